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

// quadFar is how much farther than the k-th nearest node the nearest
// node of a quadrant must be to be added to a list: only the nodes with
// an empty side get the extra entries (measured: with every quadrant's
// nearest added, 1.0, random strokes lost 0.1 point of gain; with 2,
// nothing; with 3 clustered layouts gained less).
const quadFar = 2.0

// buildNeighbours finds the k nearest neighbours of every node of g but
// the dummy with a kd-tree: O(n log n). With quad it adds, for each
// quadrant around a node, the nearest node in it if that is more than
// quadFar times as far as the k-th nearest (the lists then hold up to
// k+4, still nearest first). On clustered layouts the k nearest nodes
// of a node all lie in its own cluster; the quadrant neighbours of the
// nodes at the cluster's edge lie in the next clusters, so that the
// moves that reconnect clusters are searched too.
func buildNeighbours(g *graph, k int, quad bool) *neighbours {
	n := g.n()
	kk := k
	if quad {
		kk += 4
	}
	nb := &neighbours{k: kk, id: make([]int32, n*kk), dst: make([]float64, n*kk)}
	for i := range nb.id {
		nb.id[i] = -1
	}
	idx := make([]int32, 0, g.real)
	for v := range int32(g.real) {
		idx = append(idx, v)
	}
	t := newKDTree(g.x, g.y, idx)
	b := newKNNBuf(k)
	qb := newKNNBuf(1)
	// Query in the tree's order: neighbouring queries touch the same
	// leaves, which keeps the caches warm.
	order := append([]int32(nil), t.idx...)
	for _, v := range order {
		b.qx, b.qy, b.ex1, b.ex2 = g.x[v], g.y[v], v, g.partner[v]
		t.nearest(b)
		o := int(v) * kk
		for j, u := range b.id {
			nb.id[o+j] = u
			nb.dst[o+j] = math.Sqrt(b.d2[j])
		}
		if !quad || len(b.id) < k {
			continue // without quadrants, or every node is listed
		}
		m := k
		far := quadFar * quadFar * b.d2[k-1]
		qb.qx, qb.qy, qb.ex1, qb.ex2 = b.qx, b.qy, b.ex1, b.ex2
		for q := range int8(4) {
			qb.quad = q
			t.nearest(qb)
			if len(qb.id) == 0 || qb.d2[0] <= far {
				continue
			}
			// Farther than the k nearest; keep the extras in order.
			d := math.Sqrt(qb.d2[0])
			j := o + m
			for j > o+k && nb.dst[j-1] > d {
				nb.id[j], nb.dst[j] = nb.id[j-1], nb.dst[j-1]
				j--
			}
			nb.id[j], nb.dst[j] = qb.id[0], d
			m++
		}
	}
	return nb
}
