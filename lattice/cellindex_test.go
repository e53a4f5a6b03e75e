package lattice

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/golang/geo/r2"
)

// Gaps between runs drawn by hand: n intact rows between two sets measure
// n·RowSpacing and n intact dimers along a row n·DimerPitch (the cells of
// neighbouring sites share edges; see SiteCell).
func TestCellIndexGapByHand(t *testing.T) {
	s := mustSurface(t, 100, 100)
	run := func(row, d0, d1 int) *SiteSet {
		set := NewSiteSet()
		set.AddRun(0, row, 2*d0, 2*d1+2)
		return set
	}
	tests := []struct {
		name string
		a, b *SiteSet
		want float64
	}{
		{"next row", run(10, 5, 20), run(11, 5, 20), 0},
		{"one intact row", run(10, 5, 20), run(12, 5, 20), RowSpacing},
		{"nine intact rows", run(10, 5, 20), run(20, 5, 20), 9 * RowSpacing},
		{"next dimer", run(10, 5, 20), run(10, 21, 30), 0},
		{"one intact dimer", run(10, 5, 20), run(10, 22, 30), DimerPitch},
		{"overlap", run(10, 5, 20), run(10, 15, 30), 0},
		// Diagonal: 3 intact rows across and 4 intact dimers along.
		{"diagonal", run(10, 5, 20), run(14, 25, 30), math.Hypot(3*RowSpacing, 4*DimerPitch)},
	}
	for _, tc := range tests {
		a, b := NewCellIndex(s, tc.a), NewCellIndex(s, tc.b)
		if d, _ := a.Gap(b); math.Abs(d-tc.want) > 1e-9 {
			t.Errorf("%s: Gap = %g nm, want %g", tc.name, d, tc.want)
		}
		if _, _, ok := a.GapWithin(b, tc.want+1e-6); !ok {
			t.Errorf("%s: GapWithin(%g) found nothing", tc.name, tc.want)
		}
		if tc.want > 0 {
			if _, _, ok := b.GapWithin(a, tc.want-1e-6); ok {
				t.Errorf("%s: GapWithin(%g) found a gap below %g", tc.name, tc.want-1e-6, tc.want)
			}
		}
	}
	empty := NewCellIndex(s, NewSiteSet())
	full := NewCellIndex(s, run(3, 0, 4))
	if d, _ := empty.Gap(full); !math.IsInf(d, 1) || !empty.IsEmpty() || !empty.Bounds().IsEmpty() {
		t.Errorf("empty index: Gap %g, IsEmpty %v, Bounds %v", d, empty.IsEmpty(), empty.Bounds())
	}
	if _, _, ok := full.GapWithin(empty, 1e9); ok {
		t.Error("GapWithin an empty index found a gap")
	}
}

// The grid index finds the same least distance as comparing the cell of
// every site of one set with the cell of every site of the other (brute
// force over SiteCell, which does not use RunCells), on random
// rectangles over two terraces.
func TestCellIndexGapMatchesBruteForce(t *testing.T) {
	lower := Terrace{Name: "lower", Rows: RowsAlongX}
	upper := lower.AcrossStep(StepUp)
	upper.Name = "upper"
	upper.Boundary = []r2.Point{{X: 40, Y: 0}, {X: 60, Y: 0}, {X: 60, Y: 60}, {X: 40, Y: 60}}
	s, err := NewSurface(60, 60, lower, upper)
	if err != nil {
		t.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(21, 22))
	for trial := range 40 {
		a, b := NewSiteSet(), NewSiteSet()
		for _, set := range []*SiteSet{a, b} {
			for range 1 + rng.IntN(3) {
				// Near the step at x = 40, so sets often touch, overlap
				// or face each other across it.
				x, y := 28+20*rng.Float64(), 20*rng.Float64()
				s.Paint(set, RectFromCorners(r2.Point{X: x, Y: y}, r2.Point{X: x + 8*rng.Float64(), Y: y + 8*rng.Float64()}))
			}
		}
		var ca, cb []r2.Rect
		for site := range a.All() {
			ca = append(ca, s.SiteCell(site))
		}
		for site := range b.All() {
			cb = append(cb, s.SiteCell(site))
		}
		want := math.Inf(1)
		for _, ra := range ca {
			for _, rb := range cb {
				d, _ := rectGap(ra, rb)
				want = math.Min(want, d)
			}
		}
		ia, ib := NewCellIndex(s, a), NewCellIndex(s, b)
		if d, _ := ia.Gap(ib); d != want && math.Abs(d-want) > 1e-9 {
			t.Fatalf("trial %d: Gap = %g, brute force %g", trial, d, want)
		}
		for _, limit := range []float64{0.3, 5, 50} {
			d, _, ok := ia.GapWithin(ib, limit)
			if ok != (want <= limit) || (ok && math.Abs(d-want) > 1e-9) {
				t.Fatalf("trial %d limit %g: GapWithin = %g, %v; brute force %g", trial, limit, d, ok, want)
			}
		}
	}
}

// A gap is counted in the unit of its direction: intact dimer rows where
// it crosses the rows, intact dimers where it runs along a row (the
// issue's "6.53 nm (8.5 dimer rows)" was 17 dimers along a row), on
// terraces with rows along x and along y, where the same sets turn.
func TestDescribeGap(t *testing.T) {
	run := func(row, d0, d1 int) *SiteSet {
		set := NewSiteSet()
		set.AddRun(0, row, 2*d0, 2*d1+2)
		return set
	}
	tests := []struct {
		name   string
		a, b   *SiteSet
		nm     float64
		rows   float64
		dimers float64
		text   string
	}{
		{"across nine rows", run(10, 5, 20), run(20, 5, 20), 9 * RowSpacing, 9, 0, "6.91 nm (9.0 dimer rows across the rows)"},
		{"along seventeen dimers", run(10, 5, 20), run(10, 38, 50), 17 * DimerPitch, 0, 17, "6.53 nm (17.0 dimers along a row)"},
		{"diagonal", run(10, 5, 20), run(14, 25, 30), math.Hypot(3*RowSpacing, 4*DimerPitch), 3, 4, "2.77 nm (diagonal: 3.0 dimer rows across, 4.0 dimers along the rows)"},
	}
	for _, rows := range []RowDirection{RowsAlongX, RowsAlongY} {
		s := mustSurface(t, 100, 100, Terrace{Name: "t", Rows: rows})
		for _, tc := range tests {
			t.Run(rows.String()+"/"+tc.name, func(t *testing.T) {
				g := NewCellIndex(s, tc.a).Span(NewCellIndex(s, tc.b))
				r, d, ok := s.GapInLattice(g)
				if !ok || math.Abs(g.NM-tc.nm) > 1e-9 || math.Abs(r-tc.rows) > 1e-9 || math.Abs(d-tc.dimers) > 1e-9 {
					t.Errorf("gap %+v: %g rows, %g dimers (ok %v); want %g nm, %g rows, %g dimers", g, r, d, ok, tc.nm, tc.rows, tc.dimers)
				}
				if got := s.GapText(g); got != tc.text {
					t.Errorf("GapText = %q, want %q", got, tc.text)
				}
			})
		}
	}
}
