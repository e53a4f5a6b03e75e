package planner

import (
	"math"
	"testing"

	"gonum.org/v1/gonum/stat/distuv"
)

func TestElementaryCharge(t *testing.T) {
	// SI 2019 / CODATA 2018: e = 1.602176634e-19 C exactly.
	if ElementaryCharge != 1.602176634e-19 {
		t.Errorf("ElementaryCharge = %v", ElementaryCharge)
	}
}

func TestWritingSpeed(t *testing.T) {
	cases := []struct {
		name    string
		current float64 // A
		dose    float64 // C/cm
		want    float64 // nm/s
	}{
		// Schmucker et al., Nat. Commun. 3 (2012): 2 nA at 2 mC/cm → 10 nm/s.
		{"Schmucker 2012", 2e-9, 2e-3, 10},
		// By hand: 5 nA / 0.05 mC/cm = 1e-4 cm/s = 1000 nm/s.
		{"FE default", 5e-9, 5e-5, 1000},
		// By hand: 1 nA / 10 mC/cm = 1e-7 cm/s = 1 nm/s.
		{"slow AP", 1e-9, 1e-2, 1},
	}
	for _, c := range cases {
		if got := WritingSpeed(c.current, c.dose); math.Abs(got-c.want) > 1e-9*c.want {
			t.Errorf("%s: WritingSpeed(%g, %g) = %v, want %v", c.name, c.current, c.dose, got, c.want)
		}
	}
}

func TestWidthModel(t *testing.T) {
	m := WidthModel{SigmaNM: 0.5, ThresholdDoseCPerCm: 1e-3}
	// By hand: w = 2σ·sqrt(2 ln(λ/λ_thr)); at λ = e·λ_thr, w = 2σ·√2.
	if got, want := m.Width(math.E*1e-3), 2*0.5*math.Sqrt2; math.Abs(got-want) > 1e-12 {
		t.Errorf("Width(e·λthr) = %v, want %v", got, want)
	}
	for _, d := range []float64{0, 1e-3, 0.5e-3, math.NaN()} {
		if got := m.Width(d); got != 0 {
			t.Errorf("Width(%v) = %v, want 0 at or below threshold", d, got)
		}
	}
	// The exposure model agrees with the width model: an infinitely long
	// line clears exactly out to half the width.
	ratio := 4.0
	w := WidthModel{SigmaNM: 0.3, ThresholdDoseCPerCm: 1}.Width(ratio)
	if e := exposure(ratio, 0.3, 1e6, 5e5, w/2); math.Abs(e-1) > 1e-9 {
		t.Errorf("exposure at half width = %v, want 1", e)
	}
}

func TestDwellCompletionMatchesExponential(t *testing.T) {
	// The completion time is exponential with rate Y·I/e; compare with
	// gonum's distuv.Exponential CDF.
	d := DefaultProfile().Dwell
	exp := distuv.Exponential{Rate: d.YieldPerElectron * d.CurrentA / 1.602176634e-19}
	for _, tt := range []float64{0, 0.01, 0.1, 0.3, 1, 5} {
		if got, want := d.CompletionProbability(tt), exp.CDF(tt); math.Abs(got-want) > 1e-12 {
			t.Errorf("CompletionProbability(%v) = %v, want %v (distuv.Exponential)", tt, got, want)
		}
	}
	if got := exp.CDF(d.CapS()); math.Abs(got-d.Completion) > 1e-12 {
		t.Errorf("CDF(CapS) = %v, want %v", got, d.Completion)
	}
	// E[min(T, cap)] = ∫0^cap (1-F(t)) dt, integrated numerically.
	n, sum := 200000, 0.0
	h := d.CapS() / float64(n)
	for i := range n {
		sum += (1 - exp.CDF((float64(i)+0.5)*h)) * h
	}
	if got := d.ExpectedS(); math.Abs(got-sum) > 1e-6*sum {
		t.Errorf("ExpectedS = %v, want %v (numerical integral)", got, sum)
	}
}

func TestFEArealRate(t *testing.T) {
	// Rudolph et al. 2014: ≳10^4 nm²/s in FE mode; 1 µm² at 10^4 nm²/s
	// takes 100 s. A profile with speed 1000 nm/s and pitch 10 nm writes
	// 10^4 nm²/s.
	p := DefaultProfile().FE
	p.Overlap = 0
	if got := p.ArealRate(); math.Abs(got-1e4) > 1e-6 {
		t.Errorf("ArealRate = %v nm²/s, want 1e4", got)
	}
	if got := 1e6 / p.ArealRate(); math.Abs(got-100) > 1e-9 {
		t.Errorf("1 µm² fill = %v s, want 100", got)
	}
}
