package planner

import (
	"math"
	"math/rand/v2"
	"slices"
	"strings"
	"testing"

	"github.com/golang/geo/r1"
	"github.com/golang/geo/r2"

	"dimerpath/lattice"
	"dimerpath/lattice/design"
)

// smallDesign holds an AP rectangle, an AP line of half dimers, two
// windows and an FE pad on a 120 x 80 nm field.
func smallDesign() *design.Design {
	return testDesign(120, 80,
		design.Region{Name: "island", Role: design.RoleDevice, Mode: design.ModeAP, Shapes: []design.Shape{rect(10, 10, 22, 16)}},
		design.Region{Name: "donors", Role: design.RoleDonor, Mode: design.ModeAP, Shapes: []design.Shape{
			{Kind: design.ShapeWindow, Template: "P", Points: [][2]float64{{30, 30}}},
			{Kind: design.ShapeWindow, Template: "As", Points: [][2]float64{{40, 30}}},
		}},
		design.Region{Name: "pad", Role: design.RolePad, Mode: design.ModeFE, Shapes: []design.Shape{rect(60, 20, 100, 60)}},
	)
}

func generate(t *testing.T, d *design.Design, prof Profile) ([]Stroke, []CoverageRegion, *design.Layout) {
	t.Helper()
	lay, cr := layRegions(t, d)
	g := newStrokeGen(lay.Surface, &prof)
	var ss []Stroke
	for _, rl := range lay.Regions {
		plain, win := rl.Sites.Clone(), lattice.NewSiteSet()
		for i, w := range rl.Windows {
			ss = append(ss, g.windowStrokes(rl.Region.Name, w, i)...)
			w.AddTo(win)
		}
		plain.Difference(win)
		if rl.Region.Mode == design.ModeFE {
			ss = append(ss, g.feStrokes(rl.Region.Name, plain)...)
		} else {
			ss = append(ss, g.apStrokes(rl.Region.Name, plain)...)
		}
	}
	return ss, cr, lay
}

func TestCoverageOfGeneratedStrokes(t *testing.T) {
	for _, style := range []string{WindowStyleLine, WindowStyleDwell} {
		prof := DefaultProfile()
		prof.WindowStyle = style
		ss, cr, lay := generate(t, smallDesign(), prof)
		cov := CheckCoverage(lay.Surface, cr, ss, prof)
		if !cov.OK {
			t.Errorf("window style %s: coverage %+v", style, cov)
		}
		want := 0
		for _, r := range cr {
			want += r.Sites.Count()
		}
		if cov.Sites != want {
			t.Errorf("coverage counts %d sites, regions hold %d", cov.Sites, want)
		}
	}
}

func TestCoverageMatchesBruteForce(t *testing.T) {
	// Brute force: every site's dose summed from every stroke piece. The
	// fast check must find the same uncovered sites, including after the
	// stroke set is broken.
	prof := DefaultProfile()
	ss, cr, lay := generate(t, smallDesign(), prof)
	broken := append([]Stroke(nil), ss...)
	broken = broken[1:] // drop the first AP line of the island
	for _, set := range [][]Stroke{ss, broken} {
		cov := CheckCoverage(lay.Surface, cr, set, prof)
		unc, _, _ := bruteCoverage(lay.Surface, cr, set, prof)
		if cov.Uncovered != unc {
			t.Errorf("CheckCoverage finds %d uncovered sites, brute force %d", cov.Uncovered, unc)
		}
	}
}

func TestCoverageCatchesBrokenStrokes(t *testing.T) {
	prof := DefaultProfile()
	ss, cr, lay := generate(t, smallDesign(), prof)
	// Find the island's first line and the pad's serpentine.
	line, fe := -1, -1
	for i, s := range ss {
		if s.Region == "island" && s.Kind == StrokeLine && line < 0 {
			line = i
		}
		if s.Region == "pad" && fe < 0 {
			fe = i
		}
	}
	cases := []struct {
		name           string
		edit           func([]Stroke) []Stroke
		uncov, overclr bool
	}{
		{"a line left out", func(s []Stroke) []Stroke { return append(s[:line:line], s[line+1:]...) }, true, false},
		{"a line one row off", func(s []Stroke) []Stroke {
			st := s[line]
			st.Path = []r2.Point{st.Path[0].Sub(r2.Point{Y: 0.7681}), st.Path[1].Sub(r2.Point{Y: 0.7681})}
			s[line] = st
			return s
		}, true, true},
		{"the FE fill 10 nm to the right", func(s []Stroke) []Stroke {
			st := s[fe]
			p := make([]r2.Point, len(st.Path))
			for i, q := range st.Path {
				p[i] = q.Add(r2.Point{X: 10})
			}
			st.Path = p
			s[fe] = st
			return s
		}, true, true},
		{"a dwell on a site outside every region", func(s []Stroke) []Stroke {
			return append(s, Stroke{Region: "island", Mode: design.ModeAP, Kind: StrokeDwell, Path: []r2.Point{lay.Surface.Position(siteAt(lay, 5, 5))}, Passes: 1})
		}, false, true},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			set := c.edit(append([]Stroke(nil), ss...))
			cov := CheckCoverage(lay.Surface, cr, set, prof)
			if (cov.Uncovered > 0) != c.uncov || (cov.Overcleared > 0) != c.overclr || cov.OK {
				t.Errorf("coverage %d uncovered, %d overcleared, OK %v; want uncovered %v, overcleared %v", cov.Uncovered, cov.Overcleared, cov.OK, c.uncov, c.overclr)
			}
			if len(cov.Issues) == 0 || !strings.Contains(strings.Join(cov.Issues, "\n"), "site T") {
				t.Errorf("issues do not name a site: %v", cov.Issues)
			}
		})
	}
}

func siteAt(lay *design.Layout, x, y float64) (s lattice.Site) {
	s, _, _ = lay.Surface.Snap(r2.Point{X: x, Y: y})
	return s
}

func TestCoverageDemo(t *testing.T) {
	d := demo(t)
	for _, v := range d.VariantNames() {
		p, err := buildTest(t, d, v)
		if err != nil {
			t.Fatal(err)
		}
		if !p.Coverage.OK {
			t.Errorf("variant %s: coverage %+v", v, p.Coverage)
		}
	}
}

// stepDesign has a single-height step crossing an FE pad, an FE fan
// slanted to the rows (so its serpentine turns are slanted pieces) and
// an AP rectangle, on a 160 x 100 nm field.
func stepDesign() *design.Design {
	d := testDesign(160, 100,
		design.Region{Name: "wire", Role: design.RoleDevice, Mode: design.ModeAP, Shapes: []design.Shape{rect(10, 10, 30, 14)}},
		design.Region{Name: "fan", Role: design.RoleLead, Mode: design.ModeFE, Shapes: []design.Shape{{Kind: design.ShapePolyline, Points: [][2]float64{{20, 30}, {60, 80}}, WidthNM: 14}}},
		design.Region{Name: "pad", Role: design.RolePad, Mode: design.ModeFE, Shapes: []design.Shape{rect(80, 20, 150, 80)}},
	)
	d.Terraces = []design.Terrace{
		{Name: "lower", Rows: "x"},
		{Name: "upper", Boundary: [][2]float64{{110, 0}, {160, 0}, {160, 100}, {118, 100}}, StepFrom: "lower"},
	}
	return d
}

// The fast check finds the uncovered sites the brute force (every site,
// every piece) finds, across a step and with slanted pieces, for the
// generated strokes and for strokes broken on purpose (some left out,
// some shifted by up to 6 nm); it may also count the few sites that only
// the pieces it neglects (under 1 % of the clearing dose each) would
// clear.
func TestCoverageMatchesBruteForceAcrossAStep(t *testing.T) {
	prof := DefaultProfile()
	ss, cr, lay := generate(t, stepDesign(), prof)
	if len(lay.Surface.Terraces) != 2 {
		t.Fatalf("%d terraces", len(lay.Surface.Terraces))
	}
	rng := rand.New(rand.NewPCG(5, 8))
	for trial := range 6 {
		set := make([]Stroke, 0, len(ss))
		for _, s := range ss {
			if trial > 0 && rng.IntN(6) == 0 {
				continue // left out
			}
			s.Path = append([]r2.Point(nil), s.Path...)
			if trial > 0 && rng.IntN(8) == 0 {
				off := r2.Point{X: 12 * (rng.Float64() - 0.5), Y: 12 * (rng.Float64() - 0.5)}
				for i := range s.Path {
					s.Path[i] = s.Path[i].Add(off)
				}
			}
			set = append(set, s)
		}
		cov := CheckCoverage(lay.Surface, cr, set, prof)
		unc, _, marginal := bruteCoverage(lay.Surface, cr, set, prof)
		if cov.Uncovered < unc || cov.Uncovered > unc+marginal {
			t.Errorf("trial %d: CheckCoverage finds %d uncovered sites, brute force %d (and %d marginal)", trial, cov.Uncovered, unc, marginal)
		}
		if trial == 0 && !cov.OK {
			t.Errorf("generated strokes: %+v", cov)
		}
		if trial > 0 && unc == 0 {
			t.Errorf("trial %d broke nothing: the test needs another seed", trial)
		}
	}
}

// appendRunExtents finds the same runs as SiteSet.Runs.
func TestRunExtentsMatchRuns(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 30))
	for range 40 {
		set := lattice.NewSiteSet()
		for range 1 + rng.IntN(30) {
			row, from := rng.IntN(4), rng.IntN(300)
			set.AddRun(0, row, from, from+1+rng.IntN(rng.IntN(140)+1))
		}
		for range rng.IntN(30) {
			row, from := rng.IntN(4), rng.IntN(300)
			set.RemoveRun(0, row, from, from+1+rng.IntN(8))
		}
		var want []r1.Interval
		for run := range set.Runs() {
			want = append(want, r1.Interval{Lo: float64(run.Start/2) * lattice.DimerPitch, Hi: float64((run.End()-1)/2) * lattice.DimerPitch})
		}
		var got []r1.Interval
		for row := range set.RowCount(0) {
			got = appendRunExtents(got, set.Row(0, row))
		}
		if !slices.Equal(got, want) {
			t.Fatalf("extents %v, Runs give %v", got, want)
		}
	}
}

// unionWidened gives the union that sorting all the widened spans and
// merging them gives.
func TestUnionWidenedMatchesSortAndMerge(t *testing.T) {
	rng := rand.New(rand.NewPCG(4, 40))
	sorted := func(n int) []r1.Interval {
		var sp []r1.Interval
		x := 0.0
		for range n {
			x += rng.Float64() * 3
			lo := x
			x += rng.Float64() * 2
			sp = append(sp, r1.Interval{Lo: lo, Hi: x})
		}
		return sp
	}
	for range 200 {
		var acc []r1.Interval
		var all []r1.Interval
		for range 1 + rng.IntN(6) {
			b, h := sorted(rng.IntN(12)), rng.Float64()*1.5
			for _, s := range b {
				all = append(all, r1.Interval{Lo: s.Lo - h, Hi: s.Hi + h})
			}
			acc = unionWidened(nil, acc, b, h)
		}
		want := lattice.MergeIntervals(all, 0)
		if len(acc) == 0 && len(want) == 0 {
			continue
		}
		if !slices.Equal(acc, want) {
			t.Fatalf("union %v, sort and merge %v", acc, want)
		}
	}
}

// The tables bracket Φ, the Gaussian and the band factor, within one
// step's change of the exact value.
func TestBoundTablesBracket(t *testing.T) {
	rng := rand.New(rand.NewPCG(6, 60))
	for range 20000 {
		x := 24 * (rng.Float64() - 0.5)
		if lo, hi := phiBounds(x); !(lo <= normalCDF(x) && normalCDF(x) <= hi && hi-lo < 0.004) {
			t.Fatalf("Φ(%g) = %g outside [%g, %g]", x, normalCDF(x), lo, hi)
		}
		ax := math.Abs(x) * 2
		if lo, hi := gaussBounds(ax); !(lo <= gauss(ax, 1) && gauss(ax, 1) <= hi && hi-lo < 0.006) {
			t.Fatalf("exp(-x²/2) at %g = %g outside [%g, %g]", ax, gauss(ax, 1), lo, hi)
		}
		L, sigma, s := 30*rng.Float64(), 0.2+3*rng.Float64(), 40*(rng.Float64()-0.3)
		if lo, hi := bandBounds(L, sigma, s); !(lo <= band(0, L, sigma, s) && band(0, L, sigma, s) <= hi) {
			t.Fatalf("band(0, %g, %g, %g) = %g outside [%g, %g]", L, sigma, s, band(0, L, sigma, s), lo, hi)
		}
	}
	// On a table point the bracket is the point.
	if lo, hi := phiBounds(0); lo != 0.5 || hi != 0.5 {
		t.Errorf("Φ(0) in [%g, %g]", lo, hi)
	}
}
