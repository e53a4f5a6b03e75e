package planner

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"
)

// TestSavedMemo: decay.savedMemo gives saved's value bit for bit (the
// memo only remembers math.Expm1, a pure function), with spans and
// delays repeated and fresh, so that entries are hit and replaced.
func TestSavedMemo(t *testing.T) {
	rng := rand.New(rand.NewPCG(21, 22))
	for _, tau := range []float64{30, 60, 1200} {
		d := decay{tau: tau}
		at := 0.0
		for range 50 {
			// Gaps past 745τ leave the level at exactly 0 (Exp underflows).
			at += rng.Float64() * 3 * tau
			if rng.IntN(5) == 0 {
				at += 800 * tau
			}
			d.add(at, rng.Float64())
		}
		m := newSavedMemo()
		delays := []float64{256, 12.5, 600, 0, -1}
		spans := []float64{3.25, 1e-3, 40, 2 * tau}
		for range 20000 {
			t0 := rng.Float64() * (at + 100)
			span := spans[rng.IntN(len(spans))]
			if rng.IntN(4) == 0 {
				span = rng.Float64() * 100
			}
			delay := delays[rng.IntN(len(delays))]
			if rng.IntN(4) == 0 {
				delay = rng.Float64() * 1000
			}
			got, want := d.savedMemo(t0, t0+span, delay, m), d.saved(t0, t0+span, delay)
			if math.Float64bits(got) != math.Float64bits(want) {
				t.Fatalf("tau %v: savedMemo(%v, %v, %v) = %v, saved %v", tau, t0, t0+span, delay, got, want)
			}
			// saved is its formula, the sources' level at t0 times the
			// two Expm1 factors, bit for bit (also where the level is 0).
			if t1 := t0 + span; delay > 0 && t1 > t0 {
				formula := d.levelAt(t0) * d.tau * (-math.Expm1(-(t1 - t0) / d.tau)) * (-math.Expm1(-delay / d.tau))
				if math.Float64bits(want) != math.Float64bits(formula) {
					t.Fatalf("tau %v: saved(%v, %v, %v) = %v, formula %v", tau, t0, t1, delay, want, formula)
				}
			}
		}
	}
}

// TestSegmenterPrepareSolveSame: prepareSolve's loads, whose integrals
// it now takes once for both drift fields and whose start terms take
// their Expm1 values from a memo, are the old formulas' bit for bit,
// with and without compensation and the anneal's excess.
func TestSegmenterPrepareSolveSame(t *testing.T) {
	rng := rand.New(rand.NewPCG(23, 24))
	p := DefaultProfile()
	p.Drift.Compensation.Enabled = true
	for trial := range 40 {
		jobs, _, c := randomJobs(rng, 1+rng.IntN(60))
		model := testModel(&p)
		if trial%2 == 0 {
			model.residual = 1
		}
		if trial%3 == 0 {
			model.annealLevel = 0
		}
		sg := newSegmenter(jobs, c, model, 0)
		sc := sg.prepareSolve()
		md := sg.model
		for v, f := range []*driftField{&sg.driftRaw, &sg.driftC} {
			for j := range sg.n {
				tj := sg.T[j]
				want := md.creep*sg.creepF.integral(tj) + md.rateMul*f.at(tj)
				if got := sc.value[v][j]; math.Float64bits(got) != math.Float64bits(want) {
					t.Fatalf("trial %d: value[%d][%d] = %v, want %v", trial, v, j, got, want)
				}
			}
		}
		for k := range sc.cst {
			for s := range sg.n {
				if !sg.allowed(s, k) {
					continue
				}
				c0, d0 := sg.startTerms(s, k)
				want := md.creep*sg.creepF.integral(sg.clockStart(s, k)) + md.rateMul*sg.field(s).at(sg.clockStart(s, k)) -
					sg.regError(k) - md.creep*c0 - md.rateMul*d0
				if got := sc.cst[k][s]; math.Float64bits(got) != math.Float64bits(want) {
					t.Fatalf("trial %d: cst[%d][%d] = %v, want %v", trial, k, s, got, want)
				}
			}
		}
	}
}

// TestDecaySame: same tells decays with the same sources from others.
func TestDecaySame(t *testing.T) {
	var a, b decay
	a.tau, b.tau = 60, 60
	for _, s := range [][2]float64{{1, 0.5}, {4, 0.25}, {9, 1}} {
		a.add(s[0], s[1])
		b.add(s[0], s[1])
	}
	if !a.same(&b) {
		t.Fatal("decays with the same sources differ")
	}
	b.add(12, 0.1)
	if a.same(&b) {
		t.Fatal("a decay with one source more is the same")
	}
	a.add(12, 0.2)
	if a.same(&b) {
		t.Fatal("decays with different levels are the same")
	}
}

// TestBandMemo: bandMemo and uFactorMemo give band's and uFactor's
// values bit for bit, with sites far beyond a piece's ends (where Φ
// leaves fastPhi's table) at a few repeated offsets and at fresh ones.
func TestBandMemo(t *testing.T) {
	rng := rand.New(rand.NewPCG(25, 26))
	m := newTailMemo()
	const sigma, lo, hi = 0.7, 10.0, 13.5
	p := piece{kind: pieceParallel, a0: lo, a1: hi, sigma: sigma}
	offsets := []float64{8.2806, 9.0, 10.92, 12.8, 20.5, 3, 0.5}
	for range 50000 {
		off := offsets[rng.IntN(len(offsets))] * sigma
		if rng.IntN(3) == 0 {
			off = rng.Float64() * 40 * sigma
		}
		x := hi + off
		if rng.IntN(2) == 0 {
			x = lo - off
		}
		if got, want := bandMemo(lo, hi, sigma, x, m), band(lo, hi, sigma, x); math.Float64bits(got) != math.Float64bits(want) {
			t.Fatalf("bandMemo at %v = %v, band %v", x, got, want)
		}
		if got, want := p.uFactorMemo(x, m), p.uFactor(x); math.Float64bits(got) != math.Float64bits(want) {
			t.Fatalf("uFactorMemo at %v = %v, uFactor %v", x, got, want)
		}
	}
}

// TestSegmenterFromPrevSame: a segmenter made from its predecessor (the
// order before reoptimise, here with a few ranges of jobs shuffled and
// one turned round) is the one made afresh, bit for bit.
func TestSegmenterFromPrevSame(t *testing.T) {
	rng := rand.New(rand.NewPCG(27, 28))
	p := DefaultProfile()
	p.Drift.Compensation.Enabled = true
	for trial := range 60 {
		n := 1 + rng.IntN(80)
		jobs, _, c := randomJobs(rng, n)
		model := testModel(&p)
		prev := newSegmenter(jobs, c, model, 1)
		prev.solve(1)
		next := append([]job(nil), jobs...)
		for range rng.IntN(4) {
			s := rng.IntN(n)
			e := min(n, s+1+rng.IntN(6))
			rng.Shuffle(e-s, func(i, j int) { next[s+i], next[s+j] = next[s+j], next[s+i] })
		}
		if trial%5 == 0 {
			next = next[:rng.IntN(n+1)]
		}
		if len(next) > 0 && trial%3 == 0 {
			j := rng.IntN(len(next))
			next[j].start, next[j].end = next[j].end, next[j].start
		}
		prev.keepForSuccessor()
		got, want := newSegmenterFrom(next, c, model, 1, prev), newSegmenter(next, c, model, 1)
		if differ := segmenterTermsDiffer(got, want); len(differ) > 0 {
			t.Fatalf("trial %d: %v differ from a segmenter made afresh", trial, differ)
		}
		if !slices.Equal(got.fid, want.fid) || !got.creepF.same(&want.creepF) || !got.driftRaw.moves.same(&want.driftRaw.moves) ||
			!got.driftC.moves.same(&want.driftC.moves) {
			t.Fatalf("trial %d: fiducials or fields differ", trial)
		}
	}
}

// segmenterTermsDiffer names the per-job terms of got that are not
// want's bit for bit (sorted), none when all are.
func segmenterTermsDiffer(got, want *segmenter) []string {
	var differ []string
	for name, pair := range map[string][2][]float64{
		"T": {got.T, want.T}, "ts": {got.ts, want.ts}, "m": {got.m, want.m}, "sw": {got.sw, want.sw},
		"moveCreep": {got.moveCreep, want.moveCreep}, "moveExcess": {got.moveExcess, want.moveExcess},
		"a": {got.a, want.a}, "aCreep": {got.aCreep, want.aCreep}, "aExcess": {got.aExcess, want.aExcess},
		"detour": {got.detour, want.detour}, "Blocal": {got.B[kLocal], want.B[kLocal]}, "Bcoarse": {got.B[kCoarse], want.B[kCoarse]},
	} {
		if !sameBits(pair[0], pair[1]) {
			differ = append(differ, name)
		}
	}
	slices.Sort(differ)
	return differ
}
