package route

import "slices"

// Sequential 4- and 5-opt moves: the deeper steps of Lin & Kernighan
// 1973 as LKH makes them (Helsgaun 2000, "An effective implementation of
// the Lin-Kernighan traveling salesman heuristic", EJOR 126(1); Helsgaun
// 2009, "General k-opt submoves for the Lin-Kernighan TSP heuristic",
// Math. Prog. Comp. 1). From t1 the move removes (t1,t2), (t3,t4), ...,
// (t2k-1,t2k) and adds (t2,t3), (t4,t5), ..., (t2k,t1), where t2i+1 is a
// neighbour of t2i with positive partial gain and t2i+2 either tour
// neighbour of t2i+1. The intermediate steps need not leave a tour;
// only the closed move must, which a walk over the k segments checks.
// The move is made as the reversals that turn the segments' old order
// into the new one (a shortest sequence, precomputed by breadth-first
// search over the signed permutations of at most four segments).

// koptDepthMax is the deepest move: 5 removed edges.
const koptDepthMax = 5

// koptBreadth bounds the candidates t2i+1 tried at each level i (1..4).
var koptBreadth = [koptDepthMax]int{0, 5, 3, 2, 1}

// koptState is the scratch of one search.
type koptState struct {
	t    [2*koptDepthMax + 1]int32 // t[1..2k]
	node [2 * koptDepthMax]int32   // the 2k nodes by position, from a segment head
	idx  [2 * koptDepthMax]int8    // the index j in t of node[q]
	rank [2*koptDepthMax + 1]int8  // the index q in node of t[j]
	key  uint32                    // the checked move's new segment order (koptValid)
	// in[v] is set while v is one of the search's current t[1..2i], so
	// that the test costs one load.
	in []bool
}

// mark sets or clears the in-move mark of t[1..2m].
func (k *koptState) mark(m int, on bool) {
	for _, v := range k.t[1 : 2*m+1] {
		k.in[v] = on
	}
}

// bestKOpt searches sequential 4- and 5-opt moves from t1 and makes the
// first improving one. It reports whether it did.
func (s *solver) bestKOpt(t1 int32) bool {
	g := s.g
	if g.oneWay >= 2 || s.n < 12 {
		return false
	}
	k := s.koptScratch()
	k.t[1] = t1
	for dir := range 2 {
		t2 := s.next(t1, dir)
		if g.fixed(t1, t2) {
			continue
		}
		k.t[2] = t2
		k.mark(1, true)
		ok := s.koptStep(1, g.d(t1, t2))
		k.mark(1, false)
		if ok {
			return true
		}
	}
	return false
}

// koptScratch returns the k-opt scratch, its marks allocated.
func (s *solver) koptScratch() *koptState {
	k := &s.kopt
	if len(k.in) != int(s.n) {
		k.in = make([]bool, s.n)
	}
	return k
}

// koptStep extends a chain of i removed and i-1 added edges with gain G
// so far by one more pair, closes it when deep enough, and recurses.
func (s *solver) koptStep(i int, G float64) bool {
	g := s.g
	k := &s.kopt
	t2i := k.t[2*i]
	ids, ds := s.nb.list(t2i)
	tried := 0
	for c, t3 := range ids {
		if t3 < 0 {
			break
		}
		g1 := G - ds[c]
		if g1 <= s.eps {
			break
		}
		if k.in[t3] || s.succ(t2i) == t3 || s.pred(t2i) == t3 {
			continue
		}
		tried++
		for side := range 2 {
			t4 := s.next(t3, side)
			if g.fixed(t3, t4) || k.in[t4] {
				continue
			}
			k.t[2*i+1], k.t[2*i+2] = t3, t4
			G2 := g1 + g.d(t3, t4)
			if i+1 >= 4 {
				if gain := G2 - g.d(t4, k.t[1]); gain > s.eps && s.koptMake(i+1) {
					s.length -= gain
					return true
				}
			}
			if i+1 < koptDepthMax {
				k.in[t3], k.in[t4] = true, true
				ok := s.koptStep(i+1, G2)
				k.in[t3], k.in[t4] = false, false
				if ok {
					return true
				}
			}
		}
		if tried >= koptBreadth[i] {
			break
		}
	}
	return false
}

// koptSegments sorts the 2k nodes of the move by tour position so that
// node[2i] and node[2i+1] are the first and last node of the i-th
// stretch of tour between the removed edges, and records each node's
// index in t (idx) and each t's place in node (rank).
func (s *solver) koptSegments(m int) {
	k := &s.kopt
	// Insertion sort of t's indices by position: at most 10 of them.
	var keys [2 * koptDepthMax]int32
	var js [2 * koptDepthMax]int8
	for j := 1; j <= 2*m; j++ {
		p := s.position(k.t[j])
		q := j - 1
		for q > 0 && keys[q-1] > p {
			keys[q], js[q] = keys[q-1], js[q-1]
			q--
		}
		keys[q], js[q] = p, int8(j)
	}
	// The first sorted node heads a segment only if it is cut from its
	// predecessor (at the end of the array), not from its successor (the
	// second sorted node); else it ends the segment that wraps round,
	// which the last sorted node heads. t[j]'s removed edge joins it to
	// t[j+1] (j odd) or t[j-1] (j even).
	first := 0
	if j0 := js[0]; (j0&1 == 1 && js[1] == j0+1) || (j0&1 == 0 && js[1] == j0-1) {
		first = 1
	}
	for q := range 2 * m {
		j := js[(q+first)%(2*m)]
		k.idx[q], k.node[q], k.rank[j] = j, k.t[j], int8(q)
	}
}

// koptMake checks that the closed m-opt move in s.kopt leaves one tour
// and, if so and its reversals are short enough, makes it and queues its
// nodes.
func (s *solver) koptMake(m int) bool {
	if !s.koptDo(m) {
		return false
	}
	for _, v := range s.kopt.t[1 : 2*m+1] {
		s.push(v)
	}
	return true
}

// koptValid reports whether the closed m-opt move in s.kopt leaves one
// tour (a walk over its segments), leaving the segments' new order in
// s.kopt.key.
func (s *solver) koptValid(m int) bool { return s.koptValidMates(m, &seqMates[m]) }

// koptMates is a move's added edges: t[j] is joined to t[mate[j]].
type koptMates [2*koptDepthMax + 2]int8

// seqMates[m] are the added edges of a sequential m-opt move: (t[2j],
// t[2j+1]) for j < m, and (t[2m], t[1]).
var seqMates = func() (ms [koptDepthMax + 1]koptMates) {
	for m := 1; m <= koptDepthMax; m++ {
		ms[m][1], ms[m][2*m] = int8(2*m), 1
		for j := 1; j < m; j++ {
			ms[m][2*j], ms[m][2*j+1] = int8(2*j+1), int8(2*j)
		}
	}
	return ms
}()

// koptValidMates is koptValid for the move that removes (t[2j-1], t[2j])
// and adds the edges mate gives.
func (s *solver) koptValidMates(m int, mate *koptMates) bool {
	k := &s.kopt
	s.koptSegments(m)
	// Sorted index q is segment q/2's head (even) or last node (odd),
	// segments in tour order. Walk: along a segment, then an added edge.
	var key uint32 // the signed permutation of segments 1..m-1 in the new order
	at := int8(0)  // sorted index where the walk enters a segment
	for c := 0; ; c++ {
		if c > 0 {
			e := uint32(at / 2)
			if at&1 == 1 {
				e |= 8
			}
			key |= e << (4 * (c - 1))
		}
		j := mate[k.idx[at^1]] // the segment's exit, as an index into t, then its added edge's other end
		nx := k.rank[j]
		if nx == 0 {
			if c != m-1 {
				return false // a shorter cycle
			}
			break
		}
		if c == m-1 {
			return false
		}
		at = nx
	}
	k.key = key
	return true
}

// koptDo makes the closed m-opt move in s.kopt if it leaves one tour and
// its reversals are short enough.
func (s *solver) koptDo(m int) bool { return s.koptDoMates(m, &seqMates[m]) }

// koptDoMates is koptDo for the move whose added edges mate gives.
func (s *solver) koptDoMates(m int, mate *koptMates) bool {
	if !s.koptValidMates(m, mate) {
		return false
	}
	k := &s.kopt
	steps := reversalPlan(m-1, k.key)
	// Check every reversal's length first, then make them.
	cur := [koptDepthMax]int8{}
	cr := [koptDepthMax]bool{}
	for c := range m {
		cur[c] = int8(c)
	}
	if s.maxRev < s.n {
		// The segments' lengths, for the reversal bound.
		var length [koptDepthMax]int32
		for sg := range m {
			length[sg] = s.pathLen(s.position(k.node[2*sg]), s.position(k.node[2*sg+1]))
		}
		for _, st := range steps {
			span := int32(0)
			for c := st[0]; c <= st[1]; c++ {
				span += length[cur[c]]
			}
			if min(span, s.n-span) > s.maxRev {
				return false
			}
			reverseBlock(cur[:], cr[:], int(st[0]), int(st[1]))
		}
		for c := range m {
			cur[c], cr[c] = int8(c), false
		}
	}
	entry := func(c int) int32 {
		sg := int(cur[c%m])
		if cr[c%m] {
			return k.node[2*sg+1]
		}
		return k.node[2*sg]
	}
	exit := func(c int) int32 {
		sg := int(cur[c])
		if cr[c] {
			return k.node[2*sg]
		}
		return k.node[2*sg+1]
	}
	for _, st := range steps {
		i, j := int(st[0]), int(st[1])
		s.flip(exit(i-1), entry(i), exit(j), entry(j+1))
		reverseBlock(cur[:], cr[:], i, j)
	}
	return true
}

// reverseBlock reverses positions i..j of a signed arrangement.
func reverseBlock(cur []int8, cr []bool, i, j int) {
	for i < j {
		cur[i], cur[j] = cur[j], cur[i]
		cr[i], cr[j] = !cr[j], !cr[i]
		i++
		j--
	}
	if i == j {
		cr[i] = !cr[i]
	}
}

// reversalPlans[m] maps a signed permutation of segments 1..m (4 bits an
// element: the segment, and 8 if reversed) to a shortest list of block
// reversals (positions, 1-based) that turns 1..m into it. Built once, at
// start-up (a few hundred states), so concurrent Solve calls only read it.
var reversalPlans = func() (p [koptDepthMax]map[uint32][][2]int8) {
	for m := 1; m < koptDepthMax; m++ {
		p[m] = planReversals(m)
	}
	return p
}()

func reversalPlan(m int, key uint32) [][2]int8 { return reversalPlans[m][key] }

// planReversals is a breadth-first search from the identity over the
// signed permutations of m elements, moves being block reversals.
func planReversals(m int) map[uint32][][2]int8 {
	enc := func(cur []int8, cr []bool) uint32 {
		var key uint32
		for c := 1; c <= m; c++ {
			e := uint32(cur[c])
			if cr[c] {
				e |= 8
			}
			key |= e << (4 * (c - 1))
		}
		return key
	}
	type state struct {
		cur [koptDepthMax]int8
		cr  [koptDepthMax]bool
	}
	var id state
	for c := range koptDepthMax {
		id.cur[c] = int8(c)
	}
	plans := map[uint32][][2]int8{enc(id.cur[:], id.cr[:]): nil}
	queue := []state{id}
	for len(queue) > 0 {
		st := queue[0]
		queue = queue[1:]
		path := plans[enc(st.cur[:], st.cr[:])]
		for i := 1; i <= m; i++ {
			for j := i; j <= m; j++ {
				nx := st
				reverseBlock(nx.cur[:], nx.cr[:], i, j)
				key := enc(nx.cur[:], nx.cr[:])
				if _, ok := plans[key]; ok {
					continue
				}
				plans[key] = append(slices.Clip(path), [2]int8{int8(i), int8(j)})
				queue = append(queue, nx)
			}
		}
	}
	return plans
}
