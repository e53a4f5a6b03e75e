package planner

import (
	"errors"
	"fmt"
	"math"

	"dimerpath/internal/jsonfile"
	"dimerpath/lattice"
	"dimerpath/lattice/design"
)

// Limits on the work one plan may hold. The planner counts what the
// profile and the design would make it produce (runs of sites, raster
// lines, strokes, pieces of a split stroke, actions) before it allocates
// them, and refuses a plan beyond a limit with a *CountError naming the
// fields that drive the count: a profile that passes validation in
// every field can still combine into absurd work, and that must be a
// message, not a machine out of memory. The limits sit above the
// largest plans dimerpath is meant for (donor arrays of 4·10^6 windows,
// one stroke and one run of sites each: issue 14).
const (
	// MaxRuns bounds the runs of consecutive sites of all regions of a
	// variant together (each becomes a segment the planner keeps).
	MaxRuns = 4_000_000
	// MaxStrokes bounds the strokes of a plan, after splitting: as many
	// as MaxRuns, since each run of sites is written by one or more.
	MaxStrokes = 4_000_000
	// MaxPieces bounds the pieces one stroke is cut into at
	// registrations.
	MaxPieces = 10_000
	// MaxRasterLines bounds the FE raster lines across the field.
	MaxRasterLines = 1_000_000
	// MaxActions bounds the steps of a plan's timeline.
	MaxActions = 10_000_000
)

// ErrTooMuchWork is wrapped by every *CountError.
var ErrTooMuchWork = errors.New("the plan would be too large")

// CountError reports a count of work beyond its limit, before the work
// was made.
type CountError struct {
	// What is counted ("FE raster lines across the 2000 nm field").
	What string
	// Count is what the plan would have produced (it may be huge or
	// infinite: the count is made in floating point).
	Count float64
	Max   int
	// Cause names the fields that drive the count, with their values.
	Cause string
}

func (e *CountError) Error() string {
	count := "without end"
	if !math.IsInf(e.Count, 0) && !math.IsNaN(e.Count) {
		count = fmt.Sprintf("%.3g", e.Count)
	}
	return fmt.Sprintf("refused: %s would number %s, more than the limit of %d (%s): %s", e.What, count, e.Max, ErrTooMuchWork, e.Cause)
}

func (e *CountError) Unwrap() error { return ErrTooMuchWork }

// checkRaster bounds the FE raster: lines at the raster pitch across the
// field's diagonal, the most any FE region could need.
func (b *builder) checkRaster() error {
	fe := b.prof.FE
	extent := math.Hypot(b.d.Field.WidthNM, b.d.Field.HeightNM)
	pitch := b.prof.FEPitch()
	if n := extent / pitch; !(n <= MaxRasterLines) {
		return &CountError{What: fmt.Sprintf("FE raster lines across the %s nm field", jsonfile.Number(math.Round(extent))), Count: n, Max: MaxRasterLines,
			Cause: fmt.Sprintf("fe.sigma_nm = %s and fe.fill_completion = %s at line_dose_c_per_cm = %s give a raster pitch of %s nm",
				jsonfile.Number(fe.SigmaNM), jsonfile.Number(fe.FillCompletion), jsonfile.Number(fe.LineDoseCPerCm), jsonfile.Approx(pitch))}
	}
	return nil
}

// checkRuns bounds the runs of sites of every region together, counted
// from the sets' words without making the runs. The error reports the
// limit crossed by one, where counting stops, with the region that
// crossed it.
func checkRuns(regions []string, sets []*lattice.SiteSet) error {
	total := 0
	for i, set := range sets {
		if total += set.RunCount(); total > MaxRuns {
			return &CountError{What: "runs of consecutive sites in the variant's regions", Count: float64(MaxRuns + 1), Max: MaxRuns,
				Cause: fmt.Sprintf("counting stopped in region %q; paint whole rows rather than scattered sites, or split the design", regions[i])}
		}
	}
	return nil
}

// checkStrokes bounds the strokes made so far.
func checkStrokes(n float64, cause string) error {
	if !(n <= MaxStrokes) {
		return &CountError{What: "strokes", Count: n, Max: MaxStrokes, Cause: cause}
	}
	return nil
}

// speedCause names the fields that set a mode's writing speed.
func speedCause(mode design.Mode, m ModeProfile) string {
	return fmt.Sprintf("%s.current_a = %s A over %s.line_dose_c_per_cm = %s C/cm writes at %s nm/s",
		mode, jsonfile.Number(m.CurrentA), mode, jsonfile.Number(m.LineDoseCPerCm), jsonfile.Approx(m.Speed()))
}

// modeOf returns the profile of write mode m.
func (p *Profile) modeOf(m design.Mode) ModeProfile {
	if m == design.ModeFE {
		return p.FE
	}
	return p.AP
}
