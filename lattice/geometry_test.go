package lattice

import (
	"math"
	"testing"
)

// Check values: the Si lattice constant is
// CODATA 2018 (5.431 020 511 Å); the derived Si(100)-2x1 spacings are
// 7.6806 Å between dimer rows and 3.8403 Å between dimers along a row
// (7.68 Å and 3.84 Å measured, arXiv cond-mat/0611417); the H density of
// the saturated 2x1:H surface is 6.7806 nm⁻².
func TestGeometryAgainstPublishedValues(t *testing.T) {
	tests := []struct {
		name      string
		got, want float64
		tol       float64
	}{
		{"SiLatticeConstant (CODATA 2018)", SiLatticeConstant, 0.5431020511, 1e-12},
		{"RowSpacing 7.6806 Å", RowSpacing, 0.76806, 0.5e-5},
		{"DimerPitch 3.8403 Å", DimerPitch, 0.38403, 0.5e-5},
		{"RowSpacing measured 7.68 Å (cond-mat/0611417)", RowSpacing, 0.768, 0.5e-3},
		{"DimerPitch measured 3.84 Å (cond-mat/0611417)", DimerPitch, 0.384, 0.5e-3},
		{"HDensity 6.7806 nm^-2", HDensity, 6.7806, 0.5e-4},
		{"HDensity 6.78e14 cm^-2", HDensity * 1e14, 6.78e14, 0.005e14},
		{"DimerArea 29.496 Å^2", DimerArea * 100, 29.496, 0.5e-3},
		{"StepHeight a/4 = 1.3578 Å", StepHeight * 10, 1.3578, 0.5e-4},
		{"StepShift a/(2√2) = 1.920 Å", StepShift * 10, 1.920, 0.5e-3},
		// Wang et al., Commun. Phys. 3, 82 (2020): 7–16 dimer rows are
		// 5.4–12.3 nm, and 11 rows (8.45 nm) is their example where ±1
		// row changes the resistance about tenfold.
		{"7 rows = 5.4 nm (Wang 2020)", 7 * RowSpacing, 5.4, 0.05},
		{"16 rows = 12.3 nm (Wang 2020)", 16 * RowSpacing, 12.3, 0.05},
		{"11 rows = 8.45 nm", 11 * RowSpacing, 8.45, 0.005},
	}
	for _, tc := range tests {
		if math.Abs(tc.got-tc.want) > tc.tol {
			t.Errorf("%s: got %.7g, want %.7g ± %g", tc.name, tc.got, tc.want, tc.tol)
		}
	}
	// A 1 µm x 1 µm field holds about 6.8 million H sites (issue 2).
	if n := HDensity * 1e6; math.Abs(n-6.78e6) > 0.01e6 {
		t.Errorf("sites per µm² = %g, want about 6.78e6", n)
	}
}
