package planner

import (
	"context"
	"reflect"
	"runtime"
	"testing"

	"dimerpath/lattice/design/designtest"
)

// TestReoptimiseSameOnAnyCores plans a donor array of 10^4 windows (625
// segments, beyond parallelSegmentsMin) on one core and on four: the
// segments solved side by side must give exactly the plan of solving
// them one after another (reoptimise's speculative pass), and nothing
// else in Build may depend on the number of cores.
func TestReoptimiseSameOnAnyCores(t *testing.T) {
	d := designtest.WindowArray(100, 100)
	prof := DefaultProfile()
	prof.Limits.ScanFieldNM = designtest.FieldNM(d)
	lay, err := d.Lay("")
	if err != nil {
		t.Fatal(err)
	}
	plan := func(procs int) *Plan {
		defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(procs))
		p, err := Build(context.Background(), lay, prof, Options{Seed: 3})
		if err != nil {
			t.Fatal(err)
		}
		return p
	}
	one, four := plan(1), plan(4)
	if len(one.Segments) < parallelSegmentsMin {
		t.Fatalf("%d segments: the test does not reach the parallel pass (%d)", len(one.Segments), parallelSegmentsMin)
	}
	if !reflect.DeepEqual(one, four) {
		t.Errorf("the plan on four cores differs from the plan on one (total %v s against %v s)", four.TotalS, one.TotalS)
	}
}
