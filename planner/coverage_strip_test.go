package planner

import (
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"github.com/golang/geo/r2"

	"dimerpath/lattice/design"
)

// withStrips runs f with the strips on or off.
func withStrips(on bool, f func()) {
	old := strips
	strips = on
	defer func() { strips = old }()
	f()
}

// TestStripsMatchScan: the demo summed with strips (an FE raster's ends
// taken a strip at a time) gives the expectation that halving and
// scanning give, within the check's stated accuracy (sameCoverage), the
// same sites over the limit, and every AP stroke's expected missed and
// stray sites bit for bit (they set the session's repair times, and a
// strip never takes an AP stroke's sites).
func TestStripsMatchScan(t *testing.T) {
	if testing.Short() {
		t.Skip("plans the demo twice")
	}
	demoWithAndWithout(t, withStrips, func(v string, got, want Coverage, gs, ws []Stroke) {
		sameCoverage(t, "demo "+v, got, want, gs, ws)
		for i := range gs {
			if gs[i].Mode == design.ModeAP && (gs[i].ExpectedMissed != ws[i].ExpectedMissed || gs[i].ExpectedStray != ws[i].ExpectedStray) {
				t.Errorf("%s: AP stroke %d: missed %v stray %v with strips, %v %v without", v, i,
					gs[i].ExpectedMissed, gs[i].ExpectedStray, ws[i].ExpectedMissed, ws[i].ExpectedStray)
			}
		}
		if len(got.StraySites) != len(want.StraySites) {
			t.Errorf("%s: %d stray sites listed with strips, %d without", v, len(got.StraySites), len(want.StraySites))
		}
	})
}

// TestStripsMatchBruteForce: FE rasters whose lines run up to the edge
// of their pad or past it (so sites beyond the edge allowance clear above
// the stray limit: errors a strip must find site by site) and between,
// at random pitches and passes, half of them with slanted turns: with strips the check lists the same
// sites over the limit with the same probabilities as without, and
// agrees with the brute force.
func TestStripsMatchBruteForce(t *testing.T) {
	rng := rand.New(rand.NewPCG(12, 13))
	for trial := range 6 {
		x0, y0 := 20+rng.Float64()*10, 15+rng.Float64()*10
		w, h := 10+rng.Float64()*25, 8+rng.Float64()*20
		d := testDesign(80, 70, design.Region{Name: "pad", Role: design.RolePad, Mode: design.ModeFE,
			Shapes: []design.Shape{rect(x0, y0, x0+w, y0+h)}})
		lay, cr := layRegions(t, d)
		prof := DefaultProfile()
		prof.FE.Passes = 1 + rng.IntN(2)
		pitch := prof.FEPitch() * (0.6 + 0.6*rng.Float64())
		inset := -2 + 12*rng.Float64() // past the edge for some, well inside for others
		// Odd trials shift the lines' ends from line to line: slanted turns.
		shift := float64(trial%2) * 1.5 * rng.Float64()
		var path []r2.Point
		side := min(max(2, inset), h/4)
		for k := 0; y0+side+float64(k)*pitch <= y0+h-side; k++ {
			y := y0 + side + float64(k)*pitch
			a, b := x0+inset+float64(k)*shift, x0+w-inset+float64(k)*shift
			if k%2 == 1 {
				a, b = b, a
			}
			path = append(path, r2.Point{X: a, Y: y}, r2.Point{X: b, Y: y})
		}
		ss := []Stroke{{Region: "pad", Mode: design.ModeFE, Kind: StrokeRaster, Path: path, Passes: prof.FE.Passes, Window: -1,
			LengthNM: pathLength(path)}}
		var got, want Coverage
		var gs, ws []Stroke
		withStrips(true, func() { got, gs = CheckCoverage(lay.Surface, cr, ss, prof) })
		withStrips(false, func() { want, ws = CheckCoverage(lay.Surface, cr, ss, prof) })
		what := fmt.Sprintf("raster %c (inset %.2f nm, shift %.2f nm)", 'a'+trial, inset, shift)
		sameCoverage(t, what, got, want, gs, ws)
		if !slices.Equal(got.StraySites, want.StraySites) {
			t.Errorf("%s: %d stray sites listed with strips, %d without, or not the same", what, len(got.StraySites), len(want.StraySites))
		}
		compareBrute(t, what, got, gs, bruteCoverage(lay.Surface, cr, ss, prof))
		t.Logf("%s: %d sites over the limit", what, got.OverLimit)
	}
}

// TestMissLogPowerForm: the tables a strip's line takes its painted sites'
// miss and log from (missSpans, logOKSpans: missAndLog's cubics in power
// form) against math.Exp and math.Log1p, within the bounds missAndLog's
// tables state (exp relative 10⁻⁹, log absolute 1.5·10⁻⁸; TestMissAndLog
// holds missAndLog to the same), and against missAndLog itself to
// rounding (10⁻¹⁴ relative): the same cubics.
func TestMissLogPowerForm(t *testing.T) {
	// countLine's side-by-side table holds the two tables' cubics of
	// each step.
	for i, c := range missLogSpans {
		var lg [4]float64
		if j := i - logOffset; j >= 0 && j < len(logOKSpans) {
			lg = logOKSpans[j]
		}
		if [4]float64(c[:4]) != missSpans[i] || [4]float64(c[4:]) != lg {
			t.Fatalf("missLogSpans[%d] = %v, want %v and %v", i, c, missSpans[i], lg)
		}
	}
	rng := rand.New(rand.NewPCG(10, 36))
	for range 200000 {
		x := rng.Float64() * exposureSure
		if rng.IntN(4) == 0 {
			x = float64(rng.IntN(exposureSure*expSteps)) / expSteps // on a node
		}
		tt := x * expSteps
		i := int(tt)
		f := tt - float64(i)
		c := &missSpans[i]
		miss := c[0] + f*(c[1]+f*(c[2]+f*c[3]))
		if want := math.Exp(-x); math.Abs(miss-want) > 1e-9*want {
			t.Fatalf("miss at %v: %v, want %v", x, miss, want)
		}
		wantMiss, wantLog := missAndLog(x)
		if math.Abs(miss-wantMiss) > 1e-14*wantMiss {
			t.Fatalf("miss at %v: %v, missAndLog %v", x, miss, wantMiss)
		}
		// missLogPower (scan's, where no AP stroke reaches) is the same
		// cubic; its log from the log table within the table's bound of
		// log1p's, elsewhere the series or log1p of its miss.
		pm, pl := missLogPower(x)
		if pm != miss {
			t.Fatalf("missLogPower at %v: miss %v, want %v", x, pm, miss)
		}
		if j := i - logOffset; pm >= 1e-4 && j >= 0 && j < logLast {
			if want := math.Log1p(-math.Exp(-x)); math.Abs(pl-want) > 1.5e-8 {
				t.Fatalf("missLogPower at %v: log %v, want %v", x, pl, want)
			}
			if math.Abs(pl-wantLog) > 1e-14*math.Abs(wantLog) {
				t.Fatalf("missLogPower at %v: log %v, missAndLog %v", x, pl, wantLog)
			}
		} else if want := logNotMissed(x, pm); pl != want {
			t.Fatalf("missLogPower at %v: log %v, want %v (series or log1p of its miss)", x, pl, want)
		}
		if j := i - logOffset; miss >= 1e-4 && j >= 0 && j < logLast {
			c := &logOKSpans[j]
			logOK := c[0] + f*(c[1]+f*(c[2]+f*c[3]))
			if want := math.Log1p(-math.Exp(-x)); math.Abs(logOK-want) > 1.5e-8 {
				t.Fatalf("log at %v: %v, want %v", x, logOK, want)
			}
			if math.Abs(logOK-wantLog) > 1e-14*math.Abs(wantLog) {
				t.Fatalf("log at %v: %v, missAndLog %v", x, logOK, wantLog)
			}
		}
	}
}
