package render

import (
	"math"

	"github.com/golang/geo/r2"
)

// routeGrid finds the route's items (strokes or moves) near a view
// without visiting the million a large plan has: a uniform grid over
// their extent, each item filed under the cell of its centre when it
// fits in a cell, else in a list of wide items visited every time.
// Cells are laid out compressed (items of cell c are
// items[start[c]:start[c+1]]). Built once per plan (RouteOf), read by
// every frame.
type routeGrid struct {
	origin r2.Point
	cell   float64 // cell side, nm
	nx, ny int
	start  []int32
	items  []int32
	wide   []int32
}

// routeGridItems is about how many items share a cell.
const routeGridItems = 16

// newRouteGrid files the items whose bounds (each grown by whatever it
// may draw beyond them) are given; nil for fewer than a few thousand,
// which a frame visits quickly enough one by one.
func newRouteGrid(bounds []r2.Rect) *routeGrid {
	if len(bounds) < 4096 {
		return nil
	}
	all := r2.EmptyRect()
	for _, b := range bounds {
		all = all.Union(b)
	}
	sz := all.Size()
	area := math.Max(sz.X, 1e-3) * math.Max(sz.Y, 1e-3)
	cell := math.Sqrt(area * routeGridItems / float64(len(bounds)))
	g := &routeGrid{origin: all.Lo(), cell: cell}
	g.nx = min(max(int(math.Ceil(sz.X/cell)), 1), 2048)
	g.ny = min(max(int(math.Ceil(sz.Y/cell)), 1), 2048)
	// The cell's side follows the capped counts.
	g.cell = math.Max(sz.X/float64(g.nx), sz.Y/float64(g.ny))
	cellOf := make([]int32, len(bounds))
	count := make([]int32, g.nx*g.ny+1)
	for i, b := range bounds {
		s := b.Size()
		if s.X > g.cell || s.Y > g.cell {
			cellOf[i] = -1
			g.wide = append(g.wide, int32(i))
			continue
		}
		c := b.Center()
		cx, cy := g.index(c.X, g.origin.X, g.nx), g.index(c.Y, g.origin.Y, g.ny)
		cellOf[i] = int32(cy*g.nx + cx)
		count[cellOf[i]+1]++
	}
	for c := 1; c < len(count); c++ {
		count[c] += count[c-1]
	}
	g.start = count
	g.items = make([]int32, count[len(count)-1])
	fill := make([]int32, g.nx*g.ny)
	for i, c := range cellOf {
		if c >= 0 {
			g.items[g.start[c]+fill[c]] = int32(i)
			fill[c]++
		}
	}
	return g
}

// index returns the cell of coordinate v along one axis, clamped.
func (g *routeGrid) index(v, origin float64, n int) int {
	return min(max(int((v-origin)/g.cell), 0), n-1)
}

// near appends to buf every item that may reach into r: those filed in
// the cells r touches, grown by a cell (an item fits in one, centred in
// its own), and the wide ones.
func (g *routeGrid) near(r r2.Rect, buf []int32) []int32 {
	buf = append(buf, g.wide...)
	r = r.ExpandedByMargin(g.cell)
	if r.X.Hi < g.origin.X || r.Y.Hi < g.origin.Y ||
		r.X.Lo > g.origin.X+float64(g.nx)*g.cell || r.Y.Lo > g.origin.Y+float64(g.ny)*g.cell {
		return buf
	}
	x0, x1 := g.index(r.X.Lo, g.origin.X, g.nx), g.index(r.X.Hi, g.origin.X, g.nx)
	y0, y1 := g.index(r.Y.Lo, g.origin.Y, g.ny), g.index(r.Y.Hi, g.origin.Y, g.ny)
	for y := y0; y <= y1; y++ {
		row := y * g.nx
		buf = append(buf, g.items[g.start[row+x0]:g.start[row+x1+1]]...)
	}
	return buf
}

// covers returns the share of the grid's extent that r covers (0..1).
func (g *routeGrid) covers(r r2.Rect) float64 {
	ext := r2.RectFromPoints(g.origin, g.origin.Add(r2.Point{X: float64(g.nx) * g.cell, Y: float64(g.ny) * g.cell}))
	in := ext.Intersection(r)
	if in.IsEmpty() {
		return 0
	}
	return in.Size().X * in.Size().Y / (ext.Size().X * ext.Size().Y)
}
