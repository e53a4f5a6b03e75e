package planner

import (
	"math"
	"runtime/debug"
	"runtime/metrics"
	"sync"
)

// The collector's default pacing (GOGC=100) lets the heap grow to about
// twice what was live at the last collection. For a plan of 10^6 strokes
// the live heap peaks near 830 MB (the route's set-up and the timeline),
// so the process would peak near 1.7 GB; at 4·10^6 strokes 6.2 GB. While
// a large plan is built, a soft memory limit (runtime/debug.SetMemoryLimit)
// holds the heap nearer what is live: the heap before the build plus
// gcBudgetPerStroke bytes a stroke, and never less than gcBudgetHeadroom
// times the live heap at the last stage boundary, so that a plan that
// needs more per stroke than the array designs it was measured on costs
// more collections, not a collector running flat out. A limit the user
// set (GOMEMLIMIT, or SetMemoryLimit before the build) is left alone, and
// plans below gcBudgetMinStrokes (every ordinary design) keep the default
// pacing. Measured on the 10^6- and 4·10^6-window arrays (DEVELOPERS.md,
// issue 14): this is a complement to a smaller live heap, not a
// replacement for one.
const (
	gcBudgetMinStrokes = 200_000
	gcBudgetPerStroke  = 950
	gcBudgetHeadroom   = 1.15
)

// gcBudgets is the process's soft memory limit while large plans are
// built: plans may be built concurrently (sweeps), each adding its budget.
var gcBudgets gcBudgetState

type gcBudgetState struct {
	sync.Mutex
	active int   // builds holding a budget
	sum    int64 // their budgets, bytes
	base   int64 // live heap when the first of them started
	floor  int64 // gcBudgetHeadroom × the live heap last seen
	prev   int64 // the limit before the first of them
}

// gcBudget is one build's hold on the soft memory limit.
type gcBudget struct {
	bytes int64 // 0: none held
}

// holdGCBudget takes a budget for a plan of n strokes; liveBefore is the
// live heap when the build started. It does nothing for small plans or
// when the user has set a limit.
func holdGCBudget(n int, liveBefore int64) *gcBudget {
	if n < gcBudgetMinStrokes {
		return &gcBudget{}
	}
	g := &gcBudgets
	g.Lock()
	defer g.Unlock()
	if g.active == 0 {
		prev := debug.SetMemoryLimit(-1)
		if prev != math.MaxInt64 {
			return &gcBudget{} // the user's limit stands
		}
		g.prev, g.base, g.sum, g.floor = prev, liveBefore, 0, 0
	}
	bud := &gcBudget{bytes: int64(n) * gcBudgetPerStroke}
	g.active++
	g.sum += bud.bytes
	g.apply()
	return bud
}

// update raises the limit where the live heap has outgrown the budgets
// (to gcBudgetHeadroom times it).
func (bud *gcBudget) update() {
	if bud == nil || bud.bytes == 0 {
		return
	}
	g := &gcBudgets
	g.Lock()
	defer g.Unlock()
	g.floor = max(g.floor, int64(gcBudgetHeadroom*float64(liveHeap())))
	g.apply()
}

// release gives the budget back; the last one restores the limit.
func (bud *gcBudget) release() {
	if bud == nil || bud.bytes == 0 {
		return
	}
	g := &gcBudgets
	g.Lock()
	defer g.Unlock()
	g.active--
	g.sum -= bud.bytes
	bud.bytes = 0
	if g.active == 0 {
		debug.SetMemoryLimit(g.prev)
		return
	}
	g.apply()
}

func (g *gcBudgetState) apply() {
	debug.SetMemoryLimit(max(g.base+g.sum, g.floor))
}

// liveHeap returns the heap live at the last collection, in bytes.
func liveHeap() int64 {
	s := []metrics.Sample{{Name: "/gc/heap/live:bytes"}}
	metrics.Read(s)
	if s[0].Value.Kind() != metrics.KindUint64 {
		return 0
	}
	return int64(s[0].Value.Uint64())
}
