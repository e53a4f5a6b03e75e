package planner

import (
	"context"
	"math"
	"math/rand/v2"
	"sort"

	"gonum.org/v1/gonum/stat"
	"gonum.org/v1/gonum/stat/distuv"
)

// DefaultMonteCarloRuns is the number of Monte Carlo samples of the
// write time when Options.MonteCarloRuns is 0.
const DefaultMonteCarloRuns = 1000

// exactDwellSamples is the number of dwells up to which each run draws
// every dwell's completion time; beyond it the sum of the (independent,
// identically distributed) capped completion times is drawn from its
// normal approximation (central limit theorem), whose error is far below
// the spread of the drift term.
const exactDwellSamples = 2000

// spreadTolerance is the gap in total time (relative) below which the
// total at a drift rate between two evaluated rates is interpolated
// rather than re-segmented: the optimal total never falls as the drift
// rate rises, so it lies between its neighbours.
const spreadTolerance = 1e-4

// mcResult holds the Monte Carlo samples of the total write time.
type mcResult struct {
	samples       []float64 // sorted
	p10, p50, p90 float64
	evaluations   int // segmentations computed
}

// monteCarlo samples the total write time over the drift-rate
// uncertainty (log-normal with the profile's mean and standard
// deviation, re-segmenting the writing order at each sampled rate) and
// over the feedback-ended dwell times (exponential with rate Y·I/e,
// capped at the dwell's 99 % time; the plan counts each at its mean).
// The drift and dwell terms are drawn from separate streams of seed.
func monteCarlo(ctx context.Context, sg *segmenter, prof *Profile, runs int, seed int64, dwells int, progress func(float64)) (mcResult, error) {
	if runs <= 0 {
		runs = DefaultMonteCarloRuns
	}
	var res mcResult
	r0 := prof.Drift.RateNMPerMin
	rates := driftSamples(prof, runs, seed)
	// Totals at the sampled rates: evaluate the segmentation at sorted
	// rates by bisection, interpolating where neighbours agree.
	order := make([]int, runs)
	for i := range order {
		order[i] = i
	}
	sort.SliceStable(order, func(a, b int) bool { return rates[order[a]] < rates[order[b]] })
	totals := make([]float64, runs)
	known := make([]bool, runs)
	eval := func(k int) (float64, error) {
		i := order[k]
		if !known[i] {
			if err := ctx.Err(); err != nil {
				return 0, err
			}
			scale := math.Inf(1)
			if rates[i] > 0 {
				scale = r0 / rates[i]
			}
			_, totals[i], _ = sg.solve(scale)
			known[i] = true
			res.evaluations++
			if progress != nil {
				progress(math.Min(1, float64(res.evaluations)/64))
			}
		}
		return totals[i], nil
	}
	var fill func(lo, hi int) error
	fill = func(lo, hi int) error {
		if hi-lo <= 1 {
			return nil
		}
		tl, err := eval(lo)
		if err != nil {
			return err
		}
		th, err := eval(hi)
		if err != nil {
			return err
		}
		if th-tl <= spreadTolerance*math.Max(tl, 1) {
			rl, rh := rates[order[lo]], rates[order[hi]]
			for k := lo + 1; k < hi; k++ {
				i := order[k]
				f := 0.0
				if rh > rl {
					f = (rates[i] - rl) / (rh - rl)
				}
				totals[i] = tl + f*(th-tl)
				known[i] = true
			}
			return nil
		}
		mid := (lo + hi) / 2
		if _, err := eval(mid); err != nil {
			return err
		}
		if err := fill(lo, mid); err != nil {
			return err
		}
		return fill(mid, hi)
	}
	if _, err := eval(0); err != nil {
		return res, err
	}
	if err := fill(0, runs-1); err != nil {
		return res, err
	}

	if dwells > 0 {
		k, capS := prof.Dwell.Rate(), prof.Dwell.CapS()
		mean := prof.Dwell.ExpectedS()
		src := rand.NewPCG(uint64(seed), 0x6477656c6c)
		if dwells <= exactDwellSamples {
			exp := distuv.Exponential{Rate: k, Src: src}
			for i := range totals {
				d := 0.0
				for range dwells {
					d += math.Min(exp.Rand(), capS) - mean
				}
				totals[i] += d
			}
		} else {
			// E[min(T,c)²] = 2/k²·(1 - e^{-kc}(1+kc)) for T ~ Exp(k).
			m2 := 2 / (k * k) * (1 - math.Exp(-k*capS)*(1+k*capS))
			v := math.Max(m2-mean*mean, 0)
			norm := distuv.Normal{Mu: 0, Sigma: math.Sqrt(v * float64(dwells)), Src: src}
			for i := range totals {
				totals[i] += norm.Rand()
			}
		}
	}
	res.samples = totals
	sort.Float64s(res.samples)
	res.p10 = stat.Quantile(0.1, stat.Empirical, res.samples, nil)
	res.p50 = stat.Quantile(0.5, stat.Empirical, res.samples, nil)
	res.p90 = stat.Quantile(0.9, stat.Empirical, res.samples, nil)
	return res, nil
}

// driftSamples draws runs drift rates (nm/min) from a log-normal
// distribution with the profile's mean and standard deviation: drift
// rates are positive and their spread is multiplicative. Without spread
// every sample is the mean.
func driftSamples(prof *Profile, runs int, seed int64) []float64 {
	r0, sd := prof.Drift.RateNMPerMin, prof.Drift.RateSDNMPerMin
	rates := make([]float64, runs)
	if r0 > 0 && sd > 0 {
		s2 := math.Log1p(sd * sd / (r0 * r0))
		ln := distuv.LogNormal{Mu: math.Log(r0) - s2/2, Sigma: math.Sqrt(s2), Src: rand.NewPCG(uint64(seed), 0x6472696674)}
		for i := range rates {
			rates[i] = ln.Rand()
		}
		return rates
	}
	for i := range rates {
		rates[i] = r0
	}
	return rates
}
