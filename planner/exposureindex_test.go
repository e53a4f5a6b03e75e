package planner

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestExposureIndexCells: col and row are the cell of a coordinate by
// their definition, floor(x / cell) clamped to the index, for
// coordinates inside, on cell edges, below 0, beyond the field, and for
// NaN and infinities.
func TestExposureIndexCells(t *testing.T) {
	ix := &exposureIndex{nx: 37, ny: 5}
	want := func(v float64, n int) int { return min(max(int(math.Floor(v/indexCellNM)), 0), n-1) }
	xs := []float64{0, -0.0, 1e-300, -1e-300, -0.5, -1, -1.99, -2, -2.01, 1.99, 2, 2.01, 9.99, 10, 73.9, 74, 1e6, -1e6,
		1e300, -1e300, math.NaN(), math.Inf(1), math.Inf(-1)}
	r := rand.New(rand.NewPCG(14, 3))
	for range 100000 {
		xs = append(xs, (r.Float64()-0.2)*100)
	}
	for _, x := range xs {
		if got, w := ix.col(x), want(x, ix.nx); got != w {
			t.Fatalf("col(%v) = %d, want %d", x, got, w)
		}
		if got, w := ix.row(x), want(x, ix.ny); got != w {
			t.Fatalf("row(%v) = %d, want %d", x, got, w)
		}
	}
}
