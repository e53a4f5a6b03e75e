package route

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"
)

// completePool lists every other node of g for every node: the sparse
// graph is then the complete graph, where the 1-tree bound and α have
// their textbook meaning.
func completePool(g *graph) *neighbours {
	return buildPool(g, g.real-1, 0)
}

// TestAlphaMatchesBruteForce checks α on the complete graph of small
// random point sets, with random penalties π, against its definition
// (Helsgaun 2000, §4.1): for a non-tree edge, its transformed cost less
// the largest transformed cost on the path joining its ends in a minimum
// spanning tree; found here by Prim's O(n²) algorithm and a walk of the
// tree from every node.
func TestAlphaMatchesBruteForce(t *testing.T) {
	r := rand.New(rand.NewPCG(21, 21))
	for trial := range 40 {
		n := 5 + r.IntN(40)
		items := randomItems(r, n, 0, 0)
		g := newGraph(items, nil, nil, false)
		tour := g.tourFromOrder(r.Perm(n), make([]bool, n))
		sg := newSparseGraph(g, completePool(g), tour)
		if len(sg.a) != n*(n-1)/2 {
			t.Fatalf("trial %d: %d edges, want the complete graph's %d", trial, len(sg.a), n*(n-1)/2)
		}
		pi := make([]float64, n)
		for i := range pi {
			pi[i] = (r.Float64() - 0.5) * 10
		}
		tr := newOneTree(sg.n)
		if !tr.build(sg, pi) {
			t.Fatal("complete graph reported disconnected")
		}
		alpha := alphaValues(sg, tr, pi)
		w := func(u, v int) float64 { return g.d(int32(u), int32(v)) + pi[u] + pi[v] }
		// Prim, O(n²), from node 0.
		parent := make([]int, n)
		in := make([]bool, n)
		key := make([]float64, n)
		for i := range key {
			key[i], parent[i] = math.Inf(1), -1
		}
		key[0] = 0
		treeCost, ourCost := 0.0, 0.0
		for range n {
			u := -1
			for v := range n {
				if !in[v] && (u < 0 || key[v] < key[u]) {
					u = v
				}
			}
			in[u] = true
			if parent[u] >= 0 {
				treeCost += w(u, parent[u])
			}
			for v := range n {
				if !in[v] && w(u, v) < key[v] {
					key[v], parent[v] = w(u, v), u
				}
			}
		}
		for _, v := range tr.order {
			if p := tr.parent[v]; p >= 0 {
				ourCost += w(int(v), int(p))
			}
		}
		if math.Abs(treeCost-ourCost) > 1e-9*math.Abs(treeCost)+1e-9 {
			t.Fatalf("trial %d: spanning tree costs %v, brute force %v", trial, ourCost, treeCost)
		}
		// The largest cost on the tree path from s to every node, by a
		// walk of our tree (its cost equals the brute-force minimum, so
		// the path maxima agree with any minimum spanning tree's where
		// costs are distinct, as they are for random points).
		adj := make([][]int, n)
		for _, v := range tr.order {
			if p := tr.parent[v]; p >= 0 {
				adj[v] = append(adj[v], int(p))
				adj[p] = append(adj[p], int(v))
			}
		}
		for e := range sg.a {
			u, v := int(sg.a[e]), int(sg.b[e])
			best := math.Inf(-1)
			var walk func(x, from int, m float64) bool
			walk = func(x, from int, m float64) bool {
				if x == v {
					best = m
					return true
				}
				for _, y := range adj[x] {
					if y != from && walk(y, x, max(m, w(x, y))) {
						return true
					}
				}
				return false
			}
			walk(u, -1, math.Inf(-1))
			want := max(0, w(u, v)-best)
			if math.Abs(alpha[e]-want) > 1e-9 {
				t.Fatalf("trial %d: α(%d,%d) = %v, want %v", trial, u, v, alpha[e], want)
			}
		}
	}
}

// TestOneTreeBoundBelowOptimum checks that the subgradient ascent's
// bound is a lower bound (Held & Karp 1970: every 1-tree under any
// penalties bounds the optimal tour from below) on the complete graph:
// against the exact optimum of small random instances (the package's
// dynamic programme) and the published optimal tour of TSPLIB's a280
// (Reinelt 1991), here scored with unrounded distances. It also checks
// that the ascent raises the bound above that of π = 0.
func TestOneTreeBoundBelowOptimum(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 5))
	for trial := range 30 {
		n := 5 + r.IntN(6)
		items := randomItems(r, n, 0, 0)
		g := newGraph(items, nil, nil, false)
		order, rev := solveExact(items, nil, nil, true)
		tour := g.tourFromOrder(order, rev)
		opt := 0.0
		for i, v := range tour {
			opt += g.d(v, tour[(i+1)%n])
		}
		sg := newSparseGraph(g, completePool(g), tour)
		_, w, _, ok := ascend(sg, g.n(), opt, 100)
		if !ok || w > opt*(1+1e-9) {
			t.Fatalf("trial %d: bound %v above the optimum %v", trial, w, opt)
		}
	}
	items := loadTestTSPLIB(t, "a280")
	order := loadTestTour(t, "a280")
	g := newGraph(items, nil, nil, false)
	tour := make([]int32, len(order))
	opt := 0.0
	for i, v := range order {
		tour[i] = int32(v)
	}
	for i, v := range tour {
		opt += g.d(v, tour[(i+1)%len(tour)])
	}
	sg := newSparseGraph(g, completePool(g), tour)
	_, w0, _, _ := ascend(sg, g.n(), opt, 0)
	_, w, _, _ := ascend(sg, g.n(), opt, 100)
	t.Logf("a280: optimal tour %.1f, bound at π=0 %.1f (%.2f%%), after 100 steps %.1f (%.2f%%)", opt, w0, 100*w0/opt, w, 100*w/opt)
	if w > opt || w <= w0 {
		t.Errorf("a280: bound %v after the ascent, %v at π=0, optimal tour %v", w, w0, opt)
	}
}

// TestAlphaFarCandidates checks the candidate lists' far entries on a
// layout of dense square patches far apart: every list holds the kc
// α-nearest in α order (α from the same ascent, which
// TestAlphaMatchesBruteForce checks against its definition; Helsgaun
// 2000 lists candidates by α), then at most farCands entries each more than
// farReach times as far as the farthest of those; and some node of every
// patch has a far entry in another patch, so the search can relink the
// patches.
func TestAlphaFarCandidates(t *testing.T) {
	const side, pitch, gap = 6, 1.0, 40.0
	var items []Item
	patch := []int{}
	for p := range 9 {
		ox, oy := float64(p%3)*gap, float64(p/3)*gap
		for i := range side * side {
			q := Point{X: ox + float64(i%side)*pitch, Y: oy + float64(i/side)*pitch}
			items = append(items, Item{A: q, B: q})
			patch = append(patch, p)
		}
	}
	g := newGraph(items, nil, nil, false)
	nb := buildNeighbours(g, 10, false)
	const kc = 5
	pool, tour := buildPool(g, 10, 2), greedyTour(g, nb)
	cand := alphaCandidates(g, pool, tour, kc, 25)
	if cand == nil {
		t.Fatal("no candidates")
	}
	// α of every pool edge, by its ends.
	sg := newSparseGraph(g, pool, tour)
	upper := 0.0
	for i, v := range tour {
		upper += g.d(v, tour[(i+1)%len(tour)])
	}
	pi, _, tr, _ := ascend(sg, g.n(), upper, 25)
	alphaOf := map[[2]int32]float64{}
	for e, a := range alphaValues(sg, tr, pi) {
		alphaOf[[2]int32{sg.a[e], sg.b[e]}] = a
		alphaOf[[2]int32{sg.b[e], sg.a[e]}] = a
	}
	if cand.k != kc+farCands {
		t.Fatalf("lists of %d, want %d", cand.k, kc+farCands)
	}
	linked := make([]bool, 9)
	for v := range int32(g.real) {
		ids, ds := cand.list(v)
		reach := 0.0
		for j := range kc {
			if ids[j] < 0 {
				t.Fatalf("node %d: only %d α-candidates", v, j)
			}
			if j > 0 && alphaOf[[2]int32{v, ids[j]}] < alphaOf[[2]int32{v, ids[j-1]}] {
				t.Fatalf("node %d: candidates not in α order: %v", v, ids[:kc])
			}
			reach = max(reach, ds[j])
		}
		// No pool node outside the kc has a smaller α than the last.
		last := alphaOf[[2]int32{v, ids[kc-1]}]
		for k := sg.off[v]; k < sg.off[v+1]; k++ {
			if e := sg.adj[k]; !sg.fixed[e] && alphaOf[[2]int32{v, sg.other[k]}] < last && !slices.Contains(ids[:kc], sg.other[k]) {
				t.Fatalf("node %d: pool node %d has α below the candidates'", v, sg.other[k])
			}
		}
		for j := kc; j < cand.k && ids[j] >= 0; j++ {
			if ds[j] <= farReach*reach {
				t.Errorf("node %d: far entry %d at %.1f, within %.0fx the reach %.1f", v, ids[j], ds[j], farReach, reach)
			}
			if patch[ids[j]] != patch[v] {
				linked[patch[v]] = true
			}
		}
	}
	for p, ok := range linked {
		if !ok {
			t.Errorf("patch %d: no node has a candidate in another patch", p)
		}
	}
}
