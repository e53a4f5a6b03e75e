package route

import (
	"cmp"
	"math/rand"
	"slices"
	"testing"
)

// TestSortedOrder checks sortedOrder against a stable comparison sort on
// the key it documents (the float32 of the length, ties in input order)
// on both sides of its digit-width switch, with many equal lengths (as
// on a lattice).
func TestSortedOrder(t *testing.T) {
	for _, n := range []int{0, 1, 255, 256, 1000, 1<<16 - 1, 1 << 16, 70_000} {
		r := rand.New(rand.NewSource(int64(n)))
		edges := make([]cand, n)
		for i := range edges {
			d := float64(r.Intn(50)) * 0.384
			if i%3 == 0 {
				d = r.Float64() * 100
			}
			edges[i] = cand{d: d}
		}
		got := sortedOrder(edges)
		want := make([]uint32, n)
		for i := range want {
			want[i] = uint32(i)
		}
		// Below 256 edges the float64 length is the key; the lengths here
		// are distinct in float32 too, so the orders agree.
		slices.SortStableFunc(want, func(a, b uint32) int { return cmp.Compare(float32(edges[a].d), float32(edges[b].d)) })
		if !slices.Equal(got, want) {
			t.Errorf("n=%d: order differs from a stable sort by length", n)
		}
	}
}

// TestSortKeysByNode checks sortKeysByNode against slices.Sort on edge
// keys with repeats, few and many per node.
func TestSortKeysByNode(t *testing.T) {
	r := rand.New(rand.NewSource(3))
	for _, c := range []struct{ n, m, spread int }{{1, 0, 1}, {2, 1, 1}, {70, 900, 70}, {500, 20000, 500}, {40, 3000, 40}} {
		keys := make([]uint64, c.m)
		for i := range keys {
			u := r.Intn(c.n)
			v := u + 1 + r.Intn(c.spread)
			keys[i] = uint64(u)<<32 | uint64(v)
		}
		want := slices.Clone(keys)
		slices.Sort(want)
		if got := sortKeysByNode(keys, int32(c.n)); !slices.Equal(got, want) {
			t.Errorf("n=%d m=%d: not sorted as slices.Sort sorts", c.n, c.m)
		}
	}
}
