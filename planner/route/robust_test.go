package route_test

import (
	"context"
	"fmt"
	"math/rand/v2"
	"testing"

	"dimerpath/planner/route"
)

// TestDegenerateInputs runs the engine on inputs that trip up geometric
// code: every point the same, points on one line, a regular lattice
// (many equal distances, like dimer-row sites), strokes chained end to
// end, and a tight cluster far from the rest.
func TestDegenerateInputs(t *testing.T) {
	pt := func(x, y float64) route.Item {
		return route.Item{A: route.Point{X: x, Y: y}, B: route.Point{X: x, Y: y}}
	}
	var same, line, lattice, chain, cluster []route.Item
	for i := range 2000 {
		same = append(same, pt(3, 3))
		line = append(line, pt(float64((i*7919)%2000), 0))
		lattice = append(lattice, pt(float64(i%50)*0.768, float64(i/50)*0.768))
		x := float64(i)
		chain = append(chain, route.Item{A: route.Point{X: x, Y: 0}, B: route.Point{X: x + 1, Y: 0}})
	}
	r := rand.New(rand.NewPCG(5, 5))
	for i := range 2000 {
		if i < 1900 {
			cluster = append(cluster, pt(r.Float64()*1e-3, r.Float64()*1e-3))
		} else {
			cluster = append(cluster, pt(1e6+r.Float64()*1e3, r.Float64()*1e3))
		}
	}
	r.Shuffle(len(chain), func(i, j int) { chain[i], chain[j] = chain[j], chain[i] })
	for _, c := range []struct {
		name  string
		items []route.Item
		max   float64 // the optimum or an upper bound on it, for the open path
	}{
		{"same point", same, 0},
		{"line", line, 1999},
		{"lattice", lattice, 1999 * 0.768},
		{"chained strokes", chain, 0},
		{"cluster", cluster, -1},
	} {
		for _, closed := range []bool{false, true} {
			t.Run(fmt.Sprintf("%s/closed=%v", c.name, closed), func(t *testing.T) {
				p := route.Problem{Items: c.items, Closed: closed}
				s, err := route.Solve(context.Background(), p, route.Options{MaxKicks: 5000})
				if err != nil {
					t.Fatal(err)
				}
				checkValid(t, p, s)
				if !closed && c.max >= 0 && s.Length > c.max*1.02+1e-9 {
					t.Errorf("open path length %v, optimum at most %v", s.Length, c.max)
				}
			})
		}
	}
}
