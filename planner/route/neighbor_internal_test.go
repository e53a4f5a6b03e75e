package route

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"
)

// TestNeighbourLists checks the neighbour lists against brute force:
// the k nearest nodes other than the node and its stroke partner, and,
// with quadrants, exactly the nearest node of each quadrant that is
// more than quadFar times as far as the k-th nearest; every list sorted
// by distance. The points are clustered (tight blocks far apart), so
// that the quadrant entries occur.
func TestNeighbourLists(t *testing.T) {
	r := rand.New(rand.NewPCG(11, 11))
	for trial := range 20 {
		var items []Item
		for range 3 + r.IntN(6) {
			cx, cy := r.Float64()*1000, r.Float64()*1000
			for range 5 + r.IntN(30) {
				p := Point{X: cx + r.Float64()*10, Y: cy + r.Float64()*10}
				q := p
				if r.IntN(2) == 0 {
					q = Point{X: p.X + r.Float64()*3, Y: p.Y + r.Float64()*3}
				}
				items = append(items, Item{A: p, B: q})
			}
		}
		g := newGraph(items, nil, nil, trial%2 == 0)
		const k = 6
		quad := trial%4 < 2
		nb := buildNeighbours(g, k, quad)
		extras := 0
		for v := range int32(g.real) {
			type cand struct {
				id int32
				d  float64
			}
			var all []cand
			for u := range int32(g.real) {
				if u != v && u != g.partner[v] {
					all = append(all, cand{u, g.d(v, u)})
				}
			}
			slices.SortStableFunc(all, func(a, b cand) int {
				if a.d != b.d {
					if a.d < b.d {
						return -1
					}
					return 1
				}
				return 0
			})
			ids, ds := nb.list(v)
			for j := range min(k, len(all)) {
				// Ties may be listed in either order: compare distances.
				if math.Abs(ds[j]-all[j].d) > 1e-9 || math.Abs(g.d(v, ids[j])-ds[j]) > 1e-9 {
					t.Fatalf("trial %d node %d: entry %d at %v, want %v", trial, v, j, ds[j], all[j].d)
				}
			}
			var want []float64
			if quad && len(all) >= k {
				dk := all[k-1].d
				for q := range int8(4) {
					for _, c := range all {
						if quadrant(g.x[c.id]-g.x[v], g.y[c.id]-g.y[v]) == q {
							if c.d > quadFar*dk {
								want = append(want, c.d)
							}
							break
						}
					}
				}
			}
			slices.Sort(want)
			var got []float64
			for j := k; j < nb.k; j++ {
				if ids[j] >= 0 {
					got = append(got, ds[j])
				}
			}
			if len(got) != len(want) {
				t.Fatalf("trial %d node %d: quadrant entries %v, want %v", trial, v, got, want)
			}
			for j := range got {
				if math.Abs(got[j]-want[j]) > 1e-9 {
					t.Fatalf("trial %d node %d: quadrant entries %v, want %v", trial, v, got, want)
				}
			}
			extras += len(got)
			for j := 1; j < nb.k && ids[j] >= 0; j++ {
				if ds[j] < ds[j-1] {
					t.Fatalf("trial %d node %d: list not sorted: %v", trial, v, ds)
				}
			}
		}
		if quad && extras == 0 {
			t.Errorf("trial %d: no quadrant entries on a clustered layout", trial)
		}
	}
}

// TestNeighboursPoolSame checks that the one-pass buildNeighboursPool
// gives exactly the lists (ties in the same order) of buildNeighbours and
// buildPool, on random points and on lattice points (short strokes on a
// grid, as in the planner's window arrays, where many distances tie).
func TestNeighboursPoolSame(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 5))
	for trial := range 120 {
		var items []Item
		n := 2 + r.IntN(60)
		if trial%10 == 9 {
			n = 300 + r.IntN(300) // deeper trees
		}
		for range n {
			var p, q Point
			if trial%2 == 0 {
				p = Point{X: r.Float64() * 100, Y: r.Float64() * 100}
				q = Point{X: p.X + r.Float64()*3, Y: p.Y + r.Float64()*3}
			} else {
				p = Point{X: float64(r.IntN(6+n/10)) * 7.68, Y: float64(r.IntN(6+n/10)) * 7.68}
				p.Y += float64(r.IntN(3)) * 0.384
				q = Point{X: p.X + 0.768, Y: p.Y}
			}
			if r.IntN(5) == 0 {
				q = p
			}
			items = append(items, Item{A: p, B: q})
		}
		var start *Point
		if trial%3 != 0 {
			start = &Point{X: 1, Y: 2}
		}
		g := newGraph(items, start, nil, trial%4 < 2)
		for _, k := range []int{8, 10} {
			for q := range 3 {
				for _, quad := range []bool{false, true} {
					for _, pk := range []int{k - 2, k} {
						nb, pool := buildNeighboursPool(g, k, pk, q, quad)
						wantNB, wantPool := buildNeighbours(g, k, quad), buildPool(g, pk, q)
						if nb.k != wantNB.k || !slices.Equal(nb.id, wantNB.id) || !slices.Equal(nb.dst, wantNB.dst) {
							t.Fatalf("trial %d k=%d q=%d quad=%v: neighbour lists differ", trial, k, q, quad)
						}
						if pool.k != wantPool.k || !slices.Equal(pool.id, wantPool.id) || !slices.Equal(pool.dst, wantPool.dst) {
							t.Fatalf("trial %d k=%d q=%d quad=%v: pools differ", trial, k, q, quad)
						}
					}
				}
			}
		}
	}
}
