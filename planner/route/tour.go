package route

// solver holds a tour over a graph's nodes as an array with a position
// index (or in a two-level list, tour2.go, which gives every node the
// same position), the neighbour lists, the queue of nodes to look at (the
// "don't-look bits" of Bentley 1992: a node leaves the queue when no move
// from it improves, and returns when a move touches it) and a journal of
// reversals that lets a rejected perturbation be undone.
type solver struct {
	g   *graph
	nb  *neighbours
	n   int32
	t   []int32 // t[i] is the node at position i: ring[1 : n+1]
	pos []int32 // pos[v] is v's position
	// ring is t with the cycle's wrap written out: ring[0] = t[n-1] and
	// ring[n+1] = t[0], so that succ and pred need no test for the ends
	// and stay small enough for the compiler to inline with the
	// two-level list's branch.
	ring []int32

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
	bridge    bool              // double bridges found by search after the chained search (bridge.go)
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
	// two, when set, holds the tour instead of t and pos (tour2.go). Only
	// the chained search (lk.go, kopt.go), the double bridges (bridge.go),
	// the kicks, undo and the tour's extraction run on it,
	// through succ, pred, next, position and nodeAt; the shallower moves
	// (opt.go, or3.go) and the one-way checks read t and pos directly,
	// which is right because the list is used only where the search runs
	// alone, on problems without one-way edges (heuristic). Those
	// accessors stay within the compiler's inlining budget with the
	// branch (checked with -gcflags=-m), so the array path costs a
	// predictable test more than before and no call.
	two    *twoLevel
	listed bool // two != nil, as a flag: cheaper in the inliner's count
}

func newSolver(g *graph, nb *neighbours, tour []int32) *solver {
	n := int32(len(tour))
	ring := make([]int32, n+2)
	s := &solver{
		g: g, nb: nb, n: n, ring: ring, t: ring[1 : n+1], pos: make([]int32, n),
		queue: make([]int32, n), inq: make([]bool, n),
		maxRev: n, orMax: 3, or3: true, lkBreadth: koptBreadth,
	}
	copy(s.t, tour)
	for i, v := range tour {
		s.pos[v] = int32(i)
	}
	s.wrapEnds()
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
	if s.listed {
		return s.two.succ(v)
	}
	return s.ring[s.pos[v]+2]
}

func (s *solver) pred(v int32) int32 {
	if s.listed {
		return s.two.pred(v)
	}
	return s.ring[s.pos[v]]
}

// wrapEnds writes the cycle's wrap into ring's ends after t changed.
func (s *solver) wrapEnds() {
	if s.n > 0 {
		s.ring[0], s.ring[s.n+1] = s.t[s.n-1], s.t[0]
	}
}

// position is v's position in the tour.
func (s *solver) position(v int32) int32 {
	if s.listed {
		return s.two.position(v)
	}
	return s.pos[v]
}

// nodeAt is the node at position p.
func (s *solver) nodeAt(p int32) int32 {
	if s.listed {
		return s.two.nodeAt(p)
	}
	return s.t[p]
}

// appendTour appends the nodes in position order.
func (s *solver) appendTour(dst []int32) []int32 {
	if s.two != nil {
		return s.two.appendTour(dst)
	}
	return append(dst, s.t...)
}

// useTwoLevel moves the tour into a two-level list (tour2.go).
func (s *solver) useTwoLevel() {
	s.two, s.listed = newTwoLevel(s.t), true
	if onTwoLevel != nil {
		onTwoLevel()
	}
}

// next is succ for dir 0 and pred for dir 1.
func (s *solver) next(v int32, dir int) int32 {
	if s.listed {
		return s.listNext(v, dir)
	}
	return s.ring[s.pos[v]+int32(2-dir-dir)]
}

// listNext is next on the two-level list. It is kept out of line so
// that next stays within the compiler's inlining budget (80; next costs
// exactly that), which the array path's speed depends on.
//
//go:noinline
func (s *solver) listNext(v int32, dir int) int32 { return s.two.next(v, dir) }

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
	if s.two != nil {
		j := i + l - 1
		if j >= s.n {
			j -= s.n
		}
		s.two.reverse(s.two.nodeAt(i), s.two.nodeAt(j), l)
		return
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
		s.wrapEnds()
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
	s.wrapEnds()
}

// flip is the 2-opt move that removes the edges (u1, u2) and (v1, v2) and
// adds (u1, v1) and (u2, v2). Both removed edges must run the same way
// round the tour: u2 = succ(u1) and v2 = succ(v1), or both pred.
func (s *solver) flip(u1, u2, v1, v2 int32) {
	if s.two != nil {
		if s.succ(u1) == u2 {
			s.reverseListPath(u2, v1)
		} else {
			s.reverseListPath(u1, v2)
		}
		return
	}
	if s.succ(u1) == u2 {
		s.reversePath(s.pos[u2], s.pos[v1])
	} else {
		s.reversePath(s.pos[u1], s.pos[v2])
	}
}

// reverseListPath is reversePath for the two-level list, from the path's
// end nodes: the same reversal, journalled the same way.
func (s *solver) reverseListPath(a, b int32) {
	i, j := s.two.position(a), s.two.position(b)
	l := s.pathLen(i, j)
	if 2*l > s.n {
		i, l = j+1, s.n-l
		if i == s.n {
			i = 0
		}
		a, b = s.two.succ(b), s.two.pred(a)
	}
	if l < 2 {
		return
	}
	if s.recording {
		s.journal = append(s.journal, i, l)
	}
	s.two.reverse(a, b, l)
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
