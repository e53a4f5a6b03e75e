package route

import (
	"math/rand/v2"
	"reflect"
	"runtime"
	"slices"
	"testing"
)

// TestNeighbourListsSameOnAnyCores checks that the neighbour lists of a
// problem large enough to query on every core (parallelMin lowered so
// that a few thousand nodes do) are the lists of the one-core path,
// entry for entry, ties included: strokes on a grid (the planner's
// window arrays, where most distances tie) and random ones, with and
// without quadrants, open (with the dummy) and closed.
func TestNeighbourListsSameOnAnyCores(t *testing.T) {
	defer func(m int) { parallelMin = m }(parallelMin)
	defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(0))
	r := rand.New(rand.NewPCG(3, 4))
	grid := func() []Item {
		var items []Item
		for row := range 60 {
			for col := range 60 {
				x, y := float64(col)*2.3, float64(row)*1.54
				items = append(items, Item{A: Point{X: x, Y: y}, B: Point{X: x + 0.77, Y: y}})
			}
		}
		return items
	}
	random := func() []Item {
		var items []Item
		for range 5000 {
			p := Point{X: r.Float64() * 1000, Y: r.Float64() * 1000}
			items = append(items, Item{A: p, B: Point{X: p.X + r.Float64()*3, Y: p.Y + r.Float64()*3}})
		}
		return items
	}
	for _, c := range []struct {
		name  string
		items []Item
	}{{"grid", grid()}, {"random", random()}} {
		for _, open := range []bool{false, true} {
			for _, quad := range []bool{false, true} {
				g := newGraph(c.items, nil, nil, open)
				parallelMin = 1 << 30
				runtime.GOMAXPROCS(1)
				one := buildNeighbours(g, 8, quad)
				parallelMin = 1
				runtime.GOMAXPROCS(4)
				if g.n() < 2*parallelBlock {
					t.Fatalf("%s: %d nodes do not fill two blocks of %d", c.name, g.n(), parallelBlock)
				}
				all := buildNeighbours(g, 8, quad)
				if one.k != all.k || !slices.Equal(one.id, all.id) || !slices.Equal(one.dst, all.dst) {
					t.Errorf("%s open=%v quad=%v: the lists built on 4 workers differ from one core's", c.name, open, quad)
				}
			}
		}
	}
}

// TestKDTreeSameOnAnyCores checks that a tree built with its subtrees on
// several cores is the tree of the one-core build, node for node, and
// that both are the tree of a plain depth-first build that appends each
// node as it is made (the way the tree was built before its nodes were
// numbered in advance); kdNodes is checked against its definition.
func TestKDTreeSameOnAnyCores(t *testing.T) {
	defer func(m int) { parallelMin = m }(parallelMin)
	defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(0))
	var count func(m int32) int32
	count = func(m int32) int32 {
		if m <= kdLeaf {
			return 1
		}
		return 1 + count(m/2) + count(m-m/2)
	}
	for m := int32(1); m < 3000; m++ {
		if kdNodes(m) != count(m) {
			t.Fatalf("kdNodes(%d) = %d, want %d", m, kdNodes(m), count(m))
		}
	}
	r := rand.New(rand.NewPCG(8, 9))
	for _, n := range []int{1, 7, 9, 1000, 20_011} {
		x, y := make([]float64, n), make([]float64, n)
		for i := range n {
			// Coordinates on a coarse grid: many ties, as on an array.
			x[i], y[i] = float64(r.IntN(200)), float64(r.IntN(100))
		}
		ids := func() []int32 {
			idx := make([]int32, n)
			for i := range idx {
				idx[i] = int32(i)
			}
			return idx
		}
		ref := &kdTree{x: x, y: y, idx: ids()}
		var appendBuild func(lo, hi int32) int32
		appendBuild = func(lo, hi int32) int32 {
			id := int32(len(ref.nodes))
			ref.nodes = append(ref.nodes, kdNode{lo: lo, hi: hi, left: -1, right: -1})
			if hi-lo <= kdLeaf {
				return id
			}
			minX, maxX, minY, maxY := x[ref.idx[lo]], x[ref.idx[lo]], y[ref.idx[lo]], y[ref.idx[lo]]
			for _, p := range ref.idx[lo+1 : hi] {
				minX, maxX = min(minX, x[p]), max(maxX, x[p])
				minY, maxY = min(minY, y[p]), max(maxY, y[p])
			}
			var dim uint8
			if maxY-minY > maxX-minX {
				dim = 1
			}
			mid := lo + (hi-lo)/2
			ref.selectNth(lo, hi-1, mid, dim)
			split := ref.coord(ref.idx[mid], dim)
			left := appendBuild(lo, mid)
			right := appendBuild(mid, hi)
			ref.nodes[id].left, ref.nodes[id].right, ref.nodes[id].split, ref.nodes[id].dim = left, right, split, dim
			return id
		}
		appendBuild(0, int32(n))
		parallelMin = 1 << 30
		runtime.GOMAXPROCS(1)
		one := newKDTree(x, y, ids())
		parallelMin = 1
		runtime.GOMAXPROCS(4)
		many := newKDTree(x, y, ids())
		for _, c := range []struct {
			name string
			t    *kdTree
		}{{"one core", one}, {"4 cores", many}} {
			if !slices.Equal(c.t.nodes, ref.nodes) || !slices.Equal(c.t.idx, ref.idx) {
				t.Errorf("%d points, %s: the tree differs from the appending build's (%d nodes, want %d)", n, c.name, len(c.t.nodes), len(ref.nodes))
			}
		}
	}
}

// TestSpatialOrderSameOnAnyCores checks that a graph renumbered along
// the Hilbert curve on several cores (parallelMin lowered: the keys,
// their sort in two halves merged, and the copies) is the one-core
// graph, field for field, for an open problem with a start and a closed
// one.
func TestSpatialOrderSameOnAnyCores(t *testing.T) {
	defer func(m int) { parallelMin = m }(parallelMin)
	defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(0))
	r := rand.New(rand.NewPCG(12, 13))
	var items []Item
	for range 7000 {
		p := Point{X: float64(r.IntN(500)), Y: r.Float64() * 300}
		q := p
		if r.IntN(3) > 0 {
			q = Point{X: p.X + r.Float64()*4, Y: p.Y}
		}
		items = append(items, Item{A: p, B: q})
	}
	for _, open := range []bool{false, true} {
		var start *Point
		if open {
			start = &Point{X: 250, Y: 150}
		}
		g := newGraph(items, start, nil, open)
		parallelMin = 1 << 30
		runtime.GOMAXPROCS(1)
		one := g.spatiallyOrdered()
		parallelMin = 1
		runtime.GOMAXPROCS(4)
		many := g.spatiallyOrdered()
		if !reflect.DeepEqual(one, many) {
			t.Errorf("open=%v: the graph renumbered on 4 cores differs from one core's", open)
		}
	}
}
