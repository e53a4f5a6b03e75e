package lattice

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/golang/geo/r2"
)

func TestRectCountsByHand(t *testing.T) {
	s := mustSurface(t, 100, 100)
	x := func(d float64) float64 { return d * DimerPitch }
	y := func(r float64) float64 { return r * RowSpacing }
	tests := []struct {
		name string
		rect Rect
		want int
	}{
		// Dimers 10..19 (10 dimers). Across: the sites of row r lie at
		// r·RowSpacing ± 0.177 nm, so a margin of 0.1 nm keeps only the
		// inner side of the end rows: rows 5 (side 1), 6 (both), 7 (side
		// 0) = 4 sites per dimer.
		{"margin 0.1", RectFromCorners(r2.Point{X: x(10) - 0.1, Y: y(5) - 0.1}, r2.Point{X: x(19) + 0.1, Y: y(7) + 0.1}), 10 * 4},
		// A margin of 0.2 nm holds rows 5..7 whole: 10 dimers x 3 rows x 2.
		{"margin 0.2", RectFromCorners(r2.Point{X: x(10) - 0.2, Y: y(5) - 0.2}, r2.Point{X: x(19) + 0.2, Y: y(7) + 0.2}), 60},
		// Corners given high-to-low work the same.
		{"reversed corners", RectFromCorners(r2.Point{X: x(19) + 0.2, Y: y(7) + 0.2}, r2.Point{X: x(10) - 0.2, Y: y(5) - 0.2}), 60},
		// Edges exactly on site positions include those sites.
		{"edges on sites", RectFromCorners(r2.Point{X: x(3), Y: y(2) + HOffset}, r2.Point{X: x(4), Y: y(3) - HOffset}), 2 * 2},
		// Between two rows' sites: nothing.
		{"between rows", RectFromCorners(r2.Point{X: 0, Y: y(2) + 0.2}, r2.Point{X: 50, Y: y(3) - 0.2}), 0},
		// Overhanging the field: only the field's sites (dimers 0..9 of
		// rows 0..1, the lower side of row 0 included).
		{"overhang", RectFromCorners(r2.Point{X: -20, Y: -20}, r2.Point{X: x(9) + 0.1, Y: y(1) + 0.2}), 10 * 4},
	}
	for _, tc := range tests {
		set := NewSiteSet()
		s.Paint(set, tc.rect)
		if got := set.Count(); got != tc.want {
			t.Errorf("%s: Paint(%v) Count = %d, want %d", tc.name, tc.rect, got, tc.want)
		}
	}
}

// bruteForce returns the set of existing sites whose position satisfies
// in, testing every site of the surface one by one.
func bruteForce(s *Surface, in func(r2.Point) bool) *SiteSet {
	set := NewSiteSet()
	for ti := range s.Terraces {
		for r := 0; r < s.RowCount(ti); r++ {
			for d := 0; d < s.DimerCount(ti); d++ {
				for side := 0; side < 2; side++ {
					site := Site{ti, r, d, side}
					if s.Valid(site) && in(s.Position(site)) {
						set.Add(site)
					}
				}
			}
		}
	}
	return set
}

func distToSegment(p, a, b r2.Point) float64 {
	v := b.Sub(a)
	t := 0.0
	if n2 := v.Dot(v); n2 > 0 {
		t = math.Max(0, math.Min(1, p.Sub(a).Dot(v)/n2))
	}
	return p.Sub(a.Add(v.Mul(t))).Norm()
}

// Polygons and polylines are checked against a brute-force test of every
// site, on a surface with two terraces (rows turning at the step).
func TestAreasAgainstBruteForce(t *testing.T) {
	s := twoTerraces(t)
	rng := rand.New(rand.NewPCG(7, 9))
	randPoint := func() r2.Point { return r2.Point{X: -10 + 220*rng.Float64(), Y: -10 + 120*rng.Float64()} }
	for trial := range 40 {
		// A random polygon (possibly self-intersecting: even-odd rule).
		poly := make(Polygon, 3+rng.IntN(6))
		for i := range poly {
			poly[i] = randPoint()
		}
		got := NewSiteSet()
		s.Paint(got, poly)
		want := bruteForce(s, func(p r2.Point) bool { return PolygonContains(poly, p) })
		if diff := symmetricDifference(got, want); diff > 0 {
			t.Errorf("trial %d: polygon %v: %d sites differ from brute force (of %d)", trial, poly, diff, want.Count())
		}
		// A random polyline with a width.
		line := Polyline{WidthNM: 0.5 + 10*rng.Float64()}
		for range 1 + rng.IntN(4) {
			line.Points = append(line.Points, randPoint())
		}
		got = NewSiteSet()
		s.Paint(got, line)
		want = bruteForce(s, func(p r2.Point) bool {
			pts := line.Points
			if len(pts) == 1 {
				return p.Sub(pts[0]).Norm() <= line.WidthNM/2
			}
			for i := 0; i+1 < len(pts); i++ {
				if distToSegment(p, pts[i], pts[i+1]) <= line.WidthNM/2 {
					return true
				}
			}
			return false
		})
		if diff := symmetricDifference(got, want); diff > 0 {
			t.Errorf("trial %d: polyline %v: %d sites differ from brute force (of %d)", trial, line, diff, want.Count())
		}
	}
}

func symmetricDifference(a, b *SiteSet) int {
	return a.Clone().Difference(b).Count() + b.Clone().Difference(a).Count()
}

func TestEraseAndStrided(t *testing.T) {
	s := mustSurface(t, 100, 100)
	set := NewSiteSet()
	s.Paint(set, Rect{s.Field})
	before := set.Count()
	// A horizontal line 0.1 nm thick through side 1 of row 10 only.
	y := 10*RowSpacing + HOffset
	strip := RectFromCorners(r2.Point{X: 10, Y: y - 0.05}, r2.Point{X: 20, Y: y + 0.05})
	probe := NewSiteSet()
	n := s.Paint(probe, strip)
	for site := range probe.All() {
		if site.Row != 10 || site.Side != 1 {
			t.Fatalf("strip painted %v, want only row 10 side 1", site)
		}
	}
	// Dimers with x in [10, 20]: d = 27..52 (10/0.38403 = 26.04, 20/0.38403 = 52.08).
	if n != 26 || probe.Count() != 26 {
		t.Errorf("strip: Paint = %d, Count = %d, want 26", n, probe.Count())
	}
	s.Erase(set, strip)
	if got := set.Count(); got != before-26 {
		t.Errorf("after erase Count = %d, want %d", got, before-26)
	}
	if set.Contains(Site{0, 10, 30, 1}) || !set.Contains(Site{0, 10, 30, 0}) {
		t.Errorf("erase removed the wrong side")
	}
}

func TestWindows(t *testing.T) {
	s := mustSurface(t, 100, 100)
	p := s.DimerCentre(0, 20, 40)
	for _, tc := range []struct {
		tmpl       WindowTemplate
		first, num int
	}{
		{PhosphineWindow, 39, 6}, // centred on dimer 40: dimers 39..41, 6 H sites (Ivie 2021)
		{ArsineWindow, 40, 4},    // dimers 40..41 (centre nearest: 40.5 vs 39.5 tie goes up), 4 sites (Stock 2024)
	} {
		w, ok := s.PlaceWindow(tc.tmpl, p.Add(r2.Point{X: 0.01}))
		if !ok || w.Row != 20 || w.FirstDimer != tc.first {
			t.Errorf("PlaceWindow(%s) = %v, %v; want row 20 first dimer %d", tc.tmpl.Name, w, ok, tc.first)
		}
		set := NewSiteSet()
		if n := s.AddWindow(set, w); n != tc.num || set.Count() != tc.num || tc.tmpl.Sites() != tc.num {
			t.Errorf("%s window: AddWindow = %d, Count = %d, want %d", tc.tmpl.Name, n, set.Count(), tc.num)
		}
		if !s.WindowExists(w) {
			t.Errorf("%v does not exist", w)
		}
		c := s.WindowCentre(w)
		if d := c.Sub(p).Norm(); d > DimerPitch/2+1e-9 {
			t.Errorf("%s window centre %v is %g nm from %v", tc.tmpl.Name, c, d, p)
		}
	}
	// At the field edge the window reaches beyond the lattice.
	w, _ := s.PlaceWindow(PhosphineWindow, s.DimerCentre(0, 3, 0))
	if s.WindowExists(w) || w.FirstDimer != -1 {
		t.Errorf("edge window %v: exists %v", w, s.WindowExists(w))
	}
	set := NewSiteSet()
	if n := s.AddWindow(set, w); n != 4 {
		t.Errorf("edge window adds %d sites, want 4", n)
	}
}

func TestTemplateValidate(t *testing.T) {
	for _, tmpl := range BuiltinTemplates() {
		if err := tmpl.Validate(); err != nil {
			t.Errorf("built-in %s: %v", tmpl.Name, err)
		}
	}
	// Ivie et al. 2021: one P in 63 ± 10 % of 3-dimer windows, two in
	// none. Stock et al. 2024: one As in 97 ± 2 %.
	if p := PhosphineWindow; p.P1 != 0.63 || p.P1SD != 0.10 || p.P2Plus != 0 || p.Sites() != 6 {
		t.Errorf("P template %+v", p)
	}
	if a := ArsineWindow; a.P1 != 0.97 || a.P1SD != 0.02 || a.Sites() != 4 {
		t.Errorf("As template %+v", a)
	}
	ok := WindowTemplate{Name: "x", Species: "P", Dimers: 3, P0: 0.2, P1: 0.5, P2Plus: 0.3, P1SD: 0.1}
	bad := []struct {
		name, field string
		edit        func(*WindowTemplate)
	}{
		{"no name", "name", func(t *WindowTemplate) { t.Name = "" }},
		{"no species", "species", func(t *WindowTemplate) { t.Species = "" }},
		{"no dimers", "dimers", func(t *WindowTemplate) { t.Dimers = 0 }},
		{"p1 above 1", "p1", func(t *WindowTemplate) { t.P1 = 1.5 }},
		{"p0 NaN", "p0", func(t *WindowTemplate) { t.P0 = math.NaN() }},
		{"sum not 1", "p0 + p1 + p2plus", func(t *WindowTemplate) { t.P2Plus = 0.3 + 2e-9 }},
		{"negative sd", "p1_sd", func(t *WindowTemplate) { t.P1SD = -0.01 }},
		{"sd too large for a beta", "p1_sd", func(t *WindowTemplate) { t.P1SD = 0.5 }},
		{"sd at p = 0", "p2plus_sd", func(t *WindowTemplate) { t.P0, t.P2Plus, t.P2PlusSD = 0.5, 0, 0.01 }},
		{"both spellings", "probability", func(t *WindowTemplate) { t.Probability = 0.5 }},
	}
	for _, c := range bad {
		t.Run(c.name, func(t *testing.T) {
			tmpl := ok
			c.edit(&tmpl)
			ps := tmpl.Problems()
			if len(ps) != 1 || ps[0].Field != c.field {
				t.Errorf("Problems(%+v) = %v, want one problem with %s", tmpl, ps, c.field)
			}
		})
	}
	if ps := ok.Problems(); len(ps) != 0 {
		t.Errorf("Problems(%+v) = %v, want none", ok, ps)
	}
	// Version 1: probability alone is p1, the rest empty windows.
	v1 := WindowTemplate{Name: "x", Species: "P", Dimers: 3, Probability: 0.4}.Normalized()
	if v1.P1 != 0.4 || v1.P0 != 0.6 || v1.P2Plus != 0 || v1.Probability != 0 || len(v1.Problems()) != 0 {
		t.Errorf("Normalized version 1 template %+v", v1)
	}
}

func TestRunCells(t *testing.T) {
	s := twoTerraces(t)
	rng := rand.New(rand.NewPCG(11, 12))
	for range 300 {
		ti := rng.IntN(2)
		start := rng.IntN(40)
		run := Run{Terrace: ti, Row: 20 + rng.IntN(5), Start: start, Len: 1 + rng.IntN(9)}
		cells := s.RunCells(nil, run)
		// Every site's own cell lies in the union, and the union's area is
		// the sum of the sites' cells (DimerPitch · RowSpacing/2 each).
		area := 0.0
		for _, c := range cells {
			sz := c.Size()
			area += sz.X * sz.Y
		}
		want := float64(run.Len) * DimerPitch * RowSpacing / 2
		if math.Abs(area-want) > 1e-9 {
			t.Fatalf("RunCells(%v) area %g, want %g (%v)", run, area, want, cells)
		}
		for i := run.Start; i < run.End(); i++ {
			site := SiteAt(ti, run.Row, i)
			sc := s.SiteCell(site)
			if !sc.ContainsPoint(s.Position(site)) {
				t.Fatalf("SiteCell(%v) = %v does not hold its site %v", site, sc, s.Position(site))
			}
			in := false
			for _, c := range cells {
				in = in || c.ExpandedByMargin(1e-9).Contains(sc)
			}
			if !in {
				t.Fatalf("cell of %v not in RunCells(%v)", site, run)
			}
		}
	}
}

func pt(x, y float64) r2.Point { return r2.Point{X: x, Y: y} }
