package planner

import (
	"context"
	"math/rand/v2"
	"reflect"
	"runtime"
	"slices"
	"testing"

	"dimerpath/lattice/design/designtest"
)

// TestSegmenterSameOnAnyCores checks that a segmenter of a step large
// enough to make its moves on every core (parallelMin lowered) is the
// one-core segmenter bit for bit, made afresh and from a predecessor
// (newSegmenterFrom, with some jobs reordered so that both the reused
// and the recomputed moves occur), and so are its solve's terms
// (prepareSolve).
func TestSegmenterSameOnAnyCores(t *testing.T) {
	defer func(m int) { parallelMin = m }(parallelMin)
	defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(0))
	rng := rand.New(rand.NewPCG(41, 42))
	p := DefaultProfile()
	p.Drift.Compensation.Enabled = true
	model := testModel(&p)
	n := 3*parallelBlock + 123
	jobs, _, c := randomJobs(rng, n)
	next := slices.Clone(jobs)
	for range 50 {
		s := rng.IntN(n - 10)
		rng.Shuffle(8, func(i, j int) { next[s+i], next[s+j] = next[s+j], next[s+i] })
	}
	make := func(cores, least int) (*segmenter, *segmenter, *solveCache) {
		runtime.GOMAXPROCS(cores)
		parallelMin = least
		prev := newSegmenter(jobs, c, model, 1)
		fresh := newSegmenter(jobs, c, model, 1)
		prev.keepForSuccessor()
		return fresh, newSegmenterFrom(next, c, model, 1, prev), fresh.prepareSolve()
	}
	oneFresh, oneFrom, oneCache := make(1, 1<<30)
	manyFresh, manyFrom, manyCache := make(4, 1)
	for k := range 2 {
		if !sameBits(oneCache.value[k], manyCache.value[k]) || !sameBits(oneCache.cst[k], manyCache.cst[k]) ||
			!slices.Equal(oneCache.nextLocal, manyCache.nextLocal) {
			t.Errorf("prepareSolve: the loads' terms (field %d) differ on 4 cores", k)
		}
	}
	for _, c := range []struct {
		name      string
		got, want *segmenter
	}{{"afresh", manyFresh, oneFresh}, {"from its predecessor", manyFrom, oneFrom}} {
		got, want := c.got, c.want
		if differ := segmenterTermsDiffer(got, want); len(differ) > 0 {
			t.Errorf("%s: %v differ on 4 cores", c.name, differ)
		}
		if !slices.Equal(got.fid, want.fid) || !got.creepF.same(&want.creepF) || !got.driftRaw.moves.same(&want.driftRaw.moves) ||
			!got.driftC.moves.same(&want.driftC.moves) {
			t.Errorf("%s: fiducials or fields differ on 4 cores", c.name)
		}
	}
}

// TestArrayPlanSameOnAnyCores: a window array large enough that its
// route takes the route engine's parallel set-up (16,900 windows: 33,800
// stroke ends, over its 2^15), with the planner's own thresholds
// (parallelMin, parallelBlock, tolParallelMin) lowered so that its
// segmenters, segment loads and tolerance sampling take theirs, plans
// the same on four cores as on one with the thresholds as they are.
func TestArrayPlanSameOnAnyCores(t *testing.T) {
	if testing.Short() {
		t.Skip("plans a 130 x 130 array twice")
	}
	defer func(m, b, tm int) { parallelMin, parallelBlock, tolParallelMin = m, b, tm }(parallelMin, parallelBlock, tolParallelMin)
	d := designtest.WindowArray(130, 130)
	prof := DefaultProfile()
	prof.Limits.ScanFieldNM = designtest.FieldNM(d)
	plan := func(procs int) *Plan {
		defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(procs))
		p, err := buildVariant(context.Background(), d, "", prof, Options{Seed: 3})
		if err != nil {
			t.Fatal(err)
		}
		return p
	}
	one := plan(1)
	// Small blocks, so that the segments' loads (some hundreds) are
	// shared out too.
	parallelMin, parallelBlock, tolParallelMin = 64, 16, 1<<12
	if four := plan(4); !reflect.DeepEqual(one, four) {
		t.Errorf("the array's plan on four cores differs from the plan on one (total %v s against %v s)", four.TotalS, one.TotalS)
	}
}
