package route

import (
	"math"
	"slices"
)

// neighbours holds each node's k nearest other nodes (leaving out its
// fixed-edge partner and the dummy), nearest first (the α candidate
// lists of alpha.go, held the same way: in α order), with their
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
	for i := g.real * kk; i < len(nb.id); i++ {
		nb.id[i] = -1 // the dummy's list, never queried
	}
	idx := make([]int32, 0, g.real)
	for v := range int32(g.real) {
		idx = append(idx, v)
	}
	t := newKDTree(g.x, g.y, idx)
	// Query in the tree's order: neighbouring queries touch the same
	// leaves, which keeps the caches warm. Each query writes its node's
	// list alone, so large problems query on every core (inBlocks).
	order := append([]int32(nil), t.idx...)
	inBlocks(len(order), func() func(lo, hi int) {
		b := newKNNBuf(k)
		qb := newKNNBuf(1)
		return func(lo, hi int) {
			for _, v := range order[lo:hi] {
				nb.query(t, g, v, k, quad, b, qb)
			}
		}
	})
	return nb
}

// query fills node v's list of nb (see buildNeighbours) with the scratch
// buffers b (of k) and qb (of 1).
func (nb *neighbours) query(t *kdTree, g *graph, v int32, k int, quad bool, b, qb *knnBuf) {
	b.qx, b.qy, b.ex1, b.ex2 = g.x[v], g.y[v], v, g.partner[v]
	t.nearest(b)
	o := int(v) * nb.k
	for j, u := range b.id {
		nb.id[o+j] = u
		nb.dst[o+j] = math.Sqrt(b.d2[j])
	}
	for j := o + len(b.id); j < o+nb.k; j++ {
		nb.id[j] = -1
	}
	if !quad || len(b.id) < k {
		return // without quadrants, or every node is listed
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
		nb.insertExtra(o, k, m, qb.id[0], math.Sqrt(qb.d2[0]))
		m++
	}
}

// insertExtra puts node u at distance d into the list starting at o,
// which holds the k nearest and then m-k extras (quadrant neighbours
// farther than all k) sorted by distance: the extras stay in order.
func (nb *neighbours) insertExtra(o, k, m int, u int32, d float64) {
	j := o + m
	for j > o+k && nb.dst[j-1] > d {
		nb.id[j], nb.dst[j] = nb.id[j-1], nb.dst[j-1]
		j--
	}
	nb.id[j], nb.dst[j] = u, d
}

// buildNeighboursPool returns what buildNeighbours(g, k, quad) and
// buildPool(g, pk, q) return (pk <= k), from one kd-tree and one
// k-nearest query per node instead of two of each: the pk nearest are
// the first pk of the k nearest, and a quadrant's nearest is the first
// of its q nearest (the queries break ties by the order the tree offers
// the points, the same in both). On the
// planner's re-route problems (~70 nodes, tens of thousands of them in a
// large plan) the queries were a quarter of the set-up.
func buildNeighboursPool(g *graph, k, pk, q int, quad bool) (*neighbours, *neighbours) {
	n := g.n()
	kk := k
	if quad {
		kk += 4
	}
	nb := &neighbours{k: kk, id: make([]int32, n*kk), dst: make([]float64, n*kk)}
	pool := &neighbours{k: pk + 4*q, id: make([]int32, n*(pk+4*q)), dst: make([]float64, n*(pk+4*q))}
	for i := range nb.id {
		nb.id[i] = -1
	}
	for i := range pool.id {
		pool.id[i] = -1
	}
	idx := make([]int32, 0, g.real)
	for v := range int32(g.real) {
		idx = append(idx, v)
	}
	t := newKDTree(g.x, g.y, idx)
	b := newKNNBuf(k)
	qb := newKNNBuf(max(q, 1))
	order := append([]int32(nil), t.idx...)
	for _, v := range order {
		b.qx, b.qy, b.ex1, b.ex2 = g.x[v], g.y[v], v, g.partner[v]
		t.nearest(b)
		o, po := int(v)*kk, int(v)*pool.k
		for j, u := range b.id {
			d := math.Sqrt(b.d2[j])
			nb.id[o+j], nb.dst[o+j] = u, d
			if j < pk {
				pool.id[po+j], pool.dst[po+j] = u, d
			}
		}
		m, pm := k, min(len(b.id), pk)
		withQuad := quad && len(b.id) >= k
		far := 0.0
		if withQuad {
			far = quadFar * quadFar * b.d2[k-1]
		}
		qb.qx, qb.qy, qb.ex1, qb.ex2 = b.qx, b.qy, b.ex1, b.ex2
		for qd := range int8(4) {
			if q == 0 && !withQuad {
				break
			}
			qb.quad = qd
			t.nearest(qb)
			if withQuad && len(qb.id) > 0 && qb.d2[0] > far {
				// As buildNeighbours: farther than the k nearest.
				nb.insertExtra(o, k, m, qb.id[0], math.Sqrt(qb.d2[0]))
				m++
			}
			// As buildPool.
			for j, u := range qb.id[:min(len(qb.id), q)] {
				if slices.Contains(pool.id[po:po+pm], u) {
					continue
				}
				d := math.Sqrt(qb.d2[j])
				i := po + pm
				for i > po && pool.dst[i-1] > d {
					pool.id[i], pool.dst[i] = pool.id[i-1], pool.dst[i-1]
					i--
				}
				pool.id[i], pool.dst[i] = u, d
				pm++
			}
		}
	}
	return nb, pool
}
