package route

import (
	"context"
	"math/rand/v2"
	"slices"
	"testing"
)

// TestTwoLevelMatchesArray makes the same random reversals on the
// two-level list and on a plain array with a position index, and checks
// after each that both hold the same sequence: every node's position,
// the node at every position, succ and pred. Segment lengths from tiny
// (many splits, rebuilds, node-by-node and in-segment reversals all hit)
// to the default.
func TestTwoLevelMatchesArray(t *testing.T) {
	for _, tc := range []struct {
		n, target, short int32
		moves            int
	}{
		{40, 3, 2, 3000},
		{41, 2, 1, 3000},
		{200, 4, 3, 3000},
		{1000, 8, 4, 3000},
		{1000, 16, 40, 2000},
		{5000, 70, 70, 1000},
	} {
		r := rand.New(rand.NewPCG(uint64(tc.n), uint64(tc.target)))
		arr := make([]int32, tc.n)
		for i, v := range r.Perm(int(tc.n)) {
			arr[i] = int32(v)
		}
		tl := newTwoLevel(arr)
		tl.target, tl.maxLen, tl.short = tc.target, 4*tc.target, tc.short
		tl.build(arr)
		arr = slices.Clone(arr)
		n := tc.n
		for mv := range tc.moves {
			// A long or a short path, l <= n/2 as the solver makes them,
			// or any l as undo may.
			var l int32
			switch mv % 3 {
			case 0:
				l = 2 + r.Int32N(n/2-1)
			case 1:
				l = 2 + r.Int32N(min(n/2-1, 3*tc.target))
			default:
				l = 2 + r.Int32N(n-1)
			}
			i := r.Int32N(n)
			j := (i + l - 1) % n
			tl.reverse(tl.nodeAt(i), tl.nodeAt(j), l)
			for k := range l / 2 {
				a, b := (i+k)%n, (i+l-1-k)%n
				arr[a], arr[b] = arr[b], arr[a]
			}
			if got := tl.appendTour(nil); !slices.Equal(got, arr) {
				t.Fatalf("n %d target %d, move %d (i %d, l %d): tour %v, want %v", n, tc.target, mv, i, l, got, arr)
			}
			for p, v := range arr {
				q := (p + 1) % len(arr)
				if tl.position(v) != int32(p) || tl.nodeAt(int32(p)) != v || tl.succ(v) != arr[q] || tl.pred(arr[q]) != v {
					t.Fatalf("n %d target %d, move %d: node %d at %d: position %d, nodeAt %d, succ %d (want %d), pred of %d %d",
						n, tc.target, mv, v, p, tl.position(v), tl.nodeAt(int32(p)), tl.succ(v), arr[q], arr[q], tl.pred(arr[q]))
				}
			}
			for sg := range tl.segs {
				if tl.segs[sg].size() <= 0 {
					t.Fatalf("n %d target %d, move %d: segment %d empty", n, tc.target, mv, sg)
				}
			}
		}
	}
}

// TestTwoLevelSameSolutions solves problems with a fixed number of kicks
// with the array tour and with the two-level list: every move, undo and
// kick sees the same sequence, so the orders must be identical.
func TestTwoLevelSameSolutions(t *testing.T) {
	defer func(m int32, sc float64) { twoLevelMin, twoLevelScale, onTwoLevel = m, sc, nil }(twoLevelMin, twoLevelScale)
	used := 0
	onTwoLevel = func() { used++ }
	r := rand.New(rand.NewPCG(7, 8))
	for _, tc := range []struct {
		name   string
		items  []Item
		closed bool
		start  *Point
	}{
		{"strokes closed", randomItems(r, 400, 1, 3), true, nil},
		{"strokes open", randomItems(r, 400, 1, 3), false, nil},
		{"mixed closed", randomItems(r, 300, 0.6, 5), true, nil},
		{"strokes from a start", randomItems(r, 300, 1, 3), false, &Point{X: 50, Y: 50}},
	} {
		p := Problem{Items: tc.items, Closed: tc.closed, Start: tc.start}
		opt := Options{MaxKicks: 2000, Seed: 5}
		twoLevelMin = 1 << 30
		want, err := Solve(context.Background(), p, opt)
		if err != nil {
			t.Fatal(err)
		}
		// Small segments, so that the list splits, turns and rebuilds.
		twoLevelMin, twoLevelScale = 12, 0.2
		was := used
		got, err := Solve(context.Background(), p, opt)
		if err != nil {
			t.Fatal(err)
		}
		if used == was {
			t.Fatalf("%s: the solve did not use the two-level list", tc.name)
		}
		if !slices.Equal(got.Order, want.Order) || !slices.Equal(got.Reversed, want.Reversed) || got.Length != want.Length {
			t.Errorf("%s: two-level list gave length %v, array %v (orders differ)", tc.name, got.Length, want.Length)
		}
	}
}
