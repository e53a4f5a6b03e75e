package lattice

import (
	"math"
	"slices"

	"github.com/golang/geo/r2"
)

// OutlinePolygon is one piece of the outline of a site set's cells (see
// Surface.SiteCell) on one terrace, in field nm: Outer runs
// counter-clockwise, each of Holes clockwise, and every edge is parallel
// to a field axis (cells are rectangles along and across the rows).
// Rings do not repeat their first point.
type OutlinePolygon struct {
	Outer []r2.Point
	Holes [][]r2.Point
	// keyhole is Outer with every hole joined in by a cut of zero width.
	keyhole []r2.Point
}

// Keyholed returns the piece as one ring, for formats whose polygons
// cannot hold holes (GDSII): each hole is joined to the ring around it
// by a cut of zero width along the rows' direction, so the ring encloses
// exactly the piece's area (by the even-odd rule and by its signed
// area). Without holes it is Outer.
func (p OutlinePolygon) Keyholed() []r2.Point {
	if p.keyhole == nil {
		return p.Outer
	}
	return p.keyhole
}

// Outline returns the outline of the cells of set's sites on one terrace:
// the union of the sites' cells (each DimerPitch along the row by
// RowSpacing/2 across it), as polygons with holes. Cells that touch only
// at a corner belong to different pieces. Sites of other terraces are
// left out, so a region that crosses a step has pieces on each terrace,
// which may overlap by less than a cell at the step. Complexity:
// O(runs·log runs) in the set's runs on the terrace, never per site.
func (s *Surface) Outline(set *SiteSet, terrace int) []OutlinePolygon {
	return s.OutlineRows(set, terrace, 0, set.RowCount(terrace))
}

// OutlineRows is Outline for the rows [rowFrom, rowTo) of the terrace
// only, so a caller can cut a large outline into bands of rows.
func (s *Surface) OutlineRows(set *SiteSet, terrace, rowFrom, rowTo int) []OutlinePolygon {
	if terrace < 0 || terrace >= len(s.Terraces) {
		return nil
	}
	pieces := cellOutlines(set, terrace, max(rowFrom, 0), min(rowTo, set.RowCount(terrace)))
	t := &s.Terraces[terrace]
	f := t.Frame()
	// Corner (E, K) in half units: along edge E/2 lies half a pitch
	// before dimer E/2's centre, across edge K/2 at the low side of
	// strip K/2 = 2·row + side.
	at := func(c corner) r2.Point {
		return f.ToField((float64(c.e)/2-0.5)*DimerPitch, (float64(c.k)/2-1)*RowSpacing/2)
	}
	ring := func(cs []corner) []r2.Point {
		out := make([]r2.Point, len(cs))
		for i, c := range cs {
			out[i] = at(c)
		}
		// Exchanging the axes (rows along y) mirrors the plane: keep
		// outer rings counter-clockwise in the field.
		if t.Rows == RowsAlongY {
			slices.Reverse(out)
		}
		return out
	}
	out := make([]OutlinePolygon, len(pieces))
	for i, pc := range pieces {
		p := OutlinePolygon{Outer: ring(pc.outer)}
		for _, h := range pc.holes {
			p.Holes = append(p.Holes, ring(h))
		}
		if len(pc.holes) > 0 {
			p.keyhole = ring(keyhole(pc.outer, pc.holes))
		}
		out[i] = p
	}
	return out
}

// corner is a corner of the cell grid of one terrace in half units (so
// that midpoints of unit edges are whole): e = 2·(along edge), k =
// 2·(across edge).
type corner struct{ e, k int }

type cellPiece struct {
	outer []corner
	holes [][]corner
}

// edge is a unit-length... or longer boundary edge between cells, with
// the set's cells on its left.
type edge struct {
	from, to corner
	used     bool
}

// cellOutlines traces the boundary of the union of the cells of set's
// sites on terrace t, rows [r0, r1), into rings: outer rings
// counter-clockwise in the (along, across) frame, holes clockwise, each
// hole given to the smallest outer ring around it.
func cellOutlines(set *SiteSet, t, r0, r1 int) []cellPiece {
	if r1 <= r0 {
		return nil
	}
	// Dimer intervals [a, b) per strip k = 2·row + side, for the strips of
	// the rows asked for.
	k0 := 2 * r0
	strips := make([][][2]int, 2*(r1-r0))
	for r := r0; r < r1; r++ {
		eachRun(set.Row(t, r), func(start, end int) bool {
			// Side 0 holds the even indices, side 1 the odd ones.
			if a, b := (start+1)/2, (end+1)/2; a < b {
				strips[2*(r-r0)] = appendInterval(strips[2*(r-r0)], a, b)
			}
			if a, b := start/2, end/2; a < b {
				strips[2*(r-r0)+1] = appendInterval(strips[2*(r-r0)+1], a, b)
			}
			return true
		})
	}
	// Boundary edges, cells on their left: bottoms of strips run +along,
	// tops -along, left sides down, right sides up.
	var edges []edge
	add := func(e0, k0_, e1, k1 int) {
		edges = append(edges, edge{from: corner{2 * e0, 2 * k0_}, to: corner{2 * e1, 2 * k1}})
	}
	var diff []([2]int)
	for i := 0; i <= len(strips); i++ {
		var below, above [][2]int
		if i > 0 {
			below = strips[i-1]
		}
		if i < len(strips) {
			above = strips[i]
		}
		k := k0 + i
		diff = subtractIntervals(diff[:0], above, below)
		for _, iv := range diff {
			add(iv[0], k, iv[1], k)
		}
		diff = subtractIntervals(diff[:0], below, above)
		for _, iv := range diff {
			add(iv[1], k, iv[0], k)
		}
		for _, iv := range above {
			add(iv[0], k+1, iv[0], k)
			add(iv[1], k, iv[1], k+1)
		}
	}
	if len(edges) == 0 {
		return nil
	}
	// Link edges into rings. A corner where two pieces touch has two
	// edges in and two out: turning left there keeps pieces that touch
	// only at a corner apart.
	slices.SortFunc(edges, func(a, b edge) int { return compareCorner(a.from, b.from) })
	outAt := func(c corner) (int, int) {
		lo, _ := slices.BinarySearchFunc(edges, c, func(e edge, c corner) int { return compareCorner(e.from, c) })
		hi := lo
		for hi < len(edges) && edges[hi].from == c {
			hi++
		}
		return lo, hi
	}
	var outers, holes [][]corner
	for i := range edges {
		if edges[i].used {
			continue
		}
		var ring []corner
		cur := i
		for !edges[cur].used {
			e := &edges[cur]
			e.used = true
			ring = append(ring, e.from)
			lo, hi := outAt(e.to)
			next := -1
			for j := lo; j < hi; j++ {
				if edges[j].used {
					continue
				}
				if next < 0 || leftOf(e, &edges[j]) {
					next = j
				}
			}
			if next < 0 {
				break
			}
			cur = next
		}
		ring = simplify(ring)
		if len(ring) < 4 {
			continue
		}
		if ringArea2(ring) > 0 {
			outers = append(outers, ring)
		} else {
			holes = append(holes, ring)
		}
	}
	pieces := make([]cellPiece, len(outers))
	for i, o := range outers {
		pieces[i].outer = o
	}
	if len(holes) == 0 {
		return pieces
	}
	// Each hole goes to the smallest outer ring holding a point inside
	// it: the centre of the cell to the right of its first edge.
	boxes := make([][4]int, len(outers))
	for i, o := range outers {
		boxes[i] = ringBox(o)
	}
	for _, h := range holes {
		p := insidePoint(h)
		best, bestArea := -1, math.MaxInt
		for i, o := range outers {
			b := boxes[i]
			if p.e < b[0] || p.e > b[2] || p.k < b[1] || p.k > b[3] {
				continue
			}
			if a := ringArea2(o); a < bestArea && ringContains(o, p) {
				best, bestArea = i, a
			}
		}
		if best >= 0 {
			pieces[best].holes = append(pieces[best].holes, h)
		}
	}
	return pieces
}

// appendInterval adds [a, b) to a sorted interval list, merging it with
// the last interval when they touch.
func appendInterval(list [][2]int, a, b int) [][2]int {
	if n := len(list); n > 0 && list[n-1][1] >= a {
		list[n-1][1] = max(list[n-1][1], b)
		return list
	}
	return append(list, [2]int{a, b})
}

// subtractIntervals appends to dst the parts of sorted list a outside
// sorted list b.
func subtractIntervals(dst, a, b [][2]int) [][2]int {
	j := 0
	for _, iv := range a {
		lo := iv[0]
		for j < len(b) && b[j][1] <= lo {
			j++
		}
		for k := j; k < len(b) && b[k][0] < iv[1]; k++ {
			if b[k][0] > lo {
				dst = append(dst, [2]int{lo, b[k][0]})
			}
			lo = max(lo, b[k][1])
		}
		if lo < iv[1] {
			dst = append(dst, [2]int{lo, iv[1]})
		}
	}
	return dst
}

func compareCorner(a, b corner) int {
	if a.k != b.k {
		return a.k - b.k
	}
	return a.e - b.e
}

// leftOf reports whether edge b turns further left from edge a than
// going straight on would (a left turn beats straight, straight beats a
// right turn); only b's direction matters.
func leftOf(a, b *edge) bool {
	dx, dy := a.to.e-a.from.e, a.to.k-a.from.k
	ex, ey := b.to.e-b.from.e, b.to.k-b.from.k
	return dx*ey-dy*ex > 0
}

// simplify drops corners where the ring goes straight on.
func simplify(ring []corner) []corner {
	n := len(ring)
	out := ring[:0:0]
	for i := range ring {
		p, c, q := ring[(i+n-1)%n], ring[i], ring[(i+1)%n]
		if (p.e == c.e && c.e == q.e) || (p.k == c.k && c.k == q.k) {
			continue
		}
		out = append(out, c)
	}
	return out
}

// ringArea2 returns twice the signed area (positive counter-clockwise).
func ringArea2(r []corner) int {
	a := 0
	for i := range r {
		p, q := r[i], r[(i+1)%len(r)]
		a += p.e*q.k - q.e*p.k
	}
	return a / 4 // corners are in half units: area in (half units)²/4·2
}

func ringBox(r []corner) [4]int {
	b := [4]int{math.MaxInt, math.MaxInt, math.MinInt, math.MinInt}
	for _, c := range r {
		b[0], b[1] = min(b[0], c.e), min(b[1], c.k)
		b[2], b[3] = max(b[2], c.e), max(b[3], c.k)
	}
	return b
}

// insidePoint returns the centre of the cell on the right of a hole
// ring's first edge, a point inside the hole and on no grid line.
func insidePoint(h []corner) corner {
	a, b := h[0], h[1]
	mid := corner{(a.e + b.e) / 2, (a.k + b.k) / 2}
	// Unit steps are 2 half units; the right of direction (dx, dy) is
	// (dy, -dx).
	dx, dy := sign(b.e-a.e), sign(b.k-a.k)
	if mid.e%2 == 0 && mid.k%2 == 0 { // a long edge: start from its first unit
		mid = corner{a.e + dx, a.k + dy}
	}
	return corner{mid.e + dy, mid.k - dx}
}

func sign(v int) int {
	switch {
	case v > 0:
		return 1
	case v < 0:
		return -1
	}
	return 0
}

// ringContains reports whether p, on no edge of r, lies inside r.
func ringContains(r []corner, p corner) bool {
	inside := false
	j := len(r) - 1
	for i := range r {
		a, b := r[i], r[j]
		j = i
		if (a.k > p.k) != (b.k > p.k) {
			// Rectilinear: a crossing edge is vertical.
			if p.e < a.e {
				inside = !inside
			}
		}
	}
	return inside
}

// keyhole joins each hole to the ring around it (Eberly's bridging, on
// the grid): holes are taken rightmost first, and from the middle of the
// first unit of each hole's rightmost edge a cut runs along +e to the
// nearest edge of the ring built so far, which holes further right have
// already joined; so no cut crosses a hole. Half-unit midpoints lie on
// no grid line, so a cut never runs along an edge or through a corner.
func keyhole(outer []corner, holes [][]corner) []corner {
	type entry struct {
		ring []corner
		maxE int
	}
	hs := make([]entry, len(holes))
	for i, h := range holes {
		hs[i] = entry{h, ringBox(h)[2]}
	}
	slices.SortStableFunc(hs, func(a, b entry) int { return b.maxE - a.maxE })
	ring := slices.Clone(outer)
	for _, h := range hs {
		// The hole's rightmost vertical edge with the lowest start.
		n := len(h.ring)
		best := -1
		for i := range n {
			a, b := h.ring[i], h.ring[(i+1)%n]
			if a.e == h.maxE && b.e == h.maxE && (best < 0 || min(a.k, b.k) < min(h.ring[best].k, h.ring[(best+1)%n].k)) {
				best = i
			}
		}
		a, b := h.ring[best], h.ring[(best+1)%n]
		start := corner{h.maxE, min(a.k, b.k) + 1}
		// The nearest ring edge crossing the line k = start.k to the right.
		hit, hitE := -1, math.MaxInt
		for i := range ring {
			p, q := ring[i], ring[(i+1)%len(ring)]
			if p.e != q.e || p.e <= start.e || p.e >= hitE {
				continue
			}
			if (p.k < start.k) != (q.k < start.k) {
				hit, hitE = i, p.e
			}
		}
		if hit < 0 {
			continue // not inside: cannot happen for a hole of this ring
		}
		x := corner{hitE, start.k}
		// ring[..hit], x, start, hole from the corner after start round
		// to start, x, ring[hit+1..].
		joined := make([]corner, 0, len(ring)+n+4)
		joined = append(joined, ring[:hit+1]...)
		joined = append(joined, x, start)
		for j := 1; j <= n; j++ {
			joined = append(joined, h.ring[(best+j)%n])
		}
		joined = append(joined, start, x)
		joined = append(joined, ring[hit+1:]...)
		ring = joined
	}
	return ring
}
