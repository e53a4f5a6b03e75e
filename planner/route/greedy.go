package route

import (
	"cmp"
	"math"
	"runtime"
	"slices"
)

// greedyTour builds a tour by greedy edge matching (the "greedy" or
// "multi-fragment" heuristic; Bentley 1992, "Fast algorithms for
// geometric traveling salesman problems", ORSA J. Computing 4(4)):
// candidate edges from the neighbour lists are taken shortest first
// whenever both ends still have degree < 2 and the edge closes no cycle.
// Fixed edges are taken first. The fragments left over are joined by the
// same rule on their end nodes, in rounds, until one path remains; the
// path is then closed (through the dummy for an open path). O(n log n).
func greedyTour(g *graph, nb *neighbours) []int32 {
	n := g.n()
	adj := make([]int32, 2*n)
	for i := range adj {
		adj[i] = -1
	}
	deg := make([]uint8, n)
	uf := make([]int32, n)
	for i := range uf {
		uf[i] = int32(i)
	}
	find := func(v int32) int32 {
		for uf[v] != v {
			uf[v] = uf[uf[v]]
			v = uf[v]
		}
		return v
	}
	link := func(u, v int32) {
		adj[2*u+int32(deg[u])] = v
		deg[u]++
		adj[2*v+int32(deg[v])] = u
		deg[v]++
		uf[find(u)] = find(v)
	}
	for v := range int32(g.real) {
		if p := g.partner[v]; p > v && p != g.dummy {
			link(v, p)
		}
	}
	// The start of an open path keeps one edge free for the dummy.
	full := func(v int32) bool {
		return deg[v] >= 2 || (v == g.start && g.dummy >= 0 && deg[v] >= 1)
	}
	fragments := g.real
	for v := range int32(g.real) {
		if p := g.partner[v]; p > v && p != g.dummy {
			fragments--
		}
	}
	try := func(u, v int32) {
		if !full(u) && !full(v) && find(u) != find(v) {
			link(u, v)
			fragments--
		}
	}

	// First round on the full neighbour lists, each edge once, shortest
	// first: by the float32 bit pattern of the length (as sortedOrder),
	// ties in the order the lists are walked. The edges are not copied out
	// of the lists: each is its slot in nb (v·k + j, below 2^32: 5·10^8
	// nodes would not fit in memory), sorted stably by the upper 16 bits
	// of its key into one array and then, bucket by bucket, by the lower
	// 16 (at 2·10^6 nodes a list of edges and an order of them, then keys
	// and their radix buffer, were the largest temporaries: 20, then 16,
	// now 4 bytes an edge and a bucket's buffer).
	firstRound(nb, int32(g.real), func(slot int) bool {
		if fragments <= 1 {
			return false
		}
		try(int32(slot/nb.k), nb.id[slot])
		return true
	})

	var edges []cand
	// Later rounds: join fragment ends to the nearest ends of other
	// fragments. Each round takes at least the shortest such edge.
	const kEnds = 8
	for fragments > 1 {
		ends := make([]int32, 0)
		for v := range int32(g.real) {
			if !full(v) {
				ends = append(ends, v)
			}
		}
		t := newKDTree(g.x, g.y, append([]int32(nil), ends...))
		b := newKNNBuf(min(kEnds, len(ends)))
		edges = edges[:0]
		for _, v := range ends {
			b.qx, b.qy, b.ex1, b.ex2 = g.x[v], g.y[v], v, -1
			t.nearest(b)
			fv := find(v)
			for j, u := range b.id {
				if find(u) != fv {
					edges = append(edges, cand{u: v, v: u, d: math.Sqrt(b.d2[j])})
				}
			}
		}
		for _, k := range sortedOrder(edges) {
			if fragments <= 1 {
				break
			}
			try(edges[k].u, edges[k].v)
		}
	}

	// Walk the single path from one end: the start when the path is
	// open and has one, since its other edge goes to the dummy.
	first := int32(0)
	for v := range int32(g.real) {
		if adj[2*v+1] < 0 {
			first = v
			break
		}
	}
	if g.start >= 0 && g.dummy >= 0 {
		first = g.start
	}
	tour := make([]int32, 0, n)
	prev, cur := int32(-1), first
	for range g.real {
		tour = append(tour, cur)
		next := adj[2*cur]
		if next == prev {
			next = adj[2*cur+1]
		}
		if next < 0 {
			break
		}
		prev, cur = cur, next
	}
	if g.dummy >= 0 {
		tour = append(tour, g.dummy)
	}
	return tour
}

// firstRound calls take with the slot of every edge of the lists of
// nb's first n nodes, once
// (an edge listed from both ends is taken from the lower node's list),
// shortest first by the float32 bit pattern of the length, equal ones in
// slot order; below 256 edges by the float64 length, as sortedOrder
// does. It stops when take returns false. Large lists are sorted by
// slot (4 bytes an edge: no copy of the edges), small ones by
// sortedOrder.
func firstRound(nb *neighbours, n int32, take func(slot int) bool) {
	// eachIn calls f for the edges listed from the nodes [lo, hi).
	eachIn := func(lo, hi int32, f func(slot uint32, d float64)) {
		for v := lo; v < hi; v++ {
			ids, ds := nb.list(v)
			o := uint32(v) * uint32(nb.k)
			for j, u := range ids {
				if u < 0 {
					break
				}
				if u < v && contains(nb, u, v) {
					continue // listed from u's side
				}
				f(o+uint32(j), ds[j])
			}
		}
	}
	each := func(f func(slot uint32, d float64)) { eachIn(0, n, f) }
	// Small lists (the session's many re-routes): the edges' lengths in
	// one pass, sorted by sortedOrder (the same order as below; 2^16
	// counters would cost more than the sort).
	small := func() {
		var slots []uint32
		var edges []cand
		each(func(slot uint32, d float64) {
			slots = append(slots, slot)
			edges = append(edges, cand{d: d})
		})
		for _, k := range sortedOrder(edges) {
			if !take(int(slots[k])) {
				return
			}
		}
	}
	if int(n)*nb.k < 1<<16 {
		small()
		return
	}
	bits := func(d float64) uint32 { return math.Float32bits(float32(d)) }
	// The counts and the scatter by the upper 16 bits, on every core for
	// a large problem: each part of the nodes (contiguous, in order)
	// counts its own edges, and scatters them after the earlier parts'
	// in each bucket, so the buckets hold their edges in slot order as
	// one pass would.
	parts := 1
	if int(n) >= parallelMin {
		parts = runtime.GOMAXPROCS(0)
	}
	partOf := func(p int) (int32, int32) { return int32(int(n) * p / parts), int32(int(n) * (p + 1) / parts) }
	hist := make([][]int, parts)
	inParts(parts, func(p int) {
		h := make([]int, 1<<16)
		lo, hi := partOf(p)
		eachIn(lo, hi, func(_ uint32, d float64) { h[bits(d)>>16]++ })
		hist[p] = h
	})
	cnt := make([]int, 1<<16+1)
	for h := range 1 << 16 {
		cnt[h+1] = cnt[h]
		for p := range parts {
			cnt[h+1] += hist[p][h]
		}
	}
	total := cnt[len(cnt)-1]
	if total < 1<<16 {
		small() // long lists, mostly empty
		return
	}
	slots := make([]uint32, total)
	// hist[p][h] becomes where part p's edges of bucket h go.
	for h := range 1 << 16 {
		at := cnt[h]
		for p := range parts {
			at, hist[p][h] = at+hist[p][h], at
		}
	}
	inParts(parts, func(p int) {
		next := hist[p]
		lo, hi := partOf(p)
		eachIn(lo, hi, func(slot uint32, d float64) {
			h := bits(d) >> 16
			slots[next[h]] = slot
			next[h]++
		})
	})
	// Each bucket sorted by the lower 16 bits, stably, before its edges
	// are taken: on one core bucket by bucket (the first round may stop
	// early), on several all of them first, the parts of the range of
	// buckets on every core (the buckets are apart).
	sortBucket := func(h int, buf *[]uint32, low []int) {
		bucket := slots[cnt[h]:cnt[h+1]]
		if len(bucket) < 2 {
			return
		}
		if len(bucket) < 1024 {
			slices.SortStableFunc(bucket, func(a, b uint32) int {
				return cmp.Compare(bits(nb.dst[a])&0xffff, bits(nb.dst[b])&0xffff)
			})
			return
		}
		// A stable counting sort on the lower 16 bits.
		clear(low)
		for _, slot := range bucket {
			low[bits(nb.dst[slot])&0xffff+1]++
		}
		for i := 1; i < len(low); i++ {
			low[i] += low[i-1]
		}
		*buf = slices.Grow((*buf)[:0], len(bucket))[:len(bucket)]
		for _, slot := range bucket {
			l := bits(nb.dst[slot]) & 0xffff
			(*buf)[low[l]] = slot
			low[l]++
		}
		copy(bucket, *buf)
	}
	if parts > 1 {
		inParts(parts, func(p int) {
			var buf []uint32
			low := make([]int, 1<<16+1)
			for h := (1 << 16) * p / parts; h < (1<<16)*(p+1)/parts; h++ {
				sortBucket(h, &buf, low)
			}
		})
	}
	var buf []uint32
	low := make([]int, 1<<16+1)
	for h := range 1 << 16 {
		if parts == 1 {
			sortBucket(h, &buf, low)
		}
		for _, slot := range slots[cnt[h]:cnt[h+1]] {
			if !take(int(slot)) {
				return
			}
		}
	}
}

// contains reports whether u's neighbour list holds v.
func contains(nb *neighbours, u, v int32) bool {
	ids, _ := nb.list(u)
	for _, w := range ids {
		if w == v {
			return true
		}
	}
	return false
}

// cand is a candidate edge.
type cand struct {
	u, v int32
	d    float64
}

// sortedOrder returns the indices of edges by length, ties in input
// order: a stable LSD radix sort on the float32 bit pattern of the
// length (non-negative floats order as their bits), O(n), without
// moving the edges themselves.
func sortedOrder(edges []cand) []uint32 {
	n := len(edges)
	order := make([]uint32, n)
	if n < 256 {
		for i := range order {
			order[i] = uint32(i)
		}
		slices.SortStableFunc(order, func(a, b uint32) int { return cmp.Compare(edges[a].d, edges[b].d) })
		return order
	}
	keys := make([]uint64, n)
	for i, e := range edges {
		keys[i] = lengthKey(e.d, uint64(i))
	}
	for i, k := range sortKeys(keys) {
		order[i] = uint32(k)
	}
	return order
}

// lengthKey is the sort key of an edge of length d at index i (below
// 2^32): the float32 bit pattern of d above i.
func lengthKey(d float64, i uint64) uint64 {
	return uint64(math.Float32bits(float32(d)))<<32 | i
}

// sortKeys sorts keys made by lengthKey in increasing order of their
// indices by their upper 32 bits (a stable LSD radix sort: equal lengths
// keep the order of their indices) and returns them; it may reuse keys'
// memory.
func sortKeys(keys []uint64) []uint64 {
	n := len(keys)
	tmp := make([]uint64, n)
	// Digits of 16 bits on large inputs, of 8 below 2^16 edges: the
	// re-route's small problems (~1,000 edges) spent most of this
	// function clearing and summing 2^16 counters. Either way a stable
	// sort on the same 32-bit key, so the same order.
	bits := uint(16)
	var small [1 << 8]int
	cnt := small[:]
	if n < 1<<16 {
		bits = 8
	} else {
		cnt = make([]int, 1<<16)
	}
	mask := uint64(1)<<bits - 1
	for shift := uint(32); shift < 64; shift += bits {
		clear(cnt)
		for _, k := range keys {
			cnt[(k>>shift)&mask]++
		}
		sum := 0
		for i, c := range cnt {
			cnt[i] = sum
			sum += c
		}
		for _, k := range keys {
			b := (k >> shift) & mask
			tmp[cnt[b]] = k
			cnt[b]++
		}
		keys, tmp = tmp, keys
	}
	return keys
}
