package planner

import (
	"math"

	"github.com/golang/geo/r2"

	"dimerpath/lattice/design"
)

// job is one stroke as the segmenter and the timeline see it, in
// writing order.
type job struct {
	stroke     int      // index into the plan's strokes
	start, end r2.Point // tip position where the write starts and ends
	writeS     float64  // write or dwell duration
	budgetS    float64  // drift budget at the nominal rate; +Inf without drift
	mode       design.Mode
	dwell      bool
}

// costs turns tip motion and instrument steps into time, the same way
// for the segmenter, the timeline and the by-hand baseline.
type costs struct {
	speed, settle, modeSwitch, register, verify float64
	fiducials                                   []Fiducial
}

func newCosts(p *Profile, fids []Fiducial) costs {
	return costs{
		speed: p.MoveSpeedNMPerS, settle: p.SettleS, modeSwitch: p.ModeSwitchS,
		register: p.Drift.RegistrationS, verify: p.Drift.VerificationS,
		fiducials: fids,
	}
}

// move is the time of one idle move: distance/speed + settle.
func (c *costs) move(a, b r2.Point) float64 { return a.Sub(b).Norm()/c.speed + c.settle }

// switchCost is the mode switch paid between two consecutive writes.
func (c *costs) switchCost(a, b design.Mode) float64 {
	if a != b {
		return c.modeSwitch
	}
	return 0
}

// nearest returns the index of the fiducial nearest p.
func (c *costs) nearest(p r2.Point) int {
	best, bd := 0, math.Inf(1)
	for i, f := range c.fiducials {
		if d := f.At.Sub(p).Dot(f.At.Sub(p)); d < bd {
			best, bd = i, d
		}
	}
	return best
}

// segmenter holds, for one writing order, everything the choice of
// segment boundaries depends on. With n jobs and the first registration
// at fiducial f0:
//
//	T[j]  time from the start of job 0 to the end of job j, moves and
//	      switches between them included, without registrations;
//	m[j]  the direct move from job j to job j+1;
//	sw[j] the mode switch before job j;
//	fid[s], a[s] the fiducial of a segment starting at job s (the one
//	      nearest the job's start; f0 for s = 0) and the move from it;
//	B[s]  the extra time of a boundary before job s: verification, the
//	      detour through fid[s] and the registration, less the direct
//	      move it replaces.
//
// A segment starting at s may hold job j when the drift clock, started
// at the end of its registration, reads at most budget[j] when j ends:
// a[s] + T[j] - T[s-1] - m[s-1] - sw[s] <= budget[j] (the switch at a
// boundary is made at the fiducial, before registering).
type segmenter struct {
	jobs  []job
	c     costs
	T, m  []float64
	sw    []float64
	fid   []int
	a, B  []float64
	cst   []float64 // c[s]: the segment may hold j while T[j]-budget[j] <= cst[s]
	base  float64   // first registration + approach + T[n-1] + final verification
	first int       // fiducial of the first registration
}

func newSegmenter(jobs []job, c costs, first int) *segmenter {
	n := len(jobs)
	sg := &segmenter{jobs: jobs, c: c, first: first,
		T: make([]float64, n), m: make([]float64, n), sw: make([]float64, n),
		fid: make([]int, n), a: make([]float64, n), B: make([]float64, n), cst: make([]float64, n)}
	if n == 0 {
		return sg
	}
	t := 0.0
	for j := range jobs {
		if j > 0 {
			sg.m[j-1] = c.move(jobs[j-1].end, jobs[j].start)
			sg.sw[j] = c.switchCost(jobs[j-1].mode, jobs[j].mode)
			t += sg.m[j-1] + sg.sw[j]
		}
		t += jobs[j].writeS
		sg.T[j] = t
	}
	for s := range jobs {
		f := first
		if s > 0 {
			f = c.nearest(jobs[s].start)
		}
		sg.fid[s] = f
		sg.a[s] = c.move(c.fiducials[f].At, jobs[s].start)
		if s == 0 {
			sg.cst[0] = -sg.a[0]
			continue
		}
		sg.cst[s] = sg.T[s-1] + sg.m[s-1] + sg.sw[s] - sg.a[s]
		sg.B[s] = c.verify + c.move(jobs[s-1].end, c.fiducials[f].At) + c.register + sg.a[s] - sg.m[s-1]
	}
	sg.base = c.register + sg.a[0] + sg.T[n-1] + c.verify
	return sg
}

// solve returns the segment starts (job indices, starts[0] = 0) that
// minimise the total time with every budget multiplied by scale (the
// nominal drift rate over the rate assumed), the total, and the jobs
// that do not fit their budget even right after a registration (they get
// a segment of their own). It is exact for the given order: a dynamic
// programme over the last boundary, D[e] = min over feasible s of
// D[s-1] + B[s], where the feasible s for e are those whose first
// budget-breaking job lies beyond e (found by descending a max tree), kept
// in a heap keyed by D[s-1]+B[s] and dropped once expired.
// O(n log n) time, O(n) memory.
func (sg *segmenter) solve(scale float64) (starts []int, total float64, forced []int) {
	n := len(sg.jobs)
	if n == 0 {
		return nil, 0, nil
	}
	q := make([]float64, n)
	for j, jb := range sg.jobs {
		b := jb.budgetS * scale
		if math.IsInf(jb.budgetS, 1) || math.IsNaN(b) {
			q[j] = math.Inf(-1)
		} else {
			q[j] = sg.T[j] - b
		}
	}
	tree := newMaxTree(q)
	D := make([]float64, n)
	from := make([]int, n)
	var h candHeap
	for e := 0; e < n; e++ {
		prev := 0.0
		if e > 0 {
			prev = D[e-1]
		}
		emax := tree.firstAbove(e, sg.cst[e]) - 1
		if emax < e {
			emax = e // over budget even alone: its own segment
			forced = append(forced, e)
		}
		h.push(cand{key: prev + sg.B[e], s: e, emax: emax})
		for h[0].emax < e {
			h.pop()
		}
		D[e], from[e] = h[0].key, h[0].s
	}
	for e := n - 1; e >= 0; e = from[e] - 1 {
		starts = append(starts, from[e])
	}
	for i, j := 0, len(starts)-1; i < j; i, j = i+1, j-1 {
		starts[i], starts[j] = starts[j], starts[i]
	}
	return starts, sg.base + D[n-1], forced
}

// minScale returns the least budget scale at which the segmentation
// starts is still allowed: every job of a segment of two or more jobs
// within its scaled budget (a job alone in its segment is always
// allowed). It is 0 when no budget binds.
func (sg *segmenter) minScale(starts []int) float64 {
	rho := 0.0
	n := len(sg.jobs)
	for k, s := range starts {
		e := n
		if k+1 < len(starts) {
			e = starts[k+1]
		}
		if e-s < 2 {
			continue
		}
		base := sg.a[s]
		if s > 0 {
			base -= sg.T[s-1] + sg.m[s-1] + sg.sw[s]
		}
		for j := s; j < e; j++ {
			b := sg.jobs[j].budgetS
			if math.IsInf(b, 1) {
				continue
			}
			rho = math.Max(rho, (base+sg.T[j])/b)
		}
	}
	return rho
}

// fixedInterval returns the segment starts of the by-hand practice: a
// registration whenever the next job would end more than interval after
// the last one.
func (sg *segmenter) fixedInterval(interval float64) []int {
	n := len(sg.jobs)
	if n == 0 {
		return nil
	}
	starts := []int{0}
	s := 0
	for j := 1; j < n; j++ {
		elapsed := sg.a[s] + sg.T[j]
		if s > 0 {
			elapsed -= sg.T[s-1] + sg.m[s-1] + sg.sw[s]
		}
		if elapsed > interval {
			starts = append(starts, j)
			s = j
		}
	}
	return starts
}

// totalOf returns the total time of a segmentation.
func (sg *segmenter) totalOf(starts []int) float64 {
	if len(sg.jobs) == 0 {
		return 0
	}
	t := sg.base
	for _, s := range starts[1:] {
		t += sg.B[s]
	}
	return t
}

type cand struct {
	key  float64
	s    int
	emax int
}

// candHeap is a binary min-heap of candidates by key, then start.
type candHeap []cand

func (h candHeap) less(i, j int) bool {
	if h[i].key != h[j].key {
		return h[i].key < h[j].key
	}
	return h[i].s < h[j].s
}

func (h *candHeap) push(c cand) {
	*h = append(*h, c)
	a := *h
	for i := len(a) - 1; i > 0; {
		p := (i - 1) / 2
		if !a.less(i, p) {
			break
		}
		a[i], a[p] = a[p], a[i]
		i = p
	}
}

func (h *candHeap) pop() {
	a := *h
	n := len(a) - 1
	a[0] = a[n]
	a = a[:n]
	for i := 0; ; {
		l, r, m := 2*i+1, 2*i+2, i
		if l < n && a.less(l, m) {
			m = l
		}
		if r < n && a.less(r, m) {
			m = r
		}
		if m == i {
			break
		}
		a[i], a[m] = a[m], a[i]
		i = m
	}
	*h = a
}

// maxTree answers "first index at or after i whose value exceeds c".
type maxTree struct {
	n, size int
	v       []float64
}

func newMaxTree(vals []float64) *maxTree {
	size := 1
	for size < len(vals) {
		size *= 2
	}
	t := &maxTree{n: len(vals), size: size, v: make([]float64, 2*size)}
	for i := range t.v {
		t.v[i] = math.Inf(-1)
	}
	copy(t.v[size:], vals)
	for i := size - 1; i >= 1; i-- {
		t.v[i] = math.Max(t.v[2*i], t.v[2*i+1])
	}
	return t
}

// firstAbove returns the least j >= from with vals[j] > c, or n.
func (t *maxTree) firstAbove(from int, c float64) int {
	if r := t.descend(1, 0, t.size, from, c); r >= 0 {
		return r
	}
	return t.n
}

func (t *maxTree) descend(node, lo, hi, from int, c float64) int {
	if hi <= from || t.v[node] <= c {
		return -1
	}
	if hi-lo == 1 {
		return lo
	}
	mid := (lo + hi) / 2
	if r := t.descend(2*node, lo, mid, from, c); r >= 0 {
		return r
	}
	return t.descend(2*node+1, mid, hi, from, c)
}

// DriftBudget returns the time in seconds after a registration within
// which a stroke of placement tolerance toleranceNM (±nm) must be
// written at a drift rate of rateNMPerMin: tolerance / rate. It is +Inf
// without drift.
func DriftBudget(toleranceNM, rateNMPerMin float64) float64 {
	if rateNMPerMin <= 0 {
		return math.Inf(1)
	}
	return toleranceNM / rateNMPerMin * 60
}
