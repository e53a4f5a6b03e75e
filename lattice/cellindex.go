package lattice

import (
	"fmt"
	"math"

	"github.com/golang/geo/r2"
)

// CellIndex holds the lattice cells (see Surface.SiteCell) of one site
// set, merged into at most two rectangles per run of sites
// (Surface.RunCells), in a uniform grid. It answers how far apart two
// site sets are, measured between their cells: the width of the intact
// surface between them, so n intact dimer rows measure n·RowSpacing, one
// intact dimer along a row DimerPitch, and touching or overlapping sets
// 0. A query looks only at the grid cells near its rectangles, never at
// all pairs of sites or of runs, so its cost grows with the sets'
// outlines, not their site counts.
//
// The index is a snapshot: it does not follow later changes to the set.
// Its methods only read it, so it may be queried from several goroutines
// at once.
type CellIndex struct {
	rects  []r2.Rect
	bounds r2.Rect
	// The grid covers bounds with nx·ny square cells of side cell; the
	// rectangles overlapping grid cell k are items[start[k]:start[k+1]].
	cell   float64
	nx, ny int
	start  []int32
	items  []int32
}

// cellIndexGridNM is the side of a grid cell, in nm: a few rows, so that
// a query near a set touches few cells while long runs span a modest
// number of them. Sets spread thinly over a large field get larger cells
// (see NewCellIndex), so the grid never outgrows the set.
const cellIndexGridNM = 8.0

// NewCellIndex indexes the cells of set's sites on surf; sites of
// terraces surf does not have are left out. Cost: O(runs + Σ run length /
// 8 nm) time and memory.
func NewCellIndex(surf *Surface, set *SiteSet) *CellIndex {
	ix := &CellIndex{bounds: r2.EmptyRect(), cell: cellIndexGridNM}
	for run := range set.Runs() {
		if run.Terrace >= len(surf.Terraces) {
			continue
		}
		ix.rects = surf.RunCells(ix.rects, run)
	}
	if len(ix.rects) == 0 {
		return ix
	}
	for _, r := range ix.rects {
		ix.bounds = ix.bounds.AddRect(r)
	}
	// At most about 4 grid cells per rectangle (and 4096 in all) before
	// the cells grow: a thin set over a wide field stays small.
	w, h := ix.bounds.X.Length(), ix.bounds.Y.Length()
	if most := float64(max(4*len(ix.rects), 4096)); (w/ix.cell+1)*(h/ix.cell+1) > most {
		ix.cell = max(ix.cell, math.Sqrt(w*h/most), w/most, h/most)
	}
	ix.nx = int(w/ix.cell) + 1
	ix.ny = int(h/ix.cell) + 1
	ix.start = make([]int32, ix.nx*ix.ny+1)
	for _, r := range ix.rects {
		x0, y0, x1, y1 := ix.gridRange(r)
		for gy := y0; gy <= y1; gy++ {
			for gx := x0; gx <= x1; gx++ {
				ix.start[gy*ix.nx+gx+1]++
			}
		}
	}
	for k := 1; k < len(ix.start); k++ {
		ix.start[k] += ix.start[k-1]
	}
	ix.items = make([]int32, ix.start[len(ix.start)-1])
	fill := append([]int32(nil), ix.start[:len(ix.start)-1]...)
	for i, r := range ix.rects {
		x0, y0, x1, y1 := ix.gridRange(r)
		for gy := y0; gy <= y1; gy++ {
			for gx := x0; gx <= x1; gx++ {
				k := gy*ix.nx + gx
				ix.items[fill[k]] = int32(i)
				fill[k]++
			}
		}
	}
	return ix
}

// IsEmpty reports whether the indexed set had no sites on the surface.
func (ix *CellIndex) IsEmpty() bool { return len(ix.rects) == 0 }

// Bounds returns the smallest field rectangle, in nm, holding every
// indexed cell; it is empty for an empty index.
func (ix *CellIndex) Bounds() r2.Rect { return ix.bounds }

// gridRange returns the grid cells, clamped to the grid, that a
// rectangle overlaps.
func (ix *CellIndex) gridRange(r r2.Rect) (x0, y0, x1, y1 int) {
	f := func(v, lo float64, n int) int {
		return min(max(int(math.Floor((v-lo)/ix.cell)), 0), n-1)
	}
	return f(r.X.Lo, ix.bounds.X.Lo, ix.nx), f(r.Y.Lo, ix.bounds.Y.Lo, ix.ny),
		f(r.X.Hi, ix.bounds.X.Lo, ix.nx), f(r.Y.Hi, ix.bounds.Y.Lo, ix.ny)
}

// rectGap returns the least distance between two rectangles, in nm (0
// when they touch or overlap), and the midpoint of the shortest segment
// between them (the middle of their overlap where they overlap).
func rectGap(a, b r2.Rect) (float64, r2.Point) {
	g := rectSpan(a, b)
	return g.NM, g.At
}

// rectSpan returns the shortest segment between two rectangles as a Gap.
func rectSpan(a, b r2.Rect) Gap {
	gap := func(alo, ahi, blo, bhi float64) (float64, float64) {
		switch {
		case bhi < alo:
			return alo - bhi, (alo + bhi) / 2
		case ahi < blo:
			return blo - ahi, (ahi + blo) / 2
		}
		lo, hi := max(alo, blo), min(ahi, bhi)
		return 0, (lo + hi) / 2
	}
	dx, mx := gap(a.X.Lo, a.X.Hi, b.X.Lo, b.X.Hi)
	dy, my := gap(a.Y.Lo, a.Y.Hi, b.Y.Lo, b.Y.Hi)
	return Gap{NM: math.Hypot(dx, dy), At: r2.Point{X: mx, Y: my}, Extent: r2.Point{X: dx, Y: dy}}
}

// boundsGap is the distance between the bounding boxes of a and b, a
// lower bound of their gap; +Inf when either is empty.
func boundsGap(a, b *CellIndex) float64 {
	if a.IsEmpty() || b.IsEmpty() {
		return math.Inf(1)
	}
	d, _ := rectGap(a.bounds, b.bounds)
	return d
}

// GapWithin returns the least distance, in nm, between the cells of a and
// those of b when it is at most limit, with the midpoint of the shortest
// segment between them (where to look), and ok = false when no cell of b
// lies within limit of a cell of a (or either index is empty). It is the
// "is a within limit of b" query: each rectangle of the smaller index
// looks only at the grid cells of the other within limit of it, so the
// cost is O(rects · (limit/8 nm + rect length/8 nm)² · local density),
// independent of the sets' site counts.
func (a *CellIndex) GapWithin(b *CellIndex, limit float64) (d float64, at r2.Point, ok bool) {
	g, ok := a.SpanWithin(b, limit)
	return g.NM, g.At, ok
}

// SpanWithin is GapWithin with the whole shortest segment: its length,
// midpoint and extent along x and y (see Gap).
func (a *CellIndex) SpanWithin(b *CellIndex, limit float64) (Gap, bool) {
	if len(b.rects) < len(a.rects) {
		return b.SpanWithin(a, limit)
	}
	if !(boundsGap(a, b) <= limit) {
		return Gap{}, false
	}
	best := Gap{NM: math.Inf(1)}
	// seen[j] == k+1 when a's rectangle k has looked at b's rectangle j,
	// which sits in several grid cells.
	seen := make([]int32, len(b.rects))
	for k, r := range a.rects {
		q := r.ExpandedByMargin(limit)
		if !q.Intersects(b.bounds) {
			continue
		}
		stamp := int32(k + 1)
		x0, y0, x1, y1 := b.gridRange(q)
		for gy := y0; gy <= y1; gy++ {
			for gx := x0; gx <= x1; gx++ {
				g := gy*b.nx + gx
				for _, j := range b.items[b.start[g]:b.start[g+1]] {
					if seen[j] == stamp {
						continue
					}
					seen[j] = stamp
					if s := rectSpan(r, b.rects[j]); s.NM < best.NM {
						best = s
					}
				}
			}
		}
	}
	if best.NM > limit {
		return Gap{}, false
	}
	return best, true
}

// Gap returns the least distance, in nm, between the cells of a and b
// and the midpoint of the shortest segment between them; the distance is
// +Inf when either index is empty. It widens a GapWithin search from the
// bounding boxes' distance until it finds the nearest cells, so sets far
// apart cost little more than near ones.
func (a *CellIndex) Gap(b *CellIndex) (float64, r2.Point) {
	g := a.Span(b)
	return g.NM, g.At
}

// Span is Gap with the whole shortest segment (see Gap); its NM is +Inf
// when either index is empty.
func (a *CellIndex) Span(b *CellIndex) Gap {
	lower := boundsGap(a, b)
	if math.IsInf(lower, 1) {
		return Gap{NM: lower}
	}
	for limit := lower + 1; ; limit *= 2 {
		if g, ok := a.SpanWithin(b, limit); ok {
			return g
		}
	}
}

// Gap is the intact surface between two site sets, as a CellIndex
// measures it: the shortest segment between their cells, of length NM,
// midpoint At (field nm) and extent Extent along x and along y (each ≥ 0,
// nm). Where the segment crosses the dimer rows its width counts intact
// rows (n rows measure n·RowSpacing); where it runs along a row, intact
// dimers (n·DimerPitch); see Surface.GapInLattice.
type Gap struct {
	NM     float64
	At     r2.Point
	Extent r2.Point
}

// GapInLattice returns g's width in the lattice of the terrace at g.At:
// rows, the intact dimer rows it crosses (its extent across the rows over
// RowSpacing), and dimers, the intact dimers it spans along them (its
// extent along the rows over DimerPitch). ok is false where no terrace
// holds g.At.
func (s *Surface) GapInLattice(g Gap) (rows, dimers float64, ok bool) {
	t := s.TerraceAt(g.At)
	if t < 0 {
		return 0, 0, false
	}
	along, across := s.Terraces[t].Rows.Split(g.Extent)
	return across / RowSpacing, along / DimerPitch, true
}

// DescribeGap states g's width in the lattice unit of its direction,
// saying which: "9.0 dimer rows across the rows" for a gap that crosses
// rows, "17.0 dimers along a row" for one that runs along a row, both
// counts for a diagonal one, and "" where no terrace holds g.At. Callers
// put it beside the width in nm: "6.91 nm (9.0 dimer rows across the
// rows)".
func (s *Surface) DescribeGap(g Gap) string {
	rows, dimers, ok := s.GapInLattice(g)
	// Cell edges are shared by neighbouring sites, so a straight gap has
	// no extent at all the other way; 0.01 nm forgives rounding.
	const flat = 0.01
	switch {
	case !ok:
		return ""
	case dimers*DimerPitch < flat:
		return fmt.Sprintf("%.1f dimer rows across the rows", rows)
	case rows*RowSpacing < flat:
		return fmt.Sprintf("%.1f dimers along a row", dimers)
	}
	return fmt.Sprintf("diagonal: %.1f dimer rows across, %.1f dimers along the rows", rows, dimers)
}

// GapText formats g as its width in nm with DescribeGap's count beside
// it: "6.91 nm (9.0 dimer rows across the rows)".
func (s *Surface) GapText(g Gap) string {
	if d := s.DescribeGap(g); d != "" {
		return fmt.Sprintf("%.2f nm (%s)", g.NM, d)
	}
	return fmt.Sprintf("%.2f nm", g.NM)
}

// NearestWithin returns the least distance, in nm, from p to the indexed
// cells when it is at most limit, with the nearest point of those cells;
// ok is false when no cell lies within limit (or the index is empty).
// Only the grid cells within limit of p are looked at.
func (ix *CellIndex) NearestWithin(p r2.Point, limit float64) (d float64, at r2.Point, ok bool) {
	return ix.SegmentWithin(p, p, limit)
}

// SegmentWithin returns the least distance, in nm, from the segment ab to
// the indexed cells when it is at most limit (0 where the segment crosses
// a cell), with the point of the cells nearest the segment; ok is false
// when no cell lies within limit. Only the grid cells within limit of the
// segment's bounding box are looked at.
func (ix *CellIndex) SegmentWithin(a, b r2.Point, limit float64) (d float64, at r2.Point, ok bool) {
	if ix.IsEmpty() {
		return 0, r2.Point{}, false
	}
	q := r2.RectFromPoints(a, b).ExpandedByMargin(limit)
	if !q.Intersects(ix.bounds) {
		return 0, r2.Point{}, false
	}
	best := math.Inf(1)
	x0, y0, x1, y1 := ix.gridRange(q)
	for gy := y0; gy <= y1; gy++ {
		for gx := x0; gx <= x1; gx++ {
			g := gy*ix.nx + gx
			for _, j := range ix.items[ix.start[g]:ix.start[g+1]] {
				if dd, pt := segmentRect(a, b, ix.rects[j]); dd < best {
					best, at = dd, pt
				}
			}
		}
	}
	if best > limit {
		return 0, r2.Point{}, false
	}
	return best, at, true
}

// segmentRect returns the distance from the segment ab to the rectangle r
// (0 when they meet) and the point of r nearest the segment.
func segmentRect(a, b r2.Point, r r2.Rect) (float64, r2.Point) {
	clampTo := func(p r2.Point) r2.Point { return r.ClampPoint(p) }
	if r.ContainsPoint(a) {
		return 0, a
	}
	if r.ContainsPoint(b) {
		return 0, b
	}
	// The segment crosses the rectangle when it crosses one of its sides.
	corners := r.Vertices()
	for k := range 4 {
		c, e := corners[k], corners[(k+1)%4]
		if p, ok := segmentsMeet(a, b, c, e); ok {
			return 0, p
		}
	}
	best := math.Inf(1)
	var at r2.Point
	for _, p := range []r2.Point{a, b} {
		c := clampTo(p)
		if d := p.Sub(c).Norm(); d < best {
			best, at = d, c
		}
	}
	for _, c := range corners {
		if d := pointSegment(c, a, b); d < best {
			best, at = d, c
		}
	}
	return best, at
}

// pointSegment returns the distance from p to the segment ab.
func pointSegment(p, a, b r2.Point) float64 {
	ab := b.Sub(a)
	l2 := ab.Dot(ab)
	t := 0.0
	if l2 > 0 {
		t = math.Max(0, math.Min(1, p.Sub(a).Dot(ab)/l2))
	}
	return p.Sub(a.Add(ab.Mul(t))).Norm()
}

// segmentsMeet returns where the segments ab and cd cross, if they do.
func segmentsMeet(a, b, c, d r2.Point) (r2.Point, bool) {
	r, s := b.Sub(a), d.Sub(c)
	den := r.Cross(s)
	if den == 0 {
		return r2.Point{}, false
	}
	t := c.Sub(a).Cross(s) / den
	u := c.Sub(a).Cross(r) / den
	if t < 0 || t > 1 || u < 0 || u > 1 {
		return r2.Point{}, false
	}
	return a.Add(r.Mul(t)), true
}
