package design

import (
	"math"

	"github.com/golang/geo/r2"

	"dimerpath/lattice"
)

// cellIndex holds one region's sites as the rectangles of their lattice
// cells (one or two per run, lattice.Surface.RunCells) in a uniform grid,
// so that the gap to another region is found by looking only at nearby
// rectangles: never all pairs of sites, nor all pairs of runs.
type cellIndex struct {
	rects  []r2.Rect
	bounds r2.Rect
	cell   float64
	grid   map[[2]int32][]int32
}

// gridCellNM is the side of a grid cell: a few rows, so a query near a
// region touches few cells while long runs span a modest number of them.
const gridCellNM = 8.0

func newCellIndex(surf *lattice.Surface, set *lattice.SiteSet) *cellIndex {
	ix := &cellIndex{bounds: r2.EmptyRect(), cell: gridCellNM, grid: map[[2]int32][]int32{}}
	for run := range set.Runs() {
		ix.rects = surf.RunCells(ix.rects, run)
	}
	for i, r := range ix.rects {
		ix.bounds = ix.bounds.AddRect(r)
		x0, y0, x1, y1 := ix.cellRange(r)
		for gx := x0; gx <= x1; gx++ {
			for gy := y0; gy <= y1; gy++ {
				k := [2]int32{gx, gy}
				ix.grid[k] = append(ix.grid[k], int32(i))
			}
		}
	}
	return ix
}

func (ix *cellIndex) cellRange(r r2.Rect) (x0, y0, x1, y1 int32) {
	f := func(v float64) int32 { return int32(math.Floor(v / ix.cell)) }
	return f(r.X.Lo), f(r.Y.Lo), f(r.X.Hi), f(r.Y.Hi)
}

// rectGap returns the distance between two rectangles and the midpoint of
// the shortest segment between them (the middle of their overlap where
// they overlap).
func rectGap(a, b r2.Rect) (float64, r2.Point) {
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
	return math.Hypot(dx, dy), r2.Point{X: mx, Y: my}
}

// boundsGap returns the distance between the bounding boxes of a and b:
// a lower bound of their gap.
func boundsGap(a, b *cellIndex) float64 {
	if a.bounds.IsEmpty() || b.bounds.IsEmpty() {
		return math.Inf(1)
	}
	d, _ := rectGap(a.bounds, b.bounds)
	return d
}

// gap returns the least distance between the cells of a and b when it is
// at most limit, with the midpoint of the shortest segment, and ok =
// false when no cells of b lie within limit of a's. Each of a's
// rectangles looks only at the grid cells within limit of it: O(|a| ·
// (limit/cell + length/cell)² · local density).
func (a *cellIndex) gap(b *cellIndex, limit float64) (d float64, at r2.Point, ok bool) {
	if len(b.rects) < len(a.rects) {
		return b.gap(a, limit)
	}
	if boundsGap(a, b) > limit {
		return 0, r2.Point{}, false
	}
	best := math.Inf(1)
	seen := make(map[int32]bool)
	for _, r := range a.rects {
		q := r.ExpandedByMargin(limit)
		if !q.Intersects(b.bounds) {
			continue
		}
		clear(seen)
		x0, y0, x1, y1 := b.cellRange(q)
		for gx := x0; gx <= x1; gx++ {
			for gy := y0; gy <= y1; gy++ {
				for _, j := range b.grid[[2]int32{gx, gy}] {
					if seen[j] {
						continue
					}
					seen[j] = true
					if g, p := rectGap(r, b.rects[j]); g < best {
						best, at = g, p
					}
				}
			}
		}
	}
	if best > limit {
		return 0, r2.Point{}, false
	}
	return best, at, true
}
