package route

// rng is a small, fast, seedable generator (splitmix64 seeding an
// xorshift64*; Vigna 2016, "An experimental exploration of Marsaglia's
// xorshift generators, scrambled", ACM TOMS 42(4)).
type rng struct{ s uint64 }

func newRNG(seed int64) *rng {
	z := uint64(seed) + 0x9e3779b97f4a7c15
	z = (z ^ (z >> 30)) * 0xbf58476d1ce4e5b9
	z = (z ^ (z >> 27)) * 0x94d049bb133111eb
	z ^= z >> 31
	if z == 0 {
		z = 1
	}
	return &rng{s: z}
}

func (r *rng) uint64() uint64 {
	r.s ^= r.s >> 12
	r.s ^= r.s << 25
	r.s ^= r.s >> 27
	return r.s * 2685821657736338717
}

// intn returns a number in [0, n), n > 0.
func (r *rng) intn(n int32) int32 {
	return int32((r.uint64() >> 32) * uint64(n) >> 32)
}

// kick perturbs the tour with a segment-local double bridge: it cuts
// three edges close together on the tour and swaps the two segments
// between them (A B C D becomes A C B D; Martin, Otto & Felten 1991,
// "Large-step Markov chains for the traveling salesman problem", Complex
// Systems 5), then re-optimises from the six touched nodes only. The
// result is kept if it is no longer than before, else undone from the
// journal (iterated local search; Johnson & McGeoch 1997). It reports
// whether the tour changed.
func (s *solver) kick(r *rng, segMax int32) bool {
	n := s.n
	segMax = min(segMax, (n-2)/3)
	if segMax < 1 {
		return false
	}
	// Cut after positions p0 < p1 < p2, each moved on by one if it would
	// cut a fixed edge (fixed edges never touch each other).
	g := s.g
	p0 := r.intn(n)
	p1 := p0 + 1 + r.intn(segMax)
	p2 := p1 + 1 + r.intn(segMax)
	var a1, a2, b1, b2, c1, c2 int32
	for _, c := range [...]struct {
		p      *int32
		u1, u2 *int32
	}{{&p0, &a1, &a2}, {&p1, &b1, &b2}, {&p2, &c1, &c2}} {
		*c.u1, *c.u2 = s.t[*c.p%n], s.t[(*c.p+1)%n]
		if g.fixed(*c.u1, *c.u2) {
			*c.p++
			*c.u1, *c.u2 = s.t[*c.p%n], s.t[(*c.p+1)%n]
		}
	}
	if p1 <= p0 || p2 <= p1 || p2-p0 >= n-1 || g.fixed(a1, a2) || g.fixed(b1, b2) || g.fixed(c1, c2) {
		return false
	}
	before := s.length
	delta := g.d(a1, b2) + g.d(c1, a2) + g.d(b1, c2) - g.d(a1, a2) - g.d(b1, b2) - g.d(c1, c2)
	mark := len(s.journal)
	s.recording = true
	s.moveSegment(a2, b1, c1, c2, false)
	s.length += delta
	for _, v := range [...]int32{a1, a2, b1, b2, c1, c2} {
		s.push(v)
	}
	s.localSearch(nil)
	s.recording = false
	if s.length <= before+s.eps {
		s.journal = s.journal[:mark]
		return s.length < before-s.eps
	}
	s.undo(mark)
	s.length = before
	return false
}
