package testset_test

import (
	"context"
	"testing"

	"dimerpath/planner/route"
	"dimerpath/planner/route/internal/testset"
)

// TestHeldKarpBoundBelowOptimum checks the bound against exact optima
// (route.Solve is exact up to 10 items, which route's own tests check by
// brute force): it must never exceed them, and should come close.
func TestHeldKarpBoundBelowOptimum(t *testing.T) {
	for seed := range uint64(20) {
		items := testset.Strokes(8, seed)
		if seed%2 == 0 {
			items = testset.Uniform(9, seed)
		}
		s, err := route.Solve(context.Background(), route.Problem{Items: items}, route.Options{})
		if err != nil {
			t.Fatal(err)
		}
		lb := testset.HeldKarpBound(items, s.Length, 500)
		if lb > s.Length+1e-6 {
			t.Errorf("seed %d: bound %v above the optimum %v", seed, lb, s.Length)
		}
		if lb < 0.8*s.Length {
			t.Logf("seed %d: bound %v, optimum %v (%.1f%%)", seed, lb, s.Length, 100*lb/s.Length)
		}
	}
}
