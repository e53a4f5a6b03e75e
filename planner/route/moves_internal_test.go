package route

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"testing"
	"time"
)

// TestMovesKeepTour applies the best move of every kind from random
// nodes of random tours (points and strokes, open and closed, with and
// without a start) and checks that the tour stays a permutation that
// keeps every fixed edge, and that the predicted change of length is the
// real one, recomputed from scratch.
func TestMovesKeepTour(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 1))
	counts := map[int]int{}
	for trial := range 300 {
		n := 12 + r.IntN(40)
		items := randomItems(r, n, float64(trial%2)/2, 10)
		var start *Point
		if trial%3 == 0 {
			start = &Point{X: 50, Y: 50}
		}
		g := newGraph(items, start, nil, trial%4 < 2)
		nb := buildNeighbours(g, 8, trial%2 == 1)
		// A random tour that keeps the fixed edges: items in random order.
		order := r.Perm(n)
		rev := make([]bool, n)
		for i := range rev {
			rev[i] = r.IntN(2) == 0
		}
		s := newSolver(g, nb, g.tourFromOrder(order, rev))
		s.or3 = true
		check := func(what string, delta, before float64) {
			t.Helper()
			after := s.tourLength()
			if math.Abs(after-before-delta) > 1e-6 {
				t.Fatalf("trial %d %s: predicted change %v, real %v", trial, what, delta, after-before)
			}
			if err := tourError(s); err != "" {
				t.Fatalf("trial %d %s: %s", trial, what, err)
			}
		}
		for range 60 {
			v := int32(r.IntN(int(s.n)))
			before := s.tourLength()
			b := move{delta: -s.eps}
			s.best2Opt(v, &b)
			s.bestOrOpt(v, &b)
			if b.kind != moveNone {
				counts[b.kind]++
				l0 := s.length
				s.improve(v)
				check("2-opt/Or-opt", s.length-l0, before)
				continue
			}
			m := move3{delta: -s.eps}
			s.bestOr3(v, &m)
			if m.kind != 0 {
				counts[m.kind]++
				s.applyOr3(&m)
				check("3-opt", m.delta, before)
			}
		}
	}
	for _, k := range []int{move2Opt, moveOr, moveOr3A1, moveOr3A2, moveOr3B} {
		if counts[k] == 0 {
			t.Errorf("move kind %d never tried", k)
		}
	}
}

// TestOrientUnits checks the direction DP against brute force over all
// directions of the strokes, order fixed, on small random tours.
func TestOrientUnits(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 3))
	for trial := range 100 {
		n := 3 + r.IntN(6)
		items := make([]Item, n)
		for i := range items {
			p := Point{X: r.Float64() * 10, Y: r.Float64() * 10}
			q := p
			if r.IntN(3) > 0 {
				q = Point{X: p.X + r.Float64()*4 - 2, Y: p.Y + r.Float64()*4 - 2}
			}
			items[i] = Item{A: p, B: q, OneWay: r.IntN(5) == 0}
		}
		var start *Point
		if trial%2 == 0 {
			start = &Point{X: 5, Y: 5}
		}
		g := newGraph(items, start, nil, trial%3 != 0)
		order := r.Perm(n)
		rev := make([]bool, n)
		for i := range rev {
			rev[i] = r.IntN(2) == 0 && !items[order[i]].OneWay
		}
		// Brute force over the reversible strokes' directions.
		best := math.Inf(1)
		for mask := range 1 << n {
			dirs := make([]bool, n)
			ok := true
			for k, i := range order {
				dirs[k] = mask&(1<<k) != 0
				if dirs[k] && (items[i].IsPoint() || items[i].OneWay) {
					ok = false
				}
			}
			if ok {
				s := newSolver(g, nil, g.tourFromOrder(order, dirs))
				best = min(best, s.tourLength())
			}
		}
		s := newSolver(g, nil, g.tourFromOrder(order, rev))
		l0 := s.tourLength()
		d := s.orientUnits()
		if got := s.tourLength(); math.Abs(got-best) > 1e-9 || math.Abs(got-l0-d) > 1e-9 {
			t.Fatalf("trial %d: orientUnits gives %v (predicted change %v from %v), brute force %v", trial, got, d, l0, best)
		}
		for a := range int32(g.n()) {
			if g.tail[a] && s.succ(a) != g.partner[a] {
				t.Fatalf("trial %d: one-way edge turned", trial)
			}
		}
	}
}

// TestKickKeepsTour checks that kicks leave a valid tour whose tracked
// length is its real length, and never a longer one.
func TestKickKeepsTour(t *testing.T) {
	r := rand.New(rand.NewPCG(4, 4))
	for trial := range 100 {
		s, _ := randomKickSolver(r, trial)
		s.or3 = true
		if trial%4 == 3 {
			s.useLK = true // the chained search
		}
		rg := newRNG(int64(trial))
		for range 50 {
			before := s.tourLength()
			s.kick(rg, 30)
			after := s.tourLength()
			if math.Abs(after-s.length) > 1e-6 || after > before+1e-9 {
				t.Fatalf("trial %d: length %v (tracked %v), before %v", trial, after, s.length, before)
			}
			if err := tourError(s); err != "" {
				t.Fatalf("trial %d: %s", trial, err)
			}
		}
	}
}

// TestKickSlack checks the record-to-record acceptance of kicks: with a
// slack, a kicked tour may be kept longer than before but never more
// than the slack above the best tour so far; the tracked lengths stay
// exact, and restoreBest gives back a valid tour of exactly the shortest
// length seen.
func TestKickSlack(t *testing.T) {
	r := rand.New(rand.NewPCG(8, 8))
	for trial := range 60 {
		s, n := randomKickSolver(r, trial)
		s.useLK = trial%4 == 3
		s.localSearch(nil)
		s.bestLen = s.length
		s.slack = 0.5 * s.length / float64(n)
		shortest := s.length
		rg := newRNG(int64(trial))
		for range 200 {
			improved := s.kick(rg, 30)
			after := s.tourLength()
			if math.Abs(after-s.length) > 1e-6 {
				t.Fatalf("trial %d: length %v, tracked %v", trial, after, s.length)
			}
			if after > shortest+s.slack+1e-6 {
				t.Fatalf("trial %d: kept a tour %v above the best %v plus the slack %v", trial, after, shortest, s.slack)
			}
			if improved != (after < shortest-s.eps) {
				t.Fatalf("trial %d: kick reported %v going from best %v to %v", trial, improved, shortest, after)
			}
			shortest = min(shortest, after)
			if err := tourError(s); err != "" {
				t.Fatalf("trial %d: %s", trial, err)
			}
		}
		s.restoreBest()
		if err := tourError(s); err != "" {
			t.Fatalf("trial %d: after restoreBest: %s", trial, err)
		}
		if got := s.tourLength(); math.Abs(got-shortest) > 1e-6 || math.Abs(s.length-shortest) > 1e-6 {
			t.Fatalf("trial %d: best tour %v (tracked %v), want %v", trial, got, s.length, shortest)
		}
	}
}

// TestFixedEnd checks paths that must finish at a given point (the last
// group of a closed problem) against brute force, through the exact
// solver and through the heuristic.
func TestFixedEnd(t *testing.T) {
	r := rand.New(rand.NewPCG(5, 5))
	for trial := range 60 {
		n := 3 + r.IntN(5)
		items := make([]Item, n)
		for i := range items {
			p := Point{X: r.Float64() * 10, Y: r.Float64() * 10}
			q := p
			if r.IntN(2) == 0 {
				q = Point{X: p.X + r.Float64()*4 - 2, Y: p.Y + r.Float64()*4 - 2}
			}
			items[i] = Item{A: p, B: q, OneWay: r.IntN(6) == 0}
		}
		start, end := Point{X: -1, Y: 5}, Point{X: 11, Y: r.Float64() * 10}
		cost := func(order []int, rev []bool) float64 {
			cur, sum := start, 0.0
			for k, i := range order {
				in, out := items[i].A, items[i].B
				if rev[k] {
					in, out = out, in
				}
				sum += dist(cur, in)
				cur = out
			}
			return sum + dist(cur, end)
		}
		// Brute force over orders and directions.
		best := math.Inf(1)
		perm := make([]int, n)
		for i := range perm {
			perm[i] = i
		}
		var rec func(k int)
		rec = func(k int) {
			if k == n {
				for mask := range 1 << n {
					rev := make([]bool, n)
					ok := true
					for j, i := range perm {
						rev[j] = mask&(1<<j) != 0
						if rev[j] && (items[i].IsPoint() || items[i].OneWay) {
							ok = false
						}
					}
					if ok {
						best = min(best, cost(perm, rev))
					}
				}
				return
			}
			for i := k; i < n; i++ {
				perm[k], perm[i] = perm[i], perm[k]
				rec(k + 1)
				perm[k], perm[i] = perm[i], perm[k]
			}
		}
		rec(0)
		o, rv := solveExact(items, &start, &end, false)
		if got := cost(o, rv); math.Abs(got-best) > 1e-9 {
			t.Fatalf("trial %d: exact with end %v, brute force %v", trial, got, best)
		}
		c := newControl(context.Background(), Problem{Items: items}, Options{MaxKicks: 300})
		o, rv, err := c.heuristic(items, &start, &end, false, time.Time{}, 300)
		if err != nil || len(o) != n {
			t.Fatalf("trial %d: heuristic %v, %d items", trial, err, len(o))
		}
		for k, i := range o {
			if rv[k] && items[i].OneWay {
				t.Fatalf("trial %d: one-way item reversed", trial)
			}
		}
		if got := cost(o, rv); got > best+1e-9 {
			t.Errorf("trial %d: heuristic with end %v, brute force %v", trial, got, best)
		}
	}
}

// TestKOptKeepsTour makes the sequential 4- and 5-opt moves from every
// node of random 2-opt-optimal tours (points and strokes, open and
// closed) and checks that each keeps a tour with every fixed edge and
// changes its length by the predicted amount, recomputed from scratch.
func TestKOptKeepsTour(t *testing.T) {
	r := rand.New(rand.NewPCG(9, 9))
	made := 0
	for trial := range 200 {
		n := 12 + r.IntN(60)
		items := randomItems(r, n, float64(trial%2)*2/3, 10)
		g := newGraph(items, nil, nil, trial%3 == 0)
		nb := buildNeighbours(g, 8, trial%2 == 1)
		s := newSolver(g, nb, g.tourFromOrder(r.Perm(n), make([]bool, n)))
		s.or3 = false
		if trial%5 == 4 {
			s.maxRev = int32(n / 4) // the bound on reversals of large problems
		}
		for _, v := range s.t {
			s.push(v)
		}
		s.localSearch(nil) // 2-opt and Or-opt only, so deeper moves remain
		s.recording = true // journal the reversals to check their lengths
		for _, v := range append([]int32(nil), s.t...) {
			before := s.tourLength()
			l0 := s.length
			if !s.bestKOpt(v) {
				continue
			}
			made++
			after := s.tourLength()
			if math.Abs(after-before-(s.length-l0)) > 1e-6 || after >= before {
				t.Fatalf("trial %d: predicted change %v, real %v", trial, s.length-l0, after-before)
			}
			if err := tourError(s); err != "" {
				t.Fatalf("trial %d: %s", trial, err)
			}
			for k := 0; k+1 < len(s.journal); k += 2 {
				if l := s.journal[k+1]; l > s.maxRev {
					t.Fatalf("trial %d: reversal of %d positions, bound %d", trial, l, s.maxRev)
				}
			}
		}
	}
	if made < 50 {
		t.Errorf("only %d deep moves made; the test exercises too little", made)
	}
	t.Logf("%d deep moves", made)
}

// randomItems returns n items at random in a 100 x 100 square, each a
// stroke with probability strokes, its B end within reach of A on
// each axis.
func randomItems(r *rand.Rand, n int, strokes, reach float64) []Item {
	items := make([]Item, n)
	for i := range items {
		p := Point{X: r.Float64() * 100, Y: r.Float64() * 100}
		q := p
		if r.Float64() < strokes {
			q = Point{X: p.X + (2*r.Float64()-1)*reach, Y: p.Y + (2*r.Float64()-1)*reach}
		}
		items[i] = Item{A: p, B: q}
	}
	return items
}

// tourError describes what is wrong with s's tour: not a permutation
// matching the position index, or a fixed edge cut; "" if nothing.
func tourError(s *solver) string {
	seen := make([]bool, s.n)
	for i, v := range s.t {
		if seen[v] || s.pos[v] != int32(i) {
			return "not a permutation"
		}
		seen[v] = true
		if p := s.g.partner[v]; p >= 0 && s.succ(v) != p && s.pred(v) != p {
			return fmt.Sprintf("fixed edge (%d,%d) cut", v, p)
		}
	}
	return ""
}

// randomKickSolver returns a solver on a random tour of n (12–211) items
// in a 100 x 100 square: points, and on odd trials some strokes up to 14
// long, with quadrant neighbours; every third trial an open tour.
func randomKickSolver(r *rand.Rand, trial int) (*solver, int) {
	n := 12 + r.IntN(200)
	items := make([]Item, n)
	for i := range items {
		p := Point{X: r.Float64() * 100, Y: r.Float64() * 100}
		q := p
		if trial%2 == 1 && r.IntN(2) == 0 {
			q = Point{X: p.X + r.Float64()*10, Y: p.Y + r.Float64()*10}
		}
		items[i] = Item{A: p, B: q}
	}
	g := newGraph(items, nil, nil, trial%3 == 0)
	nb := buildNeighbours(g, 8, trial%2 == 1)
	return newSolver(g, nb, g.tourFromOrder(r.Perm(n), make([]bool, n))), n
}
