package planner

import (
	"context"
	"fmt"
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
const exactDwellSamples = 256

// spreadRanks is the number of intervals between the drift-rate ranks
// at which the segmentation is computed exactly when dwells add their own
// spread (see monteCarlo).
const spreadRanks = 16

// quantileIndex is the 0-based index of the empirical p-quantile of n
// sorted samples: the smallest value whose empirical CDF reaches p, as
// gonum's stat.Quantile with stat.Empirical picks it.
func quantileIndex(p float64, n int) int {
	return min(max(int(math.Ceil(p*float64(n)))-1, 0), n-1)
}

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
	// The optimal total never falls as the drift rate rises, so the
	// total at the k-th smallest sampled rate is the k-th smallest total.
	// The segmentation is computed exactly at the ranks the quantiles
	// pick and, when dwells add their own spread, at spreadRanks ranks
	// evenly spaced between; totals at other ranks are interpolated
	// between their evaluated neighbours, which bound them. Without
	// dwells the quantiles are therefore exact.
	order := make([]int, runs)
	for i := range order {
		order[i] = i
	}
	sort.SliceStable(order, func(a, b int) bool { return rates[order[a]] < rates[order[b]] })
	ranks := map[int]bool{}
	for _, q := range []float64{0.1, 0.5, 0.9} {
		ranks[quantileIndex(q, runs)] = true
	}
	if dwells > 0 {
		for k := 0; k <= spreadRanks; k++ {
			ranks[k*(runs-1)/spreadRanks] = true
		}
	}
	evaluated := make([]int, 0, len(ranks))
	for k := range ranks {
		evaluated = append(evaluated, k)
	}
	sort.Ints(evaluated)
	byRank := make([]float64, runs)
	for n, k := range evaluated {
		if err := ctx.Err(); err != nil {
			return res, err
		}
		r := rates[order[k]]
		scale := math.Inf(1)
		if r > 0 {
			scale = r0 / r
		}
		_, byRank[k], _ = sg.solve(scale)
		res.evaluations++
		if progress != nil {
			progress(float64(n+1) / float64(len(evaluated)))
		}
	}
	for n := 0; n+1 < len(evaluated); n++ {
		a, b := evaluated[n], evaluated[n+1]
		for k := a + 1; k < b; k++ {
			byRank[k] = byRank[a] + (byRank[b]-byRank[a])*float64(k-a)/float64(b-a)
		}
	}
	for k := 0; k < evaluated[0]; k++ {
		byRank[k] = byRank[evaluated[0]]
	}
	for k := evaluated[len(evaluated)-1] + 1; k < runs; k++ {
		byRank[k] = byRank[evaluated[len(evaluated)-1]]
	}
	totals := make([]float64, runs)
	for k, i := range order {
		totals[i] = byRank[k]
	}

	if dwells > 0 {
		k, capS := prof.Dwell.Rate(), prof.Dwell.CapS()
		mean := prof.Dwell.ExpectedS()
		src := rand.NewPCG(uint64(seed), 0x6477656c6c)
		if dwells <= exactDwellSamples {
			// Exponential with rate k, as distuv.Exponential draws it
			// (ExpFloat64/k), from one generator rather than one per draw.
			rng := rand.New(src)
			for i := range totals {
				d := 0.0
				for range dwells {
					d += math.Min(rng.ExpFloat64()/k, capS) - mean
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
	for i, s := range totals {
		if !finite(s) {
			return res, fmt.Errorf("planner: the write time at a drift rate of %.3g nm/min is not a finite number of seconds (%v): the profile's times (drift.registration_s, drift.verification_s, settle_s, mode_switch_s) or rates are beyond any instrument", rates[i], s)
		}
	}
	res.samples = totals
	sort.Float64s(res.samples)
	res.p10 = stat.Quantile(0.1, stat.Empirical, res.samples, nil)
	if res.p10 != res.samples[quantileIndex(0.1, runs)] {
		return res, &InternalError{Message: fmt.Sprintf("P10 %v s from gonum's empirical quantile disagrees with sample %d of %d (%v s)", res.p10, quantileIndex(0.1, runs), runs, res.samples[quantileIndex(0.1, runs)])}
	}
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
