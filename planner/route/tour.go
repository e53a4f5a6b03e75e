package route

// solver holds a tour over a graph's nodes as an array with a position
// index, the neighbour lists, the queue of nodes to look at (the
// "don't-look bits" of Bentley 1992: a node leaves the queue when no move
// from it improves, and returns when a move touches it) and a journal of
// reversals that lets a rejected perturbation be undone.
type solver struct {
	g   *graph
	nb  *neighbours
	n   int32
	t   []int32 // t[i] is the node at position i
	pos []int32 // pos[v] is v's position

	queue     []int32 // ring buffer
	qhead, qn int32
	inq       []bool
	journal   []int32 // pairs (position, length) of applied reversals
	recording bool
	maxRev    int32 // longest reversal a move may make
	orMax     int   // longest segment an Or-opt move shifts, in nodes
	or3       bool  // also try sequential 3-opt moves
	deep      bool  // also try sequential 4- and 5-opt moves
	kopt      koptState
	lk        lkState
	lkTouched []int32
	useLK     bool              // chained k-opt (lk.go) instead of single 4-/5-opt moves
	lkOnly    bool              // the chained search alone, without 2-opt, Or-opt and 3-opt first
	lkBreadth [koptDepthMax]int // the chained search's breadth by level
	units     []int32
	dpCost    []float64
	dpFrom    []int8
	eps       float64
	length    float64 // current tour length, fixed edges included
	// Record-to-record acceptance of kicks (kick.go): while slack > 0 a
	// kicked tour is kept when it is at most slack longer than the best
	// tour so far, which is then kept aside in bestT.
	slack   float64
	bestLen float64
	bestT   []int32 // the best tour, when offBest
	offBest bool    // the tour is longer than the best one, kept in bestT
	redo    []int32
}

func newSolver(g *graph, nb *neighbours, tour []int32) *solver {
	n := int32(len(tour))
	s := &solver{
		g: g, nb: nb, n: n, t: tour, pos: make([]int32, n),
		queue: make([]int32, n), inq: make([]bool, n),
		maxRev: n, orMax: 3, or3: true, lkBreadth: koptBreadth,
	}
	for i, v := range tour {
		s.pos[v] = int32(i)
	}
	s.length = s.tourLength()
	// Gains below eps are rounding noise; stopping at them keeps the
	// search from cycling.
	s.eps = 1e-9 * max(s.length/float64(max(n, 1)), 1e-300)
	return s
}

func (s *solver) tourLength() float64 {
	sum := 0.0
	for i := range s.n {
		j := i + 1
		if j == s.n {
			j = 0
		}
		sum += s.g.d(s.t[i], s.t[j])
	}
	return sum
}

func (s *solver) succ(v int32) int32 {
	p := s.pos[v] + 1
	if p == s.n {
		p = 0
	}
	return s.t[p]
}

func (s *solver) pred(v int32) int32 {
	p := s.pos[v] - 1
	if p < 0 {
		p = s.n - 1
	}
	return s.t[p]
}

// next is succ for dir 0 and pred for dir 1.
func (s *solver) next(v int32, dir int) int32 {
	if dir == 0 {
		return s.succ(v)
	}
	return s.pred(v)
}

// pathLen is the number of nodes on the path from position i forward to
// position j.
func (s *solver) pathLen(i, j int32) int32 {
	l := j - i
	if l < 0 {
		l += s.n
	}
	return l + 1
}

// reversePath reverses the path from position i forward to position j,
// or the rest of the cycle when that is shorter: both give the same
// cycle, read in opposite directions.
func (s *solver) reversePath(i, j int32) {
	l := s.pathLen(i, j)
	if 2*l > s.n {
		i, l = j+1, s.n-l
		if i == s.n {
			i = 0
		}
	}
	s.reverseRange(i, l)
}

// reverseRange reverses the l positions from i forward, wrapping.
func (s *solver) reverseRange(i, l int32) {
	if l < 2 {
		return
	}
	if s.recording {
		s.journal = append(s.journal, i, l)
	}

	n := s.n
	j := i + l - 1
	t, pos := s.t, s.pos
	if j < n {
		for i < j {
			a, b := t[i], t[j]
			t[i], t[j] = b, a
			pos[b], pos[a] = i, j
			i++
			j--
		}
		return
	}
	j -= n
	for k := l / 2; k > 0; k-- {
		a, b := t[i], t[j]
		t[i], t[j] = b, a
		pos[b], pos[a] = i, j
		i++
		if i == n {
			i = 0
		}
		j--
		if j < 0 {
			j = n - 1
		}
	}
}

// flip is the 2-opt move that removes the edges (u1, u2) and (v1, v2) and
// adds (u1, v1) and (u2, v2). Both removed edges must run the same way
// round the tour: u2 = succ(u1) and v2 = succ(v1), or both pred.
func (s *solver) flip(u1, u2, v1, v2 int32) {
	if s.succ(u1) == u2 {
		s.reversePath(s.pos[u2], s.pos[v1])
	} else {
		s.reversePath(s.pos[u1], s.pos[v2])
	}
}

// moveSegment moves the segment first..last (first to last forward) to
// between a and b = succ(a), outside the segment, reversed if rev. It
// is three 2-opt flips (two when reversed); each reverses the shorter
// side, so the cost is about twice the shorter way round from the
// segment to its new place.
func (s *solver) moveSegment(first, last, a, b int32, rev bool) {
	p, nx := s.pred(first), s.succ(last)
	s.flip(p, first, a, b) // p a..nx last..first b
	s.flip(p, a, nx, last) // p nx..a last..first b
	if !rev {
		s.flip(a, last, first, b) // p nx..a first..last b
	}
}

// undo reverts the reversals journalled since mark, latest first.
func (s *solver) undo(mark int) {
	rec := s.recording
	s.recording = false
	for k := len(s.journal) - 2; k >= mark; k -= 2 {
		s.reverseRange(s.journal[k], s.journal[k+1])
	}
	s.journal = s.journal[:mark]
	s.recording = rec
}

func (s *solver) push(v int32) {
	if s.inq[v] {
		return
	}
	s.inq[v] = true
	i := s.qhead + s.qn
	if i >= s.n {
		i -= s.n
	}
	s.queue[i] = v
	s.qn++
}

func (s *solver) pop() int32 {
	v := s.queue[s.qhead]
	s.qhead++
	if s.qhead == s.n {
		s.qhead = 0
	}
	s.qn--
	s.inq[v] = false
	return v
}

// oneWayIn counts the tails of one-way fixed edges on the path of l
// positions from i.
func (s *solver) oneWayIn(i, l int32) int {
	c := 0
	for range l {
		if s.g.tail[s.t[i]] {
			c++
		}
		i++
		if i == s.n {
			i = 0
		}
	}
	return c
}

// reversalOK reports whether reversing the path of l positions from i
// (or the rest of the cycle) is allowed: not longer than maxRev, and, if
// there are two or more one-way edges, leaving them all the same way
// round: the path holds none of them or all.
func (s *solver) reversalOK(i, l int32) bool {
	if 2*l > s.n {
		i, l = i+l, s.n-l
		if i >= s.n {
			i -= s.n
		}
	}
	if l > s.maxRev {
		return false
	}
	if s.g.oneWay < 2 {
		return true
	}
	c := s.oneWayIn(i, l)
	return c == 0 || c == s.g.oneWay
}
