package lattice

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/golang/geo/r2"
)

func signedArea(p []r2.Point) float64 {
	a := 0.0
	for i := range p {
		q := p[(i+1)%len(p)]
		a += p[i].X*q.Y - q.X*p[i].Y
	}
	return a / 2
}

// evenOdd reports whether p lies inside an odd number of the rings.
func evenOdd(rings [][]r2.Point, p r2.Point) bool {
	in := false
	for _, r := range rings {
		if PolygonContains(r, p) {
			in = !in
		}
	}
	return in
}

// checkOutline compares the outline of set on every terrace with a
// brute-force test of every site cell of the terrace near the set: a
// cell's centre lies inside the outline (holes counted by the even-odd
// rule, and again inside the keyholed rings) exactly when its site is in
// the set; areas add up to the cells'; outer rings run counter-clockwise
// and holes clockwise; every edge is parallel to an axis.
func checkOutline(t *testing.T, s *Surface, set *SiteSet) {
	t.Helper()
	cellArea := DimerPitch * RowSpacing / 2
	for ti := range s.Terraces {
		polys := s.Outline(set, ti)
		var rings, keyholed [][]r2.Point
		area, keyArea := 0.0, 0.0
		for _, p := range polys {
			rings = append(rings, p.Outer)
			if a := signedArea(p.Outer); a <= 0 {
				t.Errorf("terrace %d: outer ring has signed area %g, want > 0", ti, a)
			}
			area += signedArea(p.Outer)
			for _, h := range p.Holes {
				rings = append(rings, h)
				if a := signedArea(h); a >= 0 {
					t.Errorf("terrace %d: hole has signed area %g, want < 0", ti, a)
				}
				area += signedArea(h)
			}
			k := p.Keyholed()
			keyholed = append(keyholed, k)
			keyArea += signedArea(k)
			for _, r := range append([][]r2.Point{p.Outer, k}, p.Holes...) {
				for i := range r {
					a, b := r[i], r[(i+1)%len(r)]
					if a.X != b.X && a.Y != b.Y {
						t.Fatalf("terrace %d: edge %v -> %v is not parallel to an axis", ti, a, b)
					}
				}
			}
		}
		n := 0
		lo, hi := math.MaxInt, -1
		rlo, rhi := math.MaxInt, -1
		for site := range set.All() {
			if site.Terrace != ti {
				continue
			}
			n++
			lo, hi = min(lo, site.Dimer), max(hi, site.Dimer)
			rlo, rhi = min(rlo, site.Row), max(rhi, site.Row)
		}
		if want := float64(n) * cellArea; math.Abs(area-want) > 1e-6*math.Max(1, want) || math.Abs(keyArea-want) > 1e-6*math.Max(1, want) {
			t.Errorf("terrace %d: outline area %g, keyholed %g, want %d cells = %g", ti, area, keyArea, n, want)
		}
		for r := rlo - 2; r <= rhi+2; r++ {
			for d := lo - 2; d <= hi+2; d++ {
				for side := range 2 {
					site := Site{ti, r, d, side}
					if r < 0 || d < 0 {
						continue
					}
					c := s.SiteCell(site).Center()
					want := set.Contains(site)
					if got := evenOdd(rings, c); got != want {
						t.Fatalf("terrace %d: cell of %v (centre %v) inside outline = %v, in set = %v", ti, site, c, got, want)
					}
					if got := evenOdd(keyholed, c); got != want {
						t.Fatalf("terrace %d: cell of %v inside keyholed outline = %v, in set = %v", ti, site, got, want)
					}
				}
			}
		}
	}
}

func TestOutlineMatchesBruteForce(t *testing.T) {
	s := twoTerraces(t)
	rng := rand.New(rand.NewPCG(3, 5))
	t.Run("by hand", func(t *testing.T) {
		// The number of pieces and holes on terrace 0 is counted by hand
		// from the drawings the comments describe.
		cases := map[string]struct {
			pieces, holes int
			build         func(*SiteSet)
		}{
			"one site side 0": {1, 0, func(set *SiteSet) { set.Add(Site{0, 4, 7, 0}) }},
			"one site side 1": {1, 0, func(set *SiteSet) { set.Add(Site{0, 4, 7, 1}) }},
			// Lower cell of dimer 7 and upper cell of dimer 8 meet at a corner.
			"corners touch": {2, 0, func(set *SiteSet) { set.Add(Site{0, 4, 7, 0}); set.Add(Site{0, 4, 8, 1}) }},
			"ring with a hole": {1, 1, func(set *SiteSet) {
				for r := 10; r < 16; r++ {
					set.AddRun(0, r, 20, 40)
				}
				set.RemoveRun(0, 12, 26, 30)
				set.RemoveRun(0, 13, 26, 27) // dimer 13, side 0: joins the gap above it
			}},
			// Two holes meeting at a corner are one (pinched) hole.
			"two holes touching at a corner": {1, 1, func(set *SiteSet) {
				for r := 10; r < 16; r++ {
					set.AddRun(0, r, 20, 40)
				}
				set.Remove(Site{0, 12, 14, 0})
				set.Remove(Site{0, 12, 15, 1})
			}},
			"island in a hole": {2, 1, func(set *SiteSet) {
				for r := 10; r < 20; r++ {
					set.AddRun(0, r, 20, 60)
				}
				for r := 12; r < 18; r++ {
					set.RemoveRun(0, r, 26, 50)
				}
				set.AddRun(0, 15, 34, 40)
			}},
			// A notch reaching in from the edge is no hole.
			"hole touching the outside at a corner": {1, 0, func(set *SiteSet) {
				for r := 10; r < 14; r++ {
					set.AddRun(0, r, 20, 30)
				}
				set.Remove(Site{0, 11, 12, 1})
				set.Remove(Site{0, 12, 13, 0})
				set.RemoveRun(0, 13, 26, 30)
				set.Remove(Site{0, 12, 13, 1}) // opens a corner path out
			}},
			"rows along y across the step": {-1, -1, func(set *SiteSet) {
				s.Paint(set, RectFromCorners(r2.Point{X: 110, Y: 20}, r2.Point{X: 150, Y: 40}))
				set.Remove(Site{1, 180, 70, 0})
			}},
		}
		for name, c := range cases {
			t.Run(name, func(t *testing.T) {
				set := NewSiteSet()
				c.build(set)
				set.Difference(s.Missing(set)) // existing sites only
				checkOutline(t, s, set)
				if c.pieces < 0 {
					return
				}
				polys := s.Outline(set, 0)
				holes := 0
				for _, p := range polys {
					holes += len(p.Holes)
				}
				if len(polys) != c.pieces || holes != c.holes {
					t.Errorf("%d pieces with %d holes, want %d with %d", len(polys), holes, c.pieces, c.holes)
				}
			})
		}
	})
	t.Run("random", func(t *testing.T) {
		for trial := range 60 {
			set := NewSiteSet()
			// A blob of random sites around a centre, dense enough to
			// make holes, islands and corner contacts.
			c := r2.Point{X: 10 + 180*rng.Float64(), Y: 10 + 80*rng.Float64()}
			density := 0.3 + 0.6*rng.Float64()
			full := NewSiteSet()
			s.Paint(full, RectFromCorners(c.Sub(r2.Point{X: 5, Y: 5}), c.Add(r2.Point{X: 5, Y: 5})))
			for site := range full.All() {
				if rng.Float64() < density {
					set.Add(site)
				}
			}
			if trial%3 == 0 {
				s.Paint(set, Polygon{c, c.Add(r2.Point{X: 8, Y: 1}), c.Add(r2.Point{X: 3, Y: 7})})
			}
			checkOutline(t, s, set)
		}
	})
}

func TestOutlineRowsCutsIntoBands(t *testing.T) {
	s := mustSurface(t, 100, 100)
	set := NewSiteSet()
	s.Paint(set, Polygon{{X: 10, Y: 10}, {X: 80, Y: 20}, {X: 40, Y: 90}})
	whole := 0.0
	for _, p := range s.Outline(set, 0) {
		whole += signedArea(p.Keyholed())
	}
	banded := 0.0
	for r := 0; r < set.RowCount(0); r += 7 {
		for _, p := range s.OutlineRows(set, 0, r, r+7) {
			banded += signedArea(p.Keyholed())
		}
	}
	want := float64(set.Count()) * DimerPitch * RowSpacing / 2
	if math.Abs(whole-want) > 1e-6 || math.Abs(banded-want) > 1e-6 {
		t.Errorf("area whole %g, in bands %g, want %g", whole, banded, want)
	}
}
