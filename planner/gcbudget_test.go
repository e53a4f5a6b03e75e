package planner

import (
	"math"
	"runtime/debug"
	"testing"
)

// TestGCBudget checks the soft memory limit a large plan holds while it
// is built: none for a small plan or under a limit the user set; the
// budgets of concurrent builds add; the last release restores the limit.
// (The budget's size is a measured figure, DEVELOPERS.md issue 14, not
// checked here.)
func TestGCBudget(t *testing.T) {
	limit := func() int64 { return debug.SetMemoryLimit(-1) }
	prev := debug.SetMemoryLimit(math.MaxInt64)
	defer debug.SetMemoryLimit(prev)

	small := holdGCBudget(gcBudgetMinStrokes - 1)
	if got := limit(); got != math.MaxInt64 {
		t.Errorf("a plan of %d strokes set the limit to %d", gcBudgetMinStrokes-1, got)
	}
	small.release()

	n := 2 * gcBudgetMinStrokes
	per := int64(n * gcBudgetPerStroke)
	a := holdGCBudget(n)
	one := limit()
	if live := liveHeap(); one < live+per || one > live+per+64<<20 {
		t.Errorf("one large plan: limit %d, want the live heap (%d) + %d", one, live, per)
	}
	b := holdGCBudget(n)
	if got := limit(); got < one+per {
		t.Errorf("two large plans: limit %d, want at least %d", got, one+per)
	}
	a.update()
	if got := limit(); got < int64(gcBudgetHeadroom*float64(liveHeap())) {
		t.Errorf("limit %d below %g x the live heap (%d)", got, gcBudgetHeadroom, liveHeap())
	}
	a.release()
	a.release() // a second release gives nothing back
	if got := limit(); got == math.MaxInt64 {
		t.Error("the limit was restored while a plan still holds a budget")
	}
	b.release()
	if got := limit(); got != math.MaxInt64 {
		t.Errorf("after the last release the limit is %d, want it restored (%d)", got, int64(math.MaxInt64))
	}

	debug.SetMemoryLimit(3 << 30) // as GOMEMLIMIT=3GiB would
	c := holdGCBudget(n)
	if got := limit(); got != 3<<30 {
		t.Errorf("the user's limit became %d", got)
	}
	c.release()
	if got := limit(); got != 3<<30 {
		t.Errorf("after release the user's limit is %d", got)
	}
}
