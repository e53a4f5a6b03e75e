package route

import (
	"math"
	"math/rand/v2"
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
