package lattice

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/golang/geo/r1"
	"github.com/golang/geo/r2"
)

func TestSplitJoin(t *testing.T) {
	p := r2.Point{X: 3, Y: 7}
	tests := []struct {
		name          string
		d             RowDirection
		along, across float64
	}{
		{"rows along x", RowsAlongX, 3, 7},
		{"rows along y", RowsAlongY, 7, 3},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			along, across := tc.d.Split(p)
			if along != tc.along || across != tc.across {
				t.Errorf("Split(%v) = %g, %g, want %g, %g", p, along, across, tc.along, tc.across)
			}
			if q := tc.d.Join(along, across); q != p {
				t.Errorf("Join(Split(%v)) = %v", p, q)
			}
		})
	}
}

// The frame must agree with the surface's own addressing: a site's
// position is its dimer's distance along and its side's distance across
// from the terrace offset.
func TestFrameAgreesWithPosition(t *testing.T) {
	s := twoTerraces(t)
	for ti := range s.Terraces {
		f := s.Frame(ti)
		t.Run(s.Terraces[ti].Name, func(t *testing.T) {
			for _, site := range []Site{{ti, 3, 7, 0}, {ti, 3, 7, 1}, {ti, 40, 200, 1}, {ti, 0, 0, 0}} {
				along, across := f.ToLocal(s.Position(site))
				if math.Abs(along-DimerAlong(site.Dimer)) > 1e-12 || math.Abs(across-SiteAcross(site.Row, site.Side)) > 1e-12 {
					t.Errorf("ToLocal(Position(%v)) = %g, %g, want %g, %g", site, along, across, DimerAlong(site.Dimer), SiteAcross(site.Row, site.Side))
				}
				if q := f.ToField(DimerAlong(site.Dimer), RowAcross(site.Row)); q.Sub(s.DimerCentre(ti, site.Row, site.Dimer)).Norm() > 1e-12 {
					t.Errorf("ToField(dimer %v) = %v, DimerCentre %v", site, q, s.DimerCentre(ti, site.Row, site.Dimer))
				}
			}
		})
	}
}

func TestFrameRects(t *testing.T) {
	r := r2.RectFromPoints(r2.Point{X: 10, Y: 20}, r2.Point{X: 30, Y: 25})
	tests := []struct {
		name          string
		f             Frame
		along, across r1.Interval
	}{
		{"x", Frame{RowsAlongX, r2.Point{X: 1, Y: 2}}, r1.Interval{Lo: 9, Hi: 29}, r1.Interval{Lo: 18, Hi: 23}},
		{"y", Frame{RowsAlongY, r2.Point{X: 1, Y: 2}}, r1.Interval{Lo: 18, Hi: 23}, r1.Interval{Lo: 9, Hi: 29}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			along, across := tc.f.LocalRect(r)
			if along != tc.along || across != tc.across {
				t.Errorf("LocalRect(%v) = %v, %v, want %v, %v", r, along, across, tc.along, tc.across)
			}
			if back := tc.f.FieldRect(along, across); back != r {
				t.Errorf("FieldRect(LocalRect(%v)) = %v", r, back)
			}
		})
	}
}

func TestLatticeVector(t *testing.T) {
	tests := []struct {
		name string
		f    Frame
		d    r2.Point
		want r2.Point
	}{
		{"x: 2.4 pitches, 0.6 rows", Frame{Rows: RowsAlongX}, r2.Point{X: 2.4 * DimerPitch, Y: 0.6 * RowSpacing}, r2.Point{X: 2 * DimerPitch, Y: RowSpacing}},
		{"y: the same turned", Frame{Rows: RowsAlongY}, r2.Point{X: 0.6 * RowSpacing, Y: 2.4 * DimerPitch}, r2.Point{X: RowSpacing, Y: 2 * DimerPitch}},
		{"origin does not move vectors", Frame{Rows: RowsAlongX, Origin: r2.Point{X: 0.3, Y: 0.2}}, r2.Point{X: -1.4 * DimerPitch}, r2.Point{X: -DimerPitch}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := tc.f.LatticeVector(tc.d); got.Sub(tc.want).Norm() > 1e-12 {
				t.Errorf("LatticeVector(%v) = %v, want %v", tc.d, got, tc.want)
			}
		})
	}
}

// SnapRect's rectangle holds exactly the whole dimers between the two
// corners' dimers: painting it gives those rows x dimers, both sides.
func TestSnapRect(t *testing.T) {
	s := twoTerraces(t)
	tests := []struct {
		name    string
		terrace int
		a, b    r2.Point
	}{
		{"rows along x", 0, r2.Point{X: 10.1, Y: 20.3}, r2.Point{X: 14.9, Y: 22.2}},
		{"corners swapped", 0, r2.Point{X: 14.9, Y: 22.2}, r2.Point{X: 10.1, Y: 20.3}},
		{"rows along y", 1, r2.Point{X: 150.2, Y: 40.1}, r2.Point{X: 153.7, Y: 47.9}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			f := s.Frame(tc.terrace)
			r := f.SnapRect(tc.a, tc.b)
			got := NewSiteSet()
			s.Paint(got, Rect{r})
			want := NewSiteSet()
			aAlong, aAcross := f.ToLocal(tc.a)
			bAlong, bAcross := f.ToLocal(tc.b)
			d0, d1 := int(math.Round(aAlong/DimerPitch)), int(math.Round(bAlong/DimerPitch))
			r0, r1 := int(math.Round(aAcross/RowSpacing)), int(math.Round(bAcross/RowSpacing))
			for row := min(r0, r1); row <= max(r0, r1); row++ {
				want.AddRun(tc.terrace, row, 2*min(d0, d1), 2*max(d0, d1)+2)
			}
			if diff := symmetricDifference(got, want); diff != 0 {
				t.Errorf("SnapRect(%v, %v) = %v holds %d sites, %d differ from rows %d..%d x dimers %d..%d", tc.a, tc.b, r, got.Count(), diff, r0, r1, d0, d1)
			}
		})
	}
}

// RowDimers lists exactly the dimers Valid accepts, on a surface with a
// slanted step and on its fallback terrace.
func TestRowDimersMatchesValid(t *testing.T) {
	s := twoTerraces(t)
	for ti := range s.Terraces {
		t.Run(s.Terraces[ti].Name, func(t *testing.T) {
			var dims []DimerRange
			for r := -1; r <= s.RowCount(ti); r++ {
				dims = s.RowDimers(dims[:0], ti, r)
				in := map[int]bool{}
				for k, d := range dims {
					if d.IsEmpty() || (k > 0 && d.Lo <= dims[k-1].Hi) {
						t.Fatalf("row %d: ranges %v are not sorted, disjoint and non-empty", r, dims)
					}
					for x := d.Lo; x < d.Hi; x++ {
						in[x] = true
					}
				}
				for d := -1; d <= s.DimerCount(ti); d++ {
					if want := s.Valid(Site{Terrace: ti, Row: r, Dimer: d}); in[d] != want {
						t.Fatalf("row %d dimer %d: in RowDimers %v, Valid %v", r, d, in[d], want)
					}
				}
			}
		})
	}
}

// Validator answers as Valid for every site of a surface with a slanted
// step, out-of-range indices, sides and terraces included.
func TestValidatorMatchesValid(t *testing.T) {
	s := twoTerraces(t)
	valid := s.Validator()
	checked := 0
	for ti := -1; ti <= len(s.Terraces); ti++ {
		rows, dimers := 3, 3
		if ti >= 0 && ti < len(s.Terraces) {
			rows, dimers = s.RowCount(ti), s.DimerCount(ti)
		}
		for r := -1; r <= rows; r++ {
			for d := -1; d <= dimers; d++ {
				for side := -1; side <= 2; side++ {
					site := Site{Terrace: ti, Row: r, Dimer: d, Side: side}
					if got, want := valid(site), s.Valid(site); got != want {
						t.Fatalf("%v: Validator %v, Valid %v", site, got, want)
					}
					checked++
				}
			}
		}
	}
	if checked < 1000 {
		t.Fatalf("only %d sites checked", checked)
	}
}

// Dimers(win) yields every existing dimer with a site in win, in
// address order, and no dimer whose cell misses win.
func TestDimersInWindow(t *testing.T) {
	s := twoTerraces(t)
	rng := rand.New(rand.NewPCG(5, 6))
	for trial := range 30 {
		c := r2.Point{X: -5 + 210*rng.Float64(), Y: -5 + 110*rng.Float64()}
		win := r2.RectFromCenterSize(c, r2.Point{X: 0.2 + 8*rng.Float64(), Y: 0.2 + 8*rng.Float64()})
		got := map[Site]bool{}
		var prev Site
		first := true
		for site := range s.Dimers(win) {
			if !first && !siteLess(prev, site) {
				t.Fatalf("trial %d: %v after %v: not in address order", trial, site, prev)
			}
			prev, first = site, false
			if !s.Valid(site) || site.Side != 0 {
				t.Fatalf("trial %d: yielded %v, not an existing dimer's side 0", trial, site)
			}
			if !s.DimerCells(site.Terrace, site.Row, DimerRange{site.Dimer, site.Dimer + 1}).Intersects(win) {
				t.Fatalf("trial %d: yielded %v whose cell misses %v", trial, site, win)
			}
			got[site] = true
		}
		inWin := bruteForce(s, win.ContainsPoint)
		for site := range inWin.All() {
			if !got[Site{site.Terrace, site.Row, site.Dimer, 0}] {
				t.Fatalf("trial %d: site %v in %v, its dimer not yielded", trial, site, win)
			}
		}
	}
}

func siteLess(a, b Site) bool {
	if a.Terrace != b.Terrace {
		return a.Terrace < b.Terrace
	}
	if a.Row != b.Row {
		return a.Row < b.Row
	}
	return a.Index() < b.Index()
}

func TestDimerCells(t *testing.T) {
	s := mustSurface(t, 100, 100, Terrace{Rows: RowsAlongX, Offset: r2.Point{X: 0.1, Y: 0.2}})
	got := s.DimerCells(0, 2, DimerRange{Lo: 3, Hi: 6})
	want := r2.RectFromPoints(r2.Point{X: 0.1 + 2.5*DimerPitch, Y: 0.2 + 1.5*RowSpacing}, r2.Point{X: 0.1 + 5.5*DimerPitch, Y: 0.2 + 2.5*RowSpacing})
	if !got.ApproxEqual(want) {
		t.Errorf("DimerCells(0, 2, 3..5) = %v, want %v", got, want)
	}
	if e := s.DimerCells(0, 2, DimerRange{Lo: 3, Hi: 3}); !e.IsEmpty() {
		t.Errorf("DimerCells of an empty range = %v, want empty", e)
	}
}

// Issue 13: a rectangle drawn 10 nm wide and 8 nm tall snapped outward
// by up to a cell a side (10 nm became 11.52 nm); NearestCellRect moves
// each edge to the nearest cell edge, at most half a cell, and what the
// rectangle writes (CellBounds of its sites) is the rectangle itself, on
// terraces with rows along x and along y.
func TestNearestCellRect(t *testing.T) {
	// With the lattice at the origin the 10 x 8 nm drag from (20, 30)
	// gives 26 dimer pitches (9.98 nm) by 10 rows (7.68 nm): its edges
	// 20 and 30 nm lie nearest the cell edges 52.5 and 78.5 pitches, 30
	// and 38 nm nearest 39.5 and 49.5 row spacings.
	plain := mustSurface(t, 100, 100)
	r := plain.Frame(0).NearestCellRect(r2.Point{X: 20, Y: 30}, r2.Point{X: 30, Y: 38})
	if d, rows := plain.Frame(0).CellCount(r); d != 26 || rows != 10 {
		t.Errorf("10 x 8 nm drag: %d dimers x %d rows (%.2f x %.2f nm), want 26 x 10", d, rows, r.Size().X, r.Size().Y)
	}
	s := twoTerraces(t)
	tests := []struct {
		name    string
		terrace int
		a, b    r2.Point
	}{
		{"rows along x", 0, r2.Point{X: 20, Y: 30}, r2.Point{X: 30, Y: 38}},
		{"corners swapped", 0, r2.Point{X: 30, Y: 38}, r2.Point{X: 20, Y: 30}},
		{"rows along y", 1, r2.Point{X: 150, Y: 40}, r2.Point{X: 160, Y: 48}},
		{"thinner than a cell", 0, r2.Point{X: 20, Y: 30}, r2.Point{X: 20.1, Y: 30.1}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			f := s.Frame(tc.terrace)
			r := f.NearestCellRect(tc.a, tc.b)
			dimers, rows := f.CellCount(r)
			if dimers < 1 || rows < 1 {
				t.Fatalf("NearestCellRect(%v, %v) = %v: %d dimers x %d rows", tc.a, tc.b, r, dimers, rows)
			}
			drawn := r2.RectFromPoints(tc.a, tc.b)
			if tc.name != "thinner than a cell" {
				for _, e := range [][2]float64{{r.X.Lo, drawn.X.Lo}, {r.X.Hi, drawn.X.Hi}, {r.Y.Lo, drawn.Y.Lo}, {r.Y.Hi, drawn.Y.Hi}} {
					if math.Abs(e[0]-e[1]) > RowSpacing/2+1e-9 {
						t.Errorf("%v: edge %.3f is more than half a cell from the corner drawn at %.3f", r, e[0], e[1])
					}
				}
			}
			set := NewSiteSet()
			s.Paint(set, Rect{r})
			if got := set.CellBounds(s); math.Abs(got.X.Lo-r.X.Lo)+math.Abs(got.X.Hi-r.X.Hi)+math.Abs(got.Y.Lo-r.Y.Lo)+math.Abs(got.Y.Hi-r.Y.Hi) > 1e-9 {
				t.Errorf("the sites it writes span %v, not the rectangle %v", got, r)
			}
			if n := set.Count(); n != 2*dimers*rows {
				t.Errorf("%d sites, want 2 x %d dimers x %d rows", n, dimers, rows)
			}
		})
	}
}
