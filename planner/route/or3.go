package route

// Sequential 3-opt moves (the depth-3 step of Lin & Kernighan 1973, "An
// effective heuristic algorithm for the traveling-salesman problem",
// Operations Research 21(2)), searched over neighbour lists with the
// gain criterion. In the frame where t2 follows t1, the move removes
// (t1,t2), (t3,t4), (t5,t6) and adds (t2,t3), (t4,t5), (t6,t1):
//
//	A1: t4 = succ t3, t5 in t2..t3, t6 = succ t5: segments t2..t5 and
//	    t6..t3 swap places (pure segment insertion, no reversal);
//	A2: t4 = succ t3, t5 in t2..t3, t6 = pred t5: both segments turn
//	    round in place;
//	B:  t4 = pred t3 (a valid 2-opt so far), then t6 is t5's neighbour
//	    towards t4 along the path the 2-opt leaves: two 2-opt flips.

const (
	moveOr3A1 = iota + 10
	moveOr3A2
	moveOr3B
)

type move3 struct {
	kind                   int
	delta                  float64
	t1, t2, t3, t4, t5, t6 int32
}

// between reports whether b lies on the path from a to c in direction
// dir (0: forward).
func (s *solver) between(a, b, c int32, dir int) bool {
	if dir == 1 {
		a, c = c, a
	}
	pa := s.pos[a]
	db := s.pos[b] - pa
	if db < 0 {
		db += s.n
	}
	dc := s.pos[c] - pa
	if dc < 0 {
		dc += s.n
	}
	return db <= dc
}

// spanOK reports whether the path from a to b in direction dir is at
// most maxRev nodes long: every flip of a 3-opt move whose nodes lie on
// it reverses at most that path.
func (s *solver) spanOK(a, b int32, dir int) bool {
	if s.maxRev >= s.n {
		return true
	}
	if dir == 1 {
		a, b = b, a
	}
	return s.pathLen(s.pos[a], s.pos[b]) <= s.maxRev
}

// bestOr3 finds the best improving sequential 3-opt move from t1.
func (s *solver) bestOr3(t1 int32, best *move3) {
	g := s.g
	for dir := range 2 {
		t2 := s.next(t1, dir)
		if g.fixed(t1, t2) {
			continue
		}
		d12 := g.d(t1, t2)
		ids3, ds3 := s.nb.list(t2)
		for k3, t3 := range ids3 {
			if t3 < 0 {
				break
			}
			g1 := d12 - ds3[k3]
			if g1 <= s.eps {
				break
			}
			if t3 == t1 {
				continue
			}
			for side := range 2 {
				// side 0: t4 = succ t3 (case A); side 1: t4 = pred t3 (B).
				t4 := s.next(t3, dir^side)
				if t4 == t2 || g.fixed(t3, t4) {
					continue
				}
				if side == 0 && t3 == t1 {
					continue
				}
				g2 := g1 + g.d(t3, t4)
				ids5, ds5 := s.nb.list(t4)
				for k5, t5 := range ids5 {
					if t5 < 0 {
						break
					}
					g3 := g2 - ds5[k5]
					if g3 <= s.eps {
						break
					}
					if t5 == t3 || t5 == t4 || t5 == t1 {
						continue
					}
					if side == 0 {
						if !s.between(t2, t5, t3, dir) {
							continue
						}
						// A1: t6 = succ t5 (t5 != t3); A2: t6 = pred t5 (t5 != t2).
						for a := range 2 {
							if (a == 0 && t5 == t3) || (a == 1 && t5 == t2) {
								continue
							}
							if a == 1 && g.oneWay >= 2 {
								continue
							}
							t6 := s.next(t5, dir^a)
							if g.fixed(t5, t6) {
								continue
							}
							delta := g.d(t6, t1) - g.d(t5, t6) - g3
							if delta < best.delta && s.spanOK(t2, t3, dir) {
								*best = move3{kind: moveOr3A1 + a, delta: delta, t1: t1, t2: t2, t3: t3, t4: t4, t5: t5, t6: t6}
							}
						}
						continue
					}
					if g.oneWay >= 2 {
						continue
					}
					// B: the path left by the 2-opt runs t4 ..(back).. t2,
					// t3 ..(on).. t1.
					var t6 int32
					far := s.between(t3, t5, t1, dir)
					if far {
						t6 = s.next(t5, 1-dir)
					} else {
						t6 = s.next(t5, dir)
					}
					if t6 == t1 || g.fixed(t5, t6) {
						continue
					}
					delta := g.d(t6, t1) - g.d(t5, t6) - g3
					if delta < best.delta && ((far && s.spanOK(t2, t6, dir)) || (!far && s.spanOK(t2, t4, dir))) {
						*best = move3{kind: moveOr3B, delta: delta, t1: t1, t2: t2, t3: t3, t4: t4, t5: t5, t6: t6}
					}
				}
			}
		}
	}
}

// applyOr3 makes the move m.
func (s *solver) applyOr3(m *move3) {
	t1, t2, t3, t4, t5, t6 := m.t1, m.t2, m.t3, m.t4, m.t5, m.t6
	switch m.kind {
	case moveOr3A1:
		// Move t2..t5 to between t3 and t4, in actual tour direction.
		if s.succ(t1) == t2 {
			s.moveSegment(t2, t5, t3, t4, false)
		} else {
			s.moveSegment(t5, t2, t4, t3, false)
		}
	case moveOr3A2:
		s.flip(t1, t2, t6, t5) // t1 t6..t2 t5..t3 t4
		s.flip(t2, t5, t3, t4) // t1 t6..t2 t3..t5 t4
	case moveOr3B:
		s.flip(t1, t2, t4, t3)
		s.flip(t4, t1, t5, t6)
	}
	for _, v := range [...]int32{t1, t2, t3, t4, t5, t6} {
		s.push(v)
	}
	s.length += m.delta
}
