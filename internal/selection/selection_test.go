package selection

import (
	"math/rand/v2"
	"slices"
	"testing"
)

// TestKthMatchesSort checks Kth against a full sort (the definition of an
// order statistic) on inputs that stress a quickselect: random, sorted,
// reversed, few distinct values and all equal, for every k of small inputs
// and sampled k of large ones.
func TestKthMatchesSort(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 2))
	make1 := func(n int, f func(i int) float64) []float64 {
		x := make([]float64, n)
		for i := range x {
			x[i] = f(i)
		}
		return x
	}
	cases := []struct {
		name string
		x    []float64
	}{
		{"one", []float64{3}},
		{"random", make1(257, func(int) float64 { return r.NormFloat64() })},
		{"sorted", make1(300, func(i int) float64 { return float64(i) })},
		{"reversed", make1(300, func(i int) float64 { return float64(-i) })},
		{"few distinct", make1(500, func(int) float64 { return float64(r.IntN(3)) })},
		{"all equal", make1(100, func(int) float64 { return 7 })},
		{"large", make1(20000, func(int) float64 { return r.ExpFloat64() })},
	}
	for _, c := range cases {
		want := slices.Sorted(slices.Values(c.x))
		step := max(1, len(c.x)/97)
		for k := 0; k < len(c.x); k += step {
			x := slices.Clone(c.x)
			Kth(x, k)
			if x[k] != want[k] {
				t.Fatalf("%s: Kth(x, %d) left %v at k, a sort puts %v there", c.name, k, x[k], want[k])
			}
			for i, v := range x {
				if i < k && v > x[k] || i > k && v < x[k] {
					t.Fatalf("%s, k %d: x[%d] = %v is on the wrong side of %v", c.name, k, i, v, x[k])
				}
			}
		}
	}
}
