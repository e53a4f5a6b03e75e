package lattice

import (
	"math"
	"slices"

	"github.com/golang/geo/r1"
	"github.com/golang/geo/r2"
)

// A site exists on the surface when its dimer's centre lies in the field
// and on the site's terrace (so both H sites of a dimer always share a
// terrace). A site belongs to an area when its own position lies in the
// area.

// Paint adds to set every existing site of the surface whose position
// lies in a. It works one lattice line at a time: the area's spans on the
// line are intersected with the terrace's and turned into dimer ranges,
// which are set a 64-bit word at a time, so painting costs
// O(lines·(Spans cost + words)) and never a test per site. It returns the
// number of sites it found in a (including those set already).
func (s *Surface) Paint(set *SiteSet, a Area) int {
	n := 0
	// A terrace's rows at once, from its first row with a site (rows
	// come in order, and would otherwise grow by append) to the last a's
	// box reaches.
	pendT, pendHi := -1, 0
	rows := func(t, _, hi int) { pendT, pendHi = t, hi }
	s.rasteriseRows(a, rows, func(t, r, d0, d1, side int) {
		if t == pendT {
			if pendHi < MaxRows {
				set.terrace(t, true).grow(r, pendHi+1)
			}
			pendT = -1
		}
		if side < 0 {
			set.AddRun(t, r, 2*d0, 2*d1+2)
			n += 2 * (d1 - d0 + 1)
			return
		}
		set.setStrided(t, r, d0, d1, side, true)
		n += d1 - d0 + 1
	})
	return n
}

// Erase removes from set every site of the surface whose position lies
// in a; see Paint.
func (s *Surface) Erase(set *SiteSet, a Area) {
	s.rasterise(a, func(t, r, d0, d1, side int) {
		if side < 0 {
			set.RemoveRun(t, r, 2*d0, 2*d1+2)
			return
		}
		set.setStrided(t, r, d0, d1, side, false)
	})
}

// PaintSite adds the site to set and reports whether it exists on the
// surface (a site that does not is not added).
func (s *Surface) PaintSite(set *SiteSet, site Site) bool {
	if !s.Valid(site) {
		return false
	}
	set.Add(site)
	return true
}

// PaintDimer adds both H sites of the dimer to set and reports whether
// the dimer exists on the surface.
func (s *Surface) PaintDimer(set *SiteSet, terrace, row, dimer int) bool {
	site := Site{Terrace: terrace, Row: row, Dimer: dimer}
	if !s.Valid(site) {
		return false
	}
	set.AddRun(terrace, row, 2*dimer, 2*dimer+2)
	return true
}

// rasterise calls emit(terrace, row, d0, d1, side) for every maximal
// range of dimers d0..d1 (inclusive) of one row whose side-`side` sites
// exist and lie in a; side is -1 when both sides of the range lie in a.
func (s *Surface) rasterise(a Area, emit func(t, r, d0, d1, side int)) {
	s.rasteriseRows(a, nil, emit)
}

// rasteriseRows is rasterise that first calls rows(terrace, lo, hi),
// when not nil, with each terrace's rows lo..hi (inclusive, lo <= hi)
// that a's box may reach.
func (s *Surface) rasteriseRows(a Area, rows func(t, lo, hi int), emit func(t, r, d0, d1, side int)) {
	b := a.Bounds()
	if b.IsEmpty() || !b.Intersects(s.Field.ExpandedByMargin(HOffset)) {
		return
	}
	var terr, s0, s1, i0, i1, both, only []r1.Interval
	for ti := range s.Terraces {
		f := s.Frame(ti)
		offAlong, offAcross := f.Rows.Split(f.Origin)
		bAcross := b.Y
		if f.Rows == RowsAlongY {
			bAcross = b.X
		}
		nRows, nDimers := s.RowCount(ti), s.DimerCount(ti)
		rowLo := max(0, int(math.Ceil((bAcross.Lo-HOffset-offAcross)/RowSpacing-1e-9)))
		rowHi := min(nRows-1, int(math.Floor((bAcross.Hi+HOffset-offAcross)/RowSpacing+1e-9)))
		if rows != nil && rowLo <= rowHi {
			rows(ti, rowLo, rowHi)
		}
		for r := rowLo; r <= rowHi; r++ {
			c := offAcross + RowAcross(r)
			terr = s.TerraceSpans(terr[:0], ti, c)
			if len(terr) == 0 {
				continue
			}
			s0 = a.Spans(s0[:0], f.Rows, c-HOffset)
			s1 = a.Spans(s1[:0], f.Rows, c+HOffset)
			i0 = IntersectIntervals(i0[:0], s0, terr)
			i1 = IntersectIntervals(i1[:0], s1, terr)
			toDimers := func(sp []r1.Interval) []r1.Interval {
				// Reuse the slice: Lo and Hi become the dimer range
				// [d0, d1+1); empty ranges are dropped.
				out := sp[:0]
				for _, x := range sp {
					d := DimersIn(r1.Interval{Lo: x.Lo - offAlong, Hi: x.Hi - offAlong})
					d.Lo, d.Hi = max(d.Lo, 0), min(d.Hi, nDimers)
					if !d.IsEmpty() {
						out = append(out, r1.Interval{Lo: float64(d.Lo), Hi: float64(d.Hi)})
					}
				}
				return out
			}
			i0, i1 = toDimers(i0), toDimers(i1)
			if slices.Equal(i0, i1) {
				for _, x := range i0 {
					emit(ti, r, int(x.Lo), int(x.Hi)-1, -1)
				}
				continue
			}
			// Where the sides differ (slanted edges), emit the dimers both
			// sides cover as whole runs and only the rest side by side.
			both = IntersectIntervals(both[:0], i0, i1)
			for _, x := range both {
				emit(ti, r, int(x.Lo), int(x.Hi)-1, -1)
			}
			for side, sp := range [2][]r1.Interval{i0, i1} {
				only = SubtractIntervals(only[:0], sp, both)
				for _, x := range only {
					emit(ti, r, int(x.Lo), int(x.Hi)-1, side)
				}
			}
		}
	}
}

// TerraceSpans appends to dst the intervals of the along-row field
// coordinate, on the line where the across-row field coordinate equals
// across (in terrace t's row direction), whose points lie on terrace t
// by the rule of TerraceAt, clipped to the field, and returns dst. The
// intervals are normalized and widened by 10⁻⁹ nm, as Area spans are, so
// that a point exactly on an edge counts as on the terrace. Complexity:
// O(vertices of t and of the bounded terraces before it).
func (s *Surface) TerraceSpans(dst []r1.Interval, t int, across float64) []r1.Interval {
	tr := &s.Terraces[t]
	fieldAlong, fieldAcross := s.Field.X, s.Field.Y
	if tr.Rows == RowsAlongY {
		fieldAlong, fieldAcross = s.Field.Y, s.Field.X
	}
	if across < fieldAcross.Lo-spanEps || across > fieldAcross.Hi+spanEps {
		return dst
	}
	// Scratch on the stack for the usual few spans (Paint and RowDimers
	// call this once per row); longer lists spill to the heap.
	var fieldBuf [1]r1.Interval
	var ownBuf, takenBuf, clippedBuf [8]r1.Interval
	field := append(fieldBuf[:0], r1.Interval{Lo: fieldAlong.Lo - spanEps, Hi: fieldAlong.Hi + spanEps})
	var own []r1.Interval
	var earlier []int
	switch {
	case len(tr.Boundary) >= 3:
		own = Polygon(tr.Boundary).Spans(ownBuf[:0], tr.Rows, across)
		earlier = s.bounded
		for k, j := range s.bounded {
			if j == t {
				earlier = s.bounded[:k]
				break
			}
		}
	case t == s.fallback:
		own = field
		earlier = s.bounded
	default:
		return dst // a second terrace without boundary holds nothing
	}
	taken := takenBuf[:0]
	for _, j := range earlier {
		taken = Polygon(s.Terraces[j].Boundary).Spans(taken, tr.Rows, across)
	}
	taken = NormalizeIntervals(taken)
	clipped := IntersectIntervals(clippedBuf[:0], own, field)
	return SubtractIntervals(dst, clipped, taken)
}

// Missing returns the sites of set that do not exist on the surface:
// outside the field, beyond a terrace's rows, or with their dimer on
// another terrace. Complexity O(rows·(terraces + words)).
func (s *Surface) Missing(set *SiteSet) *SiteSet {
	out := set.Clone()
	var dims []DimerRange
	for t := range out.terraces {
		if t >= len(s.Terraces) {
			continue // every site of an unknown terrace is missing
		}
		tr := &out.terraces[t]
		for j := range tr.rows {
			w := &tr.rows[j]
			if len(w.words) == 0 {
				continue
			}
			dims = s.RowDimers(dims[:0], t, tr.first+j)
			for _, d := range dims {
				from, to := d.Sites()
				w.setPattern(from, to, ^uint64(0), false)
			}
		}
	}
	return out
}

// SiteCell returns the lattice cell of a site, in field nm: the
// rectangle DimerPitch long along the row and RowSpacing/2 across it
// that holds the site's half of its dimer's 2x1 cell (side 0 the lower
// half across the row). Cells of neighbouring sites share edges, so the
// gap between the cells of two sets is the width of the intact surface
// between them: n intact dimer rows leave a gap of n·RowSpacing.
func (s *Surface) SiteCell(site Site) r2.Rect {
	return s.cell(site.Terrace, site.Row, site.Dimer, site.Dimer, site.Side, site.Side)
}

// RunCells appends to dst the union of the cells (see SiteCell) of a
// run's sites as at most two rectangles, one per side of the row, or one
// when both sides cover the same dimers, and returns dst.
func (s *Surface) RunCells(dst []r2.Rect, run Run) []r2.Rect {
	start, end := run.Start, run.End()
	if end <= start {
		return dst
	}
	// Side 0 holds the even indices, side 1 the odd ones.
	a0, b0 := (start+1)/2, (end-1)/2
	has0 := 2*a0 < end && a0 <= b0
	a1, b1 := start/2, (end-2)/2
	has1 := end >= 2 && 2*a1+1 >= start && 2*a1+1 < end && a1 <= b1
	switch {
	case has0 && has1 && a0 == a1 && b0 == b1:
		return append(dst, s.cell(run.Terrace, run.Row, a0, b0, 0, 1))
	case has0 && has1:
		return append(dst, s.cell(run.Terrace, run.Row, a0, b0, 0, 0), s.cell(run.Terrace, run.Row, a1, b1, 1, 1))
	case has0:
		return append(dst, s.cell(run.Terrace, run.Row, a0, b0, 0, 0))
	case has1:
		return append(dst, s.cell(run.Terrace, run.Row, a1, b1, 1, 1))
	}
	return dst
}

// DimerCells returns the union of the 2x1 cells of the dimers of one row
// of a terrace, in field nm: DimerPitch along the row for each dimer and
// RowSpacing across it, centred on the dimers. It is empty for an empty
// range.
func (s *Surface) DimerCells(terrace, row int, dimers DimerRange) r2.Rect {
	if dimers.IsEmpty() {
		return r2.EmptyRect()
	}
	return s.cell(terrace, row, dimers.Lo, dimers.Hi-1, 0, 1)
}

// cell returns the rectangle of the cells of dimers d0..d1 of a row,
// sides side0..side1.
func (s *Surface) cell(terrace, row, d0, d1, side0, side1 int) r2.Rect {
	t := &s.Terraces[terrace]
	offAlong, offAcross := t.Rows.Split(t.Offset)
	c := offAcross + RowAcross(row)
	alongLo := offAlong + DimerEdge(d0)
	alongHi := offAlong + DimerEdge(d1+1)
	acrossLo := c - RowSpacing/2 + float64(side0)*RowSpacing/2
	acrossHi := c + float64(side1)*RowSpacing/2
	return r2.RectFromPoints(t.Rows.Join(alongLo, acrossLo), t.Rows.Join(alongHi, acrossHi))
}
