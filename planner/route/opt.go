package route

// Local search: 2-opt (Croes 1958, "A method for solving traveling
// salesman problems", Operations Research 6) and Or-opt (Or 1976, PhD
// thesis, Northwestern University: moving a segment of up to three nodes
// elsewhere, either way round), both searched from one node over its
// neighbour list with the gain criterion of Lin & Kernighan 1973 (the
// first added edge must be shorter than the removed one), so the scan
// stops early (Johnson & McGeoch 1997, "The traveling salesman problem:
// a case study in local optimization").

// move kinds
const (
	moveNone = iota
	move2Opt
	moveOr
)

type move struct {
	kind  int
	delta float64
	// 2-opt: remove (a, b) and (c, d), add (a, c) and (b, d).
	// Or-opt: segment first..last to between a and b = succ(a).
	a, b, c, d  int32
	first, last int32
	rev         bool
}

// improve looks for the best improving move with v as an end of a
// removed edge and applies it. It reports whether it did.
func (s *solver) improve(v int32) bool {
	if s.lkOnly {
		return s.lkSearch(v) || (s.bridge && s.bridgeSearch(v))
	}
	best := move{delta: -s.eps}
	s.best2Opt(v, &best)
	s.bestOrOpt(v, &best)
	switch best.kind {
	case move2Opt:
		s.flip(best.a, best.b, best.c, best.d)
		s.push(best.a)
		s.push(best.b)
		s.push(best.c)
		s.push(best.d)
	case moveOr:
		p, nx := s.pred(best.first), s.succ(best.last)
		s.moveSegment(best.first, best.last, best.a, best.b, best.rev)
		s.push(p)
		s.push(nx)
		s.push(best.first)
		s.push(best.last)
		s.push(best.a)
		s.push(best.b)
	default:
		if !s.or3 {
			return false
		}
		m := move3{delta: -s.eps}
		s.bestOr3(v, &m)
		if m.kind == 0 {
			if s.useLK {
				return s.lkSearch(v)
			}
			return s.deep && s.bestKOpt(v)
		}
		s.applyOr3(&m)
		return true
	}
	s.length += best.delta
	return true
}

func (s *solver) best2Opt(v int32, best *move) {
	g := s.g
	ids, ds := s.nb.list(v)
	for dir := range 2 {
		v2 := s.next(v, dir)
		if g.fixed(v, v2) {
			continue
		}
		d12 := g.d(v, v2)
		for k, c := range ids {
			if c < 0 {
				break
			}
			g1 := d12 - ds[k]
			if g1 <= s.eps {
				break
			}
			c2 := s.next(c, dir)
			if c == v2 || c2 == v || g.fixed(c, c2) {
				continue
			}
			delta := g.d(v2, c2) - g.d(c, c2) - g1
			if delta >= best.delta {
				continue
			}
			// The reversed path: v2..c forward for dir 0, v..c2 for dir 1.
			i, j := s.pos[v2], s.pos[c]
			if dir == 1 {
				i, j = s.pos[v], s.pos[c2]
			}
			if !s.reversalOK(i, s.pathLen(i, j)) {
				continue
			}
			*best = move{kind: move2Opt, delta: delta, a: v, b: v2, c: c, d: c2}
		}
	}
}

func (s *solver) bestOrOpt(v int32, best *move) {
	g := s.g
	n := s.n
	ids, ds := s.nb.list(v)
	for dir := range 2 {
		e := v // the segment's other end
		for l := 1; l <= s.orMax && int32(l)+3 <= n; l++ {
			if l > 1 {
				e = s.next(e, dir)
			}
			first, last := v, e
			if dir == 1 {
				first, last = e, v
			}
			p, nx := s.pred(first), s.succ(last)
			if g.fixed(p, first) || g.fixed(last, nx) {
				continue
			}
			if l == 1 && dir == 1 {
				continue // the same single node as dir 0
			}
			removed := g.d(p, first) + g.d(last, nx) - g.d(p, nx)
			if removed <= s.eps {
				continue
			}
			segOneWay := false
			if g.oneWay >= 2 {
				segOneWay = s.oneWayIn(s.pos[first], int32(l)) > 0
			}
			for k, c := range ids {
				if c < 0 {
					break
				}
				if ds[k] >= removed-s.eps {
					break
				}
				if s.between(first, c, last, 0) {
					continue
				}
				for side := range 2 {
					w := s.next(c, side)
					if s.between(first, w, last, 0) || g.fixed(c, w) {
						continue
					}
					delta := ds[k] + g.d(e, w) - g.d(c, w) - removed
					if delta >= best.delta {
						continue
					}
					// Forward edge (a, b) to insert into, and whether the
					// segment lands reversed.
					var a, b int32
					var rev bool
					if side == 0 {
						a, b = c, w
						rev = v != first
					} else {
						a, b = w, c
						rev = v != last
					}
					if rev && segOneWay {
						continue
					}
					// The flips reverse about the shorter way round from
					// the segment to (a, b).
					if s.maxRev < n {
						y := s.pathLen(s.pos[nx], s.pos[a])
						if min(y, n-y-int32(l)) > s.maxRev {
							continue
						}
					}
					*best = move{kind: moveOr, delta: delta, a: a, b: b, first: first, last: last, rev: rev}
				}
			}
		}
	}
}

// localSearch improves from the queued nodes until none improves or
// stop reports true; stop is polled every few thousand nodes.
func (s *solver) localSearch(stop func() bool) bool {
	for k := 0; s.qn > 0; k++ {
		if k&4095 == 4095 && stop != nil && stop() {
			return false
		}
		v := s.pop()
		s.improve(v)
	}
	return true
}
