package planner

import (
	"context"
	"math"
	"math/rand/v2"
	"sort"

	"gonum.org/v1/gonum/stat"
	"testing"

	"github.com/golang/geo/r2"

	"dimerpath/lattice/design"
)

func TestDriftBudgetByHand(t *testing.T) {
	cases := []struct {
		tol, rate, want float64
	}{
		{0.2, 0.1, 120},       // AP ±0.2 nm at 0.1 nm/min: 2 min
		{2, 0.1, 1200},        // FE ±2 nm at 0.1 nm/min: 20 min
		{0.2, 1, 12},          // AP at 1 nm/min: 12 s
		{0.2, 0.1 / 60, 7200}, // AP at 0.1 nm/h: 2 h
		{0.2, 0, math.Inf(1)}, // no drift
	}
	for _, c := range cases {
		if got := DriftBudget(c.tol, c.rate); !(got == c.want || math.Abs(got-c.want) < 1e-9*c.want) {
			t.Errorf("DriftBudget(%v, %v) = %v, want %v", c.tol, c.rate, got, c.want)
		}
	}
}

// randomJobs returns n jobs along a line with random write times and
// budgets, and two fiducials.
func randomJobs(rng *rand.Rand, n int) ([]job, []Stroke, costs) {
	p := DefaultProfile()
	p.Drift.VerificationS = 5
	c := newCosts(&p, []Fiducial{{Name: "F0", At: r2.Point{X: 0, Y: 0}}, {Name: "F1", At: r2.Point{X: 300, Y: 50}}})
	jobs := make([]job, n)
	strokes := make([]Stroke, n)
	x := 10.0
	for i := range jobs {
		mode := design.ModeAP
		if rng.IntN(3) == 0 {
			mode = design.ModeFE
		}
		w := 5 + rng.Float64()*60
		jobs[i] = job{stroke: i, start: r2.Point{X: x, Y: rng.Float64() * 40}, writeS: w,
			budgetS: 40 + rng.Float64()*150, mode: mode}
		x += rng.Float64() * 60
		jobs[i].end = r2.Point{X: x, Y: rng.Float64() * 40}
		strokes[i] = Stroke{ID: i, Mode: mode}
	}
	return jobs, strokes, c
}

// elapsedOK checks a schedule against the budgets directly from its
// actions: each write must end within its budget of the end of the last
// registration, unless it is alone in its segment.
func elapsedOK(tl timeline, jobs []job) bool {
	regEnd := 0.0
	count := map[int]int{}
	for _, a := range tl.actions {
		if a.Kind == ActWrite || a.Kind == ActDwell {
			count[a.Segment]++
		}
	}
	for _, a := range tl.actions {
		switch a.Kind {
		case ActRegister:
			regEnd = a.StartS + a.DurationS
		case ActWrite, ActDwell:
			if a.StartS+a.DurationS-regEnd > jobs[a.Stroke].budgetS+1e-9 && count[a.Segment] > 1 {
				return false
			}
		}
	}
	return true
}

func TestSegmenterMatchesBruteForce(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	for trial := 0; trial < 200; trial++ {
		n := 1 + rng.IntN(9)
		jobs, strokes, c := randomJobs(rng, n)
		sg := newSegmenter(jobs, c, 0)
		prof := DefaultProfile()
		starts, total, _ := sg.solve(1)
		tl := schedule(sg, starts, strokes, &prof)
		if got := tl.breakdown.Total(); math.Abs(got-total) > 1e-9*total {
			t.Fatalf("trial %d: schedule total %v != DP total %v", trial, got, total)
		}
		if !elapsedOK(tl, jobs) {
			t.Fatalf("trial %d: DP segmentation %v breaks a budget", trial, starts)
		}
		// Brute force over every set of boundaries.
		best := math.Inf(1)
		for mask := 0; mask < 1<<(n-1); mask++ {
			st := []int{0}
			for j := 1; j < n; j++ {
				if mask&(1<<(j-1)) != 0 {
					st = append(st, j)
				}
			}
			tl := schedule(sg, st, strokes, &prof)
			if elapsedOK(tl, jobs) {
				best = math.Min(best, tl.breakdown.Total())
			}
		}
		if math.Abs(best-total) > 1e-9*best {
			t.Fatalf("trial %d (n=%d): DP total %v, brute force optimum %v", trial, n, total, best)
		}
	}
}

func TestScheduleCoversTimeline(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	jobs, strokes, c := randomJobs(rng, 40)
	sg := newSegmenter(jobs, c, 1)
	prof := DefaultProfile()
	starts, total, _ := sg.solve(1)
	tl := schedule(sg, starts, strokes, &prof)
	clock := 0.0
	for i, a := range tl.actions {
		if a.Index != i || a.StartS != clock {
			t.Fatalf("action %d starts at %v, previous ended at %v", i, a.StartS, clock)
		}
		clock += a.DurationS
	}
	if math.Abs(clock-total) > 1e-9*total || tl.breakdown.Total() != tl.breakdown.Total() {
		t.Errorf("timeline ends at %v, total %v", clock, total)
	}
	if tl.actions[0].Kind != ActRegister || tl.actions[0].From != c.fiducials[1].At {
		t.Errorf("plan starts with %+v, want a registration at the first fiducial", tl.actions[0])
	}
	// Segments tile the timeline and each names its fiducial.
	for i, s := range tl.segments {
		if i > 0 && s.StartS != tl.segments[i-1].EndS {
			t.Errorf("segment %d starts at %v, previous ended at %v", i, s.StartS, tl.segments[i-1].EndS)
		}
		if s.Fiducial == "" || len(s.Strokes) == 0 {
			t.Errorf("segment %d: %+v", i, s)
		}
	}
	if last := tl.segments[len(tl.segments)-1]; math.Abs(last.EndS-clock) > 1e-9 {
		t.Errorf("last segment ends at %v, plan at %v", last.EndS, clock)
	}
}

func TestOverBudgetJobGetsOwnSegment(t *testing.T) {
	p := DefaultProfile()
	c := newCosts(&p, []Fiducial{{Name: "F", At: r2.Point{}}})
	jobs := []job{
		{stroke: 0, start: r2.Point{X: 1}, end: r2.Point{X: 2}, writeS: 10, budgetS: 100, mode: design.ModeAP},
		{stroke: 1, start: r2.Point{X: 3}, end: r2.Point{X: 4}, writeS: 500, budgetS: 100, mode: design.ModeAP},
		{stroke: 2, start: r2.Point{X: 5}, end: r2.Point{X: 6}, writeS: 10, budgetS: 100, mode: design.ModeAP},
	}
	starts, _, forced := newSegmenter(jobs, c, 0).solve(1)
	if len(forced) != 1 || forced[0] != 1 || len(starts) != 3 {
		t.Errorf("starts %v forced %v, want job 1 alone and forced", starts, forced)
	}
}

func TestMonteCarloDeterministicAndOrdered(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 8))
	jobs, _, c := randomJobs(rng, 300)
	for i := range jobs {
		if i%4 == 0 {
			jobs[i].dwell = true
		}
	}
	p := DefaultProfile()
	sg := newSegmenter(jobs, c, 0)
	a, err := monteCarlo(context.Background(), sg, &p, 500, 42, 75, nil)
	if err != nil {
		t.Fatal(err)
	}
	b, _ := monteCarlo(context.Background(), sg, &p, 500, 42, 75, nil)
	if a.p10 != b.p10 || a.p50 != b.p50 || a.p90 != b.p90 {
		t.Errorf("same seed, different spread: %v %v", a, b)
	}
	if !(a.p10 <= a.p50 && a.p50 <= a.p90) || a.p10 == a.p90 {
		t.Errorf("P10 %v P50 %v P90 %v", a.p10, a.p50, a.p90)
	}
	// Without drift uncertainty and dwells every sample is the plan.
	p.Drift.RateSDNMPerMin = 0
	_, nominal, _ := sg.solve(1)
	z, _ := monteCarlo(context.Background(), sg, &p, 100, 1, 0, nil)
	if z.p10 != nominal || z.p90 != nominal {
		t.Errorf("no spread: P10 %v P90 %v, want %v", z.p10, z.p90, nominal)
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	p.Drift.RateSDNMPerMin = 0.05
	if _, err := monteCarlo(ctx, sg, &p, 100, 1, 0, nil); err == nil {
		t.Error("monteCarlo ignores a cancelled context")
	}
}

func TestMonteCarloQuantilesExact(t *testing.T) {
	// Without dwells the quantiles come from exact segmentations at the
	// ranks they pick; compare with re-segmenting at every sampled rate
	// and gonum's empirical quantile.
	rng := rand.New(rand.NewPCG(9, 10))
	jobs, _, c := randomJobs(rng, 400)
	p := DefaultProfile()
	sg := newSegmenter(jobs, c, 0)
	res, err := monteCarlo(context.Background(), sg, &p, 300, 11, 0, nil)
	if err != nil {
		t.Fatal(err)
	}
	if res.evaluations > 3 {
		t.Errorf("%d segmentations, want 3", res.evaluations)
	}
	rates := driftSamples(&p, 300, 11)
	exact := make([]float64, len(rates))
	for i, r := range rates {
		_, exact[i], _ = sg.solve(p.Drift.RateNMPerMin / r)
	}
	sort.Float64s(exact)
	for _, q := range []struct {
		p   float64
		got float64
	}{{0.1, res.p10}, {0.5, res.p50}, {0.9, res.p90}} {
		if want := stat.Quantile(q.p, stat.Empirical, exact, nil); q.got != want {
			t.Errorf("P%.0f = %v, exact %v", q.p*100, q.got, want)
		}
	}
	if exact[0] == exact[len(exact)-1] {
		t.Error("drift spread changes nothing: the test is too weak")
	}
}
