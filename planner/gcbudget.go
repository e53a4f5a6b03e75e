package planner

import (
	"math"
	"runtime"
	"runtime/debug"
	"runtime/metrics"
	"sync"
)

// The collector's default pacing (GOGC=100) lets the heap grow to about
// twice what was live at the last collection. For a plan of 10^6 strokes
// the live heap peaks near 735 MB (the coverage check, the route's set-up
// and the timeline), so the process would peak near 1.5 GB; at 4·10^6
// strokes over 6 GB. While a large plan is built, a soft memory limit
// (runtime/debug.SetMemoryLimit) holds the heap nearer what is live: the
// live heap once its strokes are made (found by a collection then, which
// costs about 0.1 s at 10^6 strokes and frees the layout's garbage) plus
// gcBudgetPerStroke bytes a stroke, and never less than gcBudgetHeadroom
// times the live heap at a stage boundary, so that a plan that needs more
// per stroke than the array designs it was measured on costs more
// collections, not a collector running flat out. A limit the user set
// (GOMEMLIMIT, or SetMemoryLimit before the build) is left alone, and
// plans below gcBudgetMinStrokes (every ordinary design) keep the default
// pacing. Measured on the 10^6- and 4·10^6-window arrays (DEVELOPERS.md,
// issue 14): a complement to a smaller live heap, not a replacement.
const (
	gcBudgetPerStroke = 600
	gcBudgetHeadroom  = 1.15
)

// gcBudgetMinStrokes is the smallest plan, in strokes, that holds a
// budget: a variable so that a test can make an ordinary design hold one.
var gcBudgetMinStrokes = 200_000

// gcBudgets is the process's soft memory limit while large plans are
// built: plans may be built concurrently (sweeps), each adding its budget.
var gcBudgets gcBudgetState

type gcBudgetState struct {
	sync.Mutex
	active int   // builds holding a budget
	limit  int64 // the limit set
}

// gcBudget is one build's hold on the soft memory limit.
type gcBudget struct {
	bytes int64 // 0: none held
}

// holdGCBudget takes a budget for a plan of n strokes, made and live. It
// does nothing for small plans or when the user has set a limit.
func holdGCBudget(n int) *gcBudget {
	if n < gcBudgetMinStrokes {
		return &gcBudget{}
	}
	g := &gcBudgets
	g.Lock()
	defer g.Unlock()
	if g.active == 0 {
		if debug.SetMemoryLimit(-1) != math.MaxInt64 {
			return &gcBudget{} // the user's limit stands
		}
		g.limit = 0
	}
	runtime.GC() // what is live now, exactly
	bud := &gcBudget{bytes: int64(n) * gcBudgetPerStroke}
	g.active++
	// With other plans under way their budgets are counted again in the
	// live heap, so the limit errs on the generous side.
	g.limit = max(g.limit+bud.bytes, liveHeap()+bud.bytes)
	debug.SetMemoryLimit(g.limit)
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
	if floor := int64(gcBudgetHeadroom * float64(liveHeap())); floor > g.limit {
		g.limit = floor
		debug.SetMemoryLimit(g.limit)
	}
}

// collect runs a collection if the build holds a budget: before its
// largest single allocation (the timeline's actions, 300 MB at 10^6
// strokes), so that the garbage of the stages before is not still held
// when it lands (a soft limit cannot stop one allocation from passing
// it: without this the 10^6-window plan peaked at 1.08 GB against a
// limit of 0.96 GB).
func (bud *gcBudget) collect() {
	if bud != nil && bud.bytes != 0 {
		runtime.GC()
	}
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
	g.limit -= bud.bytes
	bud.bytes = 0
	if g.active == 0 {
		debug.SetMemoryLimit(math.MaxInt64) // none, as before the first
		return
	}
	debug.SetMemoryLimit(g.limit)
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
