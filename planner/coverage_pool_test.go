package planner

import (
	"context"
	"errors"
	"reflect"
	"runtime"
	"slices"
	"sync/atomic"
	"testing"
	"time"

	"dimerpath/lattice/design"
	"dimerpath/lattice/design/designtest"
)

// TestCoverageSameOnAnyCores: the coverage check cuts its work by the
// geometry, never by the number of cores, and adds the chunks' sums in
// chunk order, so the demo's coverage and strokes come out bit for bit
// the same on one core, two and eight.
func TestCoverageSameOnAnyCores(t *testing.T) {
	surf, cr, ss, prof := demoCoverageInput(t, "gap-9")
	if n := len(newCoverageCheck(surf, cr, ss, &prof).chunks()); n < 8 {
		t.Fatalf("the demo's check has %d chunks: the test does not share them out", n)
	}
	check := func(procs int) (Coverage, []Stroke) {
		defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(procs))
		return CheckCoverage(surf, cr, ss, prof)
	}
	cov1, st1 := check(1)
	for _, procs := range []int{2, 8} {
		cov, st := check(procs)
		if !reflect.DeepEqual(cov, cov1) {
			t.Errorf("%d cores: coverage differs from one core's (missed %.17g against %.17g, stray %.17g against %.17g)",
				procs, cov.ExpectedMissed, cov1.ExpectedMissed, cov.ExpectedStray, cov1.ExpectedStray)
		}
		if !reflect.DeepEqual(st, st1) {
			t.Errorf("%d cores: the strokes' expected missed/stray sites differ from one core's", procs)
		}
	}
}

// TestBuildSameOnAnyCores: the demo's whole plan is the same on one core
// and four.
func TestBuildSameOnAnyCores(t *testing.T) {
	if testing.Short() {
		t.Skip("plans the demo twice")
	}
	d := demo(t)
	plan := func(procs int) *Plan { return demoPlanOnCores(t, d, procs) }
	if one, four := plan(1), plan(4); !reflect.DeepEqual(one, four) {
		t.Errorf("the demo's plan on four cores differs from the plan on one (total %v s against %v s)", four.TotalS, one.TotalS)
	}
}

// TestBuildSameWithLatePieces: the coverage check beside the route
// makes its pieces of the strokes' paths as written before the route,
// even when it makes them after the route has solved (Build waits for
// them before it reverses a path in place); so the plan is the one-core
// plan (and go test -race sees no write to a path being read).
func TestBuildSameWithLatePieces(t *testing.T) {
	if testing.Short() {
		t.Skip("plans the demo twice")
	}
	d := demo(t)
	plan := func(procs int) *Plan { return demoPlanOnCores(t, d, procs) }
	one := plan(1)
	coveragePiecesHook = func() { time.Sleep(200 * time.Millisecond) } // the route solves well within it
	defer func() { coveragePiecesHook = nil }()
	if late := plan(2); !reflect.DeepEqual(one, late) {
		t.Errorf("the demo's plan with the check's pieces made late differs from the one-core plan (total %v s against %v s)", late.TotalS, one.TotalS)
	}
}

// demoPlanOnCores plans the demo with seed 5 at GOMAXPROCS procs.
func demoPlanOnCores(t *testing.T, d *design.Design, procs int) *Plan {
	t.Helper()
	defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(procs))
	p, err := buildVariant(context.Background(), d, "", DefaultProfile(), Options{Seed: 5})
	if err != nil {
		t.Fatal(err)
	}
	return p
}

// TestCoverageCancelled: a check whose context is done stops with its
// error.
func TestCoverageCancelled(t *testing.T) {
	surf, cr, ss, prof := demoCoverageInput(t, "gap-9")
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	for _, procs := range []int{1, 4} {
		func() {
			defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(procs))
			if _, _, err := checkCoverage(ctx, surf, cr, ss, prof); !errors.Is(err, context.Canceled) {
				t.Errorf("%d cores: err = %v, want context.Canceled", procs, err)
			}
		}()
	}
}

// TestOnWorkers: every item runs once; a panic comes back as the
// planner's internal error, a done context as its error, and no worker
// outlives the call.
func TestOnWorkers(t *testing.T) {
	before := runtime.NumGoroutine()
	for _, workers := range []int{1, 3} {
		var runs [100]atomic.Int32
		err := onWorkers(context.Background(), len(runs), workers, func() func(int) {
			return func(i int) { runs[i].Add(1) }
		})
		if err != nil {
			t.Fatalf("%d workers: %v", workers, err)
		}
		for i := range runs {
			if n := runs[i].Load(); n != 1 {
				t.Errorf("%d workers: item %d ran %d times", workers, i, n)
			}
		}
		err = onWorkers(context.Background(), 100, workers, func() func(int) {
			return func(i int) {
				if i == 37 {
					panic("broken invariant")
				}
			}
		})
		var ie *InternalError
		if !errors.Is(err, ErrInternal) || !errors.As(err, &ie) || len(ie.Stack) == 0 {
			t.Errorf("%d workers: a panic gave %v, want an *InternalError with its stack", workers, err)
		}
		ctx, cancel := context.WithCancel(context.Background())
		var ran atomic.Int32
		err = onWorkers(ctx, 1000, workers, func() func(int) {
			return func(i int) {
				if ran.Add(1) == 5 {
					cancel()
				}
			}
		})
		if !errors.Is(err, context.Canceled) || ran.Load() > 5+int32(workers) {
			t.Errorf("%d workers: cancelled after 5 items: err %v, %d items ran", workers, err, ran.Load())
		}
		cancel()
	}
	// Goroutines the runtime or other tests start may come and go: allow
	// a moment, and none of ours must be left.
	for range 50 {
		if runtime.NumGoroutine() <= before {
			break
		}
		time.Sleep(10 * time.Millisecond)
	}
	if n := runtime.NumGoroutine(); n > before {
		t.Errorf("%d goroutines left after onWorkers (%d before)", n, before)
	}
}

// BenchmarkCoverageDemoCores is BenchmarkCoverageDemo on the GOMAXPROCS
// the benchmark runs with (go test -cpu 1,2): the check's wall time per
// check over design.Lay's on the demo (x-layout), measured in the same
// run. On a shared machine a second core only helps while it is free.
func BenchmarkCoverageDemoCores(b *testing.B) {
	surf, cr, ss, prof := demoCoverageInput(b, "gap-9")
	layNS := layTime(b, demo(b))
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		CheckCoverage(surf, cr, ss, prof)
	}
	b.StopTimer()
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/layNS, "x-layout")
}

// TestOpenWindowsSameOnAnyCores: the windows' P(opened as drawn) are
// computed in blocks on every core; each window's figures are the same
// on one core and four (and every window got them).
func TestOpenWindowsSameOnAnyCores(t *testing.T) {
	d := designtest.WindowArray(40, 30)
	prof := DefaultProfile()
	prof.Limits.ScanFieldNM = designtest.FieldNM(d)
	lay, err := d.Lay("")
	if err != nil {
		t.Fatal(err)
	}
	windows := func(procs int) []Window {
		defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(procs))
		p, err := Build(context.Background(), lay, prof, Options{Seed: 3, MonteCarloRuns: 50})
		if err != nil {
			t.Fatal(err)
		}
		return p.Windows
	}
	one, four := windows(1), windows(4)
	if len(one) < 3*openBlock {
		t.Fatalf("%d windows: the test does not share blocks out (%d a block)", len(one), openBlock)
	}
	for i := range one {
		if one[i].OpenProbability <= 0 || one[i].OpenProbability > 1 {
			t.Errorf("window %d: P(opened as drawn) %v", i, one[i].OpenProbability)
		}
	}
	if !reflect.DeepEqual(one, four) {
		t.Errorf("the windows' figures on four cores differ from those on one")
	}
}

// TestStraySitesHeldBounded: with a stray limit so low that every chunk
// reports thousands of sites over it (an overdosed plan looks the same),
// the chunks waiting to be added hold at most MaxStraySites of them, on
// any number of cores, and the check lists the same first MaxStraySites
// as one core does (found by review: each chunk kept its own 10,000 until
// the end, ~385,000 on the demo).
func TestStraySitesHeldBounded(t *testing.T) {
	if testing.Short() {
		t.Skip("sums the demo's coverage three times")
	}
	surf, cr, ss, prof := demoCoverageInput(t, "gap-9")
	prof.StrayLimit = 1e-300
	check := func(procs int) *coverageCheck {
		defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(procs))
		ck := newCoverageCheck(surf, cr, ss, &prof)
		if err := ck.run(context.Background()); err != nil {
			t.Fatal(err)
		}
		return ck
	}
	one := check(1)
	if one.cov.OverLimit < 10*MaxStraySites || len(one.cov.StraySites) != MaxStraySites {
		t.Fatalf("%d sites over the limit, %d listed: the test needs many more than MaxStraySites (%d)", one.cov.OverLimit, len(one.cov.StraySites), MaxStraySites)
	}
	for _, procs := range []int{2, 8} {
		ck := check(procs)
		if ck.heldStraysPeak > MaxStraySites {
			t.Errorf("%d cores: %d stray sites held waiting at once, more than MaxStraySites (%d)", procs, ck.heldStraysPeak, MaxStraySites)
		}
		if !reflect.DeepEqual(ck.cov, one.cov) {
			t.Errorf("%d cores: the coverage differs from one core's (%d stray sites listed, %d over the limit; one core %d, %d)",
				procs, len(ck.cov.StraySites), ck.cov.OverLimit, len(one.cov.StraySites), one.cov.OverLimit)
		}
	}
}

// TestCoverageWarningSameOnAnyCores: where the coverage check warns (a
// site outside the regions clears above the stray limit), the plan and
// its warnings are the same whether the check ran before the route (one
// core) or beside it (more than one). (Neither this design nor the demo
// warns between the check's start and its end, so the warning's place
// among others, coverageJob.warnAt, is not put to the test here.)
func TestCoverageWarningSameOnAnyCores(t *testing.T) {
	prof := DefaultProfile()
	prof.StrayLimit = 1e-6
	plan := func(procs int) *Plan {
		defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(procs))
		p, err := buildVariant(context.Background(), smallDesign(), "", prof, Options{Seed: 3, MonteCarloRuns: 50})
		if err != nil {
			t.Fatal(err)
		}
		return p
	}
	one, two := plan(1), plan(2)
	if one.Coverage.OK {
		t.Fatal("no coverage warning at a stray limit of 1e-6: the test checks nothing")
	}
	if !slices.Equal(one.Warnings, two.Warnings) {
		t.Errorf("warnings on two cores:\n%q\non one:\n%q", two.Warnings, one.Warnings)
	}
	if !reflect.DeepEqual(one, two) {
		t.Error("the plan on two cores differs from the plan on one")
	}
}
