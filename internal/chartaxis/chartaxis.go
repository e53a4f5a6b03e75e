// Package chartaxis chooses the axes of dimerpath's charts: the range,
// whether it is linear or logarithmic, and the tick values, so that the
// printed reports (package export) and the window (app/gui) draw the
// same chart the same way. It knows numbers and seconds only; formatting
// the tick labels is the caller's.
package chartaxis

import "math"

// NiceStep returns a 1, 2 or 5 × 10^k step near span/target.
func NiceStep(span float64, target int) float64 {
	if !(span > 0) {
		return 1
	}
	raw := span / float64(max(1, target))
	p := math.Pow(10, math.Floor(math.Log10(raw)))
	if !(p > 0) || math.IsInf(p, 0) {
		return math.Max(span, math.SmallestNonzeroFloat64) // degenerate spans: one step
	}
	for _, m := range []float64{1, 2, 5} {
		if m*p >= raw && !math.IsInf(m*p, 0) {
			return m * p
		}
	}
	if math.IsInf(10*p, 0) {
		return p
	}
	return 10 * p
}

// NiceBelow returns the largest 1, 2 or 5 × 10^k not above v (1 for v
// not above 0).
func NiceBelow(v float64) float64 {
	if !(v > 0) {
		return 1
	}
	p := math.Pow(10, math.Floor(math.Log10(v)))
	best := p
	for _, m := range []float64{2, 5} {
		if m*p <= v {
			best = m * p
		}
	}
	return best
}

// NiceAbove returns the smallest 1, 2 or 5 × 10^k not below v (1 for v
// not above 0).
func NiceAbove(v float64) float64 {
	if !(v > 0) {
		return 1
	}
	p := math.Pow(10, math.Floor(math.Log10(v)))
	for _, m := range []float64{1, 2, 5} {
		if m*p >= v*(1-1e-12) {
			return m * p
		}
	}
	return 10 * p
}

// NiceTimeStep returns a clock-friendly tick step (1, 2, 5, 10, 15, 20,
// 30 s or min, 1, 2, 3, 6, 12 h, then whole days) near span/target
// seconds.
func NiceTimeStep(span float64, target int) float64 {
	raw := span / float64(max(1, target))
	for _, s := range []float64{1, 2, 5, 10, 15, 20, 30, 60, 120, 300, 600, 900, 1200, 1800,
		3600, 7200, 10800, 21600, 43200, 86400} {
		if s >= raw {
			return s
		}
	}
	return 86400 * math.Ceil(raw/86400)
}

// Ticks returns the multiples of step from lo to hi (inclusive, with a
// little slack for rounding), at most 200 of them; for a degenerate step
// (not positive, or too small to advance at lo's magnitude) it returns
// lo and hi.
func Ticks(lo, hi, step float64) []float64 {
	if !(step > 0) || !(hi >= lo) || (hi-lo)/step > 200 || lo+step == lo {
		return []float64{lo, hi}
	}
	var out []float64
	for k := math.Ceil(lo/step - 1e-9); k*step <= hi+1e-9*step; k++ {
		out = append(out, k*step+0) // +0: no "-0" mark
	}
	return out
}

// Scale is one axis of a chart: the values from Lo to Hi, linearly or
// logarithmically, and the values it marks.
type Scale struct {
	Lo, Hi float64
	Log    bool
	// Marks are the tick values, in the axis's own values (seconds on a
	// time axis, log10 of the probability on a logarithmic probability
	// axis).
	Marks []float64
}

// Frac returns where v lies along the axis, 0 at Lo and 1 at Hi (outside
// 0..1 beyond them; a logarithmic axis takes v at most Lo as Lo).
func (s Scale) Frac(v float64) float64 {
	if s.Log {
		v = math.Max(v, s.Lo)
		return (math.Log10(v) - math.Log10(s.Lo)) / (math.Log10(s.Hi) - math.Log10(s.Lo))
	}
	if s.Hi == s.Lo {
		return 0.5
	}
	return (v - s.Lo) / (s.Hi - s.Lo)
}

// ForValues returns the axis of a parameter taking the values xs:
// logarithmic, from the nice value below the least to the nice value
// above the largest, when every value is positive and they span a
// factor of 20 or more; else linear from a nice step below to one above,
// from 0 when no value is negative and the values reach down near it.
func ForValues(xs []float64) Scale {
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, x := range xs {
		lo, hi = math.Min(lo, x), math.Max(hi, x)
	}
	switch {
	case math.IsInf(lo, 1):
		return Scale{Lo: 0, Hi: 1, Marks: []float64{0, 1}}
	case lo > 0 && hi/lo >= 20:
		s := Scale{Lo: NiceBelow(lo), Hi: NiceAbove(hi), Log: true}
		decades := math.Log10(s.Hi) - math.Log10(s.Lo)
		for e := math.Floor(math.Log10(s.Lo)); e <= math.Ceil(math.Log10(s.Hi)); e++ {
			d := math.Pow(10, e)
			for _, m := range []float64{1, 2, 5} {
				// Decades alone when the axis spans more than three.
				if (m != 1 && decades > 3) || m*d < s.Lo*(1-1e-9) || m*d > s.Hi*(1+1e-9) {
					continue
				}
				s.Marks = append(s.Marks, m*d)
			}
		}
		return s
	}
	span := hi - lo
	if span <= 0 {
		span = math.Max(math.Abs(hi), 1) * 0.2
	}
	lo, hi = lo-0.05*span, hi+0.05*span
	if lo < 0 && !slicesAnyNegative(xs) {
		lo = 0
	}
	step := NiceStep(hi-lo, 5)
	s := Scale{Lo: math.Floor(lo/step) * step, Hi: math.Ceil(hi/step) * step}
	s.Marks = Ticks(s.Lo, s.Hi, step)
	return s
}

func slicesAnyNegative(xs []float64) bool {
	for _, x := range xs {
		if x < 0 {
			return true
		}
	}
	return false
}

// timeMarks are the times a logarithmic time axis may mark, in seconds.
var timeMarks = []float64{1, 2, 5, 10, 20, 30, 60, 120, 300, 600, 1200, 1800, 3600, 7200, 18000, 36000, 86400,
	2 * 86400, 5 * 86400, 10 * 86400, 20 * 86400, 50 * 86400, 100 * 86400, 200 * 86400, 500 * 86400, 1000 * 86400}

// ForTimes returns the axis of times from lo to hi seconds: logarithmic
// when log is asked (a parameter on a logarithmic axis, so that a power
// law is a straight line) and the times span a factor of 20 or more,
// marked at clock-friendly times (1 s, 10 s, 1 min, 5 min, 1 h, ...;
// at most about seven); else linear from 0, marked every NiceTimeStep.
func ForTimes(lo, hi float64, log bool) Scale {
	if log && lo > 0 && hi/lo >= 20 {
		s := Scale{Lo: timeMarks[0], Log: true}
		for _, v := range timeMarks {
			if v <= lo {
				s.Lo = v
			}
		}
		s.Hi = 86400 * math.Pow(10, math.Ceil(math.Log10(hi/86400)))
		for _, v := range timeMarks {
			if v >= hi {
				s.Hi = v
				break
			}
		}
		var in []float64
		for _, v := range timeMarks {
			if v >= s.Lo && v <= s.Hi {
				in = append(in, v)
			}
		}
		k := max((len(in)+6)/7, 1)
		for i := 0; i < len(in); i += k {
			s.Marks = append(s.Marks, in[i])
		}
		if len(in) > 0 && s.Marks[len(s.Marks)-1] != in[len(in)-1] {
			s.Marks = append(s.Marks, in[len(in)-1])
		}
		return s
	}
	step := NiceTimeStep(math.Max(hi, 1), 5)
	s := Scale{Lo: 0, Hi: math.Max(step, math.Ceil(hi/step-1e-9)*step)}
	s.Marks = Ticks(s.Lo, s.Hi, step)
	return s
}

// ForProbabilities returns the axis of probabilities given by their
// log10: linear from 0 to 1 (marks every quarter), or, once some
// probability lies below 1 % and none is 0, the axis of their log10 from
// a whole power of ten below the least up to 10^0 (Log is false: the
// values placed on it are the log10s themselves).
func ForProbabilities(log10s []float64) (s Scale, ofLog10 bool) {
	lo := 0.0
	for _, l := range log10s {
		if math.IsInf(l, -1) || math.IsNaN(l) {
			return Scale{Lo: 0, Hi: 1, Marks: []float64{0, 0.25, 0.5, 0.75, 1}}, false
		}
		lo = math.Min(lo, l)
	}
	if lo >= -2 {
		return Scale{Lo: 0, Hi: 1, Marks: []float64{0, 0.25, 0.5, 0.75, 1}}, false
	}
	s = Scale{Lo: math.Floor(lo), Hi: 0}
	s.Marks = Ticks(s.Lo, s.Hi, math.Max(1, NiceStep(s.Hi-s.Lo, 4)))
	return s, true
}
