package editor

import (
	"context"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
	"time"

	"github.com/golang/geo/r2"

	"dimerpath/export"
	"dimerpath/internal/atomicfile"
	"dimerpath/lattice/design"
	"dimerpath/planner"
)

// Jobs is the background work the editor's window runs, each on a copy
// of the design. The window calls these fields rather than the
// functions, so a test can put in a job that panics or blocks.
type Jobs struct {
	Check            func(ctx context.Context, d *design.Design, variant string, prof planner.Profile) (CheckResult, error)
	Plan             func(ctx context.Context, d *design.Design, variant string, prof planner.Profile, opt planner.Options) (*planner.Plan, error)
	Export           func(ctx context.Context, path string, d *design.Design, p *planner.Plan, es ExportSettings, progress func(string, float64)) error
	ExportComparison func(ctx context.Context, path string, res []export.VariantResult, es ExportSettings) error
	// Sweep plans one variant for each value of a parameter
	// (planner.PlanSweep); ExportSweep writes its report.
	Sweep       func(ctx context.Context, d *design.Design, variant string, prof planner.Profile, param string, values []string, opt planner.SweepOptions) (*planner.Sweep, error)
	ExportSweep func(ctx context.Context, path string, sw *planner.Sweep, es ExportSettings) error
	// SaveRecovery writes the autosaved recovery copy of the design.
	SaveRecovery func(path string, d *design.Design) error
}

// DefaultJobs returns the real work: CheckDesign, BuildPlan, ExportPlan,
// ExportComparison, planner.PlanSweep, ExportSweep and SaveDesign.
func DefaultJobs() Jobs {
	return Jobs{Check: CheckDesign, Plan: BuildPlan, Export: ExportPlan, ExportComparison: ExportComparison,
		Sweep: planner.PlanSweep, ExportSweep: ExportSweep, SaveRecovery: SaveDesign}
}

// Finding is a design-rule finding as the GUI lists and draws it.
type Finding struct {
	Rule    string
	Error   bool // an error rather than a warning
	Message string
	Regions []string
	At      r2.Point // the position the finding names, field nm
}

// CheckResult is what a design-rule check of one variant finds: the
// findings, and the measured width of each declared tunnel gap, keyed
// by its two region names in the order declared.
type CheckResult struct {
	Findings  []Finding
	GapWidths map[[2]string]GapMeasure
}

// GapMeasure is a tunnel gap's width as the check measured it: NM, and
// Text, the width in nm with its count of dimer rows or dimers by the
// gap's direction ("6.91 nm (9.0 dimer rows across the rows)", from
// lattice.Surface.GapText).
type GapMeasure struct {
	NM   float64
	Text string
}

// CheckDesign runs the design-rule checks on one variant of d, with the
// over-clearing rule of the exposure model for prof
// (planner.CheckExposure: the plan's own coverage test, so a variant
// that passes plans without a coverage error), and measures its tunnel
// gaps. The error is for a variant that cannot be laid out at all; one
// the planner refuses with prof is an over-clearing finding saying why.
func CheckDesign(ctx context.Context, d *design.Design, variant string, prof planner.Profile) (CheckResult, error) {
	var res CheckResult
	l, err := d.Lay(variant)
	if err != nil {
		return res, err
	}
	fs := l.Check()
	if err := ctx.Err(); err != nil {
		return res, err
	}
	over, err := planner.CheckExposure(ctx, l, prof)
	if err != nil {
		if ctx.Err() != nil {
			return res, ctx.Err()
		}
		if errors.Is(err, planner.ErrInternal) {
			return res, err
		}
		over = []design.Finding{{Rule: planner.RuleOverclearing, Severity: design.SeverityError,
			Message: "cannot be planned with this profile: " + err.Error()}}
	}
	fs = append(fs, over...)
	res.Findings = make([]Finding, len(fs))
	for i, f := range fs {
		res.Findings[i] = Finding{Rule: f.Rule, Error: f.Severity == design.SeverityError, Message: f.Message, Regions: f.Regions, At: f.AtNM}
	}
	if len(l.Variant.TunnelGaps) == 0 {
		return res, nil
	}
	res.GapWidths = map[[2]string]GapMeasure{}
	for _, g := range l.Variant.TunnelGaps {
		if a, b := l.Region(g.A), l.Region(g.B); a != nil && b != nil {
			gap := l.Gap(a, b)
			res.GapWidths[[2]string{g.A, g.B}] = GapMeasure{NM: gap.NM, Text: l.Surface.GapText(gap)}
		}
	}
	return res, ctx.Err()
}

// BuildPlan lays out one variant of d and plans it.
func BuildPlan(ctx context.Context, d *design.Design, variant string, prof planner.Profile, opt planner.Options) (*planner.Plan, error) {
	lay, err := d.Lay(variant)
	if err != nil {
		return nil, err
	}
	return planner.Build(ctx, lay, prof, opt)
}

// ExportSettings are the choices an export needs besides the plan.
type ExportSettings struct {
	Paper     export.Paper
	Generator string // program name and version printed on reports
	Date      time.Time
}

// ExportPlan writes plan p of d in the format path's extension names
// (pdf, svg, json or csv), through a temporary file renamed into place.
// The figures draw the lattice and regions of the plan's variant.
func ExportPlan(ctx context.Context, path string, d *design.Design, p *planner.Plan, es ExportSettings, progress func(string, float64)) error {
	opt := export.Options{Paper: es.Paper, Date: es.Date, Generator: es.Generator, Progress: progress}
	if l, err := d.Lay(p.Variant); err == nil {
		opt.Pattern = export.PatternOf(l)
	}
	return export.WriteFile(ctx, path, p, opt)
}

// ExportComparison writes the comparison report of every variant's
// result to path (.pdf or .svg).
func ExportComparison(ctx context.Context, path string, res []export.VariantResult, es ExportSettings) error {
	opt := export.Options{Paper: es.Paper, Date: es.Date, Generator: es.Generator}
	return atomicfile.Write(path, 0o644, func(w io.Writer) error {
		if strings.HasSuffix(strings.ToLower(path), ".svg") {
			return export.WriteComparisonSVG(w, res, opt)
		}
		return export.WriteComparisonPDF(ctx, w, res, opt)
	})
}

// ExportSweep writes the report of a sweep to path (.pdf or .svg).
func ExportSweep(ctx context.Context, path string, sw *planner.Sweep, es ExportSettings) error {
	return export.WriteSweepFile(ctx, path, sw, export.Options{Paper: es.Paper, Date: es.Date, Generator: es.Generator})
}

// SweepParameters lists what a sweep of the variant can vary with prof
// (planner.SweepParameters).
func SweepParameters(d *design.Design, variant string, prof planner.Profile) []planner.SweepParameter {
	return planner.SweepParameters(d, variant, prof)
}

// CheckSweep checks a sweep without planning it (planner.CheckSweep): a
// *planner.SweepError lists every refused value.
func CheckSweep(d *design.Design, variant string, prof planner.Profile, param string, values []string) error {
	_, err := planner.CheckSweep(d, variant, prof, param, values)
	return err
}

// SuggestSweepValues returns values to start a sweep of p from, as the
// sweep form shows them, leaving out any the sweep would refuse: a
// profile number at half, once, twice and four times its present value
// (a whole number at once to four times); an array at about a tenth, a
// third and the whole of its present size (at least 1 x 1). It returns
// "" when nothing fits (a parameter at 0).
func SuggestSweepValues(d *design.Design, variant string, prof planner.Profile, p planner.SweepParameter) string {
	var vals []string
	seen := map[string]bool{}
	try := func(v string) {
		if !seen[v] && CheckSweep(d, variant, prof, p.Name, []string{v}) == nil {
			vals = append(vals, v)
		}
		seen[v] = true
	}
	if p.Array != nil {
		for _, f := range []float64{0.1, 0.3, 1} {
			try(fmt.Sprintf("%dx%d", max(1, int(math.Round(float64(p.Array.Cols)*f))), max(1, int(math.Round(float64(p.Array.Rows)*f)))))
		}
		return strings.Join(vals, ",")
	}
	x, err := strconv.ParseFloat(p.Current, 64)
	if err != nil || x == 0 {
		return ""
	}
	factors := []float64{0.5, 1, 2, 4}
	if p.Whole {
		factors = []float64{1, 2, 3, 4}
	}
	for _, f := range factors {
		try(strconv.FormatFloat(x*f, 'g', 6, 64))
	}
	return strings.Join(vals, ",")
}

// VariantDifferences lays out every variant of d and says how each one
// after the first differs from the first (design.Differences), keyed by
// variant name; a variant that cannot be laid out is left out. The first
// variant's layout is kept while the others are laid out one at a time.
func VariantDifferences(ctx context.Context, d *design.Design) (map[string][]design.Difference, error) {
	names := d.VariantNames()
	out := map[string][]design.Difference{}
	if len(names) < 2 {
		return out, nil
	}
	first, err := d.Lay(names[0])
	if err != nil {
		return out, nil
	}
	for _, n := range names[1:] {
		if err := ctx.Err(); err != nil {
			return out, err
		}
		if l, err := d.Lay(n); err == nil {
			out[n] = design.Differences(first, l)
		}
	}
	return out, nil
}
