package chartaxis

import (
	"math"
	"reflect"
	"testing"
)

func TestNiceSteps(t *testing.T) {
	for _, c := range []struct {
		span   float64
		target int
		want   float64
	}{{10, 5, 2}, {7, 5, 2}, {1, 4, 0.5}, {1234, 5, 500}, {0, 5, 1}, {3e-9, 3, 1e-9}} {
		if got := NiceStep(c.span, c.target); math.Abs(got-c.want) > 1e-12*c.want {
			t.Errorf("NiceStep(%v, %d) = %v, want %v", c.span, c.target, got, c.want)
		}
	}
	for _, c := range []struct{ v, below, above float64 }{{0.3, 0.2, 0.5}, {1, 1, 1}, {7, 5, 10}, {1500, 1000, 2000}, {0.05, 0.05, 0.05}} {
		if b, a := NiceBelow(c.v), NiceAbove(c.v); math.Abs(b-c.below) > 1e-12 || math.Abs(a-c.above) > 1e-9 {
			t.Errorf("NiceBelow/Above(%v) = %v, %v; want %v, %v", c.v, b, a, c.below, c.above)
		}
	}
	if got := NiceTimeStep(3600, 5); got != 900 {
		t.Errorf("NiceTimeStep(1 h, 5) = %v, want 900 s", got)
	}
	if got := Ticks(0, 1, 0.25); !reflect.DeepEqual(got, []float64{0, 0.25, 0.5, 0.75, 1}) {
		t.Errorf("Ticks(0, 1, 0.25) = %v", got)
	}
}

func TestForValues(t *testing.T) {
	for _, c := range []struct {
		name   string
		xs     []float64
		log    bool
		lo, hi float64
		marks  []float64
	}{
		{"a factor of 20 is logarithmic", []float64{0.05, 0.1, 1}, true, 0.05, 1, []float64{0.05, 0.1, 0.2, 0.5, 1}},
		{"many decades are marked by decades", []float64{100, 1e6}, true, 100, 1e6, []float64{100, 1000, 1e4, 1e5, 1e6}},
		{"a narrow range is linear", []float64{100, 200, 400}, false, 0, 500, []float64{0, 100, 200, 300, 400, 500}},
		{"negative values stay linear", []float64{-1, 1}, false, -1.5, 1.5, []float64{-1.5, -1, -0.5, 0, 0.5, 1, 1.5}},
		{"one value gets a narrow axis around it", []float64{3}, false, 2.96, 3.04, nil},
	} {
		t.Run(c.name, func(t *testing.T) {
			s := ForValues(c.xs)
			if s.Log != c.log || math.Abs(s.Lo-c.lo) > 1e-9 || math.Abs(s.Hi-c.hi) > 1e-9 {
				t.Errorf("ForValues(%v) = %+v, want log %v from %v to %v", c.xs, s, c.log, c.lo, c.hi)
			}
			if c.marks != nil && !approxEqual(s.Marks, c.marks) {
				t.Errorf("marks %v, want %v", s.Marks, c.marks)
			}
			for _, x := range c.xs {
				if f := s.Frac(x); f < -1e-9 || f > 1+1e-9 {
					t.Errorf("%v lies at %v, off the axis", x, f)
				}
			}
		})
	}
}

func TestForTimes(t *testing.T) {
	lin := ForTimes(300, 5000, false)
	if lin.Log || lin.Lo != 0 || lin.Hi < 5000 || lin.Marks[0] != 0 {
		t.Errorf("linear time axis %+v", lin)
	}
	lg := ForTimes(300, 150000, true)
	if !lg.Log || lg.Lo > 300 || lg.Hi < 150000 || len(lg.Marks) > 8 {
		t.Errorf("logarithmic time axis %+v", lg)
	}
	if f := lg.Frac(300); f < 0 || f > 1 {
		t.Errorf("300 s lies at %v", f)
	}
	if s := ForTimes(300, 1000, true); s.Log {
		t.Errorf("a factor of 3 is logarithmic: %+v", s)
	}
}

func TestForProbabilities(t *testing.T) {
	if s, log := ForProbabilities([]float64{math.Log10(0.6), math.Log10(0.05)}); log || s.Lo != 0 || s.Hi != 1 {
		t.Errorf("probabilities above 1 %%: %+v, log %v", s, log)
	}
	s, log := ForProbabilities([]float64{-1.3, -133, -1191})
	if !log || s.Lo != -1191 || s.Hi != 0 {
		t.Errorf("tiny probabilities: %+v, log %v", s, log)
	}
	if _, log := ForProbabilities([]float64{-5, math.Inf(-1)}); log {
		t.Errorf("a probability of 0 on a logarithmic axis")
	}
}

func approxEqual(a, b []float64) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if math.Abs(a[i]-b[i]) > 1e-9*math.Max(1, math.Abs(b[i])) {
			return false
		}
	}
	return true
}

func TestTicksHaveNoNegativeZero(t *testing.T) {
	for _, v := range Ticks(-1e-12, 10, 5) {
		if v == 0 && math.Signbit(v) {
			t.Errorf("Ticks gives -0")
		}
	}
}
