package route

import (
	"math/bits"
	"runtime"
)

// kdTree is a static 2-d tree over a subset of points, built by median
// splits on the wider side (Bentley 1975, "Multidimensional binary search
// trees used for associative searching", CACM 18(9)). Leaves hold up to
// kdLeaf points. Build is O(n log n); a k-nearest query is O(log n + k)
// on typical inputs, and clustered or duplicated points do not degrade
// it as they would a uniform grid.
type kdTree struct {
	x, y  []float64
	idx   []int32 // the points, permuted so each node's points are contiguous
	nodes []kdNode
}

type kdNode struct {
	lo, hi      int32 // range of idx
	left, right int32 // children, -1 at a leaf
	split       float64
	dim         uint8
}

const kdLeaf = 8

// newKDTree builds a tree over the points idx (which it reorders) with
// coordinates x, y.
func newKDTree(x, y []float64, idx []int32) *kdTree {
	t := &kdTree{x: x, y: y, idx: idx}
	if len(idx) > 0 {
		// The nodes are numbered in depth-first order, left subtree
		// first, so each subtree's place is known before it is built and
		// a large tree's subtrees are built on two cores at a time
		// (kdForkMin), the same tree as on one.
		t.nodes = make([]kdNode, kdNodes(int32(len(idx))))
		forks := 0
		if runtime.GOMAXPROCS(0) > 1 && len(idx) >= parallelMin {
			forks = bits.Len(uint(runtime.GOMAXPROCS(0) - 1))
		}
		t.build(0, 0, int32(len(idx)), forks)
	}
	return t
}

// kdNodes returns the number of nodes of a tree over m points: one leaf
// up to kdLeaf, else a node over the trees of the halves (build's split).
func kdNodes(m int32) int32 {
	f, _ := kdNodesPair(m)
	return f
}

// kdNodesPair returns kdNodes of a and of a+1 in O(log a): the halves of
// a and of a+1 are all a/2 or a/2+1.
func kdNodesPair(a int32) (int32, int32) {
	if a+1 <= kdLeaf {
		return 1, 1
	}
	q := a / 2
	fq, fq1 := kdNodesPair(q)
	half := func(x int32) int32 {
		if x == q {
			return fq
		}
		return fq1
	}
	of := func(m int32) int32 {
		if m <= kdLeaf {
			return 1
		}
		return 1 + half(m/2) + half(m-m/2)
	}
	return of(a), of(a + 1)
}

func (t *kdTree) coord(i int32, dim uint8) float64 {
	if dim == 0 {
		return t.x[i]
	}
	return t.y[i]
}

// build makes node id over idx[lo:hi] and its subtrees; forks more
// levels build their left subtree on a goroutine of its own.
func (t *kdTree) build(id, lo, hi int32, forks int) {
	t.nodes[id] = kdNode{lo: lo, hi: hi, left: -1, right: -1}
	if hi-lo <= kdLeaf {
		return
	}
	minX, maxX, minY, maxY := t.x[t.idx[lo]], t.x[t.idx[lo]], t.y[t.idx[lo]], t.y[t.idx[lo]]
	for _, p := range t.idx[lo+1 : hi] {
		minX, maxX = min(minX, t.x[p]), max(maxX, t.x[p])
		minY, maxY = min(minY, t.y[p]), max(maxY, t.y[p])
	}
	var dim uint8
	if maxY-minY > maxX-minX {
		dim = 1
	}
	mid := lo + (hi-lo)/2
	t.selectNth(lo, hi-1, mid, dim)
	split := t.coord(t.idx[mid], dim)
	left, right := id+1, id+1+kdNodes(mid-lo)
	t.nodes[id].left, t.nodes[id].right = left, right
	t.nodes[id].split, t.nodes[id].dim = split, dim
	if forks > 0 {
		both(func() { t.build(left, lo, mid, forks-1) }, func() { t.build(right, mid, hi, forks-1) })
		return
	}
	t.build(left, lo, mid, 0)
	t.build(right, mid, hi, 0)
}

// selectNth reorders idx[lo..hi] so that idx[k] holds the point of rank
// k by coordinate dim, with no greater point before it and no smaller
// after it (Hoare's FIND, CACM 4(7) 1961; equal keys split evenly).
func (t *kdTree) selectNth(lo, hi, k int32, dim uint8) {
	idx := t.idx
	for lo < hi {
		pv := t.coord(idx[lo+(hi-lo)/2], dim)
		i, j := lo, hi
		for i <= j {
			for t.coord(idx[i], dim) < pv {
				i++
			}
			for t.coord(idx[j], dim) > pv {
				j--
			}
			if i <= j {
				idx[i], idx[j] = idx[j], idx[i]
				i++
				j--
			}
		}
		switch {
		case k <= j:
			hi = j
		case k >= i:
			lo = i
		default:
			return
		}
	}
}

// knnBuf holds the best k candidates of one query, sorted by squared
// distance.
type knnBuf struct {
	k   int
	d2  []float64
	id  []int32
	qx  float64
	qy  float64
	ex1 int32 // excluded points
	ex2 int32
	// quad, when >= 0, admits only the points of one quadrant around
	// (qx, qy): bit 0 set for x >= qx (else x < qx), bit 1 for y >= qy.
	quad int8
}

func newKNNBuf(k int) *knnBuf {
	return &knnBuf{k: k, d2: make([]float64, 0, k), id: make([]int32, 0, k), quad: -1}
}

func (b *knnBuf) worst() float64 {
	if len(b.d2) < b.k {
		return 1e308
	}
	return b.d2[len(b.d2)-1]
}

func (b *knnBuf) offer(d2 float64, id int32) {
	if len(b.d2) == b.k {
		if d2 >= b.d2[b.k-1] {
			return
		}
		b.d2 = b.d2[:b.k-1]
		b.id = b.id[:b.k-1]
	}
	i := len(b.d2)
	b.d2 = append(b.d2, d2)
	b.id = append(b.id, id)
	for i > 0 && b.d2[i-1] > d2 {
		b.d2[i], b.id[i] = b.d2[i-1], b.id[i-1]
		i--
	}
	b.d2[i], b.id[i] = d2, id
}

// nearest fills b with the b.k points nearest (qx, qy), leaving out
// b.ex1 and b.ex2 and, if b.quad >= 0, the points outside that quadrant.
func (t *kdTree) nearest(b *knnBuf) {
	b.d2, b.id = b.d2[:0], b.id[:0]
	if len(t.nodes) > 0 {
		t.search(0, b)
	}
}

func (t *kdTree) search(id int32, b *knnBuf) {
	nd := &t.nodes[id]
	if nd.left < 0 {
		for _, p := range t.idx[nd.lo:nd.hi] {
			if p == b.ex1 || p == b.ex2 {
				continue
			}
			dx, dy := t.x[p]-b.qx, t.y[p]-b.qy
			if b.quad >= 0 && quadrant(dx, dy) != b.quad {
				continue
			}
			b.offer(dx*dx+dy*dy, p)
		}
		return
	}
	q := b.qx
	if nd.dim == 1 {
		q = b.qy
	}
	if b.quad >= 0 {
		// The left child holds coordinates <= split, the right >= split:
		// one of them may lie wholly outside the quadrant.
		if b.quad>>nd.dim&1 == 1 { // coordinates >= q wanted
			if nd.split < q {
				t.search(nd.right, b)
				return
			}
		} else if nd.split >= q {
			t.search(nd.left, b)
			return
		}
	}
	diff := q - nd.split
	near, far := nd.left, nd.right
	if diff >= 0 {
		near, far = far, near
	}
	t.search(near, b)
	if diff*diff < b.worst() {
		t.search(far, b)
	}
}

// quadrant numbers the quadrant of the offset (dx, dy): bit 0 for
// dx >= 0, bit 1 for dy >= 0.
func quadrant(dx, dy float64) int8 {
	var q int8
	if dx >= 0 {
		q = 1
	}
	if dy >= 0 {
		q |= 2
	}
	return q
}
