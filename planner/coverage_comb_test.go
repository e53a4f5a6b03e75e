package planner

import (
	"context"
	"math"
	"math/rand/v2"
	"runtime"
	"testing"

	"github.com/golang/geo/r2"

	"dimerpath/internal/cputime"

	"dimerpath/lattice"
	"dimerpath/lattice/design"
)

// demoCoverageInput returns what the demo's plan of variant v hands the
// coverage check: the surface, the regions and the strokes.
func demoCoverageInput(tb testing.TB, v string) (*lattice.Surface, []CoverageRegion, []Stroke, Profile) {
	tb.Helper()
	d := demo(tb)
	p, err := buildVariant(context.Background(), d, v, DefaultProfile(), Options{Seed: 7, MonteCarloRuns: 50})
	if err != nil {
		tb.Fatal(err)
	}
	lay, err := d.Lay(v)
	if err != nil {
		tb.Fatal(err)
	}
	var cr []CoverageRegion
	for _, rl := range lay.Regions {
		cr = append(cr, CoverageRegion{Name: rl.Region.Name, Sites: rl.Sites})
	}
	return lay.Surface, cr, p.Strokes, DefaultProfile()
}

// withCombs runs f with the grouping of combs on or off.
func withCombs(on bool, f func()) {
	old := combs
	combs = on
	defer func() { combs = old }()
	f()
}

// sameCoverage checks a coverage summed with combs against the same
// summed piece by piece, within the check's stated accuracy (see
// coverageRel and coverageAbs): per region, the expected missed and
// stray sites within 10⁻⁶ a site of the region (and 10⁻⁹ of themselves),
// the probability of no error within the same share of its log; the
// same sites over the limit; each stroke's expectation likewise.
func sameCoverage(t *testing.T, what string, got, want Coverage, gs, ws []Stroke) {
	t.Helper()
	near := func(a, b, n float64) bool { return math.Abs(a-b) <= 1e-6*n+1e-9*math.Abs(b) }
	all := float64(want.Sites)
	if !near(got.ExpectedMissed, want.ExpectedMissed, all) || !near(got.ExpectedStray, want.ExpectedStray, all) {
		t.Errorf("%s: expected missed %.12g, stray %.12g; piece by piece %.12g, %.12g", what,
			got.ExpectedMissed, got.ExpectedStray, want.ExpectedMissed, want.ExpectedStray)
	}
	if len(got.Regions) != len(want.Regions) {
		t.Fatalf("%s: %d regions, piece by piece %d", what, len(got.Regions), len(want.Regions))
	}
	for i, g := range got.Regions {
		w := want.Regions[i]
		n := float64(w.Sites)
		if !near(g.ExpectedMissed, w.ExpectedMissed, n) || !near(g.ExpectedStray, w.ExpectedStray, n) ||
			!near(g.Log10Probability, w.Log10Probability, n) {
			t.Errorf("%s: region %s: missed %.12g stray %.12g log10 P %.12g; piece by piece %.12g %.12g %.12g", what, g.Region,
				g.ExpectedMissed, g.ExpectedStray, g.Log10Probability, w.ExpectedMissed, w.ExpectedStray, w.Log10Probability)
		}
	}
	if got.OverLimit != want.OverLimit || got.OK != want.OK {
		t.Errorf("%s: %d sites over the limit (ok %v), piece by piece %d (%v)", what, got.OverLimit, got.OK, want.OverLimit, want.OK)
	}
	for i := range gs {
		g, w := gs[i], ws[i]
		if !near(g.ExpectedMissed, w.ExpectedMissed, float64(max(g.Sites, 1000))) || !near(g.ExpectedStray, w.ExpectedStray, float64(max(g.Sites, 1000))) {
			t.Errorf("%s: stroke %d: missed %.12g stray %.12g; piece by piece %.12g %.12g", what, i,
				g.ExpectedMissed, g.ExpectedStray, w.ExpectedMissed, w.ExpectedStray)
		}
	}
}

// TestCombsMatchPieceByPiece: an FE raster summed as combs (its lines'
// common along factor times their summed across factors) gives the
// expectation the piece-by-piece sum gives, on the demo's two variants.
func TestCombsMatchPieceByPiece(t *testing.T) {
	if testing.Short() {
		t.Skip("plans the demo twice")
	}
	demoWithAndWithout(t, withCombs, func(v string, got, want Coverage, gs, ws []Stroke) {
		sameCoverage(t, "demo "+v, got, want, gs, ws)
	})
}

// demoWithAndWithout checks each demo variant's coverage with a
// summation switch on (got, gs) and off (want, ws), and hands both to
// compare.
func demoWithAndWithout(t *testing.T, with func(on bool, f func()), compare func(v string, got, want Coverage, gs, ws []Stroke)) {
	t.Helper()
	for _, v := range []string{"gap-9", "gap-12-source"} {
		surf, cr, ss, prof := demoCoverageInput(t, v)
		var got, want Coverage
		var gs, ws []Stroke
		with(true, func() { got, gs = CheckCoverage(surf, cr, ss, prof) })
		with(false, func() { want, ws = CheckCoverage(surf, cr, ss, prof) })
		compare(v, got, want, gs, ws)
	}
}

// TestCombsMatchBruteForce: random rectangular FE rasters (lines of one
// stroke between the same ends at random pitches, turns at the ends,
// offsets and passes at random) summed with combs agree with the piece-
// by-piece sum and with the brute force, site by site over the field.
func TestCombsMatchBruteForce(t *testing.T) {
	rng := rand.New(rand.NewPCG(10, 11))
	for trial := range 6 {
		x0, y0 := 20+rng.Float64()*10, 15+rng.Float64()*10
		w, h := 10+rng.Float64()*25, 8+rng.Float64()*20
		d := testDesign(80, 70, design.Region{Name: "pad", Role: design.RolePad, Mode: design.ModeFE,
			Shapes: []design.Shape{rect(x0, y0, x0+w, y0+h)}})
		lay, cr := layRegions(t, d)
		prof := DefaultProfile()
		prof.FE.Passes = 1 + rng.IntN(2)
		pitch := prof.FEPitch() * (0.6 + 0.6*rng.Float64())
		inset := 2 + 3*rng.Float64()
		var path []r2.Point
		for k := 0; y0+inset+float64(k)*pitch <= y0+h-inset; k++ {
			y := y0 + inset + float64(k)*pitch
			a, b := x0+inset, x0+w-inset
			if k%2 == 1 {
				a, b = b, a
			}
			path = append(path, r2.Point{X: a, Y: y}, r2.Point{X: b, Y: y})
		}
		st := Stroke{Region: "pad", Mode: design.ModeFE, Kind: StrokeRaster, Path: path, Passes: prof.FE.Passes, Window: -1,
			LengthNM: pathLength(path)}
		ss := []Stroke{st}
		var got, want Coverage
		var gs, ws []Stroke
		withCombs(true, func() { got, gs = CheckCoverage(lay.Surface, cr, ss, prof) })
		withCombs(false, func() { want, ws = CheckCoverage(lay.Surface, cr, ss, prof) })
		what := "raster " + string(rune('a'+trial))
		sameCoverage(t, what, got, want, gs, ws)
		compareBrute(t, what, got, gs, bruteCoverage(lay.Surface, cr, ss, prof))
	}
}

// BenchmarkCoverageDemo times the coverage check alone on the demo's
// strokes (variant gap-9), and reports x-layout: its time over the time
// of laying the design out, measured in the same run, and the CPU time
// of one check (cputime: the wall time on the shared machine also counts
// waiting for a core).
func BenchmarkCoverageDemo(b *testing.B) {
	defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(1))
	surf, cr, ss, prof := demoCoverageInput(b, "gap-9")
	layNS := layTime(b, demo(b))
	b.ResetTimer()
	cpu := cputime.Measure(func() {
		for i := 0; i < b.N; i++ {
			CheckCoverage(surf, cr, ss, prof)
		}
	})
	b.StopTimer()
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/layNS, "x-layout")
	b.ReportMetric(float64(cpu.Nanoseconds())/float64(b.N)/1e6, "cpu-ms/op")
}

// TestCoverageDemoWithinStatedAccuracy: the demo's expectation as the
// check sums it (ranges taken at once where their bounds allow, see
// coverageRel and coverageAbs) against the exact sum (tolerance 0: every
// range whose bounds differ summed site by site), per region: a range
// taken at its middle errs by at most half its bounds' spread, so the
// expected missed and stray sites may differ by coverageRel/2 of
// themselves plus coverageAbs/2 a site, and the log of the probability
// of no error by twice that.
func TestCoverageDemoWithinStatedAccuracy(t *testing.T) {
	if testing.Short() {
		t.Skip("plans the demo and sums it site by site")
	}
	for _, v := range []string{"gap-9", "gap-12-source"} {
		surf, cr, ss, prof := demoCoverageInput(t, v)
		fast, _ := CheckCoverage(surf, cr, ss, prof)
		old := coverageTolerance
		coverageTolerance.rel, coverageTolerance.abs = 0, 0
		exact, _ := CheckCoverage(surf, cr, ss, prof)
		coverageTolerance = old
		for i, f := range fast.Regions {
			e := exact.Regions[i]
			n := float64(max(e.Sites, 10000))
			bound := func(x float64) float64 { return coverageRel/2*x + coverageAbs/2*n + 1e-9*x }
			if d := math.Abs(f.ExpectedMissed - e.ExpectedMissed); d > bound(e.ExpectedMissed) {
				t.Errorf("%s %s: expected missed %.10g, exact %.10g", v, f.Region, f.ExpectedMissed, e.ExpectedMissed)
			}
			if d := math.Abs(f.ExpectedStray - e.ExpectedStray); d > bound(e.ExpectedStray) {
				t.Errorf("%s %s: expected stray %.10g, exact %.10g", v, f.Region, f.ExpectedStray, e.ExpectedStray)
			}
			lnF, lnE := f.Log10Probability*math.Ln10, e.Log10Probability*math.Ln10
			if d := math.Abs(lnF - lnE); d > 2*bound(e.ExpectedMissed+e.ExpectedStray) {
				t.Errorf("%s %s: ln P %.10g, exact %.10g", v, f.Region, lnF, lnE)
			}
		}
		if fast.OverLimit != exact.OverLimit {
			t.Errorf("%s: %d sites over the limit, exact %d", v, fast.OverLimit, exact.OverLimit)
		}
		// The figures the check gives are close to exact in practice:
		// log them for the notes.
		t.Logf("%s: expected missed %.6f (exact %.6f), stray %.6f (exact %.6f)", v,
			fast.ExpectedMissed, exact.ExpectedMissed, fast.ExpectedStray, exact.ExpectedStray)
	}
}

// TestCombBoundsMatchScan checks combLines.bounds (the sparse tables of
// combTables) against a plain scan of the lines in range, for tables of
// 1 to 70 lines and every range, including ranges reaching past the
// table (lines there hold 0).
func TestCombBoundsMatchScan(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	for n := 1; n <= 70; n++ {
		c := &combLines{l0: 5, sum: make([]float64, n), top: make([]float64, n)}
		for i := range n {
			c.sum[i], c.top[i] = rng.Float64()*10, rng.Float64()
		}
		c.minS, c.maxS, c.maxT = combTables(c.sum, c.top)
		for l0 := 0; l0 < n+8; l0++ {
			for l1 := l0 + 1; l1 <= n+10; l1++ {
				smin, smax, tmax := math.Inf(1), math.Inf(-1), math.Inf(-1)
				for l := l0; l < l1; l++ {
					s, tp := c.at(l)
					smin, smax, tmax = min(smin, s), max(smax, s), max(tmax, tp)
				}
				gmin, gmax, gtop := c.bounds(l0, l1)
				if gmin != smin || gmax != smax || gtop != tmax {
					t.Fatalf("n %d lines [%d, %d): bounds %v %v %v, scan %v %v %v", n, l0, l1, gmin, gmax, gtop, smin, smax, tmax)
				}
			}
		}
	}
}
