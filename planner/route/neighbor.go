package route

import "math"

// neighbours holds each node's k nearest other nodes (leaving out its
// fixed-edge partner and the dummy), nearest first, with their
// distances. A list shorter than k ends with -1.
type neighbours struct {
	k   int
	id  []int32
	dst []float64
}

// list returns node v's neighbours and their distances.
func (nb *neighbours) list(v int32) ([]int32, []float64) {
	o := int(v) * nb.k
	return nb.id[o : o+nb.k], nb.dst[o : o+nb.k]
}

// buildNeighbours finds the k nearest neighbours of every node of g but
// the dummy with a kd-tree: O(n log n).
func buildNeighbours(g *graph, k int) *neighbours {
	n := g.n()
	nb := &neighbours{k: k, id: make([]int32, n*k), dst: make([]float64, n*k)}
	for i := range nb.id {
		nb.id[i] = -1
	}
	idx := make([]int32, 0, g.real)
	for v := range int32(g.real) {
		idx = append(idx, v)
	}
	t := newKDTree(g.x, g.y, idx)
	b := newKNNBuf(k)
	// Query in the tree's order: neighbouring queries touch the same
	// leaves, which keeps the caches warm.
	order := append([]int32(nil), t.idx...)
	for _, v := range order {
		b.qx, b.qy, b.ex1, b.ex2 = g.x[v], g.y[v], v, g.partner[v]
		t.nearest(b)
		o := int(v) * k
		for j, u := range b.id {
			nb.id[o+j] = u
			nb.dst[o+j] = math.Sqrt(b.d2[j])
		}
	}
	return nb
}
