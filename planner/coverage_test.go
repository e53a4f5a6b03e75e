package planner

import (
	"fmt"
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
		cov, _ := CheckCoverage(lay.Surface, cr, ss, prof)
		if !cov.OK || cov.OverLimit != 0 {
			t.Errorf("window style %s: coverage %+v", style, cov)
		}
		want := 0
		for _, r := range cr {
			want += r.Sites.Count()
		}
		if cov.Sites != want {
			t.Errorf("coverage counts %d sites, regions hold %d", cov.Sites, want)
		}
		// The AP island: 99.9 % per site on its rows, a little less at
		// the line ends.
		for _, rc := range cov.Regions {
			if rc.Region == "island" && (rc.ExpectedMissed > 0.01*float64(rc.Sites) || rc.ExpectedMissed <= 0) {
				t.Errorf("island: %.3g of %d sites expected missed", rc.ExpectedMissed, rc.Sites)
			}
		}
	}
}

// compareBrute checks the fast check against the brute force: missed
// within 1 % (and 10⁻³ site), stray within 2 % (and the 0.05 site the
// neglected tails may add), the same sites over the limit.
func compareBrute(t *testing.T, what string, cov Coverage, strokes []Stroke, br bruteResult) {
	t.Helper()
	spurious := 0.0
	for _, rc := range cov.Regions {
		spurious += rc.ExpectedSpurious
	}
	stray := cov.ExpectedStray - spurious
	if math.Abs(cov.ExpectedMissed-br.missed) > 0.01*br.missed+1e-3 {
		t.Errorf("%s: expected missed %.6g, brute force %.6g", what, cov.ExpectedMissed, br.missed)
	}
	if math.Abs(stray-br.stray) > 0.02*br.stray+0.05 {
		t.Errorf("%s: expected stray %.6g, brute force %.6g", what, stray, br.stray)
	}
	// The same sites over the limit, but for those within 0.1 % of it,
	// where the tails the check leaves out (below exposureNeglect a
	// piece) may tip the balance.
	listed := map[lattice.Site]float64{}
	for _, ss := range cov.StraySites {
		listed[ss.Site] = ss.Probability
	}
	limit := DefaultProfile().StrayLimit
	for site, p := range br.overSites {
		if q, ok := listed[site]; (!ok && p > limit*1.001) || (ok && math.Abs(p-q) > 1e-6) {
			t.Errorf("%s: site %v clears with %.6g by brute force, the check lists %v (%.6g)", what, site, p, ok, q)
		}
	}
	for site, q := range listed {
		if _, ok := br.overSites[site]; !ok && q > limit*1.001 {
			t.Errorf("%s: the check lists site %v at %.6g, brute force does not", what, site, q)
		}
	}
	if math.Abs(float64(cov.OverLimit-br.overLimit)) > 0.05*float64(br.overLimit)+1 {
		t.Errorf("%s: %d sites over the limit, brute force %d", what, cov.OverLimit, br.overLimit)
	}
	// Every expected site is some stroke's.
	var sm, sst float64
	for _, s := range strokes {
		sm += s.ExpectedMissed
		sst += s.ExpectedStray
	}
	if math.Abs(sst-cov.ExpectedStray) > 1e-6*(1+cov.ExpectedStray) || sm > cov.ExpectedMissed*(1+1e-9)+1e-9 {
		t.Errorf("%s: strokes' missed %v (coverage %v), stray %v (coverage %v)", what, sm, cov.ExpectedMissed, sst, cov.ExpectedStray)
	}
}

func TestCoverageMatchesBruteForce(t *testing.T) {
	// Brute force: every site's exposure summed from every stroke piece.
	// The fast check must find the same expectation, including after the
	// stroke set is broken.
	for _, style := range []string{WindowStyleLine, WindowStyleDwell} {
		prof := DefaultProfile()
		prof.WindowStyle = style
		ss, cr, lay := generate(t, smallDesign(), prof)
		broken := append([]Stroke(nil), ss...)
		broken = broken[1:] // drop the first stroke
		shifted := append([]Stroke(nil), ss...)
		for i := range shifted {
			if shifted[i].Kind == StrokeLine && i%3 == 0 {
				shifted[i].Path = []r2.Point{shifted[i].Path[0].Add(r2.Point{Y: 0.5}), shifted[i].Path[1].Add(r2.Point{Y: 0.5})}
			}
		}
		for name, set := range map[string][]Stroke{"generated": ss, "broken": broken, "shifted": shifted} {
			cov, strokes := CheckCoverage(lay.Surface, cr, set, prof)
			compareBrute(t, style+", "+name, cov, strokes, bruteCoverage(lay.Surface, cr, set, prof))
		}
	}
}

func TestCoverageCatchesBrokenStrokes(t *testing.T) {
	prof := DefaultProfile()
	ss, cr, lay := generate(t, smallDesign(), prof)
	good, _ := CheckCoverage(lay.Surface, cr, ss, prof)
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
		name         string
		edit         func([]Stroke) []Stroke
		missed, over bool
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
			cov, _ := CheckCoverage(lay.Surface, cr, set, prof)
			if more := cov.ExpectedMissed > good.ExpectedMissed+10; more != c.missed || (cov.OverLimit > 0) != c.over || cov.OK == c.over {
				t.Errorf("coverage missed %.3g (good %.3g), %d over the limit, OK %v; want more missed %v, over %v", cov.ExpectedMissed, good.ExpectedMissed, cov.OverLimit, cov.OK, c.missed, c.over)
			}
			if c.over && (len(cov.Issues) == 0 || !strings.Contains(strings.Join(cov.Issues, "\n"), "outside every region, clears with") || len(cov.StraySites) != cov.OverLimit) {
				t.Errorf("issues do not name the sites: %v (%d listed of %d)", cov.Issues, len(cov.StraySites), cov.OverLimit)
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

// TestPassesAddExposure: Schmucker et al. (2012) wrote a 20 x 13-atom box
// in 5 passes. In the exposure model passes add: 5 passes of a fifth of
// the dose give the same expectation as one pass of the whole dose, and
// a box of 10 dimers by 7 rows is written without a stray site.
func TestPassesAddExposure(t *testing.T) {
	d := testDesign(40, 30, design.Region{Name: "box", Role: design.RoleDevice, Mode: design.ModeAP,
		Shapes: []design.Shape{{Kind: design.ShapeRect, Points: [][2]float64{{20.5 * lattice.DimerPitch, 15.5 * lattice.RowSpacing}, {30.5 * lattice.DimerPitch, 22.5 * lattice.RowSpacing}}}}})
	one := DefaultProfile()
	five := one
	five.AP.Passes, five.AP.LineDoseCPerCm = 5, one.AP.LineDoseCPerCm/5
	var covs []Coverage
	for _, prof := range []Profile{one, five} {
		ss, cr, lay := generate(t, d, prof)
		if cr[0].Sites.Count() != 140 {
			t.Fatalf("box of %d sites, want 10 dimers x 7 rows = 140", cr[0].Sites.Count())
		}
		cov, _ := CheckCoverage(lay.Surface, cr, ss, prof)
		if !cov.OK {
			t.Errorf("%d passes: %+v", prof.AP.Passes, cov)
		}
		covs = append(covs, cov)
	}
	if a, b := covs[0].ExpectedMissed, covs[1].ExpectedMissed; math.Abs(a-b) > 1e-9*a {
		t.Errorf("expected missed: one pass %v, five passes of a fifth %v", a, b)
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
		{Name: "upper", Boundary: [][2]float64{{110, 0}, {160, 0}, {160, 100}, {118, 100}}, StepFrom: "lower", Step: "up"},
	}
	return d
}

// The fast check finds the expectation the brute force (every site,
// every piece) finds, across a step and with slanted pieces, for the
// generated strokes and for strokes broken on purpose (some left out,
// some shifted by up to 6 nm).
func TestCoverageMatchesBruteForceAcrossAStep(t *testing.T) {
	prof := DefaultProfile()
	ss, cr, lay := generate(t, stepDesign(), prof)
	if len(lay.Surface.Terraces) != 2 {
		t.Fatalf("%d terraces", len(lay.Surface.Terraces))
	}
	rng := rand.New(rand.NewPCG(5, 8))
	for trial := range 4 {
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
		cov, strokes := CheckCoverage(lay.Surface, cr, set, prof)
		br := bruteCoverage(lay.Surface, cr, set, prof)
		compareBrute(t, fmt.Sprintf("trial %d", trial), cov, strokes, br)
		if trial == 0 && !cov.OK {
			t.Errorf("generated strokes: %+v", cov)
		}
	}
}

// appendSideExtents finds the extents of each side's sites that SiteSet.Runs
// gives, site by site.
func TestSideExtentsMatchRuns(t *testing.T) {
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
		for side := range 2 {
			var want []r1.Interval
			for run := range set.Runs() {
				first, last := -1, -1
				for i := run.Start; i < run.End(); i++ {
					if i%2 == side {
						if first < 0 {
							first = i
						}
						last = i
					}
				}
				if first >= 0 {
					want = append(want, r1.Interval{Lo: float64(first/2) * lattice.DimerPitch, Hi: float64(last/2) * lattice.DimerPitch})
				}
			}
			var got []r1.Interval
			for row := range set.RowCount(0) {
				got = appendSideExtents(got, set.Row(0, row), side)
			}
			if !slices.Equal(got, want) {
				t.Fatalf("side %d: extents %v, Runs give %v", side, got, want)
			}
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
		if lo, hi := gaussBounds(ax); !(lo <= math.Exp(-ax*ax/2) && math.Exp(-ax*ax/2) <= hi && hi-lo < 0.006) {
			t.Fatalf("exp(-x²/2) at %g = %g outside [%g, %g]", ax, math.Exp(-ax*ax/2), lo, hi)
		}
		L, sigma, s := 30*rng.Float64(), 0.2+3*rng.Float64(), 40*(rng.Float64()-0.3)
		// band uses fastPhi, within 10⁻¹⁰ of Φ.
		if lo, hi := bandBounds(L, sigma, s); !(lo-1e-10 <= band(0, L, sigma, s) && band(0, L, sigma, s) <= hi+1e-10) {
			t.Fatalf("band(0, %g, %g, %g) = %g outside [%g, %g]", L, sigma, s, band(0, L, sigma, s), lo, hi)
		}
	}
	// On a table point the bracket is the point.
	if lo, hi := phiBounds(0); lo != 0.5 || hi != 0.5 {
		t.Errorf("Φ(0) in [%g, %g]", lo, hi)
	}
}

// fastPhi agrees with Φ from math.Erfc to 10⁻¹⁰.
func TestFastPhi(t *testing.T) {
	rng := rand.New(rand.NewPCG(8, 80))
	for range 100000 {
		x := 20 * (rng.Float64() - 0.5)
		if got, want := fastPhi(x), normalCDF(x); math.Abs(got-want) > 1e-10 {
			t.Fatalf("fastPhi(%v) = %v, Φ = %v", x, got, want)
		}
	}
}

// gauss agrees with math.Exp to 10⁻⁹.
func TestFastGauss(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 90))
	for range 100000 {
		d, sigma := 30*(rng.Float64()-0.5), 0.05+3*rng.Float64()
		if got, want := gauss(d, sigma), math.Exp(-d*d/(2*sigma*sigma)); math.Abs(got-want) > 1e-9 {
			t.Fatalf("gauss(%v, %v) = %v, exp gives %v", d, sigma, got, want)
		}
	}
}

// expNeg agrees with math.Exp to a relative 10⁻⁹.
func TestExpNeg(t *testing.T) {
	rng := rand.New(rand.NewPCG(10, 100))
	for range 100000 {
		x := 40 * rng.Float64()
		if got, want := expNeg(x), math.Exp(-x); math.Abs(got-want) > 1e-9*want {
			t.Fatalf("expNeg(%v) = %v, math.Exp gives %v", x, got, want)
		}
	}
}

// allowedSpans (of each run of lines with equal extents only the line
// nearest the asked one merged) and allowedCached give, on every
// site line, the union of every region line's extents within dist,
// each widened by what the across distance leaves: all of them sorted
// and merged (lattice.MergeIntervals), the definition in allowedSpans'
// comment. Regions: rectangles (every line the same extent, the case
// the skip serves), a rectangle with notches, random runs, and one
// side's sites only.
func TestAllowedSpansMatchBruteForce(t *testing.T) {
	surf, err := lattice.NewSurface(200, 200)
	if err != nil {
		t.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(8, 80))
	prof := DefaultProfile()
	for trial := range 16 {
		set := lattice.NewSiteSet()
		rowLo, rowHi := 20+rng.IntN(40), 80+rng.IntN(60)
		from, to := 2*rng.IntN(100), 2*(150+rng.IntN(200))
		for r := rowLo; r < rowHi; r++ {
			switch {
			case trial%4 == 3:
				// One side only: the asked line's neighbours on either
				// side lie at different across distances.
				for d := from / 2; d < to/2; d++ {
					set.Add(lattice.Site{Terrace: 0, Row: r, Dimer: d, Side: 1})
				}
			case trial%4 == 0:
				set.AddRun(0, r, from, to)
			case trial%4 == 1:
				set.AddRun(0, r, from, to)
				if rng.IntN(4) == 0 {
					set.RemoveRun(0, r, from+rng.IntN(40), from+40+rng.IntN(40))
				}
			default:
				for range rng.IntN(4) {
					a := rng.IntN(500)
					set.AddRun(0, r, a, a+1+rng.IntN(30))
				}
			}
		}
		ck := newCoverageCheck(surf, []CoverageRegion{{Name: "r", Sites: set}}, nil, &prof)
		ck.rows = make([]regionExtents, 1)
		ck.allowed = make([]rowSpans, 1)
		dist := 0.5 + 8*rng.Float64()
		var lines [][]r1.Interval
		for r := range set.RowCount(0) {
			for side := range 2 {
				lines = append(lines, appendSideExtents(nil, set.Row(0, r), side))
			}
		}
		for l := 0; l < 2*surf.RowCount(0); l++ {
			var all []r1.Interval
			for ll, ext := range lines {
				dy := math.Abs(lineY(ll) - lineY(l))
				if dy > dist {
					continue
				}
				h := math.Sqrt(dist*dist - dy*dy)
				for _, s := range ext {
					all = append(all, r1.Interval{Lo: s.Lo - h, Hi: s.Hi + h})
				}
			}
			want := lattice.MergeIntervals(all, 0)
			got := slices.Clone(ck.allowedSpans(0, 0, l, dist))
			cached := ck.allowedCached(0, 0, l, dist)
			if len(want) == 0 && len(got) == 0 && len(cached) == 0 {
				continue
			}
			if !slices.Equal(got, want) || !slices.Equal(cached, want) {
				t.Fatalf("trial %d line %d (dist %g): allowedSpans %v, allowedCached %v, brute force %v", trial, l, dist, got, cached, want)
			}
		}
	}
}
