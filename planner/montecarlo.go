package planner

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"runtime"
	"sort"

	"gonum.org/v1/gonum/stat"
	"gonum.org/v1/gonum/stat/distuv"
)

// DefaultMonteCarloRuns is the number of Monte Carlo samples of the
// session when Options.MonteCarloRuns is 0.
const DefaultMonteCarloRuns = 2000

// exactDwellSamples is the number of dwells up to which each run draws
// every dwell's completion time; beyond it the sum of the (independent,
// identically distributed) capped completion times is drawn from its
// normal approximation (central limit theorem).
const exactDwellSamples = 256

// quantileIndex is the 0-based index of the empirical p-quantile of n
// sorted samples: the smallest value whose empirical CDF reaches p, as
// gonum's stat.Quantile with stat.Empirical picks it.
func quantileIndex(p float64, n int) int {
	return min(max(int(math.Ceil(p*float64(n)))-1, 0), n-1)
}

// The Monte Carlo samples the fixed, printed plan: the segmentation, the
// registrations and the order stay as printed, and each sample draws what
// the operator cannot know in advance: the drift rate (log-normal with
// the profile's mean and spread), the creep fraction (log-normal), every
// registration's error (normal, σ of its kind: integrated exactly given
// the sample's rate and creep, which has the same mean as drawing it and
// less noise), the dwell times (exponential, capped), the tip changes
// (Poisson in the writing time) and the missed sites the verification
// finds (Poisson with the exposure model's expectation), each repaired.

// mcDraws are the samples of the inputs that move the tip.
type mcDraws struct {
	rate  []float64 // drift rate over the profile's mean (1 without drift)
	creep []float64 // creep fraction
}

// drawMotion draws runs drift rates and creep fractions from separate
// streams of seed.
func drawMotion(prof *Profile, runs int, seed int64) mcDraws {
	d := mcDraws{rate: make([]float64, runs), creep: make([]float64, runs)}
	r0, sd := prof.Drift.RateNMPerMin, prof.Drift.RateSDNMPerMin
	fillLogNormal(d.rate, r0, sd, rand.NewPCG(uint64(seed), 0x6472696674))
	if r0 > 0 {
		for i := range d.rate {
			d.rate[i] /= r0
		}
	}
	c := prof.Registration.Creep
	fillLogNormal(d.creep, c.Fraction, c.FractionSD, rand.NewPCG(uint64(seed), 0x6372656570))
	return d
}

// fillLogNormal fills xs with draws from the log-normal distribution of
// mean m and standard deviation sd (gonum distuv): drift rates and creep
// are positive and their spread multiplicative. Without spread every
// draw is m.
func fillLogNormal(xs []float64, m, sd float64, src rand.Source) {
	if m > 0 && sd > 0 {
		mu, sigma := logNormalParams(m, sd)
		ln := distuv.LogNormal{Mu: mu, Sigma: sigma, Src: src}
		for i := range xs {
			xs[i] = ln.Rand()
		}
		return
	}
	for i := range xs {
		xs[i] = m
	}
}

// logNormalParams returns μ and σ of the log-normal distribution with
// mean m and standard deviation sd: σ² = ln(1 + (sd/m)²). When (sd/m)²
// overflows (a mean of 1e-300 with a spread of 0.01, which the profile's
// ranges allow) it is 2·ln(sd/m) + ln(1 + (m/sd)²), finite, so that the
// draws are tiny numbers and never NaN.
func logNormalParams(m, sd float64) (mu, sigma float64) {
	s2 := math.Log1p(sd * sd / (m * m))
	if math.IsInf(s2, 0) {
		lr := math.Log(sd) - math.Log(m)
		s2 = 2*lr + math.Log1p(math.Exp(-2*lr))
	}
	return math.Log(m) - s2/2, math.Sqrt(s2)
}

// logNormalQuantile returns the p-quantile of the log-normal
// distribution of mean m and standard deviation sd (m without spread).
func logNormalQuantile(p, m, sd float64) float64 {
	if m <= 0 || sd <= 0 {
		return m
	}
	mu, sigma := logNormalParams(m, sd)
	return distuv.LogNormal{Mu: mu, Sigma: sigma}.Quantile(p)
}

// strokeLoad is what moves one stroke at unit creep fraction and at the
// profile's mean drift rate, from its segment's registration to its end,
// and its tolerance.
type strokeLoad struct {
	tol, creep, drift float64
}

// segLoad is one segment for the tolerance sampling: its registration's
// σ and the strokes that can bind (those no other stroke dominates: one
// with a tolerance no larger and at least as much creep and drift binds
// first in every sample).
type segLoad struct {
	sigma float64
	loads []strokeLoad
}

// paretoLoads keeps the loads no other dominates.
func paretoLoads(ls []strokeLoad) []strokeLoad {
	sort.Slice(ls, func(i, j int) bool {
		if ls[i].tol != ls[j].tol {
			return ls[i].tol < ls[j].tol
		}
		if ls[i].creep != ls[j].creep {
			return ls[i].creep > ls[j].creep
		}
		return ls[i].drift > ls[j].drift
	})
	var kept []strokeLoad
	for _, l := range ls {
		dominated := false
		for _, k := range kept {
			if k.creep >= l.creep && k.drift >= l.drift {
				dominated = true
				break
			}
		}
		if !dominated {
			kept = append(kept, l)
		}
	}
	return kept
}

// pairLoad is one coupled pair: its relative tolerance, the creep and
// drift over its drift window, and the σ of a registration that stands
// between its sides (0 when both lie in one drift window).
type pairLoad struct {
	tol, creep, drift, sigma float64
}

// within returns the probability that the segment's strokes all stay
// within tolerance in draw i: its registration error fits the least
// room any of them leaves (tol − creep − drift at the draw's creep and
// drift rate).
func (sl segLoad) within(d mcDraws, i int) float64 {
	r, c := d.rate[i], d.creep[i]
	room := math.Inf(1)
	for _, l := range sl.loads {
		room = min(room, l.tol-c*l.creep-r*l.drift)
	}
	return withinProb(room, sl.sigma)
}

// within returns the probability that the coupled pair stays within
// its tolerance in draw i.
func (pl pairLoad) within(d mcDraws, i int) float64 {
	return withinProb(pl.tol-d.creep[i]*pl.creep-d.rate[i]*pl.drift, pl.sigma)
}

// withinProb returns P(|e| ≤ room) for e ~ N(0, σ²): erf(room/(σ√2)),
// the indicator of room ≥ 0 when σ = 0.
func withinProb(room, sigma float64) float64 {
	if room < 0 {
		return 0
	}
	if sigma <= 0 {
		return 1
	}
	return fastErf(room / (sigma * math.Sqrt2))
}

// erfTable holds erf on [0, erfTableMax] at steps of 1/erfTableStep, for
// fastErf: the tolerance sampling evaluates it for every segment of
// every sample (10^7 times for a large plan).
const (
	erfTableStep = 1024
	erfTableMax  = 6 // erf(6) = 1 − 2·10⁻¹⁷
)

var erfTable = func() []float64 {
	t := make([]float64, erfTableMax*erfTableStep+2)
	for i := range t {
		t[i] = math.Erf(float64(i) / erfTableStep)
	}
	return t
}()

// fastErf returns erf(x) for x ≥ 0 by linear interpolation in erfTable:
// within 1.2·10⁻⁷ of math.Erf (h²/8 · max|erf”| with h = 1/1024;
// TestFastErf checks it), 1 beyond 6.
func fastErf(x float64) float64 {
	if x >= erfTableMax {
		return 1
	}
	f := x * erfTableStep
	i := int(f)
	return erfTable[i] + (f-float64(i))*(erfTable[i+1]-erfTable[i])
}

// tolResult holds the sampled probabilities of staying within tolerance.
type tolResult struct {
	all   float64   // every segment and pair
	some  float64   // every pair and every segment not left out (see pInTolerance)
	segs  []float64 // each segment's strokes
	pairs []float64
}

// pInTolerance estimates the probabilities of staying within tolerance
// over the draws: per sample, a segment's strokes all stay within
// theirs when its registration error fits the least room any leaves,
// min over strokes of tol − creep − drift, which for a normal error has
// probability erf(room/(σ√2)).
// Segments whose leave[s] is true are left out of res.some.
func pInTolerance(ctx context.Context, segs []segLoad, pairs []pairLoad, d mcDraws, leave []bool) (tolResult, error) {
	res := tolResult{segs: make([]float64, len(segs)), pairs: make([]float64, len(pairs))}
	n := len(d.rate)
	if n == 0 {
		return res, nil
	}
	// Segment by segment over all samples, each sample's products kept
	// in all and some: the same products in the same order as sample by
	// sample, but one segment's loads and σ stay at hand and its rooms,
	// alike from sample to sample, read nearby entries of erfTable
	// (sample by sample the lookups jumped across the whole table).
	all, some := make([]float64, n), make([]float64, n)
	for i := range n {
		all[i], some[i] = 1, 1
	}
	if workers := min(runtime.GOMAXPROCS(0), len(segs)+len(pairs)); workers > 1 && (len(segs)+len(pairs))*n >= tolParallelMin {
		if err := pInToleranceOnCores(ctx, segs, pairs, d, leave, workers, &res, all, some); err != nil {
			return res, err
		}
		return res.mean(all, some, n), nil
	}
	for s := range segs {
		if s%64 == 0 {
			if err := ctx.Err(); err != nil {
				return res, err
			}
		}
		sl := segs[s]
		keep := s >= len(leave) || !leave[s]
		sum := 0.0
		for i := range n {
			p := sl.within(d, i)
			sum += p
			all[i] *= p
			if keep {
				some[i] *= p
			}
		}
		res.segs[s] = sum
	}
	for k, pl := range pairs {
		if err := ctx.Err(); err != nil {
			return res, err
		}
		sum := 0.0
		for i := range n {
			p := pl.within(d, i)
			sum += p
			all[i] *= p
			some[i] *= p
		}
		res.pairs[k] = sum
	}
	return res.mean(all, some, n), nil
}

// mean completes res from each sample's products all and some and the
// sums over the n samples in res.segs and res.pairs.
func (res tolResult) mean(all, some []float64, n int) tolResult {
	for i := range n {
		res.all += all[i]
		res.some += some[i]
	}
	res.all /= float64(n)
	res.some /= float64(n)
	for s := range res.segs {
		res.segs[s] /= float64(n)
	}
	for k := range res.pairs {
		res.pairs[k] /= float64(n)
	}
	return res
}

// tolParallelMin is the fewest segment-samples (segments and pairs times
// draws) pInTolerance spreads over the cores: a large plan's margin
// search has 10^7 of them (30,000 segments x 500 draws at 10^6
// windows); the demo's a few thousand, where starting workers would cost
// more than it saves. A variable so that a test can lower it.
var tolParallelMin = 1 << 20

// tolBlockValues is the most probabilities pInToleranceOnCores holds at
// once (2 MB): a block of segments' rows over every sample.
const tolBlockValues = 1 << 18

// pInToleranceOnCores is pInTolerance's loop on workers cores, with the
// same result bit for bit: a block of segments (then of pairs) at a
// time, the workers first compute each row's probabilities over all
// samples and its sum (a row's sum in sample order, as the serial loop
// adds it), then multiply each sample's products by the block's rows in
// row order (each sample's product in the serial loop's order). It
// fills res.segs and res.pairs with the sums and all and some with the
// products.
func pInToleranceOnCores(ctx context.Context, segs []segLoad, pairs []pairLoad, d mcDraws, leave []bool, workers int,
	res *tolResult, all, some []float64) error {
	n := len(d.rate)
	rows := max(1, tolBlockValues/n)
	p := make([]float64, rows*n)
	// keep[r] says whether row r of the block counts in some.
	keep := make([]bool, rows)
	sampleBlocks := (n + tolSampleBlock - 1) / tolSampleBlock
	multiply := func(m int) error {
		return onWorkers(ctx, sampleBlocks, min(workers, sampleBlocks), func() func(int) {
			return func(b int) {
				lo, hi := b*tolSampleBlock, min(n, (b+1)*tolSampleBlock)
				for r := range m {
					row := p[r*n : (r+1)*n]
					for i := lo; i < hi; i++ {
						all[i] *= row[i]
						if keep[r] {
							some[i] *= row[i]
						}
					}
				}
			}
		})
	}
	// rowsOnCores fills res's sums of count rows (segments or pairs), a
	// block of rows at a time: row(idx, out) writes row idx's
	// probabilities over the samples and says whether it counts in some.
	rowsOnCores := func(count int, sums []float64, row func(idx int, out []float64) bool) error {
		for r0 := 0; r0 < count; r0 += rows {
			m := min(rows, count-r0)
			err := onWorkers(ctx, m, min(workers, m), func() func(int) {
				return func(j int) {
					out := p[j*n : (j+1)*n]
					keep[j] = row(r0+j, out)
					sum := 0.0
					for _, v := range out {
						sum += v
					}
					sums[r0+j] = sum
				}
			})
			if err == nil {
				err = multiply(m)
			}
			if err != nil {
				return err
			}
		}
		return nil
	}
	err := rowsOnCores(len(segs), res.segs, func(s int, out []float64) bool {
		sl := segs[s]
		for i := range out {
			out[i] = sl.within(d, i)
		}
		return s >= len(leave) || !leave[s]
	})
	if err != nil {
		return err
	}
	return rowsOnCores(len(pairs), res.pairs, func(k int, out []float64) bool {
		pl := pairs[k]
		for i := range out {
			out[i] = pl.within(d, i)
		}
		return true
	})
}

// tolSampleBlock is the number of samples a worker multiplies at a time.
const tolSampleBlock = 256

// timeModel is what the session's time depends on beyond the fixed
// schedule: the random parts and their expected values in the schedule.
type timeModel struct {
	schedule  Breakdown // the printed schedule's times by kind
	writeS    float64   // writing time (AP, FE, dwells): tip failures come with it
	tipChange struct {
		enabled bool
		meanS   float64 // mean writing time between failures
		costS   float64 // conditioning and a coarse registration
	}
	repairs []repairModel
	dwells  int // dwell strokes, each at its mean in the schedule
}

// repairModel is one feature's repair: the expected number of missed
// sites (in the schedule at its expectation) and the time per site.
type repairModel struct {
	missed, perSiteS float64
}

// mcTimes holds the sampled session times.
type mcTimes struct {
	samples       []float64 // sorted
	mean          float64
	p10, p50, p90 float64
	breakdown     Breakdown // the schedule's plus the mean of each random part
}

// sampleTimes samples the session's time on the fixed plan: the
// schedule, plus in each run the tip changes (Poisson with mean writing
// time / mean time between failures, each costing a conditioning and a
// registration), the repairs (each feature's missed sites Poisson with
// the exposure model's expectation, less the expectation the schedule
// holds) and the dwells (exponential with rate Y·I/e capped at the
// completion time, less the mean the schedule holds). The breakdown is
// the schedule's plus each random part's sample mean, so it sums to the
// mean of the samples.
func sampleTimes(ctx context.Context, tm timeModel, prof *Profile, runs int, seed int64) (mcTimes, error) {
	var res mcTimes
	if runs <= 0 {
		runs = DefaultMonteCarloRuns
	}
	base := tm.schedule.Total()
	tips := make([]float64, runs)
	repair := make([]float64, runs)
	dwell := make([]float64, runs)
	if tm.tipChange.enabled && tm.writeS > 0 && tm.tipChange.meanS > 0 {
		lambda := tm.writeS / tm.tipChange.meanS
		pois := distuv.Poisson{Lambda: lambda, Src: rand.NewPCG(uint64(seed), 0x7469707321)}
		for i := range tips {
			tips[i] = pois.Rand() * tm.tipChange.costS
		}
	}
	if len(tm.repairs) > 0 {
		src := rand.NewPCG(uint64(seed), 0x726570616972)
		for _, rp := range tm.repairs {
			if rp.missed <= 0 {
				continue
			}
			pois := distuv.Poisson{Lambda: rp.missed, Src: src}
			for i := range repair {
				repair[i] += (pois.Rand() - rp.missed) * rp.perSiteS
			}
		}
	}
	if tm.dwells > 0 {
		k, capS := prof.DwellRate(), prof.DwellCapS()
		mean := prof.DwellExpectedS()
		src := rand.NewPCG(uint64(seed), 0x6477656c6c)
		if tm.dwells <= exactDwellSamples {
			// Exponential with rate k, as distuv.Exponential draws it
			// (ExpFloat64/k), from one generator rather than one per draw.
			rng := rand.New(src)
			for i := range dwell {
				for range tm.dwells {
					dwell[i] += math.Min(rng.ExpFloat64()/k, capS) - mean
				}
			}
		} else {
			// E[min(T,c)²] = 2/k²·(1 - e^{-kc}(1+kc)) for T ~ Exp(k).
			m2 := 2 / (k * k) * (1 - math.Exp(-k*capS)*(1+k*capS))
			v := math.Max(m2-mean*mean, 0)
			norm := distuv.Normal{Mu: 0, Sigma: math.Sqrt(v * float64(tm.dwells)), Src: src}
			for i := range dwell {
				dwell[i] = norm.Rand()
			}
		}
	}
	if err := ctx.Err(); err != nil {
		return res, err
	}
	totals := make([]float64, runs)
	for i := range totals {
		totals[i] = base + tips[i] + repair[i] + dwell[i]
		if !finite(totals[i]) {
			return res, fmt.Errorf("planner: the session time of a Monte Carlo sample is not a finite number of seconds (%v): the profile's times (session, process, drift.registration_s, settle_s, mode_switch_s) or rates are beyond any instrument", totals[i])
		}
	}
	res.breakdown = tm.schedule
	res.breakdown.TipChangeS += stat.Mean(tips, nil)
	res.breakdown.RepairS += stat.Mean(repair, nil)
	res.breakdown.DwellS += stat.Mean(dwell, nil)
	res.mean = stat.Mean(totals, nil)
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
