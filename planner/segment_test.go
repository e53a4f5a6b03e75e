package planner

import (
	"context"
	"errors"
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"github.com/golang/geo/r2"
	"gonum.org/v1/gonum/stat"
	"gonum.org/v1/gonum/stat/distuv"

	"dimerpath/lattice/design"
)

func TestDriftBudgetByHand(t *testing.T) {
	cases := []struct {
		tol, reg, creep, rate, want float64
	}{
		{0.2, 0, 0, 0.1, 120},          // AP ±0.2 nm at 0.1 nm/min, no error: 2 min
		{0.2, 0.05, 0.01, 0.1, 84},     // (0.2 − 0.05 − 0.01) / 0.1 nm/min
		{2, 0.5, 0.5, 0.1, 600},        // FE after a coarse registration
		{0.2, 0.05, 0, 0.1 / 60, 5400}, // AP at 0.1 nm/h
		{0.2, 0, 0, 0, math.Inf(1)},    // no drift
		{0.2, 0.2, 0, 0.1, 0},          // the error uses the tolerance up
	}
	for _, c := range cases {
		if got := DriftBudget(c.tol, c.reg, c.creep, c.rate); !(got == c.want || math.Abs(got-c.want) < 1e-9*c.want) {
			t.Errorf("DriftBudget(%v, %v, %v, %v) = %v, want %v", c.tol, c.reg, c.creep, c.rate, got, c.want)
		}
	}
}

// TestDecayIntegralMatchesNumeric checks the running integral of
// exponentially decaying sources against a numerical integration of the
// summed rate (trapezoid rule, 10^5 steps).
func TestDecayIntegralMatchesNumeric(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	d := decay{tau: 37}
	type src struct{ t, a float64 }
	var srcs []src
	at := 0.0
	for range 20 {
		at += rng.Float64() * 30
		a := rng.Float64() * 0.2
		d.add(at, a)
		srcs = append(srcs, src{at, a})
	}
	rate := func(x float64) float64 {
		r := 0.0
		for _, s := range srcs {
			if x >= s.t {
				r += s.a * math.Exp(-(x-s.t)/d.tau)
			}
		}
		return r
	}
	for _, end := range []float64{5, 50, 200, at, at + 100} {
		const n = 100000
		h := end / n
		num := 0.0
		for i := range n {
			num += h * (rate(float64(i)*h) + rate(float64(i+1)*h)) / 2
		}
		if got := d.integral(end); math.Abs(got-num) > 1e-3*math.Max(num, 1e-3) {
			t.Errorf("integral to %.1f s = %v, numeric %v", end, got, num)
		}
	}
	// What a delay saves never exceeds what the earlier sources bring.
	for _, t0 := range []float64{10, 100, at} {
		pre := d.levelAt(t0) * d.tau * (-math.Expm1(-60 / d.tau))
		if s := d.saved(t0, t0+60, 1e9); math.Abs(s-pre) > 1e-12 || d.saved(t0, t0+60, 0) != 0 {
			t.Errorf("saved(%v) = %v, want %v", t0, s, pre)
		}
	}
}

// TestMoveWaitsForCreep checks the settle after a long move: it lasts
// until the creep still to come (at the planning fraction) is
// SettleShare of the next tolerance, so it grows with the move's length;
// moves within the frame wait only settle_s.
func TestMoveWaitsForCreep(t *testing.T) {
	p := DefaultProfile()
	m := newMotion(&p, 0.03)
	short := m.move(r2.Point{}, r2.Point{X: 50}, 0.2)
	if short.waitS != 0 || short.creepUnit != 0 || math.Abs(short.timeS-(50/p.MoveSpeedNMPerS+p.SettleS)) > 1e-12 {
		t.Errorf("a move within the frame: %+v", short)
	}
	prev := 0.0
	for _, d := range []float64{300, 700, 1500} {
		mv := m.move(r2.Point{}, r2.Point{X: d}, 0.2)
		left := 0.03 * mv.creepUnit
		if math.Abs(left-p.Registration.Creep.SettleShare*0.2) > 1e-9 || mv.waitS <= prev {
			t.Errorf("%v nm move: %v nm of creep left, wait %v s (previous %v s)", d, left, mv.waitS, prev)
		}
		prev = mv.waitS
	}
	// A wider tolerance waits less.
	if wide := m.move(r2.Point{}, r2.Point{X: 700}, 10); wide.waitS >= m.move(r2.Point{}, r2.Point{X: 700}, 0.2).waitS {
		t.Errorf("±10 nm waits %v s, no less than ±0.2 nm", wide.waitS)
	}
}

// randomJobs returns n jobs along a line with random write times,
// tolerances and modes, and two fiducials.
func randomJobs(rng *rand.Rand, n int) ([]job, []Stroke, costs) {
	p := DefaultProfile()
	p.Drift.VerificationS = 5
	c := newCosts(&p, []Fiducial{{Name: "F0", At: r2.Point{X: 0, Y: 0}}, {Name: "F1", At: r2.Point{X: 300, Y: 50}}})
	jobs := make([]job, n)
	strokes := make([]Stroke, n)
	x := 10.0
	for i := range jobs {
		mode := design.ModeAP
		tol := []float64{0.2, 1}[rng.IntN(2)]
		if rng.IntN(3) == 0 {
			mode, tol = design.ModeFE, []float64{2, 10}[rng.IntN(2)]
		}
		w := 2 + rng.Float64()*40
		jobs[i] = job{stroke: i, start: r2.Point{X: x, Y: rng.Float64() * 40}, writeS: w, tolNM: tol, mode: mode, nearAP: rng.IntN(2) == 0}
		x += rng.Float64() * 160
		jobs[i].end = r2.Point{X: x, Y: rng.Float64() * 40}
		strokes[i] = Stroke{ID: i, Mode: mode, Kind: StrokeLine, Path: []r2.Point{jobs[i].start, jobs[i].end}, DurationS: w, ToleranceNM: tol}
	}
	return jobs, strokes, c
}

func testModel(p *Profile) segModel {
	m, _ := planModel(p)
	m.annealLevel = 0.5
	return m
}

// feasible reports whether a segmentation holds every job of a segment
// of two or more within its tolerance / margin at the planning values,
// and uses only registrations allowed where they stand.
func feasible(sg *segmenter, starts []int, kinds []RegistrationKind, margin float64) bool {
	for i, s := range starts {
		e := sg.n
		if i+1 < len(starts) {
			e = starts[i+1]
		}
		k := kindIndex(kinds[i])
		if !sg.allowed(s, k) {
			return false
		}
		if k == kCoarse {
			for j := s; j < e; j++ {
				if sg.jobs[j].localOnly {
					return false
				}
			}
		}
		if e-s < 2 {
			continue
		}
		for j := s; j < e; j++ {
			if sg.planLoad(s, k, j) > sg.jobs[j].tolNM/margin+1e-12 {
				return false
			}
		}
	}
	return true
}

// TestSegmenterMatchesBruteForce compares the dynamic programme with
// every set of boundaries and every choice of registration kinds for up
// to 8 jobs.
func TestSegmenterMatchesBruteForce(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	p := DefaultProfile()
	p.Drift.Compensation.Enabled = true
	for trial := 0; trial < 150; trial++ {
		n := 1 + rng.IntN(8)
		jobs, _, c := randomJobs(rng, n)
		if trial%3 == 0 {
			jobs[rng.IntN(n)].localOnly = true
		}
		model := testModel(&p)
		if trial%2 == 0 {
			model.residual = 1
		}
		sg := newSegmenter(jobs, c, model, 0)
		margin := 1 + rng.Float64()
		starts, kinds, total, forced := sg.solve(margin)
		if got := sg.totalOf(starts, kinds); math.Abs(got-total) > 1e-9*total {
			t.Fatalf("trial %d: totalOf %v != solve's %v", trial, got, total)
		}
		if len(forced) == 0 && !feasible(sg, starts, kinds, margin) {
			t.Fatalf("trial %d: DP segmentation %v %v breaks a tolerance", trial, starts, kinds)
		}
		best := math.Inf(1)
		for mask := 0; mask < 1<<(n-1); mask++ {
			st := []int{0}
			for j := 1; j < n; j++ {
				if mask&(1<<(j-1)) != 0 {
					st = append(st, j)
				}
			}
			for km := 0; km < 1<<len(st); km++ {
				ks := make([]RegistrationKind, len(st))
				for i := range st {
					ks[i] = regKinds[(km>>i)&1]
				}
				if feasible(sg, st, ks, margin) {
					best = math.Min(best, sg.totalOf(st, ks))
				}
			}
		}
		if len(forced) == 0 && math.Abs(best-total) > 1e-9*best {
			t.Fatalf("trial %d (n=%d): DP total %v, brute force optimum %v", trial, n, total, best)
		}
		if len(forced) > 0 && !math.IsInf(best, 1) && total > best+1e-9*best {
			t.Fatalf("trial %d: forced jobs %v, but a feasible plan of %v beats %v", trial, forced, best, total)
		}
	}
}

// TestScheduleMatchesSegmenter lays a step out and checks that its
// writing, travel, switches and registrations take what the segmenter
// counted, actions follow each other without gaps, and each segment
// starts with its registration.
func TestScheduleMatchesSegmenter(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	jobs, strokes, c := randomJobs(rng, 40)
	p := DefaultProfile()
	p.Drift.VerificationS = 5
	sg := newSegmenter(jobs, c, testModel(&p), 1)
	starts, kinds, total, _ := sg.solve(1)
	// As Build does: the timeline reads each job from its stroke.
	st := &stepWork{sg: sg, jobs: jobs, starts: starts, kinds: kinds}
	if err := st.keepForTimeline(strokes); err != nil {
		t.Fatal(err)
	}
	var tl timeline
	tl.scheduleStep(sg, st.order, starts, kinds, strokes, &p, 0, 0, nil)
	clock := 0.0
	for i, a := range tl.actions {
		if a.Index != i || math.Abs(a.StartS-clock) > 1e-9*math.Max(clock, 1) {
			t.Fatalf("action %d starts at %v, previous ended at %v", i, a.StartS, clock)
		}
		clock += a.DurationS
	}
	if math.Abs(clock-total) > 1e-9*total || math.Abs(tl.breakdown.Total()-total) > 1e-9*total {
		t.Errorf("timeline ends at %v (breakdown %v), segmenter total %v", clock, tl.breakdown.Total(), total)
	}
	if len(tl.segments) != len(starts) {
		t.Fatalf("%d segments, %d starts", len(tl.segments), len(starts))
	}
	for i, s := range tl.segments {
		if s.Registration != kinds[i] || (s.Registration == RegCoarse) != (s.Fiducial != "") {
			t.Errorf("segment %d: %+v, kind %v", i, s, kinds[i])
		}
		if i > 0 && s.StartS != tl.segments[i-1].EndS {
			t.Errorf("segment %d starts at %v, previous ended at %v", i, s.StartS, tl.segments[i-1].EndS)
		}
	}
}

// TestPInToleranceMatchesClosedForm checks the tolerance sampling
// against closed forms where both apply: a constant-rate drift with a
// normal rate R and no registration error stays within ±tol over Δt with
// probability Φ((tol·60/Δt − μ)/σ_R); a fixed displacement d and a
// normal registration error of σ with 2Φ((tol − d)/σ) − 1 (gonum distuv
// for Φ).
func TestPInToleranceMatchesClosedForm(t *testing.T) {
	const n = 200000
	mu, sd, tol, dt := 0.1, 0.04, 0.2, 100.0 // nm/min, nm, s
	rates := distuv.Normal{Mu: mu, Sigma: sd, Src: rand.NewPCG(9, 9)}
	d := mcDraws{rate: make([]float64, n), creep: make([]float64, n)}
	for i := range d.rate {
		d.rate[i] = rates.Rand() / mu // over the mean, as drawMotion gives it
	}
	seg := segLoad{sigma: 0, loads: []strokeLoad{{tol: tol, drift: mu * dt / 60}}}
	res, err := pInTolerance(context.Background(), []segLoad{seg}, nil, d, nil)
	if err != nil {
		t.Fatal(err)
	}
	want := distuv.Normal{Mu: mu, Sigma: sd}.CDF(tol * 60 / dt)
	if se := math.Sqrt(want * (1 - want) / n); math.Abs(res.all-want) > 4*se {
		t.Errorf("P(within) = %v, closed form %v (±%v)", res.all, want, se)
	}
	// A fixed displacement and a normal error: exact, not sampled.
	one := mcDraws{rate: []float64{1}, creep: []float64{0}}
	seg = segLoad{sigma: 0.05, loads: []strokeLoad{{tol: 0.2, drift: 0.07}}}
	res, _ = pInTolerance(context.Background(), []segLoad{seg}, nil, one, nil)
	if want := 2*distuv.UnitNormal.CDF(0.13/0.05) - 1; math.Abs(res.all-want) > 2e-7 {
		t.Errorf("P(|e| ≤ 0.13 nm) = %v, closed form %v", res.all, want)
	}
}

func TestFastErf(t *testing.T) {
	for x := 0.0; x < 7; x += 0.0007 {
		if d := math.Abs(fastErf(x) - math.Erf(x)); d > 1.2e-7 {
			t.Fatalf("fastErf(%v) = %v, math.Erf %v", x, fastErf(x), math.Erf(x))
		}
	}
}

// TestParetoLoadsKeepTheBinding checks that the loads left out of a
// segment never bind: over random rates and creeps the least room is the
// same with all strokes as with the kept ones.
func TestParetoLoadsKeepTheBinding(t *testing.T) {
	rng := rand.New(rand.NewPCG(4, 4))
	for trial := 0; trial < 200; trial++ {
		var all []strokeLoad
		for range 1 + rng.IntN(30) {
			all = append(all, strokeLoad{tol: []float64{0.2, 1, 2}[rng.IntN(3)], creep: rng.Float64() * 5, drift: rng.Float64() * 0.3})
		}
		kept := paretoLoads(append([]strokeLoad(nil), all...))
		for range 20 {
			r, c := rng.Float64()*3, rng.Float64()*0.1
			room := func(ls []strokeLoad) float64 {
				m := math.Inf(1)
				for _, l := range ls {
					m = math.Min(m, l.tol-c*l.creep-r*l.drift)
				}
				return m
			}
			if room(all) != room(kept) {
				t.Fatalf("trial %d: room %v with all, %v with the kept %d of %d", trial, room(all), room(kept), len(kept), len(all))
			}
		}
	}
}

// TestSampleTimesMatchesGonum checks the session's spread against gonum's
// stat on the same samples (mean, empirical quantiles), and the tip
// changes' mean against the Poisson expectation.
func TestSampleTimesMatchesGonum(t *testing.T) {
	p := DefaultProfile()
	tm := timeModel{schedule: Breakdown{APWriteS: 600, FEWriteS: 600, RegistrationS: 900, AnnealS: 3720}, writeS: 1200, dwells: 40}
	tm.schedule.DwellS = 40 * p.DwellExpectedS()
	tm.tipChange.enabled, tm.tipChange.meanS, tm.tipChange.costS = true, 1800, 856
	tm.repairs = []repairModel{{missed: 3, perSiteS: 25}, {missed: 0.5, perSiteS: 25}}
	tm.schedule.RepairS = 3.5 * 25
	const runs = 4000
	res, err := sampleTimes(context.Background(), tm, &p, runs, 3)
	if err != nil {
		t.Fatal(err)
	}
	if m := stat.Mean(res.samples, nil); math.Abs(m-res.mean) > 1e-9*m || math.Abs(res.breakdown.Total()-m) > 1e-6*m {
		t.Errorf("mean %v, gonum %v, breakdown %v", res.mean, m, res.breakdown.Total())
	}
	for _, q := range []struct{ p, got float64 }{{0.1, res.p10}, {0.5, res.p50}, {0.9, res.p90}} {
		if want := stat.Quantile(q.p, stat.Empirical, res.samples, nil); want != q.got {
			t.Errorf("P%.0f = %v, gonum %v", 100*q.p, q.got, want)
		}
	}
	// Tip changes: Poisson with mean writing time / mean time between
	// failures, each costing conditioning and a registration.
	want := 1200.0 / 1800 * 856
	if se := math.Sqrt(1200.0/1800) * 856 / math.Sqrt(runs); math.Abs(res.breakdown.TipChangeS-want) > 4*se {
		t.Errorf("tip changes %v s on average, want %v ± %v", res.breakdown.TipChangeS, want, se)
	}
	if !(res.p10 < res.p90) {
		t.Errorf("no spread: P10 %v, P90 %v", res.p10, res.p90)
	}
	b, _ := sampleTimes(context.Background(), tm, &p, runs, 3)
	if b.mean != res.mean || b.p90 != res.p90 {
		t.Error("same seed, different samples")
	}
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := sampleTimes(ctx, tm, &p, 100, 1); err == nil {
		t.Error("sampleTimes ignores a cancelled context")
	}
}

// TestJoinBlocksKeepsPairsTogether checks the reordering of coupled
// strokes: each block stands together at its latest member's place.
func TestJoinBlocksKeepsPairsTogether(t *testing.T) {
	order := []int{10, 11, 12, 13, 14, 15, 16}
	got, joined := joinBlocks(order, [][2]int{{11, 15}, {15, 13}})
	want := []int{10, 12, 14, 11, 13, 15, 16}
	for i := range want {
		if got[i] != want[i] {
			t.Fatalf("joinBlocks = %v, want %v", got, want)
		}
	}
	if joined[11] || !joined[13] || !joined[15] || joined[10] {
		t.Errorf("joined = %v", joined)
	}
}

// A segmenter solved at several margins (chooseMargin does, with solve's
// cache and working arrays kept between calls, and dropped by
// releaseSolve) gives what a new one gives at each.
func TestSegmenterSolvesAgain(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	p := DefaultProfile()
	p.Drift.Compensation.Enabled = true
	for trial := range 40 {
		n := 1 + rng.IntN(40)
		jobs, _, c := randomJobs(rng, n)
		model := testModel(&p)
		if trial%2 == 0 {
			model.residual = 1
		}
		sg := newSegmenter(jobs, c, model, 0)
		for i, margin := range []float64{1, 1.5, 1, 2.2, 1.25} {
			if i == 3 {
				sg.releaseSolve()
			}
			s1, k1, t1, f1 := sg.solve(margin)
			s2, k2, t2, f2 := newSegmenter(jobs, c, model, 0).solve(margin)
			if !slices.Equal(s1, s2) || !slices.Equal(k1, k2) || t1 != t2 || !slices.Equal(f1, f2) {
				t.Fatalf("trial %d, margin %v: again %v %v %v %v, new %v %v %v %v", trial, margin, s1, k1, t1, f1, s2, k2, t2, f2)
			}
		}
	}
}

// TestKeepForTimelineRefusesStaleJobs: the timeline reads each job from
// its stroke, so a job that no longer matches its stroke (here a path
// turned round without the job) is an internal error, not a plan.
func TestKeepForTimelineRefusesStaleJobs(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 8))
	jobs, strokes, c := randomJobs(rng, 10)
	p := DefaultProfile()
	sg := newSegmenter(jobs, c, testModel(&p), 0)
	reversePath(strokes[3].Path)
	st := &stepWork{sg: sg, jobs: jobs}
	var ie *InternalError
	if err := st.keepForTimeline(strokes); !errors.As(err, &ie) {
		t.Errorf("keepForTimeline with a stroke turned round: %v, want an *InternalError", err)
	}
}
