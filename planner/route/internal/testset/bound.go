package testset

import (
	"math"

	"dimerpath/planner/route"
)

// HeldKarpBound returns a lower bound on the idle travel of every
// ordering of items as an open path with no start: the Held-Karp 1-tree
// bound with subgradient optimisation (Held & Karp 1970, "The
// traveling-salesman problem and minimum spanning trees", Operations
// Research 18(6); step rule of Held, Wolfe & Crowder 1974, "Validation of
// subgradient optimization", Math. Programming 6), on the node model the
// engine uses: each stroke two nodes joined by an edge every tour must
// use, and a dummy node at distance zero from all, which turns the open
// path into a tour. upper is the length of a known ordering (its idle
// travel), used to size the steps. The bound minus the strokes' own
// lengths is returned. Prim's algorithm on the complete graph: O(n^2) per
// iteration, so for a few thousand items.
func HeldKarpBound(items []route.Item, upper float64, iterations int) float64 {
	var x, y []float64
	var partner []int
	fixedLen := 0.0
	for _, it := range items {
		x, y = append(x, it.A.X), append(y, it.A.Y)
		partner = append(partner, -1)
		if !it.IsPoint() {
			a := len(x) - 1
			x, y = append(x, it.B.X), append(y, it.B.Y)
			partner = append(partner, a)
			partner[a] = a + 1
			fixedLen += math.Hypot(it.A.X-it.B.X, it.A.Y-it.B.Y)
		}
	}
	dummy := len(x) // node n-1, at distance 0 from all
	n := dummy + 1
	const forced = -1e18
	cost := func(i, j int) float64 {
		if i == dummy || j == dummy {
			return 0
		}
		if partner[i] == j {
			return forced
		}
		return math.Hypot(x[i]-x[j], y[i]-y[j])
	}
	pi := make([]float64, n)
	deg := make([]int, n)
	key := make([]float64, n)
	from := make([]int, n)
	in := make([]bool, n)
	// oneTree returns the bound for pi and fills deg. The special node is
	// the dummy: the tree spans the others, and the dummy's two cheapest
	// edges close it.
	oneTree := func() float64 {
		for i := range deg {
			deg[i] = 0
		}
		m := dummy // nodes 0..m-1 in the tree
		for i := range m {
			key[i], in[i], from[i] = math.Inf(1), false, -1
		}
		key[0] = 0
		total := 0.0
		for range m {
			u, best := -1, math.Inf(1)
			for i := range m {
				if !in[i] && key[i] < best {
					u, best = i, key[i]
				}
			}
			in[u] = true
			if f := from[u]; f >= 0 {
				c := cost(f, u)
				if c == forced {
					c = math.Hypot(x[f]-x[u], y[f]-y[u])
				}
				total += c + pi[f] + pi[u]
				deg[f]++
				deg[u]++
			}
			for v := range m {
				if in[v] {
					continue
				}
				if c := cost(u, v); c != forced {
					if c += pi[u] + pi[v]; c < key[v] {
						key[v], from[v] = c, u
					}
				} else if forced < key[v] {
					key[v], from[v] = forced, u
				}
			}
		}
		// The dummy's two cheapest edges: cost 0 + pi[dummy] + pi[v].
		a, b := -1, -1
		for v := range m {
			if a < 0 || pi[v] < pi[a] {
				a, b = v, a
			} else if b < 0 || pi[v] < pi[b] {
				b = v
			}
		}
		total += 2*pi[dummy] + pi[a] + pi[b]
		deg[dummy] = 2
		deg[a]++
		deg[b]++
		sum := 0.0
		for _, p := range pi {
			sum += p
		}
		return total - 2*sum
	}
	upper += fixedLen
	best := math.Inf(-1)
	lambda := 2.0
	sinceBest := 0
	for it := 0; it < iterations; it++ {
		l := oneTree()
		if l > best+1e-9 {
			best, sinceBest = l, 0
		} else if sinceBest++; sinceBest >= 20 {
			lambda /= 2
			sinceBest = 0
		}
		norm := 0.0
		for _, d := range deg {
			norm += float64((d - 2) * (d - 2))
		}
		if norm == 0 {
			break // the 1-tree is a tour: the bound is the optimum
		}
		t := lambda * (upper - l) / norm
		for i, d := range deg {
			pi[i] += t * float64(d-2)
		}
	}
	return best - fixedLen
}
