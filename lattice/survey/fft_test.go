package survey

import (
	"math"
	"math/cmplx"
	"math/rand/v2"
	"testing"
)

// TestFFTMatchesDirectDFT checks the 2-D FFT (gonum's 1-D transforms, two
// real rows per complex transform, columns in blocks) against the
// definition of the DFT summed directly, for small sizes of every parity.
func TestFFTMatchesDirectDFT(t *testing.T) {
	for _, sz := range [][2]int{{8, 8}, {6, 5}, {5, 6}, {12, 9}, {1, 4}, {4, 1}, {15, 10}} {
		w, h := sz[0], sz[1]
		rng := rand.New(rand.NewPCG(uint64(w), uint64(h)))
		f := make([]float64, w*h)
		for i := range f {
			f[i] = rng.NormFloat64()
		}
		s := forward2D(f, w, h)
		for ky := 0; ky < h; ky++ {
			for kx := -w / 2; kx <= w/2; kx++ {
				want := directDFT(f, w, h, float64(kx)/float64(w), float64(ky)/float64(h))
				// The spectrum is stored in single precision.
				if got := s.at(kx, ky); cmplx.Abs(got-want) > 1e-6*float64(w*h) {
					t.Fatalf("%dx%d: FFT(%d, %d) = %v, direct DFT %v", w, h, kx, ky, got, want)
				}
			}
		}
		back := s.inverse2D(nil)
		for i := range f {
			if math.Abs(back[i]-f[i]) > 1e-6 {
				t.Fatalf("%dx%d: inverse(forward(f))[%d] = %g, want %g", w, h, i, back[i], f[i])
			}
		}
	}
}

func TestSmoothSizes(t *testing.T) {
	for _, c := range []struct{ n, below, above int }{{1021, 1000, 1024}, {1024, 1024, 1024}, {7, 6, 8}, {77, 75, 80}} {
		if got := smoothBelow(c.n); got != c.below {
			t.Errorf("smoothBelow(%d) = %d, want %d", c.n, got, c.below)
		}
		if got := smoothAbove(c.n); got != c.above {
			t.Errorf("smoothAbove(%d) = %d, want %d", c.n, got, c.above)
		}
	}
}
