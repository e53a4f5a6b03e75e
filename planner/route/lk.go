package route

// Lin-Kernighan search with sequential k-opt basic moves (Lin & Kernighan
// 1973; the basic moves and the chaining as in Helsgaun 2000, "An
// effective implementation of the Lin-Kernighan traveling salesman
// heuristic", EJOR 126(1), §3-5): from t1 and its tour neighbour t2, the
// search looks at every sequential move of up to koptDepthMax removed
// edges whose partial gain stays positive (t2i+1 from the candidate list
// of t2i, t2i+2 either tour neighbour of t2i+1) and makes the first whose
// closing edge (t2k, t1) leaves a shorter tour. When none does, it makes
// the valid move of greatest partial gain G without the closing edge and
// continues from t1 and the new t2 = t2k with that gain, so that the
// chain of basic moves forms one deep move; a chain that never comes out
// shorter is undone. Edges added in the chain are not removed again and
// removed ones not added again (Helsgaun's rules), which bounds it.

// lkState is the chain's scratch.
type lkState struct {
	before  float64 // the tour's length before the chain
	bestG   float64
	bestT   [2*koptDepthMax + 1]int32
	bestM   int
	added   [][2]int32
	removed [][2]int32
	// mark[v] == stamp when v ends an edge in added or removed, so that
	// most tabu checks cost one comparison.
	mark  []uint32
	stamp uint32
}

// tabu reports whether (a, b) is in es, one of the chain's edge lists.
func (lk *lkState) tabu(es [][2]int32, a, b int32) bool {
	return lk.mark[a] == lk.stamp && lk.mark[b] == lk.stamp && hasEdge(es, a, b)
}

// note adds (a, b) to *es.
func (lk *lkState) note(es *[][2]int32, a, b int32) {
	*es = append(*es, [2]int32{a, b})
	lk.mark[a], lk.mark[b] = lk.stamp, lk.stamp
}

// lkBreadthStrokes bounds the candidates t2i+1 the chained search tries
// at each level i (1..4) on problems with strokes; points use
// koptBreadth. A stroke end has one tour edge a move may remove, so a
// search from it has about half the choices and a wider one is
// affordable. Measured with 2 s of CPU on 10,000 random strokes
// (instances 1-4, seeds 1-3), idle travel above the best of two 30 s
// runs: 5,3,2,1 0.50% mean (worst 0.61%), 5,5,2,1 0.38% (0.49%), better
// on all four instances. On the TSPLIB points 5,5,2,1 was no better
// (mean gap over seeds 1-9 0.185% against 0.178%, worst 0.54% against
// 0.41%), and 5,5,3,2 worse.
var lkBreadthStrokes = [koptDepthMax]int{0, 5, 5, 2, 1}

// lkSteps bounds the basic moves of one chain. Measured (TSPLIB
// instances of 2,000-15,000 points, 2 s): 3 and 5 steps are clearly
// worse, 8, 12 and 16 alike; 50 no better.
var lkSteps = 8

func hasEdge(es [][2]int32, a, b int32) bool {
	if len(es) == 0 {
		return false
	}
	for _, e := range es {
		if (e[0] == a && e[1] == b) || (e[0] == b && e[1] == a) {
			return true
		}
	}
	return false
}

// lkSearch runs the chained search from t1 and reports whether it made
// the tour shorter.
func (s *solver) lkSearch(t1 int32) bool {
	g := s.g
	if g.oneWay >= 2 || s.n < 12 {
		return false
	}
	k := s.koptScratch()
	lk := &s.lk
	for dir := range 2 {
		t2 := s.next(t1, dir)
		if g.fixed(t1, t2) {
			continue
		}
		mark := len(s.journal)
		rec := s.recording
		s.recording = true
		before := s.length
		lk.before = before
		G0 := g.d(t1, t2)
		// The chain's earlier steps' edges (the current step's are in
		// s.kopt.t, which no step repeats).
		lk.added, lk.removed = lk.added[:0], lk.removed[:0]
		if lk.mark == nil {
			lk.mark = make([]uint32, s.n)
		}
		if lk.stamp++; lk.stamp == 0 {
			clear(lk.mark)
			lk.stamp = 1
		}
		improved := false
		for step := 0; step < lkSteps; step++ {
			k.t[1], k.t[2] = t1, t2
			lk.bestM, lk.bestG = 0, s.eps
			k.in[t1], k.in[t2] = true, true
			ok := s.lkStep(1, G0)
			k.in[t1], k.in[t2] = false, false
			if ok {
				improved = true
				break
			}
			if lk.bestM == 0 {
				break
			}
			m, G := lk.bestM, lk.bestG
			k.t = lk.bestT
			if !s.koptDo(m) {
				break
			}
			for j := 1; j < m; j++ {
				lk.note(&lk.added, k.t[2*j], k.t[2*j+1])
			}
			for j := 1; j <= m; j++ {
				lk.note(&lk.removed, k.t[2*j-1], k.t[2*j])
			}
			for _, v := range k.t[1 : 2*m+1] {
				s.lkTouched = append(s.lkTouched, v)
			}
			s.length = before - (G - g.d(k.t[2*m], t1))
			G0 = G
			t2 = k.t[2*m]
		}
		if improved {
			for _, v := range s.lkTouched {
				s.push(v)
			}
			s.lkTouched = s.lkTouched[:0]
			s.recording = rec
			if !rec {
				s.journal = s.journal[:mark]
			}
			return true
		}
		s.lkTouched = s.lkTouched[:0]
		s.undo(mark)
		s.recording = rec
		s.length = before
	}
	return false
}

// lkStep extends the current basic move of i removed edges and gain G by
// one more pair, closes it when that gains, records it as the chain's
// next step when it is the best so far, and recurses.
func (s *solver) lkStep(i int, G float64) bool {
	g := s.g
	k := &s.kopt
	lk := &s.lk
	t1 := k.t[1]
	t2i := k.t[2*i]
	ids, ds := s.nb.list(t2i)
	// The tour does not change in the loop until a move is made (and the
	// search returns), so t2i's tour neighbours are read once.
	sc, pc := s.succ(t2i), s.pred(t2i)
	tried := 0
	for c, t3 := range ids {
		if t3 < 0 {
			break
		}
		g1 := G - ds[c]
		if g1 <= s.eps {
			break
		}
		if k.in[t3] || sc == t3 || pc == t3 || lk.tabu(lk.removed, t2i, t3) {
			continue
		}
		tried++
		for side := range 2 {
			t4 := s.next(t3, side)
			if g.fixed(t3, t4) || k.in[t4] || lk.tabu(lk.added, t3, t4) {
				continue
			}
			k.t[2*i+1], k.t[2*i+2] = t3, t4
			G2 := g1 + g.d(t3, t4)
			m := i + 1
			if g.within(t4, t1, G2-s.eps) && !lk.tabu(lk.removed, t4, t1) && s.koptDo(m) {
				gain := G2 - g.d(t4, t1)
				for _, v := range k.t[1 : 2*m+1] {
					s.lkTouched = append(s.lkTouched, v)
				}
				s.length = lk.before - gain
				return true
			}
			if m == koptDepthMax && G2 > lk.bestG && !lk.tabu(lk.removed, t4, t1) && s.koptValid(m) {
				lk.bestG, lk.bestM, lk.bestT = G2, m, k.t
			}
			if m < koptDepthMax {
				k.in[t3], k.in[t4] = true, true
				ok := s.lkStep(m, G2)
				k.in[t3], k.in[t4] = false, false
				if ok {
					return true
				}
			}
		}
		if tried >= s.lkBreadth[i] {
			break
		}
	}
	return false
}
