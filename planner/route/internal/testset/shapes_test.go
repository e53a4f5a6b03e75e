package testset

import (
	"math"
	"slices"
	"testing"
)

// TestShapes checks the generated point sets: about n points (Patches
// and Grid a few less, never more), inside the square of side sqrt(n),
// points (not strokes), distinct where the shape says so, and the same
// set for the same seed.
func TestShapes(t *testing.T) {
	for _, sh := range Shapes {
		for _, n := range []int{500, 3000} {
			items := sh.Make(n, 3)
			if len(items) > n || len(items) < n*9/10 {
				t.Errorf("%s(%d): %d points", sh.Name, n, len(items))
			}
			side := math.Sqrt(float64(n))
			seen := map[[2]float64]bool{}
			for _, it := range items {
				if it.A != it.B {
					t.Fatalf("%s(%d): a stroke %v", sh.Name, n, it)
				}
				seen[[2]float64{it.A.X, it.A.Y}] = true
				// Clusters may spill past the square by a few deviations;
				// patches and rows past its edge by up to 8.
				if sh.Name != "clustered" && (it.A.X < 0 || it.A.Y < 0 || it.A.X > 1.2*side+8 || it.A.Y > 1.2*side+8) {
					t.Fatalf("%s(%d): point %v outside the square of side %.1f", sh.Name, n, it.A, side)
				}
			}
			if (sh.Name == "patches" || sh.Name == "grid") && len(seen) != len(items) {
				t.Errorf("%s(%d): %d distinct of %d points", sh.Name, n, len(seen), len(items))
			}
			if again := sh.Make(n, 3); !slices.Equal(again, items) {
				t.Errorf("%s(%d): not the same for the same seed", sh.Name, n)
			}
		}
	}
}
