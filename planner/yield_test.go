package planner

import (
	"fmt"
	"math"
	"math/rand/v2"
	"slices"
	"sort"
	"testing"

	"gonum.org/v1/gonum/stat"
	"gonum.org/v1/gonum/stat/distuv"

	"dimerpath/lattice"
)

func TestYieldIdenticalWindowsMatchesBinomial(t *testing.T) {
	// Binomial formula: 16 windows at p give P(all) = p^16; check values
	// from the issue: 0.97 → 0.614 (As, Stock et al. 2024), 0.63 →
	// 6.2e-4 (P, Ivie et al. 2021).
	cases := []struct {
		p, want, tol float64
	}{
		{0.97, 0.614, 0.0005},
		{0.63, 6.2e-4, 0.05e-4},
	}
	for _, c := range cases {
		ws := make([]Window, 16)
		for i := range ws {
			ws[i] = Window{OpenProbability: 1, P1: c.p, P0: 1 - c.p, Probability: c.p}
		}
		y := YieldOf(ws, 1)
		if math.Abs(y.All-c.want) > c.tol {
			t.Errorf("16 windows at %v: All = %v, want %v", c.p, y.All, c.want)
		}
		// The whole distribution against C(16,k) p^k (1-p)^(16-k).
		for k := 0; k <= 16; k++ {
			want := binom(16, k) * math.Pow(c.p, float64(k)) * math.Pow(1-c.p, float64(16-k))
			got := 0.0
			if k < len(y.Distribution) {
				got = y.Distribution[k]
			}
			if math.Abs(got-want) > 1e-14+1e-12*want {
				t.Errorf("p=%v: P(%d good) = %v, want %v", c.p, k, got, want)
			}
		}
		if math.Abs(y.MeanGood-16*c.p) > 1e-12 || math.Abs(y.DevicesPerPerfect-1/y.All) > 1e-9 {
			t.Errorf("p=%v: mean %v (want %v), devices %v", c.p, y.MeanGood, 16*c.p, y.DevicesPerPerfect)
		}
	}
}

func binom(n, k int) float64 {
	r := 1.0
	for i := 1; i <= k; i++ {
		r = r * float64(n-k+i) / float64(i)
	}
	return r
}

func TestPoissonBinomialBruteForce(t *testing.T) {
	// Brute force: sum the probability of every one of the 2^n outcomes.
	rng := rand.New(rand.NewPCG(1, 2))
	for n := 0; n <= 12; n++ {
		p := make([]float64, n)
		for i := range p {
			switch rng.IntN(4) {
			case 0:
				p[i] = 0.63
			case 1:
				p[i] = 0.97
			default:
				p[i] = rng.Float64()
			}
		}
		want := make([]float64, n+1)
		for mask := 0; mask < 1<<n; mask++ {
			pr, k := 1.0, 0
			for i := range n {
				if mask&(1<<i) != 0 {
					pr *= p[i]
					k++
				} else {
					pr *= 1 - p[i]
				}
			}
			want[k] += pr
		}
		got, _ := PoissonBinomial(p)
		for k := range want {
			if math.Abs(got[k]-want[k]) > 1e-14 {
				t.Errorf("n=%d: P(%d) = %v, brute force %v", n, k, got[k], want[k])
			}
		}
	}
}

func TestPoissonBinomialLarge(t *testing.T) {
	// 10^5 windows of two templates: the distribution sums to 1, its
	// mean and variance match Σp and Σp(1-p), and only underflowing
	// tails are cut.
	p := make([]float64, 100000)
	for i := range p {
		p[i] = 0.63
		if i%3 == 0 {
			p[i] = 0.97
		}
	}
	dist, lo := PoissonBinomial(p)
	sum, mean, m2 := 0.0, 0.0, 0.0
	for k, v := range dist {
		sum += v
		mean += float64(k) * v
		m2 += float64(k) * float64(k) * v
	}
	wantMean, wantVar := 0.0, 0.0
	for _, q := range p {
		wantMean += q
		wantVar += q * (1 - q)
	}
	if math.Abs(sum-1) > 1e-9 || math.Abs(mean-wantMean) > 1e-6*wantMean || math.Abs(m2-mean*mean-wantVar) > 1e-5*wantVar {
		t.Errorf("sum %v mean %v (want %v) var %v (want %v)", sum, mean, wantMean, m2-mean*mean, wantVar)
	}
	if lo == 0 || dist[lo] == 0 || dist[lo-1] != 0 {
		t.Errorf("lower cut at %d: dist[lo]=%v", lo, dist[lo])
	}
	y := YieldOf(func() []Window {
		ws := make([]Window, len(p))
		for i := range ws {
			ws[i] = Window{OpenProbability: 1, P1: p[i], Probability: p[i]}
		}
		return ws
	}(), 1)
	// P(all) underflows; its logarithm does not.
	wantLog := 0.0
	for _, q := range p {
		wantLog += math.Log10(q)
	}
	if y.All != 0 || y.DevicesPerPerfect != 0 || math.Abs(y.Log10All-wantLog) > 1e-6*math.Abs(wantLog) {
		t.Errorf("All %v, DevicesPerPerfect %v, Log10All %v (want %v)", y.All, y.DevicesPerPerfect, y.Log10All, wantLog)
	}
}

func TestYieldNoWindows(t *testing.T) {
	y := YieldOf(nil, 1)
	if y.All != 1 || y.DevicesPerPerfect != 1 || len(y.Distribution) != 1 || y.Distribution[0] != 1 {
		t.Errorf("YieldOf(nil) = %+v", y)
	}
}

func ExamplePoissonBinomial() {
	// Two arsine windows (0.97) and one phosphine window (0.63).
	dist, _ := PoissonBinomial([]float64{0.97, 0.97, 0.63})
	for k, p := range dist {
		fmt.Printf("P(%d good) = %.4f\n", k, p)
	}
	// Output:
	// P(0 good) = 0.0003
	// P(1 good) = 0.0221
	// P(2 good) = 0.3848
	// P(3 good) = 0.5928
}

func ExampleYieldOf() {
	ws := make([]Window, 16)
	for i := range ws {
		t := lattice.ArsineWindow
		ws[i] = Window{Species: "As", OpenProbability: 1, P0: t.P0, P1: t.P1, P2Plus: t.P2Plus, P1SD: t.P1SD, Probability: t.P1}
	}
	y := YieldOf(ws, 1)
	fmt.Printf("P(all 16 good) = %.3f (68%%: %.2f–%.2f), mean good %.2f, expected empty %.2f\n", y.All, y.All68[0], y.All68[1], y.MeanGood, y.ExpectedEmpty)
	// Output:
	// P(all 16 good) = 0.614 (68%: 0.45–0.83), mean good 15.52, expected empty 0.48
}

// TestYieldIntervalsMatchBeta checks the sampled intervals of P(all good)
// against the beta distribution's own quantiles (gonum distuv): with one
// template, P(all) = (open·P1)^n rises with P1, so its quantiles are those
// of P1 carried through.
func TestYieldIntervalsMatchBeta(t *testing.T) {
	cases := []struct {
		name string
		tmpl lattice.WindowTemplate
		n    int
		open float64
	}{
		// Ivie et al. 2021: P, one donor in 63 ± 10 %.
		{"two P windows", lattice.PhosphineWindow, 2, 0.98},
		// Stock et al. 2024: As, 97 ± 2 %.
		{"16 As windows", lattice.ArsineWindow, 16, 1},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			tm := c.tmpl
			ws := make([]Window, c.n)
			for i := range ws {
				ws[i] = Window{Template: tm.Name, OpenProbability: c.open, P0: tm.P0, P1: tm.P1, P2Plus: tm.P2Plus, P1SD: tm.P1SD, Probability: c.open * tm.P1}
			}
			y := YieldOf(ws, 7)
			nu := tm.P1*(1-tm.P1)/(tm.P1SD*tm.P1SD) - 1
			beta := distuv.Beta{Alpha: tm.P1 * nu, Beta: (1 - tm.P1) * nu}
			all := func(q float64) float64 { return math.Pow(c.open*beta.Quantile(q), float64(c.n)) }
			for _, iv := range []struct {
				got    [2]float64
				lo, hi float64
			}{{y.All68, 0.16, 0.84}, {y.All95, 0.025, 0.975}} {
				want := [2]float64{all(iv.lo), all(iv.hi)}
				for k := range 2 {
					// Sampling error of a quantile from 20 000 draws: well
					// under 2 % here.
					if math.Abs(iv.got[k]-want[k]) > 0.02*want[k]+1e-4 {
						t.Errorf("interval %v, want %v (beta quantiles)", iv.got, want)
					}
				}
			}
			if !(y.All95[0] <= y.All68[0] && y.All68[0] <= y.All && y.All <= y.All68[1] && y.All68[1] <= y.All95[1]) {
				t.Errorf("intervals do not nest around the point value: 95 %v, 68 %v, point %v", y.All95, y.All68, y.All)
			}
			// Expected counts, by hand.
			if want := float64(c.n) * c.open * tm.P0; math.Abs(y.ExpectedEmpty-want) > 1e-12 {
				t.Errorf("expected empty %v, want %v", y.ExpectedEmpty, want)
			}
			if want := float64(c.n) * (1 - c.open); math.Abs(y.ExpectedMisopened-want) > 1e-12 {
				t.Errorf("expected misopened %v, want %v", y.ExpectedMisopened, want)
			}
		})
	}
	// No uncertainty: the intervals are the point value.
	y := YieldOf([]Window{{OpenProbability: 1, P1: 0.5, P0: 0.5, Probability: 0.5}}, 1)
	if y.All68 != [2]float64{0.5, 0.5} || y.All95 != [2]float64{0.5, 0.5} {
		t.Errorf("certain template: intervals %v, %v, want [0.5 0.5]", y.All68, y.All95)
	}
}

func TestYieldMultipleDonors(t *testing.T) {
	// A window that usually takes two or more donors (as Campbell et al.
	// 2022 find for 2 x 3 dimers, where at least one donor is nearly
	// certain): rarely good, counted as multiple.
	ws := []Window{{Template: "big", OpenProbability: 0.9, P0: 0.02, P1: 0.28, P2Plus: 0.7, Probability: 0.9 * 0.28}}
	y := YieldOf(ws, 1)
	if math.Abs(y.All-0.252) > 1e-12 || math.Abs(y.ExpectedMultiple-0.63) > 1e-12 || math.Abs(y.ExpectedEmpty-0.018) > 1e-12 {
		t.Errorf("all %v (want 0.252), multiple %v (want 0.63), empty %v (want 0.018)", y.All, y.ExpectedMultiple, y.ExpectedEmpty)
	}
}

// TestEmpiricalQuantilesMatchGonum checks empiricalQuantiles (selection)
// against gonum's stat.Quantile (stat.Empirical) on the sorted data, bit
// for bit: random data of 1 to 300 values, with repeats and infinities.
func TestEmpiricalQuantilesMatchGonum(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	ps := [4]float64{0.025, 0.16, 0.84, 0.975}
	for n := 1; n <= 300; n++ {
		x := make([]float64, n)
		for i := range x {
			switch rng.IntN(10) {
			case 0:
				x[i] = math.Inf(-1)
			case 1, 2:
				x[i] = float64(rng.IntN(3)) // repeats
			default:
				x[i] = rng.NormFloat64()
			}
		}
		sorted := slices.Clone(x)
		slices.Sort(sorted)
		got := empiricalQuantiles(x, ps)
		for i, p := range ps {
			if want := stat.Quantile(p, stat.Empirical, sorted, nil); got[i] != want {
				t.Fatalf("n %d, p %v: %v, gonum %v", n, p, got[i], want)
			}
		}
	}
	if q := empiricalQuantiles([]float64{1, math.NaN(), 2}, ps); !math.IsNaN(q[0]) || !math.IsNaN(q[3]) {
		t.Errorf("with a NaN: %v, want NaN as stat.Quantile gives", q)
	}
}

// TestAllIntervalsMatchSortedSamples checks allIntervals against the
// straightforward computation (every draw carried to log10 P(all), all
// sorted, gonum's stat.Quantile), bit for bit, for one template and for
// two, on several seeds.
func TestAllIntervalsMatchSortedSamples(t *testing.T) {
	p, as := lattice.PhosphineWindow, lattice.ArsineWindow
	win := func(tm lattice.WindowTemplate, open float64) Window {
		return Window{Template: tm.Name, OpenProbability: open, P0: tm.P0, P1: tm.P1, P2Plus: tm.P2Plus, P1SD: tm.P1SD, Probability: open * tm.P1}
	}
	for _, ws := range [][]Window{
		{win(p, 0.98), win(p, 0.98)},
		{win(p, 0.98), win(as, 1), win(as, 1), win(p, 0.98), win(as, 1)},
	} {
		for seed := int64(1); seed <= 3; seed++ {
			log10All := 0.0
			for _, w := range ws {
				log10All += math.Log10(w.Probability)
			}
			i68, i95 := allIntervals(ws, log10All, seed)
			// The straightforward way, as allIntervals did before.
			type key struct {
				template string
				mean, sd float64
			}
			count := map[key]int{}
			var keys []key
			fixed := 0.0
			for _, w := range ws {
				fixed += math.Log10(w.Probability / w.P1)
				k := key{w.Template, w.P1, w.P1SD}
				if count[k] == 0 {
					keys = append(keys, k)
				}
				count[k]++
			}
			src := rand.NewPCG(uint64(seed), 0x7969656c64)
			var betas []distuv.Beta
			for _, k := range keys {
				nu := k.mean*(1-k.mean)/(k.sd*k.sd) - 1
				betas = append(betas, distuv.Beta{Alpha: k.mean * nu, Beta: (1 - k.mean) * nu, Src: src})
			}
			samples := make([]float64, YieldSamples)
			for s := range samples {
				v := fixed
				for i, k := range keys {
					v += float64(count[k]) * math.Log10(betas[i].Rand())
				}
				samples[s] = v
			}
			sort.Float64s(samples)
			q := func(f float64) float64 { return stat.Quantile(f, stat.Empirical, samples, nil) }
			if want68, want95 := [2]float64{q(0.16), q(0.84)}, [2]float64{q(0.025), q(0.975)}; i68 != want68 || i95 != want95 {
				t.Errorf("%d windows, seed %d: %v %v, sorted samples give %v %v", len(ws), seed, i68, i95, want68, want95)
			}
		}
	}
}
