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

// Shade takes out a tilted plane: a ramp with a checker pattern of one
// unit and one bright pixel shades to the checker alone (black and white
// by parity, whatever the ramp adds) and the bright pixel white.
func TestShadeLevels(t *testing.T) {
	top := ramp(50, 40)
	for j := 0; j < 40; j++ {
		for i := 0; i < 50; i++ {
			top.Z[j*50+i] += float32((i + j) % 2)
		}
	}
	top.Z[20*50+25] += 1000
	g := Shade(top)
	if len(g) != 50*40 || g[20*50+25] != 255 {
		t.Fatalf("bright pixel shaded %d, want 255", g[20*50+25])
	}
	for j := 0; j < 40; j++ {
		for i := 0; i < 50; i++ {
			want := uint8(0)
			if (i+j)%2 == 1 {
				want = 255
			}
			if v := g[j*50+i]; v != want && !(i == 25 && j == 20) {
				t.Fatalf("pixel (%d, %d) shaded %d, want %d: the plane is not taken out", i, j, v, want)
			}
		}
	}
}
