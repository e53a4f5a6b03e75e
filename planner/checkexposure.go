package planner

import (
	"context"
	"fmt"

	"dimerpath/lattice/design"
)

// RuleOverclearing is the design rule that the exposure model adds to
// the design's own (design.RuleNames): no site outside every region
// clears with a probability above the profile's stray limit when each
// region is written in the mode its plan would choose. CheckExposure
// runs it on the strokes Build would write, so a design that passes it
// plans without a coverage error.
const RuleOverclearing = "over-clearing"

// CheckExposure runs the over-clearing rule on one laid-out variant with
// prof (CheckWriting): one error finding per region whose strokes clear
// sites outside every region above prof.StrayLimit, at the most likely
// such site, with the count, the mode the region is planned in and what
// to change. A profile or design the planner refuses is returned as the
// error, as Build would return it.
func CheckExposure(ctx context.Context, lay *design.Layout, prof Profile) ([]design.Finding, error) {
	cov, modes, err := CheckWriting(ctx, lay, prof)
	if err != nil {
		return nil, err
	}
	return exposureFindings(cov, modes), nil
}

// exposureFindings groups the stray sites over the limit by the region
// that reaches them, the region of the most likely site first.
func exposureFindings(cov Coverage, modes []RegionMode) []design.Finding {
	if cov.OverLimit == 0 {
		return nil
	}
	type group struct {
		n     int
		worst StraySite
	}
	byRegion := map[string]*group{}
	var order []string
	for _, s := range cov.StraySites {
		g := byRegion[s.Region]
		if g == nil {
			g = &group{worst: s}
			byRegion[s.Region] = g
			order = append(order, s.Region)
		}
		g.n++
		if s.Probability > g.worst.Probability {
			g.worst = s
		}
	}
	mode := map[string]design.Mode{}
	for _, m := range modes {
		mode[m.Region] = m.Mode
	}
	var fs []design.Finding
	for _, name := range order {
		g := byRegion[name]
		f := design.Finding{Rule: RuleOverclearing, Severity: design.SeverityError, AtNM: g.worst.At}
		var who, advice string
		if name == "" {
			who = "strokes of no known region"
			advice = "look at the regions nearest to it"
		} else {
			f.Regions = []string{name}
			m := mode[name]
			who = fmt.Sprintf("the %s strokes of %s", m.Abbrev(), name)
			if m == design.ModeFE {
				advice = "keep the region farther from other sites, or write its edge in AP (mode ap, or a hybrid)"
			} else {
				advice = "end the region on whole dimers and rows, keep the neighbouring site inside it, or lower the line dose"
			}
		}
		f.Message = fmt.Sprintf("%d site(s) outside every region clear with more than %.2g %% when %s are written (the most likely %.2g %%, here); %s",
			g.n, 100*cov.StrayLimit, who, 100*g.worst.Probability, advice)
		fs = append(fs, f)
	}
	if listed := len(cov.StraySites); cov.OverLimit > listed {
		fs = append(fs, design.Finding{Rule: RuleOverclearing, Severity: design.SeverityError,
			Message: fmt.Sprintf("%d more site(s) over the limit are not listed", cov.OverLimit-listed)})
	}
	return fs
}
