package route

import (
	"cmp"
	"math"
	"slices"
)

// α-nearness candidates (Helsgaun 2000, "An effective implementation of
// the Lin-Kernighan traveling salesman heuristic", EJOR 126(1), §4): the
// α-value of an edge is how much longer than a minimum 1-tree the
// minimum 1-tree containing that edge is, computed on costs transformed
// by node penalties π that subgradient optimisation (Held & Karp 1970,
// 1971; the step rule of Polyak 1969 and the smoothing of Helsgaun 2000)
// raises towards the Held-Karp bound. Edges of an optimal tour have small
// α far more often than they are among a node's nearest: Helsgaun found
// the optimal tour's edges among the 5 α-nearest of each node where the
// 10 nearest miss some. Here the 1-trees are computed on a sparse graph
// (each node's nearest, its nearest in each quadrant, the starting tour's
// edges: connected, as it holds a tour), so everything is O(m log n) for
// m edges, and α of an edge (u, v) is its transformed cost less the
// largest transformed cost on the tree path from u to v (0 for tree
// edges), found by binary lifting.

// sparseGraph is the symmetric candidate pool: edges (a[e], b[e]) with
// cost c[e], and for each node its incident edges adj[off[v]:off[v+1]].
type sparseGraph struct {
	n      int32 // nodes (the dummy, when present, is not in the graph)
	a, b   []int32
	c      []float64
	fixed  []bool
	off    []int32
	adj    []int32   // edge indices
	other  []int32   // the other end of adj's edge
	adjC   []float64 // adj's edge's cost, -Inf when fixed (Prim's key)
	dummy  int32     // -1 if none
	dstart int32     // the dummy's fixed partner (the start), -1 if none
}

// newSparseGraph joins every node (but the dummy) to its pool entries,
// its fixed partner and its neighbours on tour.
func newSparseGraph(g *graph, pool *neighbours, tour []int32) *sparseGraph {
	n := int32(g.real)
	if g.dummy >= 0 && g.dummy != n {
		panic("route: the dummy is not the last node")
	}
	keys := make([]uint64, 0, int(n)*(pool.k+3))
	add := func(u, v int32) {
		if u == v || u >= n || v >= n || u < 0 || v < 0 {
			return
		}
		if u > v {
			u, v = v, u
		}
		keys = append(keys, uint64(u)<<32|uint64(v))
	}
	for v := range n {
		ids, _ := pool.list(v)
		for _, u := range ids {
			if u < 0 {
				break
			}
			add(v, u)
		}
		if p := g.partner[v]; p >= 0 {
			add(v, p)
		}
	}
	for i, v := range tour {
		add(v, tour[(i+1)%len(tour)])
	}
	keys = sortKeysByNode(keys, n)
	keys = slices.Compact(keys)
	m := len(keys)
	sg := &sparseGraph{n: n, a: make([]int32, m), b: make([]int32, m), c: make([]float64, m),
		fixed: make([]bool, m), off: make([]int32, n+1), adj: make([]int32, 2*m), other: make([]int32, 2*m), adjC: make([]float64, 2*m),
		dummy: g.dummy, dstart: -1}
	if g.dummy >= 0 {
		sg.dstart = g.partner[g.dummy]
	}
	for e, k := range keys {
		u, v := int32(k>>32), int32(uint32(k))
		sg.a[e], sg.b[e], sg.c[e], sg.fixed[e] = u, v, g.d(u, v), g.fixed(u, v)
		sg.off[u+1]++
		sg.off[v+1]++
	}
	for v := range n {
		sg.off[v+1] += sg.off[v]
	}
	fill := slices.Clone(sg.off[:n])
	for e := range int32(m) {
		u, v := sg.a[e], sg.b[e]
		ce := sg.c[e]
		if sg.fixed[e] {
			ce = math.Inf(-1)
		}
		sg.adj[fill[u]], sg.other[fill[u]], sg.adjC[fill[u]] = e, v, ce
		fill[u]++
		sg.adj[fill[v]], sg.other[fill[v]], sg.adjC[fill[v]] = e, u, ce
		fill[v]++
	}
	return sg
}

// sortKeysByNode sorts edge keys u<<32|v (u < v < n) ascending: a
// counting sort on u, then each node's few keys by insertion. The same
// result as slices.Sort at a fraction of its cost on the ~1,000 keys of
// the planner's small re-route problems, where the sort was a fifth of
// the α set-up.
func sortKeysByNode(keys []uint64, n int32) []uint64 {
	start := make([]int32, n+1)
	for _, k := range keys {
		start[(k>>32)+1]++
	}
	for u := range n {
		start[u+1] += start[u]
	}
	out := make([]uint64, len(keys))
	fill := slices.Clone(start[:n])
	for _, k := range keys {
		u := k >> 32
		out[fill[u]] = k
		fill[u]++
	}
	for u := range n {
		b := out[start[u]:start[u+1]]
		if len(b) > 32 {
			slices.Sort(b)
			continue
		}
		for i := 1; i < len(b); i++ {
			for j := i; j > 0 && b[j-1] > b[j]; j-- {
				b[j-1], b[j] = b[j], b[j-1]
			}
		}
	}
	return out
}

// oneTree is a minimum spanning tree of the sparse graph under the costs
// c + π(u) + π(v) (fixed edges forced in), with its parent pointers in
// the order Prim added the nodes.
type oneTree struct {
	parent  []int32   // -1 at the root
	pw      []float64 // transformed cost of the edge to the parent
	pfixed  []bool    // that edge is fixed
	order   []int32   // nodes in the order added; parents come first
	deg     []int32   // degree in the 1-tree
	w       float64   // the 1-tree's transformed cost less 2 Σ π: a lower bound
	heap    []heapEntry
	hpos    []int32
	keyEdge []int32 // the edge of each node's key
}

// heapEntry is a node in Prim's heap with its key.
type heapEntry struct {
	key float64
	v   int32
}

func newOneTree(n int32) *oneTree {
	return &oneTree{parent: make([]int32, n), pw: make([]float64, n), pfixed: make([]bool, n),
		order: make([]int32, 0, n), deg: make([]int32, n), heap: make([]heapEntry, 0, n),
		hpos: make([]int32, n), keyEdge: make([]int32, n)}
}

// build computes the minimum 1-tree for penalties pi (one per node of g,
// the dummy's last when there is one) and reports whether the sparse
// graph was connected.
func (t *oneTree) build(sg *sparseGraph, pi []float64) bool {
	n := sg.n
	const unseen, done = -1, -2
	for v := range n {
		t.hpos[v] = unseen
		t.deg[v] = 0
		t.parent[v] = -1
	}
	t.order = t.order[:0]
	t.heap = t.heap[:0]
	t.w = 0
	// Prim's algorithm with a binary heap keyed on the transformed cost
	// (fixed edges at -Inf, so they are taken first). The heap holds the
	// keys beside the nodes and the adjacency its costs beside the other
	// ends, so the inner loop reads no edge record unless it improves a
	// key. It makes the same comparisons in the same order as with the
	// keys looked up by node (the same trees). The ascent's trees
	// (ascentIters of them) are most of the search's set-up.
	t.keyEdge[0] = -1
	t.push(0, math.Inf(-1))
	for len(t.heap) > 0 {
		v := t.popMin()
		t.hpos[v] = done
		t.order = append(t.order, v)
		if e := t.keyEdge[v]; e >= 0 {
			u := sg.a[e]
			if u == v {
				u = sg.b[e]
			}
			t.parent[v] = u
			t.pw[v] = sg.c[e] + pi[u] + pi[v]
			t.pfixed[v] = sg.fixed[e]
			t.w += t.pw[v]
			t.deg[u]++
			t.deg[v]++
		}
		pv := pi[v]
		hi := sg.off[v+1]
		for k := sg.off[v]; k < hi; k++ {
			u := sg.other[k]
			hp := t.hpos[u]
			if hp == done {
				continue
			}
			w := sg.adjC[k] + pi[u] + pv
			if hp == unseen {
				t.keyEdge[u] = sg.adj[k]
				t.push(u, w)
			} else if w < t.heap[hp].key {
				t.keyEdge[u] = sg.adj[k]
				t.heap[hp].key = w
				t.up(hp)
			}
		}
	}
	if int32(len(t.order)) < n {
		return false
	}
	// Close the tree into a 1-tree. With a dummy (distance 0 to all), the
	// dummy is the special node: its two cheapest edges, the fixed one
	// to the start first. Else the special node is the leaf whose second
	// cheapest edge is the longest (Helsgaun 2000), joined by that edge.
	if sg.dummy >= 0 {
		pd := pi[sg.dummy]
		first, second := sg.dstart, int32(-1)
		for v := range n {
			switch {
			case v == sg.dstart:
			case first < 0 || (sg.dstart < 0 && pi[v] < pi[first]):
				first, second = v, first
			case second < 0 || pi[v] < pi[second]:
				second = v
			}
		}
		for _, v := range [2]int32{first, second} {
			if v >= 0 {
				t.w += pd + pi[v]
				t.deg[v]++
			}
		}
	} else {
		bestLeaf, bestEdge, bestW := int32(-1), int32(-1), math.Inf(-1)
		for v := range n {
			if t.deg[v] != 1 {
				continue
			}
			w2, e2 := math.Inf(1), int32(-1)
			for k := sg.off[v]; k < sg.off[v+1]; k++ {
				u := sg.other[k]
				if u == t.parent[v] || t.parent[u] == v {
					continue
				}
				if w := sg.c[sg.adj[k]] + pi[u] + pi[v]; w < w2 {
					w2, e2 = w, sg.adj[k]
				}
			}
			if e2 >= 0 && w2 > bestW {
				bestLeaf, bestEdge, bestW = v, e2, w2
			}
		}
		if bestLeaf >= 0 {
			t.w += bestW
			t.deg[sg.a[bestEdge]]++
			t.deg[sg.b[bestEdge]]++
		}
	}
	for v := range n {
		t.w -= 2 * pi[v]
	}
	if sg.dummy >= 0 {
		t.w -= 2 * pi[sg.dummy]
	}
	return true
}

func (t *oneTree) push(v int32, key float64) {
	t.hpos[v] = int32(len(t.heap))
	t.heap = append(t.heap, heapEntry{key, v})
	t.up(t.hpos[v])
}

func (t *oneTree) up(i int32) {
	h := t.heap
	x := h[i]
	for i > 0 {
		p := (i - 1) / 2
		if h[p].key <= x.key {
			break
		}
		h[i] = h[p]
		t.hpos[h[i].v] = i
		i = p
	}
	h[i] = x
	t.hpos[x.v] = i
}

func (t *oneTree) popMin() int32 {
	h := t.heap
	top := h[0].v
	last := h[len(h)-1]
	t.heap = h[:len(h)-1]
	h = t.heap
	if len(h) > 0 {
		i := int32(0)
		n := int32(len(h))
		for {
			c := 2*i + 1
			if c >= n {
				break
			}
			if c+1 < n && h[c+1].key < h[c].key {
				c++
			}
			if h[c].key >= last.key {
				break
			}
			h[i] = h[c]
			t.hpos[h[i].v] = i
			i = c
		}
		h[i] = last
		t.hpos[last.v] = i
	}
	return top
}

// ascend raises the 1-tree bound by subgradient optimisation for iters
// iterations from π = 0, with upper the length of a known tour, and
// returns the best π found and its bound. Deterministic.
func ascend(sg *sparseGraph, nodes int, upper float64, iters int) ([]float64, float64, *oneTree, bool) {
	pi := make([]float64, nodes)
	best := make([]float64, nodes)
	vPrev := make([]float64, nodes)
	t := newOneTree(sg.n)
	if !t.build(sg, pi) {
		return nil, 0, nil, false
	}
	bestW := t.w
	lambda := 2.0
	sinceBest := 0
	degOf := func(v int) int32 {
		if int32(v) == sg.dummy {
			return 2 // the special node always has degree 2
		}
		return t.deg[v]
	}
	for it := range iters {
		norm := 0.0
		for v := range nodes {
			d := float64(degOf(v) - 2)
			norm += d * d
		}
		if norm == 0 {
			copy(best, pi)
			bestW = t.w
			break // the 1-tree is a tour, hence optimal
		}
		step := lambda * (upper - t.w) / norm
		for v := range nodes {
			d := float64(degOf(v) - 2)
			dir := d
			if it > 0 {
				dir = 0.7*d + 0.3*vPrev[v]
			}
			pi[v] += step * dir
			vPrev[v] = d
		}
		t.build(sg, pi)
		if t.w > bestW {
			bestW = t.w
			copy(best, pi)
			sinceBest = 0
		} else if sinceBest++; sinceBest >= 3 {
			lambda /= 2
			sinceBest = 0
		}
	}
	t.build(sg, best)
	return best, bestW, t, true
}

// alphaCandidates returns, for each node, the kc nodes of its pool with
// the smallest α (ties by distance), in that order, and after them up to
// farCands pool nodes (nearest first) more than farReach times as far as
// the farthest of those. iters bounds the subgradient iterations. It
// returns nil when the sparse graph is not connected (it always is when
// tour is a tour).
//
// The lists are in α order as in Helsgaun 2000 (§5), so the breadth
// bounds of the searches (koptBreadth) keep the α-best candidates, and a
// search still stops at the first candidate whose edge leaves no gain:
// with α order that is a heuristic cut, as it is there. Measured against
// the lists sorted nearest first (the 7 α-best either way), 2 s of CPU,
// the TSPLIB set with seeds 1-3 and 4-6: mean gap 0.249% and 0.272%
// before, 0.227% and 0.216% after; d15112 0.46 -> 0.29 (DEVELOPERS.md).
//
// The far entries are for layouts of dense clusters (drilling-like
// patches of points on a fine pitch): there the kc smallest α of a node
// at a cluster's edge can all lie inside its cluster, so the edges to the
// next clusters, which the tour must take, are nobody's candidates.
// Measured with 2 s of CPU (DEVELOPERS.md): generated patches of 5,000
// points 0.6% shorter on average over 16 seeds (the worst of 10 seeds
// 1.6% shorter); the TSPLIB set, three pairs of runs of
// 3-6 seeds, mean gap 0.262% before and 0.253% after, rl5915 better in
// all three; uniform, clustered and grid layouts unchanged. Two far
// entries, or a reach of 2x, made every TSPLIB instance worse.
var (
	farCands = 1
	farReach = 5.0
)

func alphaCandidates(g *graph, pool *neighbours, tour []int32, kc, iters int) *neighbours {
	sg := newSparseGraph(g, pool, tour)
	upper := 0.0
	for i, v := range tour {
		upper += g.d(v, tour[(i+1)%len(tour)])
	}
	pi, _, t, ok := ascend(sg, g.n(), upper, iters)
	if !ok {
		return nil
	}
	alpha := alphaValues(sg, t, pi)
	type scored struct {
		v     int32
		alpha float64
		d     float64
	}
	kw := kc + farCands
	cand := &neighbours{k: kw, id: make([]int32, g.n()*kw), dst: make([]float64, g.n()*kw)}
	for i := range cand.id {
		cand.id[i] = -1
	}
	var buf []scored
	for v := range sg.n {
		buf = buf[:0]
		for k := sg.off[v]; k < sg.off[v+1]; k++ {
			if e := sg.adj[k]; !sg.fixed[e] {
				buf = append(buf, scored{sg.other[k], alpha[e], sg.c[e]})
			}
		}
		slices.SortFunc(buf, func(x, y scored) int {
			if c := cmp.Compare(x.alpha, y.alpha); c != 0 {
				return c
			}
			return cmp.Compare(x.d, y.d)
		})
		m := min(len(buf), kc)
		byLength := func(x, y scored) int { return cmp.Compare(x.d, y.d) }
		if farCands > 0 && m > 0 {
			// The α-best pool nodes more than farReach times as far as the
			// farthest candidate, after them.
			reach, far := 0.0, 0
			for _, x := range buf[:m] {
				reach = max(reach, x.d)
			}
			for _, x := range buf[m:] {
				if far < farCands && x.d > farReach*reach {
					buf[m+far] = x
					far++
				}
			}
			slices.SortFunc(buf[m:m+far], byLength)
			m += far
		}
		buf = buf[:m]
		o := int(v) * kw
		for j, s := range buf {
			cand.id[o+j], cand.dst[o+j] = s.v, s.d
		}
	}
	return cand
}

// alphaValues returns the α-value of every edge of sg for the spanning
// tree t built with penalties pi: 0 for a tree edge, else its transformed
// cost less the largest transformed cost on the tree path between its
// ends (fixed edges, which every 1-tree holds, never count as the
// largest). The special node's extra edge is left out, as in the
// spanning-tree form of α (Helsgaun 2000, §4.1); O(m log n) by binary
// lifting.
func alphaValues(sg *sparseGraph, t *oneTree, pi []float64) []float64 {
	n := sg.n
	// up[j][v] is v's 2^j-th ancestor and mx[j][v] the largest
	// transformed cost on the way there.
	depth := make([]int32, n)
	levels := 1
	for (1 << levels) < int(n) {
		levels++
	}
	up := make([][]int32, levels)
	mx := make([][]float64, levels)
	up[0] = make([]int32, n)
	mx[0] = make([]float64, n)
	for _, v := range t.order {
		p := t.parent[v]
		if p < 0 {
			up[0][v], mx[0][v] = v, math.Inf(-1)
			continue
		}
		depth[v] = depth[p] + 1
		up[0][v] = p
		mx[0][v] = t.pw[v]
		if t.pfixed[v] {
			mx[0][v] = math.Inf(-1)
		}
	}
	for j := 1; j < levels; j++ {
		up[j] = make([]int32, n)
		mx[j] = make([]float64, n)
		for v := range n {
			m := up[j-1][v]
			up[j][v] = up[j-1][m]
			mx[j][v] = max(mx[j-1][v], mx[j-1][m])
		}
	}
	pathMax := func(u, v int32) float64 {
		best := math.Inf(-1)
		if depth[u] < depth[v] {
			u, v = v, u
		}
		for j, diff := 0, depth[u]-depth[v]; diff > 0; j, diff = j+1, diff>>1 {
			if diff&1 != 0 {
				best = max(best, mx[j][u])
				u = up[j][u]
			}
		}
		if u == v {
			return best
		}
		for j := levels - 1; j >= 0; j-- {
			if up[j][u] != up[j][v] {
				best = max(best, mx[j][u], mx[j][v])
				u, v = up[j][u], up[j][v]
			}
		}
		return max(best, mx[0][u], mx[0][v])
	}
	alpha := make([]float64, len(sg.a))
	for e := range sg.a {
		u, v := sg.a[e], sg.b[e]
		if sg.fixed[e] || t.parent[u] == v || t.parent[v] == u {
			continue
		}
		alpha[e] = max(0, sg.c[e]+pi[u]+pi[v]-pathMax(u, v))
	}
	return alpha
}

// buildPool is the candidate pool α chooses from: each node's k nearest
// and its q nearest in each quadrant, nearest first (up to k+4q, fewer
// where quadrants repeat the nearest).
func buildPool(g *graph, k, q int) *neighbours {
	kk := k + 4*q
	nb := &neighbours{k: kk, id: make([]int32, g.n()*kk), dst: make([]float64, g.n()*kk)}
	for i := range nb.id {
		nb.id[i] = -1
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
		o := int(v) * kk
		m := 0
		for j, u := range b.id {
			nb.id[o+m], nb.dst[o+m] = u, math.Sqrt(b.d2[j])
			m++
		}
		qb.qx, qb.qy, qb.ex1, qb.ex2 = b.qx, b.qy, b.ex1, b.ex2
		for quad := range int8(4) {
			if q == 0 {
				break
			}
			qb.quad = quad
			t.nearest(qb)
			for j, u := range qb.id {
				if slices.Contains(nb.id[o:o+m], u) {
					continue
				}
				d := math.Sqrt(qb.d2[j])
				i := o + m
				for i > o && nb.dst[i-1] > d {
					nb.id[i], nb.dst[i] = nb.id[i-1], nb.dst[i-1]
					i--
				}
				nb.id[i], nb.dst[i] = u, d
				m++
			}
		}
	}
	return nb
}
