package route

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"
)

// TestLKKeepsTour runs the chained k-opt search from every node of
// random tours (points and strokes, open and closed, with and without a
// start, nearest-neighbour and α candidate lists, with the reversal bound
// of large problems on some) and checks after each search: a search that
// reports a gain left a valid tour (a permutation keeping every fixed
// edge) whose length, recomputed from scratch, fell by exactly the
// predicted amount; a search that found nothing left the tour exactly as
// it was (its tentative steps undone); no reversal exceeded the bound.
func TestLKKeepsTour(t *testing.T) {
	r := rand.New(rand.NewPCG(17, 17))
	made, chained := 0, 0
	for trial := range 240 {
		n := 12 + r.IntN(70)
		items := randomItems(r, n, float64(trial%3)/3, 10)
		var start *Point
		if trial%4 == 1 {
			start = &Point{X: 50, Y: 50}
		}
		g := newGraph(items, start, nil, trial%5 < 2)
		nb := buildNeighbours(g, 8, trial%2 == 1)
		order := r.Perm(n)
		rev := make([]bool, n)
		for i := range rev {
			rev[i] = r.IntN(2) == 0
		}
		tour := g.tourFromOrder(order, rev)
		if trial%3 == 2 {
			if c := alphaCandidates(g, buildPool(g, 8, 1), tour, 6, 20); c != nil {
				nb = c
			}
		}
		s := newSolver(g, nb, tour)
		s.or3 = false
		if trial%6 == 5 {
			s.maxRev = int32(n / 4)
		}
		for _, v := range s.t {
			s.push(v)
		}
		s.localSearch(nil) // 2-opt and Or-opt, so that deeper moves remain
		s.recording = true // journal the reversals to check their lengths
		for range 3 {
			for _, v := range slices.Clone(s.t) {
				before := s.tourLength()
				l0 := s.length
				was := slices.Clone(s.t)
				mark := len(s.journal)
				if !s.lkSearch(v) {
					if !slices.Equal(was, s.t) || s.length != l0 {
						t.Fatalf("trial %d: a search that found nothing changed the tour", trial)
					}
					continue
				}
				made++
				if len(s.journal)-mark > 2*koptDepthMax {
					chained++
				}
				after := s.tourLength()
				if math.Abs(after-before-(s.length-l0)) > 1e-6 || after >= before {
					t.Fatalf("trial %d: predicted change %v, real %v", trial, s.length-l0, after-before)
				}
				if err := tourError(s); err != "" {
					t.Fatalf("trial %d: %s", trial, err)
				}
				for k := mark; k+1 < len(s.journal); k += 2 {
					if l := s.journal[k+1]; l > s.maxRev {
						t.Fatalf("trial %d: reversal of %d positions, bound %d", trial, l, s.maxRev)
					}
				}
			}
		}
	}
	if made < 200 || chained < 10 {
		t.Errorf("%d improving searches, %d of them chained: the test exercises too little", made, chained)
	}
	t.Logf("%d improving searches, %d chained", made, chained)
}
