package survey

import (
	"math/rand/v2"
	"slices"
	"testing"
)

// TestMedianMatchesSort checks the selection against sorting.
func TestMedianMatchesSort(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	for n := 1; n < 60; n++ {
		for rep := 0; rep < 20; rep++ {
			s := make([]float64, n)
			for i := range s {
				s[i] = float64(rng.IntN(7)) // ties on purpose
				if rep%2 == 0 {
					s[i] = rng.NormFloat64()
				}
			}
			c := slices.Clone(s)
			slices.Sort(c)
			want := c[n/2]
			if n%2 == 0 {
				want = (c[n/2-1] + c[n/2]) / 2
			}
			if got := median(s); got != want {
				t.Fatalf("median of %v = %g, want %g", c, got, want)
			}
		}
	}
}
