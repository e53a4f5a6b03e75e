package planner

import (
	"fmt"
	"math"
	"math/rand/v2"
	"sort"

	"gonum.org/v1/gonum/stat/distuv"

	"dimerpath/internal/selection"
)

// PoissonBinomial returns the distribution of the number of successes
// among independent trials with success probabilities p: dist[k] is the
// probability of exactly k successes, for k = 0..len(p). Trials of equal
// probability are taken together through the binomial formula, and the
// groups are combined by direct convolution; the only terms dropped are
// those that underflow float64 to zero in the tails. Probabilities that
// differ by at most 10⁻¹² are taken as one, at their mean (windows alike
// but for rounding), which moves the distribution by at most n·10⁻¹²; it
// is otherwise exact in floating point. lo is the first k whose entry
// may be non-zero; entries below lo and above the last non-zero one are
// 0.
//
// Cost: O(G·W²) for G distinct probabilities and a support of width W
// (W ≈ 80·sqrt(n·p(1-p)) before underflow), so 10^5 windows of two
// templates take milliseconds. It panics if a probability lies outside
// [0, 1]; callers validate first.
func PoissonBinomial(p []float64) (dist []float64, lo int) {
	const groupTolerance = 1e-12
	n := len(p)
	dist = make([]float64, n+1)
	groups := map[float64]int{}
	for _, q := range p {
		if !(q >= 0 && q <= 1) {
			panic(fmt.Sprintf("planner: probability %v outside [0, 1]", q))
		}
		groups[q]++
	}
	sorted := make([]float64, 0, len(groups))
	for q := range groups {
		sorted = append(sorted, q)
	}
	sort.Float64s(sorted) // a fixed order makes the result reproducible to the bit
	// Probabilities within groupTolerance of a group's smallest join it,
	// at the group's mean: windows alike but for rounding (the exposure
	// model sums the same strokes at other coordinates) form one binomial.
	var keys []float64
	counts := map[float64]int{}
	for i := 0; i < len(sorted); {
		j, sum, m := i, 0.0, 0
		for ; j < len(sorted) && sorted[j]-sorted[i] <= groupTolerance; j++ {
			sum += sorted[j] * float64(groups[sorted[j]])
			m += groups[sorted[j]]
		}
		q := min(max(sum/float64(m), sorted[i]), sorted[j-1])
		keys = append(keys, q)
		counts[q] += m
		i = j
	}
	groups = counts

	// cur holds P(k) for k = off..off+len(cur)-1.
	cur, off := []float64{1}, 0
	for _, q := range keys {
		m := groups[q]
		b, boff := binomialPMF(m, q)
		next := make([]float64, len(cur)+len(b)-1)
		for i, x := range cur {
			if x == 0 {
				continue
			}
			for j, y := range b {
				next[i+j] += x * y
			}
		}
		cur, off = trimZeros(next, off+boff)
	}
	copy(dist[off:], cur)
	return dist, off
}

// binomialPMF returns the non-underflowing part of the Binomial(m, q)
// probability mass function, P(k) for k = off..off+len-1. It walks out
// from the mode by the exact ratio P(k+1)/P(k) = (m-k)/(k+1)·q/(1-q) and
// normalises the sum to 1, so the relative error stays near len·ε; the
// mode's absolute size (from log-gamma) only decides where the tails
// underflow.
func binomialPMF(m int, q float64) (pmf []float64, off int) {
	switch q {
	case 0:
		return []float64{1}, 0
	case 1:
		return []float64{1}, m
	}
	mode := min(max(int(math.Floor(float64(m+1)*q)), 0), m)
	lgm, _ := math.Lgamma(float64(m) + 1)
	a, _ := math.Lgamma(float64(mode) + 1)
	b, _ := math.Lgamma(float64(m-mode) + 1)
	pMode := math.Exp(lgm - a - b + float64(mode)*math.Log(q) + float64(m-mode)*math.Log1p(-q))
	odds := q / (1 - q)
	var up, down []float64 // relative to P(mode) = 1
	for k, v := mode, 1.0; k < m; k++ {
		v *= float64(m-k) / float64(k+1) * odds
		if v*pMode == 0 {
			break
		}
		up = append(up, v)
	}
	for k, v := mode, 1.0; k > 0; k-- {
		v *= float64(k) / float64(m-k+1) / odds
		if v*pMode == 0 {
			break
		}
		down = append(down, v)
	}
	pmf = make([]float64, 0, len(down)+1+len(up))
	for i := len(down) - 1; i >= 0; i-- {
		pmf = append(pmf, down[i])
	}
	pmf = append(pmf, 1)
	pmf = append(pmf, up...)
	sum := 0.0
	for _, v := range pmf {
		sum += v
	}
	for i := range pmf {
		pmf[i] /= sum
	}
	return pmf, mode - len(down)
}

func trimZeros(x []float64, off int) ([]float64, int) {
	i, j := 0, len(x)
	for i < j && x[i] == 0 {
		i++
	}
	for j > i && x[j-1] == 0 {
		j--
	}
	if i == j {
		return []float64{0}, off
	}
	return x[i:j], off + i
}

// AllProbability returns the probability that every trial succeeds,
// Π p, and its base-10 logarithm, which stays finite after the product
// underflows (10^5 windows at 0.97 give 10^-1323).
func AllProbability(p []float64) (all, log10All float64) {
	ls := 0.0
	for _, q := range p {
		ls += math.Log10(q)
	}
	return math.Pow(10, ls), ls
}

// YieldSamples is the number of draws of the templates' P1 behind the
// intervals of P(all good).
const YieldSamples = 20000

// YieldOf summarises the windows' outcome: P(every window good), exact,
// with its 68 % and 95 % intervals from the templates' uncertainties
// (each template's P1 drawn from a beta distribution with its mean and
// standard deviation, one draw per template shared by its windows, since
// the uncertainty is in the template's rate; YieldSamples draws from
// seed), the expected numbers of windows left empty, with two or more
// donors and not opened as drawn, the Poisson-binomial distribution of the
// number of good windows with its mean and standard deviation, and the
// expected number of devices to write for one perfect device (1/P(all),
// geometric; 0 when P(all) underflows or is 0).
func YieldOf(windows []Window, seed int64) Yield {
	p := make([]float64, len(windows))
	for i, w := range windows {
		p[i] = w.Probability
	}
	y := Yield{Windows: len(p)}
	y.Distribution, y.DistributionFrom = PoissonBinomial(p)
	// Drop the upper tail that underflowed, keeping Distribution[k]
	// indexed by k.
	last := len(y.Distribution) - 1
	for last > 0 && y.Distribution[last] == 0 {
		last--
	}
	y.Distribution = y.Distribution[:last+1]
	y.All, y.Log10All = AllProbability(p)
	varSum := 0.0
	for i, q := range p {
		y.MeanGood += q
		varSum += q * (1 - q)
		w := windows[i]
		y.ExpectedEmpty += w.OpenProbability * w.P0
		y.ExpectedMultiple += w.OpenProbability * w.P2Plus
		y.ExpectedMisopened += 1 - w.OpenProbability
	}
	y.SDGood = math.Sqrt(varSum)
	switch {
	case len(p) == 0:
		y.DevicesPerPerfect = 1
	case y.All > 0:
		y.DevicesPerPerfect = 1 / y.All
	}
	y.Log10All68, y.Log10All95 = allIntervals(windows, y.Log10All, seed)
	for i := range 2 {
		y.All68[i], y.All95[i] = math.Pow(10, y.Log10All68[i]), math.Pow(10, y.Log10All95[i])
	}
	return y
}

// allIntervals returns the 68 % and 95 % intervals of log10 P(all good)
// from the templates' uncertainties (see YieldOf); both are the point
// value when no template is uncertain.
func allIntervals(windows []Window, log10All float64, seed int64) (i68, i95 [2]float64) {
	point := [2]float64{log10All, log10All}
	// Windows that share a template share its P1: the sum of log10 P1 is
	// count·log10 P1 per template, the open probabilities a constant.
	type group struct {
		n        int
		mean, sd float64
	}
	type key struct {
		template string
		mean, sd float64
	}
	groups := map[key]*group{}
	var keys []key
	fixed := 0.0
	for _, w := range windows {
		if w.P1SD == 0 || w.P1 <= 0 || w.P1 >= 1 {
			fixed += math.Log10(w.Probability)
			continue
		}
		// Probability = OpenProbability·P1: P1 is drawn, the rest fixed.
		fixed += math.Log10(w.Probability / w.P1)
		k := key{w.Template, w.P1, w.P1SD}
		g, ok := groups[k]
		if !ok {
			g = &group{mean: w.P1, sd: w.P1SD}
			groups[k] = g
			keys = append(keys, k)
		}
		g.n++
	}
	if len(keys) == 0 || math.IsInf(log10All, -1) || math.IsNaN(log10All) {
		return point, point
	}
	src := rand.NewPCG(uint64(seed), 0x7969656c64)
	betas := make([]distuv.Beta, len(keys))
	for i, k := range keys {
		g := groups[k]
		// A beta of mean m and variance s²: α + β = m(1−m)/s² − 1.
		nu := g.mean*(1-g.mean)/(g.sd*g.sd) - 1
		betas[i] = distuv.Beta{Alpha: g.mean * nu, Beta: (1 - g.mean) * nu, Src: src}
	}
	counts := make([]float64, len(keys))
	for i, k := range keys {
		counts[i] = float64(groups[k].n)
	}
	samples := make([]float64, YieldSamples)
	for s := range samples {
		v := fixed
		for i := range betas {
			v += counts[i] * math.Log10(betas[i].Rand())
		}
		samples[s] = v
	}
	q := empiricalQuantiles(samples, [4]float64{0.025, 0.16, 0.84, 0.975})
	return [2]float64{q[1], q[2]}, [2]float64{q[0], q[3]}
}

// empiricalQuantiles returns the quantiles ps (ascending) of x as
// gonum's stat.Quantile gives them with stat.Empirical on x sorted (the
// first sorted value whose rank i+1 reaches p·len(x); NaN if x holds a
// NaN), by selection rather than a full sort. x is reordered.
func empiricalQuantiles(x []float64, ps [4]float64) (q [4]float64) {
	for _, v := range x {
		if math.IsNaN(v) {
			return [4]float64{math.NaN(), math.NaN(), math.NaN(), math.NaN()}
		}
	}
	var idx [4]int
	for i, p := range ps {
		idx[i] = quantileIndex(p, len(x))
	}
	// Each selection narrows the next one's range: x[:k] holds the
	// values below x[k], x[k+1:] those above.
	lo := 0
	for i, k := range idx {
		if k >= lo {
			selection.Kth(x[lo:], k-lo)
			lo = k + 1
		}
		q[i] = x[k]
	}
	return q
}
