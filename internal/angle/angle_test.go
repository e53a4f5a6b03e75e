package angle

import (
	"math"
	"testing"
)

func TestSinCos(t *testing.T) {
	for _, tc := range []struct {
		deg, s, c float64
	}{
		// Quarter turns are exact: the unit circle's axis points.
		{0, 0, 1}, {90, 1, 0}, {180, 0, -1}, {270, -1, 0},
		{360, 0, 1}, {-90, -1, 0}, {450, 1, 0}, {-720, 0, 1},
	} {
		s, c := SinCos(tc.deg)
		if s != tc.s || c != tc.c {
			t.Errorf("SinCos(%g) = %g, %g; want exactly %g, %g", tc.deg, s, c, tc.s, tc.c)
		}
	}
	// Other angles agree with the standard library's math.Sincos.
	for _, deg := range []float64{30, 45, 123.4, -60, 1e-9} {
		s, c := SinCos(deg)
		ws, wc := math.Sincos(deg * math.Pi / 180)
		if math.Abs(s-ws) > 1e-15 || math.Abs(c-wc) > 1e-15 {
			t.Errorf("SinCos(%g) = %g, %g; math.Sincos gives %g, %g", deg, s, c, ws, wc)
		}
	}
	if s, c := SinCos(math.NaN()); !math.IsNaN(s) || !math.IsNaN(c) {
		t.Errorf("SinCos(NaN) = %g, %g; want NaN", s, c)
	}
}
