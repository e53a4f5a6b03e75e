package route

import "math"

// twoLevel is the tour as a two-level doubly-linked list (Fredman,
// Johnson, McGeoch & Ostheimer 1995, "Data structures for traveling
// salesmen", J. Algorithms 18): the cycle is cut into about sqrt(n)
// segments, each an array of nodes with a reversal bit, and the segments
// form a cycle of their own (here an array by rank). Reversing a long
// path splits the segments at its ends and turns the segments between
// them round (their order and their bits), O(sqrt n) instead of the
// array's O(n); a short path is reversed node by node. Each segment also
// knows the tour position of its first node, so every node keeps the
// position the array tour would give it: the same reversals leave both
// structures holding the same sequence, which is what lets the solver
// use either (and a test compare them move for move).
type twoLevel struct {
	n      int32
	loc    []slot // loc[v]: v's segment and index in its array
	segs   []tourSeg
	order  []int32 // order[r]: the segment of rank r, in tour order
	target int32   // a segment's length after a rebuild
	maxLen int32   // a segment longer than this triggers a rebuild
	short  int32   // paths up to this long are reversed node by node
	// scratch for rebuilds and recentring
	buf []int32
}

type slot struct{ seg, i int32 }

// tourSeg is one segment: its nodes buf[lo:hi] in array order, read
// backwards in the tour when rev. buf has room on both sides, so that
// nodes moved in from a neighbour at either end and nodes moved out
// leave the others where they are (loc holds indices into buf): only
// the moved nodes are re-indexed, not the whole segment.
type tourSeg struct {
	buf    []int32
	lo, hi int32
	off    int32 // tour position of the segment's first node (in tour order)
	rank   int32
	rev    bool
}

func (s *tourSeg) size() int32 { return s.hi - s.lo }

// twoLevelMin is the smallest problem that gets the two-level list (where
// the search runs alone, see heuristic). Below it the array's reversals
// are short enough that the list's dearer succ and pred cost more than
// they save: random strokes, 30,000 kicks, CPU against the array (same
// tours; route14d): 5,000 nodes +45%, 10,000 nodes +14%, 15,000 nodes
// -7%, 20,000 nodes -13%.
var twoLevelMin int32 = 15_000

// onTwoLevel, when set (by tests), is called when a solve moves its tour
// into the list.
var onTwoLevel func()

// twoLevelScale sets the segments' length: scale x sqrt(n).
var twoLevelScale = 1.0

func newTwoLevel(tour []int32) *twoLevel {
	n := int32(len(tour))
	target := max(int32(8), int32(twoLevelScale*math.Sqrt(float64(n))))
	t := &twoLevel{n: n, loc: make([]slot, n), target: target, maxLen: 4 * target, short: target}
	t.build(tour)
	return t
}

// build cuts the tour (in order, from position 0) into segments of
// target nodes, each in the middle of a buffer with room for maxLen more
// nodes on either side.
func (t *twoLevel) build(tour []int32) {
	n := t.n
	m := (n + t.target - 1) / t.target
	if int32(len(t.segs)) != m {
		t.segs = make([]tourSeg, m)
		t.order = make([]int32, m)
	}
	for r := range m {
		lo := int64(r) * int64(n) / int64(m)
		hi := int64(r+1) * int64(n) / int64(m)
		sg := &t.segs[r]
		sg.place(r, tour[lo:hi], t.maxLen, t.loc)
		sg.off, sg.rank, sg.rev = int32(lo), r, false
		t.order[r] = r
	}
}

// place puts nodes (in array order) in the middle of the segment's
// buffer, with room for room more on either side, and indexes them as
// segment sg.
func (s *tourSeg) place(sg int32, nodes []int32, room int32, loc []slot) {
	size := int32(len(nodes))
	if need := int(size + 2*room); len(s.buf) < need {
		s.buf = make([]int32, need)
	}
	s.lo = (int32(len(s.buf)) - size) / 2
	s.hi = s.lo + size
	copy(s.buf[s.lo:s.hi], nodes)
	for i := s.lo; i < s.hi; i++ {
		loc[s.buf[i]] = slot{sg, i}
	}
}

// rebuild re-cuts the tour into equal segments, keeping every node's
// position.
func (t *twoLevel) rebuild() {
	t.buf = t.appendTour(t.buf[:0])
	t.build(t.buf)
}

// appendTour appends the nodes in position order.
func (t *twoLevel) appendTour(dst []int32) []int32 {
	start := t.rankAt(0)
	m := int32(len(t.order))
	// The segment holding position 0 may begin before it (wrapping).
	sg := &t.segs[t.order[start]]
	skip := t.n - sg.off
	if sg.off == 0 {
		skip = 0
	}
	first := len(dst)
	for k := range m + 1 {
		s := &t.segs[t.order[(start+k)%m]]
		dst = s.appendNodes(dst)
	}
	dst = dst[:first+int(t.n)+int(skip)]
	copy(dst[first:], dst[first+int(skip):])
	return dst[:first+int(t.n)]
}

func (s *tourSeg) appendNodes(dst []int32) []int32 {
	if !s.rev {
		return append(dst, s.buf[s.lo:s.hi]...)
	}
	for i := s.hi - 1; i >= s.lo; i-- {
		dst = append(dst, s.buf[i])
	}
	return dst
}

func (s *tourSeg) first() int32 {
	if s.rev {
		return s.buf[s.hi-1]
	}
	return s.buf[s.lo]
}

func (s *tourSeg) last() int32 {
	if s.rev {
		return s.buf[s.lo]
	}
	return s.buf[s.hi-1]
}

// tourIndex is the index in tour order of the node at buffer index i.
func (s *tourSeg) tourIndex(i int32) int32 {
	if s.rev {
		return s.hi - 1 - i
	}
	return i - s.lo
}

func (t *twoLevel) succ(v int32) int32 {
	l := t.loc[v]
	s := &t.segs[l.seg]
	if s.rev {
		if l.i > s.lo {
			return s.buf[l.i-1]
		}
	} else if l.i+1 < s.hi {
		return s.buf[l.i+1]
	}
	r := s.rank + 1
	if int(r) == len(t.order) {
		r = 0
	}
	return t.segs[t.order[r]].first()
}

// next is succ for dir 0 and pred for dir 1.
func (t *twoLevel) next(v int32, dir int) int32 {
	if dir == 0 {
		return t.succ(v)
	}
	return t.pred(v)
}

func (t *twoLevel) pred(v int32) int32 {
	l := t.loc[v]
	s := &t.segs[l.seg]
	if !s.rev {
		if l.i > s.lo {
			return s.buf[l.i-1]
		}
	} else if l.i+1 < s.hi {
		return s.buf[l.i+1]
	}
	r := s.rank - 1
	if r < 0 {
		r = int32(len(t.order)) - 1
	}
	return t.segs[t.order[r]].last()
}

func (t *twoLevel) position(v int32) int32 {
	l := t.loc[v]
	s := &t.segs[l.seg]
	p := s.off + s.tourIndex(l.i)
	if p >= t.n {
		p -= t.n
	}
	return p
}

// rankAt is the rank of the segment that holds position p.
func (t *twoLevel) rankAt(p int32) int32 {
	// Offsets rise along the ranks from rank 0's, modulo n: search on
	// the distances from it.
	n := t.n
	base := t.segs[t.order[0]].off
	q := p - base
	if q < 0 {
		q += n
	}
	lo, hi := int32(0), int32(len(t.order))-1 // the answer is in [lo, hi]
	for lo < hi {
		mid := (lo + hi + 1) / 2
		d := t.segs[t.order[mid]].off - base
		if d < 0 {
			d += n
		}
		if d <= q {
			lo = mid
		} else {
			hi = mid - 1
		}
	}
	return lo
}

func (t *twoLevel) nodeAt(p int32) int32 {
	s := &t.segs[t.order[t.rankAt(p)]]
	k := p - s.off
	if k < 0 {
		k += t.n
	}
	if s.rev {
		return s.buf[s.hi-1-k]
	}
	return s.buf[s.lo+k]
}

// reverse reverses the path a..b (forward) of l nodes, usually l <= n/2
// (the solver reverses the shorter side; a longer one, as undo may
// make, goes node by node).
func (t *twoLevel) reverse(a, b int32, l int32) {
	if l <= t.short || 2*l > t.n || 4*t.maxLen >= t.n {
		t.reverseNodes(a, b, l)
		return
	}
	if t.loc[a].seg == t.loc[b].seg && t.inOrder(a, b) {
		t.reverseInSegment(a, b)
		return
	}
	t.makeFirst(a)
	if t.loc[a].seg == t.loc[b].seg {
		// a's tail joined b's segment.
		t.reverseInSegment(a, b)
		return
	}
	t.makeLast(b)
	sa, sb := t.loc[a].seg, t.loc[b].seg
	if sa == sb {
		s := &t.segs[sa]
		s.rev = !s.rev
	} else {
		t.reverseRanks(t.segs[sa].rank, t.segs[sb].rank)
	}
	for i := range t.segs {
		if t.segs[i].size() > t.maxLen {
			t.rebuild()
			break
		}
	}
}

// inOrder reports whether a comes before b in tour order within their
// common segment.
func (t *twoLevel) inOrder(a, b int32) bool {
	la, lb := t.loc[a], t.loc[b]
	if t.segs[la.seg].rev {
		return la.i >= lb.i
	}
	return la.i <= lb.i
}

// reverseNodes swaps the path's nodes pairwise from both ends, as the
// array does: O(l).
func (t *twoLevel) reverseNodes(a, b int32, l int32) {
	x, y := t.loc[a], t.loc[b]
	for k := l / 2; k > 0; k-- {
		sx, sy := &t.segs[x.seg], &t.segs[y.seg]
		va, vb := sx.buf[x.i], sy.buf[y.i]
		sx.buf[x.i], sy.buf[y.i] = vb, va
		t.loc[vb], t.loc[va] = x, y
		x, y = t.nextSlot(x), t.prevSlot(y)
	}
}

func (t *twoLevel) nextSlot(x slot) slot {
	s := &t.segs[x.seg]
	if s.rev {
		if x.i > s.lo {
			return slot{x.seg, x.i - 1}
		}
	} else if x.i+1 < s.hi {
		return slot{x.seg, x.i + 1}
	}
	r := s.rank + 1
	if int(r) == len(t.order) {
		r = 0
	}
	nx := t.order[r]
	if sn := &t.segs[nx]; sn.rev {
		return slot{nx, sn.hi - 1}
	} else {
		return slot{nx, sn.lo}
	}
}

func (t *twoLevel) prevSlot(x slot) slot {
	s := &t.segs[x.seg]
	if !s.rev {
		if x.i > s.lo {
			return slot{x.seg, x.i - 1}
		}
	} else if x.i+1 < s.hi {
		return slot{x.seg, x.i + 1}
	}
	r := s.rank - 1
	if r < 0 {
		r = int32(len(t.order)) - 1
	}
	pv := t.order[r]
	if sp := &t.segs[pv]; sp.rev {
		return slot{pv, sp.lo}
	} else {
		return slot{pv, sp.hi - 1}
	}
}

// reverseInSegment reverses the path a..b that lies in one segment, a
// first in tour order.
func (t *twoLevel) reverseInSegment(a, b int32) {
	sg := t.loc[a].seg
	i, j := t.loc[a].i, t.loc[b].i
	if i > j {
		i, j = j, i
	}
	nodes := t.segs[sg].buf
	for i < j {
		u, w := nodes[i], nodes[j]
		nodes[i], nodes[j] = w, u
		t.loc[w].i, t.loc[u].i = i, j
		i++
		j--
	}
}

// makeFirst splits a's segment so that a begins a segment: the shorter
// part moves to the neighbouring segment (the part before a to the
// previous one's end, or a and the rest to the next one's start).
func (t *twoLevel) makeFirst(a int32) {
	la := t.loc[a]
	s := &t.segs[la.seg]
	k := s.tourIndex(la.i) // nodes before a in s
	if k == 0 {
		return
	}
	size := s.size()
	if k <= size-k {
		t.moveHeadToPrev(la.seg, k)
	} else {
		t.moveTailToNext(la.seg, size-k)
	}
}

// makeLast splits b's segment so that b ends a segment.
func (t *twoLevel) makeLast(b int32) {
	lb := t.loc[b]
	s := &t.segs[lb.seg]
	k := s.tourIndex(lb.i) + 1 // nodes up to and including b
	size := s.size()
	if k == size {
		return
	}
	if k <= size-k {
		t.moveHeadToPrev(lb.seg, k)
	} else {
		t.moveTailToNext(lb.seg, size-k)
	}
}

// moveHeadToPrev moves the first c nodes (tour order) of segment sg to
// the end of the segment before it. Positions do not change.
func (t *twoLevel) moveHeadToPrev(sg int32, c int32) {
	s := &t.segs[sg]
	r := s.rank - 1
	if r < 0 {
		r = int32(len(t.order)) - 1
	}
	pi := t.order[r]
	// The head in tour order, as it lies in s's buffer.
	if s.rev {
		t.appendInTourOrder(pi, s.buf[s.hi-c:s.hi], s.rev, true)
		s.hi -= c
	} else {
		t.appendInTourOrder(pi, s.buf[s.lo:s.lo+c], s.rev, true)
		s.lo += c
	}
	s.off += c
	if s.off >= t.n {
		s.off -= t.n
	}
}

// moveTailToNext moves the last c nodes (tour order) of segment sg to the
// start of the segment after it.
func (t *twoLevel) moveTailToNext(sg int32, c int32) {
	s := &t.segs[sg]
	r := s.rank + 1
	if int(r) == len(t.order) {
		r = 0
	}
	ni := t.order[r]
	if s.rev {
		t.appendInTourOrder(ni, s.buf[s.lo:s.lo+c], s.rev, false)
		s.lo += c
	} else {
		t.appendInTourOrder(ni, s.buf[s.hi-c:s.hi], s.rev, false)
		s.hi -= c
	}
	nx := &t.segs[ni]
	nx.off -= c
	if nx.off < 0 {
		nx.off += t.n
	}
}

// appendInTourOrder adds part (in array order of a segment with reversal
// bit partRev; another segment's buffer) to segment di: at its tour end
// if atEnd, else at its tour start, keeping part's tour order. Only the
// added nodes are indexed, unless the buffer has no room left on that
// side and the segment is first moved to the middle of a (larger) one.
func (t *twoLevel) appendInTourOrder(di int32, part []int32, partRev, atEnd bool) {
	d := &t.segs[di]
	c := int32(len(part))
	// In d's array order, part reads forwards if the two bits agree.
	same := partRev == d.rev
	// At d's tour end = its array end unless d is reversed.
	atArrayEnd := atEnd != d.rev
	var at int32 // where part goes in d's buffer
	if atArrayEnd {
		if d.hi+c > int32(len(d.buf)) {
			t.recentre(di, c)
		}
		at = d.hi
		d.hi += c
	} else {
		if d.lo < c {
			t.recentre(di, c)
		}
		d.lo -= c
		at = d.lo
	}
	dst := d.buf[at : at+c]
	if same {
		copy(dst, part)
	} else {
		for i := range c {
			dst[i] = part[c-1-i]
		}
	}
	for i, v := range dst {
		t.loc[v] = slot{di, at + int32(i)}
	}
}

// recentre moves segment di's nodes to the middle of its buffer (a
// larger one if they and room more would not fit with room to spare),
// re-indexing them.
func (t *twoLevel) recentre(di int32, room int32) {
	d := &t.segs[di]
	size := d.size()
	t.buf = append(t.buf[:0], d.buf[d.lo:d.hi]...)
	if need := int(size + 2*max(room, t.maxLen)); len(d.buf) < need {
		d.buf = make([]int32, need)
	}
	d.place(di, t.buf, 0, t.loc)
}

// reverseRanks turns the segments of ranks ra..rb (forward, wrapping)
// round: their order and their bits; the first keeps ra's offset.
func (t *twoLevel) reverseRanks(ra, rb int32) {
	m := int32(len(t.order))
	off := t.segs[t.order[ra]].off
	k := rb - ra
	if k < 0 {
		k += m
	}
	i, j := ra, rb
	for c := (k + 1) / 2; c > 0; c-- {
		t.order[i], t.order[j] = t.order[j], t.order[i]
		i++
		if i == m {
			i = 0
		}
		j--
		if j < 0 {
			j = m - 1
		}
	}
	r := ra
	for range k + 1 {
		sg := &t.segs[t.order[r]]
		sg.rev = !sg.rev
		sg.rank = r
		sg.off = off
		off += sg.size()
		if off >= t.n {
			off -= t.n
		}
		r++
		if r == m {
			r = 0
		}
	}
}
