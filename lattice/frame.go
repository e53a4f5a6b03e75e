package lattice

import (
	"iter"
	"math"

	"github.com/golang/geo/r1"
	"github.com/golang/geo/r2"
)

// Split returns the components of p along and across rows running in
// direction d: (p.X, p.Y) for RowsAlongX, (p.Y, p.X) for RowsAlongY. It
// moves nothing: use Frame.ToLocal for coordinates from a terrace's
// lattice origin.
func (d RowDirection) Split(p r2.Point) (along, across float64) {
	if d == RowsAlongY {
		return p.Y, p.X
	}
	return p.X, p.Y
}

// Join is the inverse of Split: the field vector with the given
// components along and across rows running in direction d.
func (d RowDirection) Join(along, across float64) r2.Point {
	if d == RowsAlongY {
		return r2.Point{X: across, Y: along}
	}
	return r2.Point{X: along, Y: across}
}

// Frame is a terrace's lattice frame: positions along and across its
// dimer rows, in nm, from the centre of dimer 0 of row 0. In it dimer d
// of row r is centred at (DimerAlong(d), RowAcross(r)), and its side-s
// H site lies at (DimerAlong(d), SiteAcross(r, s)).
type Frame struct {
	Rows RowDirection
	// Origin is the field position of the centre of dimer 0 of row 0
	// (the terrace's Offset).
	Origin r2.Point
}

// Frame returns the terrace's lattice frame.
func (t Terrace) Frame() Frame { return Frame{Rows: t.Rows, Origin: t.Offset} }

// Frame returns the lattice frame of terrace t (an index into Terraces).
func (s *Surface) Frame(t int) Frame { return s.Terraces[t].Frame() }

// ToLocal returns the field point p in the frame: its distances along
// and across the rows from the frame's origin.
func (f Frame) ToLocal(p r2.Point) (along, across float64) {
	return f.Rows.Split(p.Sub(f.Origin))
}

// ToField is the inverse of ToLocal: the field point at the given
// distances along and across the rows from the frame's origin.
func (f Frame) ToField(along, across float64) r2.Point {
	return f.Rows.Join(along, across).Add(f.Origin)
}

// LocalRect returns the field rectangle r in the frame, as its extents
// along and across the rows.
func (f Frame) LocalRect(r r2.Rect) (along, across r1.Interval) {
	along, across = r.X, r.Y
	if f.Rows == RowsAlongY {
		along, across = r.Y, r.X
	}
	o, c := f.Rows.Split(f.Origin)
	return r1.Interval{Lo: along.Lo - o, Hi: along.Hi - o}, r1.Interval{Lo: across.Lo - c, Hi: across.Hi - c}
}

// FieldRect is the inverse of LocalRect: the field rectangle whose
// extents along and across the rows are the given intervals of the
// frame.
func (f Frame) FieldRect(along, across r1.Interval) r2.Rect {
	o, c := f.Rows.Split(f.Origin)
	along = r1.Interval{Lo: along.Lo + o, Hi: along.Hi + o}
	across = r1.Interval{Lo: across.Lo + c, Hi: across.Hi + c}
	if f.Rows == RowsAlongY {
		return r2.Rect{X: across, Y: along}
	}
	return r2.Rect{X: along, Y: across}
}

// DimerAlong returns the distance along the rows of the centre of dimer
// d from the frame's origin, d·DimerPitch.
func DimerAlong(d int) float64 { return float64(d) * DimerPitch }

// RowAcross returns the distance across the rows of the centre line of
// row r from the frame's origin, r·RowSpacing.
func RowAcross(r int) float64 { return float64(r) * RowSpacing }

// SiteAcross returns the distance across the rows of the side-`side` H
// sites of row r from the frame's origin: the row's centre line less
// HOffset for side 0, plus HOffset for side 1.
func SiteAcross(row, side int) float64 {
	c := RowAcross(row)
	if side == 0 {
		return c - HOffset
	}
	return c + HOffset
}

// LatticeVector returns the lattice translation of the frame nearest to
// the field vector d: whole dimer pitches along the rows and whole row
// spacings across them. A shape moved by it covers the same pattern of
// sites.
func (f Frame) LatticeVector(d r2.Point) r2.Point {
	along, across := f.Rows.Split(d)
	along = math.Round(along/DimerPitch) * DimerPitch
	across = math.Round(across/RowSpacing) * RowSpacing
	return f.Rows.Join(along, across)
}

// SnapRect returns the smallest rectangle made of whole dimer cells of
// the frame (DimerPitch along the rows by RowSpacing across them, each
// centred on a dimer) that holds the cells nearest a and b. Its edges
// run midway between dimers and midway between rows, so it holds whole
// dimers of whole rows.
func (f Frame) SnapRect(a, b r2.Point) r2.Rect {
	cells := func(u, v, pitch float64) (float64, float64) {
		ku, kv := math.Round(u/pitch), math.Round(v/pitch)
		return (math.Min(ku, kv) - 0.5) * pitch, (math.Max(ku, kv) + 0.5) * pitch // cell edges
	}
	aa, ac := f.ToLocal(a)
	ba, bc := f.ToLocal(b)
	alo, ahi := cells(aa, ba, DimerPitch)
	clo, chi := cells(ac, bc, RowSpacing)
	return r2.RectFromPoints(f.ToField(alo, clo), f.ToField(ahi, chi))
}

// NearestCellRect returns the rectangle whose edges are the dimer-cell
// edges (midway between dimers along the rows, midway between rows
// across them) nearest to a and b: a rectangle drawn from a to b snapped
// to the nearest boundaries, neither grown nor shrunk by more than half
// a cell on each side, so a 10 nm drag gives 9.98 nm (26 dimer pitches)
// rather than the 10.37 nm SnapRect's whole cells would. It holds whole
// dimers of whole rows, at least one: where both edges of an axis snap
// to the same boundary, the cell of the pair's midpoint is taken.
func (f Frame) NearestCellRect(a, b r2.Point) r2.Rect {
	edges := func(u, v, pitch float64) (float64, float64) {
		// Cell edges lie at (k + ½)·pitch.
		ku, kv := math.Round(u/pitch-0.5), math.Round(v/pitch-0.5)
		lo, hi := math.Min(ku, kv), math.Max(ku, kv)
		if lo == hi {
			k := math.Round((u + v) / 2 / pitch)
			return (k - 0.5) * pitch, (k + 0.5) * pitch
		}
		return (lo + 0.5) * pitch, (hi + 0.5) * pitch
	}
	aa, ac := f.ToLocal(a)
	ba, bc := f.ToLocal(b)
	alo, ahi := edges(aa, ba, DimerPitch)
	clo, chi := edges(ac, bc, RowSpacing)
	return r2.RectFromPoints(f.ToField(alo, clo), f.ToField(ahi, chi))
}

// CellCount returns how many dimers (along the rows) and rows (across
// them) a rectangle of whole dimer cells of the frame spans.
func (f Frame) CellCount(r r2.Rect) (dimers, rows int) {
	along, across := f.Rows.Split(r.Size())
	return int(math.Round(along / DimerPitch)), int(math.Round(across / RowSpacing))
}

// DimerRange is the dimers Lo..Hi-1 of one row; it is empty when Hi <=
// Lo.
type DimerRange struct{ Lo, Hi int }

// Sites returns the in-row site indices [from, to) of the range's
// dimers, both sides.
func (d DimerRange) Sites() (from, to int) { return 2 * d.Lo, 2 * d.Hi }

// IsEmpty reports whether the range holds no dimer.
func (d DimerRange) IsEmpty() bool { return d.Hi <= d.Lo }

// DimersIn returns the dimers whose centres lie in the interval of the
// along-row coordinate of a terrace's frame, to within 10⁻⁹ of a dimer
// pitch. The range may reach beyond the dimers that exist (negative or
// past DimerCount); clip it to the row.
func DimersIn(along r1.Interval) DimerRange {
	return DimerRange{
		Lo: int(math.Ceil(along.Lo/DimerPitch - 1e-9)),
		Hi: int(math.Ceil(along.Hi/DimerPitch + 1e-9)),
	}
}

// DimerEdge returns the distance along the rows, from the frame's
// origin, of the edge between the cells of dimers d-1 and d:
// (d - ½)·DimerPitch.
func DimerEdge(d int) float64 { return (float64(d) - 0.5) * DimerPitch }

// RowDimers appends to dst the ranges of dimers of row r of terrace t
// that exist (their centres lie in the field and on terrace t, as
// TerraceSpans decides), in order, and returns dst. Complexity: that of
// TerraceSpans.
func (s *Surface) RowDimers(dst []DimerRange, t, r int) []DimerRange {
	if r < 0 || r >= s.RowCount(t) {
		return dst
	}
	f := s.Frame(t)
	o, c := f.Rows.Split(f.Origin)
	var buf [8]r1.Interval
	n := s.DimerCount(t)
	for _, iv := range s.TerraceSpans(buf[:0], t, c+RowAcross(r)) {
		d := DimersIn(r1.Interval{Lo: iv.Lo - o, Hi: iv.Hi - o})
		d.Lo, d.Hi = max(d.Lo, 0), min(d.Hi, n)
		if !d.IsEmpty() {
			dst = append(dst, d)
		}
	}
	return dst
}

// Dimers yields every dimer of the surface that exists and whose cell
// (DimerPitch along its row by RowSpacing across it, centred on the
// dimer) meets the field rectangle win, as the Site of its side 0: by
// terrace, then row, then dimer. Every site inside win belongs to a
// dimer it yields. Complexity: O(dimers whose cells meet win's box on
// each terrace).
func (s *Surface) Dimers(win r2.Rect) iter.Seq[Site] {
	return func(yield func(Site) bool) {
		if win.IsEmpty() {
			return
		}
		for t := range s.Terraces {
			along, across := s.Frame(t).LocalRect(win)
			rowLo := max(0, int(math.Ceil(across.Lo/RowSpacing-0.5)))
			rowHi := min(s.RowCount(t)-1, int(math.Floor(across.Hi/RowSpacing+0.5)))
			d0 := max(0, int(math.Ceil(along.Lo/DimerPitch-0.5)))
			d1 := min(s.DimerCount(t)-1, int(math.Floor(along.Hi/DimerPitch+0.5)))
			for r := rowLo; r <= rowHi; r++ {
				for d := d0; d <= d1; d++ {
					if s.TerraceAt(s.DimerCentre(t, r, d)) != t {
						continue
					}
					if !yield(Site{Terrace: t, Row: r, Dimer: d}) {
						return
					}
				}
			}
		}
	}
}
