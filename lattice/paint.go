package lattice

import (
	"math"

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
	s.rasterise(a, func(t, r, d0, d1, side int) {
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
	b := a.Bounds()
	if b.IsEmpty() || !b.Intersects(s.Field.ExpandedByMargin(HOffset)) {
		return
	}
	var terr, s0, s1, i0, i1, both, only []Span
	for ti := range s.Terraces {
		t := &s.Terraces[ti]
		offAlong, offAcross := s.axes(t.Rows, t.Offset)
		bAcross := b.Y
		if t.Rows == RowsAlongY {
			bAcross = b.X
		}
		nRows, nDimers := s.RowCount(ti), s.DimerCount(ti)
		r0 := max(0, int(math.Ceil((bAcross.Lo-HOffset-offAcross)/RowSpacing-1e-9)))
		r1 := min(nRows-1, int(math.Floor((bAcross.Hi+HOffset-offAcross)/RowSpacing+1e-9)))
		for r := r0; r <= r1; r++ {
			c := offAcross + float64(r)*RowSpacing
			terr = s.terraceSpans(terr[:0], ti, c)
			if len(terr) == 0 {
				continue
			}
			s0 = a.Spans(s0[:0], t.Rows, c-HOffset)
			s1 = a.Spans(s1[:0], t.Rows, c+HOffset)
			i0 = intersectSpans(i0[:0], s0, terr)
			i1 = intersectSpans(i1[:0], s1, terr)
			toDimers := func(sp []Span) []Span {
				// Reuse the slice: Lo and Hi become the half-open dimer
				// range [d0, d1+1); empty ranges are dropped.
				out := sp[:0]
				for _, x := range sp {
					d0 := int(math.Ceil((x.Lo-offAlong)/DimerPitch - 1e-9))
					d1 := int(math.Ceil((x.Hi-offAlong)/DimerPitch+1e-9)) - 1
					d0, d1 = max(d0, 0), min(d1, nDimers-1)
					if d0 <= d1 {
						out = append(out, Span{float64(d0), float64(d1 + 1)})
					}
				}
				return out
			}
			i0, i1 = toDimers(i0), toDimers(i1)
			if equalSpans(i0, i1) {
				for _, x := range i0 {
					emit(ti, r, int(x.Lo), int(x.Hi)-1, -1)
				}
				continue
			}
			// Where the sides differ (slanted edges), emit the dimers both
			// sides cover as whole runs and only the rest side by side.
			both = intersectSpans(both[:0], i0, i1)
			for _, x := range both {
				emit(ti, r, int(x.Lo), int(x.Hi)-1, -1)
			}
			for side, sp := range [2][]Span{i0, i1} {
				only = subtractSpans(only[:0], sp, both)
				for _, x := range only {
					emit(ti, r, int(x.Lo), int(x.Hi)-1, side)
				}
			}
		}
	}
}

func equalSpans(a, b []Span) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}

// terraceSpans appends to dst the spans of the along-row coordinate on
// the line across = c (in terrace ti's row direction) where a point lies
// on terrace ti by the rule of TerraceAt, clipped to the field.
func (s *Surface) terraceSpans(dst []Span, ti int, c float64) []Span {
	t := &s.Terraces[ti]
	fieldAlong, fieldAcross := s.Field.X, s.Field.Y
	if t.Rows == RowsAlongY {
		fieldAlong, fieldAcross = s.Field.Y, s.Field.X
	}
	if c < fieldAcross.Lo-spanEps || c > fieldAcross.Hi+spanEps {
		return dst
	}
	field := []Span{closedSpan(fieldAlong.Lo-spanEps, fieldAlong.Hi+spanEps)}
	var own []Span
	var earlier []int
	switch {
	case len(t.Boundary) >= 3:
		own = Polygon(t.Boundary).Spans(nil, t.Rows, c)
		for _, j := range s.bounded {
			if j == ti {
				break
			}
			earlier = append(earlier, j)
		}
	case ti == s.fallback:
		own = field
		earlier = s.bounded
	default:
		return dst // a second terrace without boundary holds nothing
	}
	var taken []Span
	for _, j := range earlier {
		taken = Polygon(s.Terraces[j].Boundary).Spans(taken, t.Rows, c)
	}
	taken = normalizeSpans(taken)
	clipped := intersectSpans(nil, own, field)
	return subtractSpans(dst, clipped, taken)
}

// Missing returns the sites of set that do not exist on the surface:
// outside the field, beyond a terrace's rows, or with their dimer on
// another terrace. Complexity O(rows·(terraces + words)).
func (s *Surface) Missing(set *SiteSet) *SiteSet {
	out := set.Clone()
	var terr []Span
	for t := range out.terraces {
		if t >= len(s.Terraces) {
			continue // every site of an unknown terrace is missing
		}
		tr := &s.Terraces[t]
		offAlong, offAcross := s.axes(tr.Rows, tr.Offset)
		nRows, nDimers := s.RowCount(t), s.DimerCount(t)
		for r, w := range out.terraces[t] {
			if len(w) == 0 || r >= nRows {
				continue
			}
			terr = s.terraceSpans(terr[:0], t, offAcross+float64(r)*RowSpacing)
			for _, x := range terr {
				d0 := max(0, int(math.Ceil((x.Lo-offAlong)/DimerPitch-1e-9)))
				d1 := min(nDimers-1, int(math.Ceil((x.Hi-offAlong)/DimerPitch+1e-9))-1)
				from, to := 2*d0, min(2*d1+2, len(w)*64)
				if from < to {
					setRange(w, from, to, false)
				}
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

// cell returns the rectangle of the cells of dimers d0..d1 of a row,
// sides side0..side1.
func (s *Surface) cell(terrace, row, d0, d1, side0, side1 int) r2.Rect {
	t := &s.Terraces[terrace]
	offAlong, offAcross := s.axes(t.Rows, t.Offset)
	c := offAcross + float64(row)*RowSpacing
	alongLo := offAlong + (float64(d0)-0.5)*DimerPitch
	alongHi := offAlong + (float64(d1)+0.5)*DimerPitch
	acrossLo := c - RowSpacing/2 + float64(side0)*RowSpacing/2
	acrossHi := c + float64(side1)*RowSpacing/2
	return r2.RectFromPoints(fromAxes(t.Rows, alongLo, acrossLo), fromAxes(t.Rows, alongHi, acrossHi))
}
