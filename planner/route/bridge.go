package route

// Non-sequential double-bridge moves found by search (the "infeasible
// first exchange, then a bridging one" idea of Helsgaun 2009, "General
// k-opt submoves for the Lin-Kernighan TSP heuristic", Math. Prog. Comp.
// 1, §5, written here for the double bridge only). A sequential search
// never makes a double bridge: its removed and added edges form two
// alternating cycles, each of which alone would split the tour. On
// strokes this matters more than on points: a stroke end has one tour
// edge a move may remove, so t4 is forced, and half of the 2-exchanges
// from t1 that gain are the ones that split the tour.
//
// From t1, its tour neighbour t2 (dir) and t3 a candidate of t2, the
// splitting exchange removes (t1,t2), (t3,t4) with t4 = next(t3, dir) and
// adds (t2,t3), (t4,t1): two cycles, t2..t3 and t4..t1. If that gains by
// itself, a second exchange removes (t5,t6) in the shorter cycle and
// (t7,t8) in the other, and adds (t6,t7), (t8,t5), which joins them into
// one tour; t7 is a candidate of t6, and the move is made when the four
// exchanges together gain.

// bridgeMates are the double bridge's added edges: (t2,t3), (t4,t1),
// (t6,t7), (t8,t5).
var bridgeMates = koptMates{1: 4, 2: 3, 3: 2, 4: 1, 5: 8, 6: 7, 7: 6, 8: 5}

// bridgeStrokes turns the search on where the chained search runs alone
// (stroke ends at least half the nodes), after it from each node. On
// 10,000 random strokes, 2 s of CPU, instances 1-12 run at the same time
// with and without: idle travel 0.096% shorter on average with seed 2
// (bound 50), 0.118% with seed 3 (bound 150; 11 of 12 shorter); with the
// same kicks it costs ~14% more CPU (route14e).
var bridgeStrokes = true

// bridgeMaxCycle bounds the shorter cycle's nodes, whose edges the
// second exchange tries one by one. Measured as above against 50: 150
// gave 0.040% and 0.051% shorter tours (seeds 1, 2), 400 0.038% (seed
// 1) and 0.019% shorter than 150 (seed 3); 20 the same as 50.
var bridgeMaxCycle int32 = 150

// bridgeSearch looks for an improving double bridge from t1 and makes
// the first it finds. It reports whether it did.
func (s *solver) bridgeSearch(t1 int32) bool {
	g := s.g
	if g.oneWay >= 2 || s.n < 12 {
		return false
	}
	k := s.koptScratch()
	for dir := range 2 {
		t2 := s.next(t1, dir)
		if g.fixed(t1, t2) {
			continue
		}
		d12 := g.d(t1, t2)
		n2 := s.next(t2, dir) // fixed in the loop: a move made returns
		ids, ds := s.nb.list(t2)
		for c, t3 := range ids {
			if t3 < 0 {
				break
			}
			g1 := d12 - ds[c]
			if g1 <= s.eps {
				break
			}
			if t3 == t1 || t3 == n2 {
				continue
			}
			t4 := s.next(t3, dir)
			if t4 == t1 || g.fixed(t3, t4) {
				continue
			}
			G := g1 + g.d(t3, t4) - g.d(t4, t1)
			if G <= s.eps {
				continue
			}
			k.t[1], k.t[2], k.t[3], k.t[4] = t1, t2, t3, t4
			if s.bridgeSecond(dir, G) {
				return true
			}
		}
	}
	return false
}

// bridgeSecond completes the splitting exchange in k.t[1..4] (gain G)
// with a second exchange that joins its two cycles, and makes the first
// double bridge that gains.
func (s *solver) bridgeSecond(dir int, G float64) bool {
	g := s.g
	k := &s.kopt
	t1, t2, t3, t4 := k.t[1], k.t[2], k.t[3], k.t[4]
	// The cycle t2..t3 holds the positions from t2 to t3 along dir.
	p2, p3 := s.position(t2), s.position(t3)
	if dir == 1 {
		p2, p3 = p3, p2
	}
	in := s.pathLen(p2, p3) // nodes of the cycle t2..t3
	// The shorter cycle: from a to b along dir.
	a, b, short := t2, t3, in
	if s.n-in < in {
		a, b, short = t4, t1, s.n-in
	}
	if short < 4 || short > bridgeMaxCycle {
		return false
	}
	// inShort reports whether v lies on the shorter cycle's path.
	pa := s.position(a)
	if dir == 1 {
		pa = s.position(b)
	}
	inShort := func(v int32) bool {
		d := s.position(v) - pa
		if d < 0 {
			d += s.n
		}
		return d < short
	}
	for u := a; u != b; {
		w := s.next(u, dir)
		if !g.fixed(u, w) && u != t1 && u != t2 && u != t3 && u != t4 &&
			w != t1 && w != t2 && w != t3 && w != t4 {
			d56 := g.d(u, w)
			for side := range 2 {
				t5, t6 := u, w
				if side == 1 {
					t5, t6 = w, u
				}
				ids, ds := s.nb.list(t6)
				for c, t7 := range ids {
					if t7 < 0 {
						break
					}
					g2 := G + d56 - ds[c]
					if g2 <= s.eps {
						break
					}
					if t7 == t1 || t7 == t2 || t7 == t3 || t7 == t4 || inShort(t7) {
						continue
					}
					for side8 := range 2 {
						t8 := s.next(t7, side8)
						if t8 == t1 || t8 == t2 || t8 == t3 || t8 == t4 || g.fixed(t7, t8) {
							continue
						}
						gain := g2 + g.d(t7, t8) - g.d(t8, t5)
						if gain <= s.eps {
							continue
						}
						k.t[5], k.t[6], k.t[7], k.t[8] = t5, t6, t7, t8
						if !s.koptDoMates(4, &bridgeMates) {
							continue
						}
						for _, v := range k.t[1:9] {
							s.push(v)
						}
						s.length -= gain
						return true
					}
				}
			}
		}
		u = w
	}
	return false
}
