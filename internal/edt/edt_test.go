package edt

import (
	"fmt"
	"math"
	"math/rand/v2"
	"testing"
)

// TestSquaredMatchesBruteForce compares the transform with the minimum
// over every pair of cells, for random site maps and sampled functions
// on grids of several shapes and spacings.
func TestSquaredMatchesBruteForce(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for _, c := range []struct {
		name         string
		w, h         int
		dx, dy       float64
		density      float64
		sampledValue bool
	}{
		{"sparse sites", 23, 17, 1, 1, 0.03, false},
		{"dense sites", 9, 31, 1, 1, 0.4, false},
		{"anisotropic", 20, 20, 0.384, 0.768, 0.05, false},
		{"one row", 40, 1, 0.5, 1, 0.1, false},
		{"no sites", 7, 5, 1, 1, 0, false},
		{"sampled function", 15, 12, 0.7, 1.3, 0.5, true},
	} {
		t.Run(c.name, func(t *testing.T) {
			f := make([]float64, c.w*c.h)
			for i := range f {
				f[i] = math.Inf(1)
				if rng.Float64() < c.density {
					f[i] = 0
					if c.sampledValue {
						f[i] = 5 * rng.Float64()
					}
				}
			}
			got := Squared(f, c.w, c.h, c.dx, c.dy)
			for j := 0; j < c.h; j++ {
				for i := 0; i < c.w; i++ {
					want := math.Inf(1)
					for l := 0; l < c.h; l++ {
						for k := 0; k < c.w; k++ {
							ddx, ddy := float64(i-k)*c.dx, float64(j-l)*c.dy
							want = math.Min(want, ddx*ddx+ddy*ddy+f[l*c.w+k])
						}
					}
					g := got[j*c.w+i]
					if !(math.IsInf(want, 1) && math.IsInf(g, 1)) && math.Abs(g-want) > 1e-9*(1+want) {
						t.Fatalf("Squared at (%d, %d) = %g, brute force %g", i, j, g, want)
					}
				}
			}
		})
	}
}

func ExampleSquared() {
	inf := math.Inf(1)
	// One site in a 5 x 1 grid of 2 nm cells.
	d := Squared([]float64{inf, inf, 0, inf, inf}, 5, 1, 2, 1)
	for _, v := range d {
		fmt.Print(math.Sqrt(v), " ")
	}
	fmt.Println()
	// Output: 4 2 0 2 4
}
