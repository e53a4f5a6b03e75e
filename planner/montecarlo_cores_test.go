package planner

import (
	"context"
	"math/rand/v2"
	"runtime"
	"testing"
)

// TestPInToleranceSameOnAnyCores checks that the tolerance sampling on
// several cores (pInToleranceOnCores, taken here by lowering
// tolParallelMin) gives the one-core loop's result bit for bit: every
// segment's and pair's sum and both products, over enough segments to
// fill several blocks and a number of draws that is not a multiple of
// the workers' sample blocks, with segments left out, segments without
// registration error (σ = 0) and rooms below zero.
func TestPInToleranceSameOnAnyCores(t *testing.T) {
	defer func(m int) { tolParallelMin = m }(tolParallelMin)
	defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(0))
	r := rand.New(rand.NewPCG(5, 6))
	for _, c := range []struct{ segs, pairs, draws int }{{1500, 40, 600}, {700, 900, 37}, {5, 0, 1000}} {
		segs := make([]segLoad, c.segs)
		leave := make([]bool, c.segs-c.segs/3) // the last third have no flag: kept
		for s := range segs {
			// Mostly loose (products of thousands of rows must not
			// underflow), a few tight enough to leave no room in some
			// samples, and those left out of some.
			seg := segLoad{sigma: 0.05 + 0.15*r.Float64()}
			if s%17 == 0 {
				seg.sigma = 0
			}
			for range 1 + r.IntN(4) {
				seg.loads = append(seg.loads, strokeLoad{tol: 1 + 2*r.Float64(), creep: 0.3 * r.Float64(), drift: 0.2 * r.Float64()})
			}
			if s%101 == 1 && s < len(leave) {
				seg.loads[0].tol = 0.3
				leave[s] = true
			}
			segs[s] = seg
		}
		pairs := make([]pairLoad, c.pairs)
		for k := range pairs {
			pairs[k] = pairLoad{tol: 1 + 2*r.Float64(), creep: 0.3 * r.Float64(), drift: 0.2 * r.Float64(), sigma: 0.05 + 0.15*r.Float64()}
		}
		d := mcDraws{rate: make([]float64, c.draws), creep: make([]float64, c.draws)}
		for i := range d.rate {
			d.rate[i], d.creep[i] = 0.5+r.ExpFloat64(), r.Float64()
		}
		tolParallelMin = 1 << 62
		runtime.GOMAXPROCS(1)
		one, err := pInTolerance(context.Background(), segs, pairs, d, leave)
		if err != nil {
			t.Fatal(err)
		}
		tolParallelMin = 1
		runtime.GOMAXPROCS(4)
		many, err := pInTolerance(context.Background(), segs, pairs, d, leave)
		if err != nil {
			t.Fatal(err)
		}
		if !sameFloat(one.all, many.all) || !sameFloat(one.some, many.some) || !sameBits(one.segs, many.segs) || !sameBits(one.pairs, many.pairs) {
			t.Errorf("%+v: on 4 cores all %v some %v, on one %v %v (or a segment's or pair's sum differs)", c, many.all, many.some, one.all, one.some)
		}
		t.Logf("%+v: all %v some %v", c, one.all, one.some)
		if !(one.some > one.all && one.all > 0.01) {
			t.Errorf("%+v: all %v some %v: the case does not exercise the left-out segments", c, one.all, one.some)
		}
	}
}
