package planner

import (
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"strings"
	"testing"

	"gonum.org/v1/gonum/mat"

	"dimerpath/lattice/design"
)

// synthetic returns measurements written at doses from λ_thr·1.3 to
// λ_thr·20 whose widths follow the model exactly, plus Gaussian noise of
// standard deviation noise nm.
func synthetic(m WidthModel, n int, noise float64, seed uint64) []Measurement {
	rng := rand.New(rand.NewPCG(seed, 1))
	var ms []Measurement
	for i := range n {
		dose := m.ThresholdDoseCPerCm * 1.3 * math.Pow(20/1.3, float64(i)/float64(n-1))
		current := 2e-9
		ms = append(ms, Measurement{
			Line: i + 2, BiasV: 4, CurrentA: current,
			SpeedNMPerS: current / dose * 1e7,
			WidthNM:     m.Width(dose) + noise*rng.NormFloat64(),
		})
	}
	return ms
}

func TestFitWidthRecoversModel(t *testing.T) {
	for _, want := range []WidthModel{
		{SigmaNM: 0.3, ThresholdDoseCPerCm: 0.5e-3},
		{SigmaNM: 2.5, ThresholdDoseCPerCm: 7e-6},
		{SigmaNM: 0.8, ThresholdDoseCPerCm: 1.2e-3},
	} {
		fit, err := FitWidth(synthetic(want, 8, 0, 1))
		if err != nil {
			t.Fatalf("FitWidth(%+v points) = %v", want, err)
		}
		if math.Abs(fit.Model.SigmaNM-want.SigmaNM) > 1e-9*want.SigmaNM ||
			math.Abs(fit.Model.ThresholdDoseCPerCm-want.ThresholdDoseCPerCm) > 1e-9*want.ThresholdDoseCPerCm {
			t.Errorf("FitWidth recovers %+v, want %+v", fit.Model, want)
		}
		if fit.RSquared < 1-1e-12 || fit.RMSNM > 1e-9 {
			t.Errorf("exact points: R² = %v, RMS = %v nm, want 1 and 0", fit.RSquared, fit.RMSNM)
		}
	}
}

func TestFitWidthMatchesLeastSquares(t *testing.T) {
	// Independent check: the normal equations of w² = A + B·ln λ solved
	// with gonum/mat (QR), not stat.LinearRegression.
	ms := synthetic(WidthModel{SigmaNM: 0.5, ThresholdDoseCPerCm: 0.8e-3}, 12, 0.05, 7)
	fit, err := FitWidth(ms)
	if err != nil {
		t.Fatal(err)
	}
	X := mat.NewDense(len(ms), 2, nil)
	y := mat.NewVecDense(len(ms), nil)
	for i, m := range ms {
		X.Set(i, 0, 1)
		X.Set(i, 1, math.Log(m.DoseCPerCm()))
		y.SetVec(i, m.WidthNM*m.WidthNM)
	}
	var beta mat.VecDense
	if err := beta.SolveVec(X, y); err != nil {
		t.Fatal(err)
	}
	if math.Abs(beta.AtVec(0)-fit.A) > 1e-9*math.Abs(fit.A) || math.Abs(beta.AtVec(1)-fit.B) > 1e-9*fit.B {
		t.Errorf("FitWidth A, B = %v, %v; mat least squares %v, %v", fit.A, fit.B, beta.AtVec(0), beta.AtVec(1))
	}
	if fit.RSquared < 0.9 || len(fit.Residuals) != len(ms) {
		t.Errorf("noisy fit: R² = %v, %d residuals", fit.RSquared, len(fit.Residuals))
	}
	for _, r := range fit.Residuals {
		if math.Abs(r.ResidualNM-(r.WidthNM-r.FitNM)) > 1e-12 {
			t.Errorf("residual %+v is not measured - fitted", r)
		}
	}
}

func TestFitWidthRefuses(t *testing.T) {
	good := synthetic(WidthModel{SigmaNM: 0.3, ThresholdDoseCPerCm: 0.5e-3}, 5, 0, 1)
	sameDose := append([]Measurement(nil), good[:3]...)
	for i := range sameDose {
		sameDose[i].SpeedNMPerS = good[0].SpeedNMPerS
	}
	shrinking := append([]Measurement(nil), good...)
	for i := range shrinking {
		shrinking[i].WidthNM = 3 - float64(i)*0.2
	}
	cases := []struct {
		name string
		ms   []Measurement
		want error
	}{
		{"two points", good[:2], ErrTooFewPoints},
		{"zero widths are not points", append(good[:2:2], Measurement{Line: 9, BiasV: 4, CurrentA: 2e-9, SpeedNMPerS: 100}), ErrTooFewPoints},
		{"one dose", sameDose, ErrTooFewPoints},
		{"width falls with dose", shrinking, ErrNonPhysical},
	}
	for _, c := range cases {
		if _, err := FitWidth(c.ms); !errors.Is(err, c.want) {
			t.Errorf("%s: FitWidth = %v, want %v", c.name, err, c.want)
		}
	}
}

func TestCalibrateWritesModel(t *testing.T) {
	want := WidthModel{SigmaNM: 0.35, ThresholdDoseCPerCm: 0.6e-3}
	ms := synthetic(want, 6, 0, 3)
	p, fits, err := Calibrate(DefaultProfile(), ms, "", "lab.csv")
	if err != nil {
		t.Fatal(err)
	}
	if len(fits) != 1 || fits[0].Mode != design.ModeAP {
		t.Fatalf("fits = %+v, want one AP fit", fits)
	}
	if math.Abs(p.AP.Width.SigmaNM-want.SigmaNM) > 1e-9 || p.FE.Width != DefaultProfile().FE.Width {
		t.Errorf("calibrated AP width %+v (want %+v), FE %+v (want unchanged)", p.AP.Width, want, p.FE.Width)
	}
	// A threshold above the profile's dose makes a profile that clears
	// nothing: refused.
	high := synthetic(WidthModel{SigmaNM: 0.3, ThresholdDoseCPerCm: 5e-3}, 6, 0, 3)
	if _, _, err := Calibrate(DefaultProfile(), high, design.ModeAP, "lab.csv"); err == nil || !strings.Contains(err.Error(), "clear nothing") {
		t.Errorf("Calibrate(threshold 5 mC/cm) = %v, want refused", err)
	}
}

func TestReadMeasurements(t *testing.T) {
	const good = "# lab test lines, 2026-11-30\nbias_v,current_na,speed_nm_per_s,width_nm,mode\n4,2,10,1.0,ap\n\n4, 2, 20, 0.8, AP\n8,5,1000,10,fe\n"
	ms, err := ReadMeasurements(strings.NewReader(good), "lab.csv")
	if err != nil {
		t.Fatal(err)
	}
	if len(ms) != 3 || ms[0].CurrentA != 2e-9 || ms[2].Mode != design.ModeFE || ms[1].Line != 5 {
		t.Fatalf("ReadMeasurements = %+v", ms)
	}
	// Dose I/v: 2 nA / 10 nm/s = 2 mC/cm (Schmucker 2012 example).
	if d := ms[0].DoseCPerCm(); math.Abs(d-2e-3) > 1e-15 {
		t.Errorf("dose = %v C/cm, want 2e-3", d)
	}
	bad := []struct {
		name, csv, want string
	}{
		{"empty", "", "empty file"},
		{"no current", "bias_v,speed_nm_per_s,width_nm\n4,10,1\n", "name it current_a (amperes) or current_na"},
		{"both currents", "bias_v,current_a,current_na,speed_nm_per_s,width_nm\n", "both"},
		{"unknown column", "bias_v,current_a,speed,width_nm\n", `unknown column "speed"`},
		{"not a number", "bias_v,current_a,speed_nm_per_s,width_nm\n4,2e-9,ten,1\n", `lab.csv:2: speed_nm_per_s = "ten"`},
		{"NaN", "bias_v,current_a,speed_nm_per_s,width_nm\n4,2e-9,NaN,1\n", "not a finite number"},
		{"negative speed", "bias_v,current_a,speed_nm_per_s,width_nm\n4,2e-9,-10,1\n", "speed must be positive"},
		{"zero current", "bias_v,current_a,speed_nm_per_s,width_nm\n4,0,10,1\n", "current must be positive"},
		{"nA in an A column", "bias_v,current_a,speed_nm_per_s,width_nm\n4,2,10,1\n", "name it current_na"},
		{"negative width", "bias_v,current_a,speed_nm_per_s,width_nm\n4,2e-9,10,-1\n", "width must not be negative"},
		{"short record", "bias_v,current_a,speed_nm_per_s,width_nm\n4,2e-9,10\n", "lab.csv:2: 3 fields, want 4"},
		{"bad mode", "bias_v,current_a,speed_nm_per_s,width_nm,mode\n4,2e-9,10,1,stm\n", `mode = "stm"`},
		{"header only", "bias_v,current_a,speed_nm_per_s,width_nm\n", "no measurements"},
		{"bad quote", "bias_v,current_a,speed_nm_per_s,width_nm\n4,\"2e-9,10,1\n", "lab.csv:"},
	}
	for _, c := range bad {
		t.Run(c.name, func(t *testing.T) {
			_, err := ReadMeasurements(strings.NewReader(c.csv), "lab.csv")
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Errorf("ReadMeasurements = %v, want error containing %q", err, c.want)
			}
			if err != nil && !errors.Is(err, ErrBadMeasurement) {
				t.Errorf("error %v does not wrap ErrBadMeasurement", err)
			}
		})
	}
}

func FuzzReadMeasurements(f *testing.F) {
	f.Add("bias_v,current_na,speed_nm_per_s,width_nm\n4,2,10,1.0\n4,2,20,0.8\n4,2,40,0.5\n")
	f.Add("bias_v,current_a,speed_nm_per_s,width_nm,mode\n8,5e-9,1000,10,fe\n")
	f.Add("# c\n\ufeffbias_v,current_na,speed_nm_per_s,width_nm\n\"4\",2,1e300,0\n")
	f.Fuzz(func(t *testing.T, data string) {
		ms, err := ReadMeasurements(strings.NewReader(data), "fuzz.csv")
		if err != nil {
			return
		}
		for _, m := range ms {
			if !(m.CurrentA > 0 && m.SpeedNMPerS > 0 && m.WidthNM >= 0) || math.IsNaN(m.BiasV) {
				t.Fatalf("accepted a bad measurement %+v", m)
			}
		}
		// Fitting whatever was read must not panic.
		_, _ = FitWidth(ms)
		_, _, _ = Calibrate(DefaultProfile(), ms, "", "fuzz.csv")
	})
}

func ExampleFitWidth() {
	// Four test lines written at 4 V and 2 nA at different speeds.
	csv := `bias_v,current_na,speed_nm_per_s,width_nm
4,2,5,1.22
4,2,10,1.00
4,2,20,0.71
4,2,30,0.46
`
	ms, _ := ReadMeasurements(strings.NewReader(csv), "lines.csv")
	fit, err := FitWidth(ms)
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Printf("sigma %.3f nm, threshold %.3f mC/cm, R² %.3f\n", fit.Model.SigmaNM, fit.Model.ThresholdDoseCPerCm*1e3, fit.RSquared)
	// Output:
	// sigma 0.298 nm, threshold 0.494 mC/cm, R² 1.000
}
