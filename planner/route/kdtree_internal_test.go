package route

import (
	"math/rand/v2"
	"slices"
	"testing"
)

// plainSearch is the k-nearest search without the cells' distances: a
// far child is skipped only when its split plane is as far as the k-th
// best (Bentley 1975). The tree's search must give exactly its lists,
// ties and their order included, since the route depends on them.
func (t *kdTree) plainSearch(id int32, b *knnBuf) {
	nd := &t.nodes[id]
	if nd.left < 0 {
		for _, p := range t.idx[nd.lo:nd.hi] {
			if p == b.ex1 || p == b.ex2 {
				continue
			}
			dx, dy := t.x[p]-b.qx, t.y[p]-b.qy
			if b.quad >= 0 && quadrant(dx, dy) != b.quad {
				continue
			}
			b.offer(dx*dx+dy*dy, p)
		}
		return
	}
	q := b.qx
	if nd.dim == 1 {
		q = b.qy
	}
	if b.quad >= 0 {
		if b.quad>>nd.dim&1 == 1 {
			if nd.split < q {
				t.plainSearch(nd.right, b)
				return
			}
		} else if nd.split >= q {
			t.plainSearch(nd.left, b)
			return
		}
	}
	diff := q - nd.split
	near, far := nd.left, nd.right
	if diff >= 0 {
		near, far = far, near
	}
	t.plainSearch(near, b)
	if diff*diff < b.worst() {
		t.plainSearch(far, b)
	}
}

// TestKDTreeSameAsPlain compares the search against plainSearch on
// regular grids (where many distances tie exactly, as on a window
// array), jittered grids and uniform points, for k nearest and for
// quadrant queries.
func TestKDTreeSameAsPlain(t *testing.T) {
	r := rand.New(rand.NewPCG(14, 2))
	layouts := []struct {
		name   string
		jitter float64
		grid   bool
	}{{"grid", 0, true}, {"jittered grid", 0.01, true}, {"uniform", 0, false}}
	for _, lay := range layouts {
		for _, n := range []int{1, 7, 9, 200, 3000} {
			x, y := make([]float64, n), make([]float64, n)
			side := 1
			for side*side < n {
				side++
			}
			for i := range n {
				if lay.grid {
					// Two ends per cell, as a stroke's, on a 3 x 2 pitch.
					x[i] = float64(i/2%side)*3 + float64(i%2)*0.5 + lay.jitter*r.Float64()
					y[i] = float64(i/2/side)*2 + lay.jitter*r.Float64()
				} else {
					x[i], y[i] = r.Float64()*100, r.Float64()*100
				}
			}
			idx := make([]int32, n)
			for i := range idx {
				idx[i] = int32(i)
			}
			tr := newKDTree(x, y, idx)
			for _, k := range []int{1, 3, 8, 10} {
				for quad := int8(-1); quad < 4; quad++ {
					got, want := newKNNBuf(k), newKNNBuf(k)
					for v := range int32(n) {
						for _, b := range []*knnBuf{got, want} {
							b.qx, b.qy, b.ex1, b.ex2, b.quad = x[v], y[v], v, v^1, quad
						}
						tr.nearest(got)
						want.d2, want.id = want.d2[:0], want.id[:0]
						tr.plainSearch(0, want)
						if !slices.Equal(got.id, want.id) || !slices.Equal(got.d2, want.d2) {
							t.Fatalf("%s n=%d k=%d quad=%d node %d: got %v, plain search %v", lay.name, n, k, quad, v, got.id, want.id)
						}
					}
				}
			}
		}
	}
}

// BenchmarkNeighbourLists times buildNeighbours on the stroke ends of a
// 300 x 300 window array (two ends per window, as the planner's route
// at scale: k = 8, no quadrants).
func BenchmarkNeighbourLists(b *testing.B) {
	const side = 300
	items := make([]Item, 0, side*side)
	for i := range side * side {
		x, y := float64(i%side)*3.1, float64(i/side)*2.3
		items = append(items, Item{A: Point{X: x, Y: y}, B: Point{X: x + 0.77, Y: y}})
	}
	g := newGraph(items, nil, nil, true).spatiallyOrdered()
	b.ResetTimer()
	for range b.N {
		buildNeighbours(g, 8, false)
	}
}
