package lattice

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/golang/geo/r2"
)

func mustSurface(t testing.TB, w, h float64, terraces ...Terrace) *Surface {
	t.Helper()
	s, err := NewSurface(w, h, terraces...)
	if err != nil {
		t.Fatal(err)
	}
	return s
}

// twoTerraces returns a 200 x 100 nm field: terrace "low" with rows
// along x on the left, and "high", one single step up, beyond a slanted
// step edge from (120, 0) to (100, 100).
func twoTerraces(t testing.TB) *Surface {
	low := Terrace{Name: "low", Rows: RowsAlongX, Offset: r2.Point{X: 0.1, Y: 0.3}}
	high := low.AcrossStep(StepUp)
	high.Name = "high"
	high.Boundary = []r2.Point{{X: 120, Y: 0}, {X: 200, Y: 0}, {X: 200, Y: 100}, {X: 100, Y: 100}}
	return mustSurface(t, 200, 100, low, high)
}

func TestCountsOnDefaultSurface(t *testing.T) {
	s := mustSurface(t, 100, 100)
	// Hand count: rows at y = r·0.76806 for r = 0..130 (130·0.76806 =
	// 99.85 <= 100), dimers at x = d·0.38403 for d = 0..260.
	if got := s.RowCount(0); got != 131 {
		t.Errorf("RowCount = %d, want 131", got)
	}
	if got := s.DimerCount(0); got != 261 {
		t.Errorf("DimerCount = %d, want 261", got)
	}
	set := NewSiteSet()
	n := s.Paint(set, Rect{s.Field.ExpandedByMargin(1)})
	if want := 131 * 261 * 2; set.Count() != want || n != want {
		t.Errorf("whole field: Count = %d, Paint = %d, want %d", set.Count(), n, want)
	}
}

func TestAcrossStep(t *testing.T) {
	low := Terrace{Rows: RowsAlongX, Offset: r2.Point{X: 0.1, Y: 0.3}}
	high := low.AcrossStep(StepUp)
	if high.Rows != RowsAlongY {
		t.Fatalf("rows across a step = %v, want y", high.Rows)
	}
	// Up, the lattice shifts by a/(2√2) across the new rows (x here);
	// down, along them (y). TestAcrossStepMatchesDiamondLattice derives
	// both from the atoms.
	if d := high.Offset.Sub(low.Offset); math.Abs(d.Y) > 1e-12 || math.Abs(d.X-SiLatticeConstant/(2*math.Sqrt2)) > 1e-12 {
		t.Errorf("step up: offset shift = %v, want (a/(2√2), 0)", d)
	}
	if d := low.AcrossStep(StepDown).Offset.Sub(low.Offset); math.Abs(d.X) > 1e-12 || math.Abs(d.Y-SiLatticeConstant/(2*math.Sqrt2)) > 1e-12 {
		t.Errorf("step down: offset shift = %v, want (0, a/(2√2))", d)
	}
	back := high.AcrossStep(StepUp)
	if back.Rows != RowsAlongX {
		t.Errorf("two steps: rows %v, want x", back.Rows)
	}
	s := twoTerraces(t)
	// On the high terrace, dimers advance along y and rows along x.
	a := s.DimerCentre(1, 10, 20)
	if d := s.DimerCentre(1, 10, 21).Sub(a); math.Abs(d.X) > 1e-9 || math.Abs(d.Y-DimerPitch) > 1e-9 {
		t.Errorf("high terrace along-row step = %v, want (0, %g)", d, DimerPitch)
	}
	if d := s.DimerCentre(1, 11, 20).Sub(a); math.Abs(d.X-RowSpacing) > 1e-9 || math.Abs(d.Y) > 1e-9 {
		t.Errorf("high terrace across-row step = %v, want (%g, 0)", d, RowSpacing)
	}
}

func TestTerraceMembership(t *testing.T) {
	s := twoTerraces(t)
	tests := []struct {
		p    r2.Point
		want int
	}{
		{r2.Point{X: 10, Y: 50}, 0},
		{r2.Point{X: 150, Y: 50}, 1},
		{r2.Point{X: 105, Y: 90}, 1}, // beyond the slanted edge near the top
		{r2.Point{X: 115, Y: 10}, 0}, // before it near the bottom
		{r2.Point{X: 201, Y: 50}, -1},
	}
	for _, tc := range tests {
		if got := s.TerraceAt(tc.p); got != tc.want {
			t.Errorf("TerraceAt(%v) = %d, want %d", tc.p, got, tc.want)
		}
	}
	// Every painted site of the whole field exists, and lies on the
	// terrace that holds its dimer (brute force over all sites).
	set := NewSiteSet()
	s.Paint(set, Rect{s.Field})
	brute := 0
	for ti := range s.Terraces {
		for r := 0; r < s.RowCount(ti); r++ {
			for d := 0; d < s.DimerCount(ti); d++ {
				for side := 0; side < 2; side++ {
					site := Site{ti, r, d, side}
					p := s.Position(site)
					in := s.Valid(site) && s.Field.ContainsPoint(p)
					if in {
						brute++
					}
					if in != set.Contains(site) {
						t.Fatalf("site %v at %v: painted %v, brute force %v", site, p, set.Contains(site), in)
					}
				}
			}
		}
	}
	if set.Count() != brute {
		t.Errorf("whole field Count = %d, brute force %d", set.Count(), brute)
	}
	if m := s.Missing(set); !m.IsEmpty() {
		t.Errorf("Missing of painted field has %d sites", m.Count())
	}
}

func TestSnapRoundTrip(t *testing.T) {
	s := twoTerraces(t)
	rng := rand.New(rand.NewPCG(1, 2))
	for range 2000 {
		ti := rng.IntN(2)
		site := Site{ti, rng.IntN(s.RowCount(ti)), rng.IntN(s.DimerCount(ti)), rng.IntN(2)}
		if !s.Valid(site) {
			continue
		}
		p := s.Position(site)
		if !s.Field.ContainsPoint(p) {
			continue // a site at the field's edge whose H lies just beyond it: Snap takes field points only
		}
		got, dist, ok := s.Snap(p)
		if !ok || got != site || dist > 1e-9 {
			t.Fatalf("Snap(Position(%v)) = %v, %g, %v", site, got, dist, ok)
		}
		// A point 0.1 nm off still snaps to it: sites are >= 0.35 nm apart.
		q := p.Add(r2.Point{X: 0.07, Y: -0.07})
		if s.TerraceAt(q) != ti {
			continue // pushed off the field or over the step edge
		}
		if got, _, _ := s.Snap(q); got != site {
			t.Fatalf("Snap(%v) = %v, want %v", q, got, site)
		}
	}
	// Near the step edge the snapped site is on the terrace holding p.
	for range 500 {
		p := r2.Point{X: 100 + 20*rng.Float64(), Y: 100 * rng.Float64()}
		site, _, ok := s.Snap(p)
		if !ok || site.Terrace != s.TerraceAt(p) || !s.Valid(site) {
			t.Fatalf("Snap(%v) = %v, ok %v; terrace at p %d", p, site, ok, s.TerraceAt(p))
		}
	}
}

func TestNeighbours(t *testing.T) {
	s := mustSurface(t, 50, 50)
	site := Site{0, 5, 7, 1}
	n, ok := s.AlongRow(site, Forward)
	if !ok || s.Position(n).Sub(s.Position(site)).Norm()-DimerPitch > 1e-12 {
		t.Errorf("AlongRow(%v) = %v %v", site, n, ok)
	}
	n, ok = s.AcrossRow(site, Backward)
	if !ok || math.Abs(s.Position(site).Sub(s.Position(n)).Norm()-RowSpacing) > 1e-12 {
		t.Errorf("AcrossRow(%v) = %v %v", site, n, ok)
	}
	if _, ok := s.AcrossRow(Site{0, 0, 7, 0}, Backward); ok {
		t.Errorf("AcrossRow below row 0 reported ok")
	}
	p := s.Partner(site)
	// The two H of a dimer are 2·HOffset apart across the row.
	if d := s.Position(site).Sub(s.Position(p)).Norm(); math.Abs(d-2*HOffset) > 1e-12 {
		t.Errorf("partner distance %g, want %g", d, 2*HOffset)
	}
}

func TestNewSurfaceRefuses(t *testing.T) {
	nan := math.NaN()
	tests := []struct {
		name     string
		w, h     float64
		terraces []Terrace
	}{
		{"zero width", 0, 10, nil},
		{"NaN height", 10, nan, nil},
		{"infinite", math.Inf(1), 10, nil},
		{"huge", 1e7, 10, nil},
		{"NaN offset", 10, 10, []Terrace{{Offset: r2.Point{X: nan}}}},
		{"two-point boundary", 10, 10, []Terrace{{}, {Boundary: []r2.Point{{}, {X: 1}}}}},
		{"two unbounded", 10, 10, []Terrace{{}, {}}},
	}
	for _, tc := range tests {
		if _, err := NewSurface(tc.w, tc.h, tc.terraces...); err == nil {
			t.Errorf("%s: NewSurface succeeded", tc.name)
		}
	}
}
