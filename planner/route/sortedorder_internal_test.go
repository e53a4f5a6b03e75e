package route

import (
	"cmp"
	"math/rand"
	"runtime"
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

// TestFirstRoundOrder checks the order in which greedyTour's first round
// takes the edges of neighbour lists against a stable comparison sort of
// the edges, walked list by list, by the key sortedOrder documents (the
// float32 of the length; below 256 edges the float64): lists of lattice
// lengths with many ties, with and without spread values, small buckets
// and large ones; on one core and in parts on three.
func TestFirstRoundOrder(t *testing.T) {
	for _, n := range []int{3, 30, 2000, 30_000} {
		r := rand.New(rand.NewSource(int64(n)))
		const k = 8
		nb := &neighbours{k: k, id: make([]int32, n*k), dst: make([]float64, n*k)}
		for v := range n {
			for j := range k {
				nb.id[v*k+j], nb.dst[v*k+j] = -1, 0
			}
			m := 1 + r.Intn(k)
			for j := range m {
				u := int32(r.Intn(n))
				if int(u) == v {
					continue
				}
				d := float64(1+r.Intn(6)) * 0.384
				if r.Intn(4) == 0 {
					d = r.Float64() * 50
				}
				nb.id[v*k+j], nb.dst[v*k+j] = u, d
				if nb.id[v*k+j] < 0 {
					break
				}
			}
			// Lists end at their first -1, as buildNeighbours leaves them.
			for j := range k {
				if nb.id[v*k+j] < 0 {
					for i := j; i < k; i++ {
						nb.id[v*k+i] = -1
					}
					break
				}
			}
		}
		var want []uint32
		for v := range int32(n) {
			ids, _ := nb.list(v)
			for j, u := range ids {
				if u < 0 {
					break
				}
				if u < v && contains(nb, u, v) {
					continue
				}
				want = append(want, uint32(int(v)*k+j))
			}
		}
		if len(want) < 256 {
			slices.SortStableFunc(want, func(a, b uint32) int { return cmp.Compare(nb.dst[a], nb.dst[b]) })
		} else {
			slices.SortStableFunc(want, func(a, b uint32) int { return cmp.Compare(float32(nb.dst[a]), float32(nb.dst[b])) })
		}
		// On one core, and on three with the parallel threshold lowered
		// (the counts, the scatter and the buckets' sorts in parts).
		for _, cores := range []int{1, 3} {
			func() {
				defer func(m int) { parallelMin = m }(parallelMin)
				defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(cores))
				if cores > 1 {
					parallelMin = 1
				}
				var got []uint32
				firstRound(nb, int32(n), func(slot int) bool { got = append(got, uint32(slot)); return true })
				if !slices.Equal(got, want) {
					t.Errorf("n=%d, %d cores: %d edges taken, not in the order of a stable sort by length (%d edges)", n, cores, len(got), len(want))
				}
				stopAt := len(want) / 2
				got = got[:0]
				firstRound(nb, int32(n), func(slot int) bool { got = append(got, uint32(slot)); return len(got) < stopAt })
				if len(got) != stopAt {
					t.Errorf("n=%d, %d cores: %d edges taken after take said stop at %d", n, cores, len(got), stopAt)
				}
			}()
		}
	}
}
