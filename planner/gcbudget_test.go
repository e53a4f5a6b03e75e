package planner

import (
	"context"
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

// TestBuildReleasesGCBudget: every way out of Build and CheckWriting (a
// plan, a cancelled context, a panic on the way, an invalid profile)
// gives the soft memory limit back. The threshold is lowered so that the
// demo holds a budget, and the test checks that it did.
func TestBuildReleasesGCBudget(t *testing.T) {
	limit := func() int64 { return debug.SetMemoryLimit(-1) }
	prev := debug.SetMemoryLimit(math.MaxInt64)
	defer debug.SetMemoryLimit(prev)
	defer func(n int) { gcBudgetMinStrokes = n }(gcBudgetMinStrokes)
	gcBudgetMinStrokes = 1
	d := demo(t)
	badProfile := DefaultProfile()
	badProfile.Drift.RateNMPerMin = -1
	for _, tc := range []struct {
		name    string
		prof    Profile
		stage   string // the progress stage where it stops ("": none)
		cancel  bool   // stop by cancelling the context, else by a panic
		wantErr bool
	}{
		{"planned", DefaultProfile(), "", false, false},
		{"cancelled at the route", DefaultProfile(), "route", true, true},
		{"panic at the segments", DefaultProfile(), "segments", false, true},
		{"invalid profile", badProfile, "", false, true},
	} {
		t.Run(tc.name, func(t *testing.T) {
			ctx, cancel := context.WithCancel(context.Background())
			defer cancel()
			held := false
			opt := Options{Seed: 1, MonteCarloRuns: 50, Progress: func(s string, _ float64) {
				if s == "route" {
					held = held || limit() != math.MaxInt64
				}
				if s == tc.stage {
					if tc.cancel {
						cancel()
					} else {
						panic("stop at " + s)
					}
				}
			}}
			_, err := buildVariant(ctx, d, "", tc.prof, opt)
			if (err != nil) != tc.wantErr {
				t.Fatalf("Build: %v, want an error: %v", err, tc.wantErr)
			}
			if !tc.wantErr && !held {
				t.Error("the demo held no budget at the route: the test checks nothing")
			}
			if got := limit(); got != math.MaxInt64 {
				t.Errorf("after Build the limit is %d, want none", got)
			}
			if gcBudgets.active != 0 {
				t.Errorf("after Build %d budgets are held", gcBudgets.active)
			}
		})
	}
	t.Run("CheckWriting", func(t *testing.T) {
		lay, err := d.Lay("")
		if err != nil {
			t.Fatal(err)
		}
		if _, _, err := CheckWriting(context.Background(), lay, DefaultProfile()); err != nil {
			t.Fatal(err)
		}
		if got := limit(); got != math.MaxInt64 || gcBudgets.active != 0 {
			t.Errorf("after CheckWriting the limit is %d with %d budgets held, want none", got, gcBudgets.active)
		}
	})
}
