package route

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"
)

// edgeSet is the tour's edges as ordered pairs (smaller node first).
func edgeSet(tour []int32) map[[2]int32]int {
	m := map[[2]int32]int{}
	for i, a := range tour {
		b := tour[(i+1)%len(tour)]
		m[[2]int32{min(a, b), max(a, b)}]++
	}
	return m
}

// TestBridgeSearch checks the double bridges the search makes, on
// LK-optimal tours of random strokes and points (open, closed, with a
// start; array and two-level list): the predicted gain is exactly the
// change of the recomputed tour length and positive, the tour is one
// cycle that keeps every fixed edge, and the tours before and after
// differ in exactly the four edges the move removes and the four it
// adds, (t1,t2), (t3,t4), (t5,t6), (t7,t8) out and (t2,t3), (t4,t1),
// (t6,t7), (t8,t5) in; a search that finds nothing leaves the tour as
// it was.
func TestBridgeSearch(t *testing.T) {
	r := rand.New(rand.NewPCG(14, 5))
	made := 0
	for trial := range 300 {
		n := 20 + r.IntN(150)
		items := randomItems(r, n, 0.6+0.4*float64(trial%2), 8)
		var start *Point
		if trial%4 == 1 {
			start = &Point{X: 50, Y: 50}
		}
		g := newGraph(items, start, nil, trial%5 < 2)
		nb := buildNeighbours(g, 8, true)
		order := r.Perm(n)
		rev := make([]bool, n)
		for i := range rev {
			rev[i] = r.IntN(2) == 0
		}
		tour := g.tourFromOrder(order, rev)
		if trial%3 != 0 {
			if c := alphaCandidates(g, buildPool(g, 8, 1), tour, 7, 20); c != nil {
				nb = c
			}
		}
		s := newSolver(g, nb, tour)
		if trial%2 == 1 {
			s.useTwoLevel()
		}
		length := func() float64 {
			tt := s.appendTour(nil)
			sum := 0.0
			for i, v := range tt {
				sum += g.d(v, tt[(i+1)%len(tt)])
			}
			return sum
		}
		// An LK-optimal tour first, where the bridges are what is left.
		for again := true; again; {
			again = false
			for _, v := range s.appendTour(nil) {
				if s.lkSearch(v) {
					again = true
				}
			}
		}
		for _, v := range s.appendTour(nil) {
			was := s.appendTour(nil)
			before, l0 := length(), s.length
			if !s.bridgeSearch(v) {
				if !slices.Equal(was, s.appendTour(nil)) || s.length != l0 {
					t.Fatalf("trial %d: a search that found nothing changed the tour", trial)
				}
				continue
			}
			made++
			after := s.appendTour(nil)
			if l := length(); math.Abs(l-before-(s.length-l0)) > 1e-6 || l >= before {
				t.Fatalf("trial %d: predicted change %v, real %v", trial, s.length-l0, l-before)
			}
			seen := make([]bool, s.n)
			for _, u := range after {
				if seen[u] {
					t.Fatalf("trial %d: node %d twice", trial, u)
				}
				seen[u] = true
				if p := g.partner[u]; p >= 0 && s.succ(u) != p && s.pred(u) != p {
					t.Fatalf("trial %d: fixed edge (%d,%d) cut", trial, u, p)
				}
			}
			if len(after) != int(s.n) {
				t.Fatalf("trial %d: %d nodes, want %d", trial, len(after), s.n)
			}
			k := s.kopt.t
			e := func(a, b int32) [2]int32 { return [2]int32{min(a, b), max(a, b)} }
			want := edgeSet(was)
			for _, x := range [][2]int32{e(k[1], k[2]), e(k[3], k[4]), e(k[5], k[6]), e(k[7], k[8])} {
				want[x]--
			}
			for _, x := range [][2]int32{e(k[2], k[3]), e(k[4], k[1]), e(k[6], k[7]), e(k[8], k[5])} {
				want[x]++
			}
			got := edgeSet(after)
			for x, c := range want {
				if c != got[x] {
					t.Fatalf("trial %d: edge %v %d times, want %d (t = %v)", trial, x, got[x], c, k[1:9])
				}
			}
		}
	}
	if made < 100 {
		t.Errorf("%d double bridges made: the test exercises too little", made)
	}
	t.Logf("%d double bridges made", made)
}
