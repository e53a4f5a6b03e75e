package route

import (
	"math"
	"runtime"
	"slices"
)

// graph is the node model of one ordering problem. A point item is one
// node; a stroke is two nodes, its ends, joined by a fixed edge that no
// move removes, so that reversing a stretch of the tour flips the strokes
// in it for free. An open path gets a dummy node at distance zero from
// every node: the tour through it is a cycle, and cutting the cycle at
// the dummy gives the path. A start position is a node of its own, tied
// to the dummy by a one-way fixed edge (dummy, start) when the path is
// open, so the path leaves from it.
type graph struct {
	x, y    []float64
	partner []int32 // fixed-edge partner, -1 if none
	tail    []bool  // the node is the first end of a one-way fixed edge
	item    []int32 // item index, -1 for the start and the dummy
	end     []uint8 // 0: the item's A end, 1: its B end
	dummy   int32   // -1 if none
	start   int32   // -1 if none
	finish  int32   // the end node of a path with a fixed end, -1 if none
	oneWay  int     // number of one-way fixed edges
	real    int     // number of nodes that are not the dummy
}

// newGraph builds the node model of items, with an optional start; open
// adds the dummy. The dummy, when present, is the last node. An end
// (with a start, and not open) is a node tied to the start by a one-way
// fixed edge (end, start): the tour then runs start, items, end.
func newGraph(items []Item, start, end *Point, open bool) *graph {
	n := 0
	for _, it := range items {
		if it.IsPoint() {
			n++
		} else {
			n += 2
		}
	}
	if start != nil {
		n++
	}
	if end != nil {
		n++
	}
	if open {
		n++
	}
	g := &graph{
		x: make([]float64, 0, n), y: make([]float64, 0, n),
		partner: make([]int32, 0, n), tail: make([]bool, 0, n),
		item: make([]int32, 0, n), end: make([]uint8, 0, n),
		dummy: -1, start: -1, finish: -1,
	}
	add := func(p Point, item int32, end uint8) int32 {
		g.x = append(g.x, p.X)
		g.y = append(g.y, p.Y)
		g.partner = append(g.partner, -1)
		g.tail = append(g.tail, false)
		g.item = append(g.item, item)
		g.end = append(g.end, end)
		return int32(len(g.x) - 1)
	}
	for i, it := range items {
		a := add(it.A, int32(i), 0)
		if it.IsPoint() {
			continue
		}
		b := add(it.B, int32(i), 1)
		g.partner[a], g.partner[b] = b, a
		if it.OneWay {
			g.tail[a] = true
			g.oneWay++
		}
	}
	if start != nil {
		g.start = add(*start, -1, 0)
		if end != nil && !open {
			e := add(*end, -1, 0)
			g.finish = e
			g.partner[e], g.partner[g.start] = g.start, e
			g.tail[e] = true
			g.oneWay++
		}
	}
	g.real = len(g.x)
	if open {
		g.dummy = add(Point{}, -1, 0)
		if g.start >= 0 {
			g.partner[g.dummy], g.partner[g.start] = g.start, g.dummy
			g.tail[g.dummy] = true
			g.oneWay++
		}
	}
	return g
}

func (g *graph) n() int { return len(g.x) }

// d is the length of the edge (i, j); edges at the dummy cost nothing.
func (g *graph) d(i, j int32) float64 {
	if i == g.dummy || j == g.dummy {
		return 0
	}
	dx, dy := g.x[i]-g.x[j], g.y[i]-g.y[j]
	return math.Sqrt(dx*dx + dy*dy)
}

// within reports whether the edge (i, j) is shorter than r (without a
// square root: the searches test far more closing edges than they make).
func (g *graph) within(i, j int32, r float64) bool {
	if r <= 0 {
		return false
	}
	if i == g.dummy || j == g.dummy {
		return true
	}
	dx, dy := g.x[i]-g.x[j], g.y[i]-g.y[j]
	return dx*dx+dy*dy < r*r
}

// fixed reports whether (i, j) is a fixed edge.
func (g *graph) fixed(i, j int32) bool { return g.partner[i] == j }

// spatialOrderMin is the node count above which the nodes are renumbered
// along a Hilbert curve: then nodes near in the plane are near in memory,
// and the local search, which mostly touches neighbours, stays in cache.
// Measured: at 2·10^5 nodes in random input order a kick cost several
// times what it costs at 2·10^4; and with 2 s of CPU on the TSPLIB set
// (1,000-15,000 points, α-ordered candidates, seeds 1-3 and 4-6) the
// mean gap was 0.227% and 0.216% with the threshold at 50,000, 0.187%
// and 0.181% at 1,000 (0.197% at 5,000): the search on 13,000-15,000
// points is bound by memory loads (candidate lists, coordinates), and
// on the smaller ones the ties of equal distances (drilling layouts on a
// grid) fall in spatial order. The renumbering costs O(n log n).
var spatialOrderMin = 1_000

// spatiallyOrdered returns g with its real nodes renumbered in the order
// of a Hilbert curve over their bounding box (Hilbert 1891; the index by
// the rotate-and-flip recursion); the dummy stays last. O(n log n).
func (g *graph) spatiallyOrdered() *graph {
	n := g.n()
	minX, maxX, minY, maxY := math.Inf(1), math.Inf(-1), math.Inf(1), math.Inf(-1)
	for v := range g.real {
		minX, maxX = min(minX, g.x[v]), max(maxX, g.x[v])
		minY, maxY = min(minY, g.y[v]), max(maxY, g.y[v])
	}
	const side = 1 << 16
	scale := (side - 1) / max(maxX-minX, maxY-minY, 1e-300)
	// Every loop below writes each index once: a large graph's run on
	// every core (inBlocks), the same graph as on one.
	keys := make([]uint64, g.real)
	inBlocks(g.real, func() func(lo, hi int) {
		return func(lo, hi int) {
			for v := lo; v < hi; v++ {
				hx := uint32((g.x[v] - minX) * scale)
				hy := uint32((g.y[v] - minY) * scale)
				keys[v] = hilbert(hx, hy, side)<<32 | uint64(v)
			}
		}
	})
	old := make([]int32, n) // old[new] = old index
	sortedIndices(keys, old)
	for v := g.real; v < n; v++ {
		old[v] = int32(v)
	}
	nw := make([]int32, n) // new index of each old node
	inBlocks(n, func() func(lo, hi int) {
		return func(lo, hi int) {
			for i, o := range old[lo:hi] {
				nw[o] = int32(lo + i)
			}
		}
	})
	h := &graph{
		x: make([]float64, n), y: make([]float64, n), partner: make([]int32, n),
		tail: make([]bool, n), item: make([]int32, n), end: make([]uint8, n),
		dummy: g.dummy, start: -1, finish: -1, oneWay: g.oneWay, real: g.real,
	}
	inBlocks(n, func() func(lo, hi int) {
		return func(lo, hi int) {
			for i := lo; i < hi; i++ {
				o := old[i]
				h.x[i], h.y[i], h.tail[i], h.item[i], h.end[i] = g.x[o], g.y[o], g.tail[o], g.item[o], g.end[o]
				h.partner[i] = -1
				if p := g.partner[o]; p >= 0 {
					h.partner[i] = nw[p]
				}
			}
		}
	})
	if g.start >= 0 {
		h.start = nw[g.start]
	}
	if g.finish >= 0 {
		h.finish = nw[g.finish]
	}
	return h
}

// hilbert is the distance along the Hilbert curve of an n x n grid (n a
// power of two) to the cell (x, y).
func hilbert(x, y, n uint32) uint64 {
	var d uint64
	for s := n / 2; s > 0; s /= 2 {
		var rx, ry uint32
		if x&s != 0 {
			rx = 1
		}
		if y&s != 0 {
			ry = 1
		}
		d += uint64(s) * uint64(s) * uint64((3*rx)^ry)
		if ry == 0 {
			if rx == 1 {
				x, y = s-1-x, s-1-y
			}
			x, y = y, x
		}
	}
	return d
}

// sortedIndices sorts keys (distinct; the index in the low 32 bits) and
// writes the index of each, in order, to out[:len(keys)]. A large set's
// two halves are sorted on two cores and merged: the keys are distinct,
// so the order is the one sort of them all gives.
func sortedIndices(keys []uint64, out []int32) {
	if len(keys) < parallelMin || runtime.GOMAXPROCS(0) < 2 {
		slices.Sort(keys)
		for i, k := range keys {
			out[i] = int32(uint32(k))
		}
		return
	}
	a, b := keys[:len(keys)/2], keys[len(keys)/2:]
	both(func() { slices.Sort(a) }, func() { slices.Sort(b) })
	i, j := 0, 0
	for o := range keys {
		if j == len(b) || (i < len(a) && a[i] < b[j]) {
			out[o] = int32(uint32(a[i]))
			i++
		} else {
			out[o] = int32(uint32(b[j]))
			j++
		}
	}
}
