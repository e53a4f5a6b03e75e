package units

import (
	"math"
	"math/rand/v2"
	"strconv"
	"strings"
	"testing"
)

func TestDuration(t *testing.T) {
	for _, tc := range []struct {
		name string
		s    float64
		want string
	}{
		{"zero", 0, "0 s"},
		{"negative zero", math.Copysign(0, -1), "0 s"},
		{"smallest positive", math.SmallestNonzeroFloat64, "<0.01 ms"},
		{"just below 0.01 ms", 4.9e-6, "<0.01 ms"},
		{"microseconds", 4.2e-5, "0.04 ms"},
		{"ms, two decimals", 0.0004, "0.40 ms"},
		{"rounds up to 10 ms", 0.009996, "10.0 ms"},
		{"rounds up to 100 ms", 0.09996, "100 ms"},
		{"ms, whole", 0.4531, "453 ms"},
		{"rounds up to 1 s", 0.9996, "1.00 s"},
		{"half a second", 0.5, "500 ms"},
		{"seconds, two decimals", 4.531, "4.53 s"},
		{"rounds up to 10 s", 9.996, "10.0 s"},
		{"seconds, one decimal", 45.25, "45.2 s"},
		// issue 9: minutes from int(s), seconds from round(s) printed these
		// as "1 min 00 s" and "59 min 00 s" (and 59.96 s as "60.0 s").
		{"rounds up to a minute", 59.96, "1 min 00 s"},
		{"one minute", 60, "1 min 00 s"},
		{"119.6 s", 119.6, "2 min 00 s"},
		{"rounds to the second", 61.4, "1 min 01 s"},
		{"last second of an hour", 3599.4, "59 min 59 s"},
		{"3599.6 s", 3599.6, "1 h 00 min"},
		{"one hour", 3600, "1 h 00 min"},
		{"rounds to the minute", 3600 + 29.9, "1 h 00 min"},
		{"rounds up a minute", 3600 + 30, "1 h 01 min"},
		{"last minute of a day", 86400 - 30.1, "23 h 59 min"},
		{"a day", 86400 - 30, "24 h 00 min"},
		{"27 h 47 min", 100000, "27 h 47 min"},
		{"largest in hours and minutes", 3.6e9 - 31, "999999 h 59 min"},
		{"a million hours", 3.6e9 - 30, "1.00e6 h"},
		{"beyond int64 seconds", 1e300, "2.78e296 h"},
		{"largest float", math.MaxFloat64, "4.99e304 h"},
		{"negative", -61, "−1 min 01 s"},
		{"negative huge", -math.MaxFloat64, "−4.99e304 h"},
		{"NaN", math.NaN(), "–"},
		{"+Inf", math.Inf(1), "–"},
		{"-Inf", math.Inf(-1), "–"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			if got := Duration(tc.s); got != tc.want {
				t.Errorf("Duration(%g) = %q, want %q", tc.s, got, tc.want)
			}
		})
	}
}

func TestClock(t *testing.T) {
	for _, tc := range []struct {
		name string
		s    float64
		want string
	}{
		{"zero", 0, "0:00:00"},
		{"rounds up", 0.5, "0:00:01"},
		{"rounds up to a minute", 59.96, "0:01:00"},
		{"last second of an hour", 3599.4, "0:59:59"},
		{"rounds up to an hour", 3599.6, "1:00:00"},
		{"27 h", 100000, "27:46:40"},
		{"small negative rounds to zero", -0.4, "0:00:00"},
		{"negative", -61, "−0:01:01"},
		{"beyond a million hours", 1e300, "2.78e296 h"},
		{"NaN", math.NaN(), "–"},
		{"Inf", math.Inf(1), "–"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			if got := Clock(tc.s); got != tc.want {
				t.Errorf("Clock(%g) = %q, want %q", tc.s, got, tc.want)
			}
		})
	}
}

// readBack parses what Duration prints back into seconds, with the
// largest rounding error its precision allows; it understands only the
// forms the doc comment promises.
func readBack(t *testing.T, text string) (s, tol float64) {
	t.Helper()
	num := func(f string) float64 {
		v, err := strconv.ParseFloat(f, 64)
		if err != nil {
			t.Fatalf("%q: %v", text, err)
		}
		return v
	}
	halfLast := func(f string) float64 { // half a unit in the last printed digit
		if _, frac, ok := strings.Cut(f, "."); ok {
			return 0.5 * math.Pow(10, -float64(len(frac)))
		}
		return 0.5
	}
	f := strings.Fields(text)
	switch {
	case len(f) == 2 && f[1] == "ms":
		return num(f[0]) / 1e3, halfLast(f[0]) / 1e3
	case len(f) == 2 && f[1] == "s":
		return num(f[0]), halfLast(f[0])
	case len(f) == 4 && f[1] == "min" && f[3] == "s" && len(f[2]) == 2:
		return 60*num(f[0]) + num(f[2]), 0.5
	case len(f) == 4 && f[1] == "h" && f[3] == "min" && len(f[2]) == 2:
		return 3600*num(f[0]) + 60*num(f[2]), 30
	case len(f) == 2 && f[1] == "h":
		h := num(f[0])
		return 3600 * h, 3600 * 0.005 * math.Pow(10, math.Floor(math.Log10(h)))
	}
	t.Fatalf("Duration printed %q, a form its doc comment does not promise", text)
	return 0, 0
}

// TestDurationReadsBack checks, over durations spread across every band
// and their boundaries, that the text means the value to its printed
// precision and that no band prints a second or minute field of 60.
func TestDurationReadsBack(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 16))
	var values []float64
	for e := -5.0; e < 305; e += 0.01 {
		values = append(values, math.Pow(10, e)*(1+0.01*rng.Float64()))
	}
	for _, edge := range []float64{0.01, 0.1, 1, 10, 60, 3600, 3.6e9} {
		for _, d := range []float64{-1e-3, -1e-4, 0, 1e-4, 1e-3} {
			values = append(values, edge*(1+d))
		}
	}
	for _, s := range values {
		text := Duration(s)
		if text == "<0.01 ms" {
			if s >= 5e-6 {
				t.Errorf("Duration(%g) = %q", s, text)
			}
			continue
		}
		got, tol := readBack(t, text)
		if math.Abs(got-s) > tol*(1+1e-9) {
			t.Errorf("Duration(%g) = %q, which reads as %g", s, text, got)
		}
		if f := strings.Fields(text); len(f) == 4 && f[2] >= "60" {
			t.Errorf("Duration(%g) = %q: second or minute field beyond 59", s, text)
		}
	}
}

func FuzzDuration(f *testing.F) {
	for _, s := range []float64{0, 59.96, 119.6, 3599.6, 1e300, -1, math.NaN()} {
		f.Add(s)
	}
	f.Fuzz(func(t *testing.T, s float64) {
		for _, text := range []string{Duration(s), Clock(s)} {
			if strings.Contains(text, "Inf") || strings.Contains(text, "NaN") {
				t.Errorf("%g printed as %q", s, text)
			}
			if s >= 0 && strings.ContainsAny(text, "-−") {
				t.Errorf("%g printed as %q, with a minus sign", s, text)
			}
		}
	})
}
