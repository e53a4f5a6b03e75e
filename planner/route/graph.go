package route

import "math"

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
	oneWay  int     // number of one-way fixed edges
	real    int     // number of nodes that are not the dummy
}

// newGraph builds the node model of items, with an optional start; open
// adds the dummy. The dummy, when present, is the last node.
func newGraph(items []Item, start *Point, open bool) *graph {
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
	if open {
		n++
	}
	g := &graph{
		x: make([]float64, 0, n), y: make([]float64, 0, n),
		partner: make([]int32, 0, n), tail: make([]bool, 0, n),
		item: make([]int32, 0, n), end: make([]uint8, 0, n),
		dummy: -1, start: -1,
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

// fixed reports whether (i, j) is a fixed edge.
func (g *graph) fixed(i, j int32) bool { return g.partner[i] == j }
