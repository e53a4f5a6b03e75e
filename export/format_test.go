package export

import (
	"bytes"
	"context"
	"dimerpath/export/internal/planfixture"
	"math"
	"strconv"
	"strings"
	"testing"
)

// parseE reads back the e-notation the formatters print (with U+2212).
func parseE(s string) (float64, error) {
	return strconv.ParseFloat(strings.ReplaceAll(s, "−", "-"), 64)
}

func TestSigAndPow10ReadBack(t *testing.T) {
	for _, v := range []float64{1, 0.614, 6.2e-4, 123456, 1.5e-9, 2.84e16, -3.25} {
		got, err := parseE(sig(v, 3))
		if err != nil || math.Abs(got-v) > 0.006*math.Abs(v) {
			t.Errorf("sig(%g, 3) = %q", v, sig(v, 3))
		}
	}
	// 10^l for exponents float64 can hold, checked against math.Pow10.
	for _, l := range []float64{-0.5, -3, -17.25, -250.9} {
		got, err := parseE(pow10(l))
		if want := math.Pow(10, l); err != nil || math.Abs(got-want) > 0.05*want {
			t.Errorf("pow10(%g) = %q, want about %g", l, pow10(l), want)
		}
	}
	// Beyond float64: the exponent is still right (16 windows at 0.97 per
	// device is 0.614; 10^5 windows give 10^(10^5·log10 0.97)).
	l := 1e5 * math.Log10(0.97)
	if got := pow10(l); !strings.HasSuffix(got, "e−1323") {
		t.Errorf("pow10(%g) = %q, want ...e−1323", l, got)
	}
}

func TestNiceSteps(t *testing.T) {
	for _, tc := range []struct {
		span float64
		n    int
		want float64
	}{{100, 5, 20}, {7, 5, 2}, {0.003, 3, 0.001}} {
		if got := niceStep(tc.span, tc.n); math.Abs(got-tc.want) > 1e-12 {
			t.Errorf("niceStep(%g, %d) = %g, want %g", tc.span, tc.n, got, tc.want)
		}
	}
	for _, tc := range []struct {
		span float64
		want float64
	}{{50, 10}, {1000, 300}, {4000, 900}, {20000, 7200}, {1e6, 259200}} {
		if got := niceTimeStep(tc.span, 5); got != tc.want {
			t.Errorf("niceTimeStep(%g, 5) = %g, want %g", tc.span, got, tc.want)
		}
	}
	for _, span := range []float64{0, 5e-324, math.MaxFloat64} {
		if got := niceStep(span, 5); !(got > 0) || math.IsInf(got, 0) {
			t.Errorf("niceStep(%g) = %g: axis loops need a positive finite step", span, got)
		}
	}
}

// Issue 16: a plan whose times were absurd (settle_s = 1e305) gave a
// chart bar of near-infinite width, and hatching it never ended.
func TestHatchLinesEnd(t *testing.T) {
	for _, b := range []box{{x: 0, y: 0, w: 1e305, h: 10}, {x: 0, y: 0, w: math.Inf(1), h: 10}, {x: 0, y: 0, w: math.NaN(), h: 1}} {
		for _, h := range []hatch{hatchHorizontal, hatchVertical, hatchDiag, hatchBackDiag, hatchCross} {
			if n := len(hatchLines(b, h, 1)); n > maxHatchLines*2 {
				t.Errorf("hatchLines(%v, %v) = %d lines", b, h, n)
			}
		}
	}
	if n := len(hatchLines(box{w: 100, h: 10}, hatchVertical, 1)); n != 100 {
		t.Errorf("a 100 x 10 box hatched every 1: %d vertical lines, want 100", n)
	}
}

// A plan file may hold absurd but finite times (nothing in the file
// format bounds them): every exporter still ends, and prints them as
// durations.
func TestExportAbsurdButFiniteTimes(t *testing.T) {
	p := planfixture.SET().Plan
	const k = 1e300
	for i := range p.Actions {
		p.Actions[i].StartS *= k
		p.Actions[i].DurationS *= k
	}
	for i := range p.Strokes {
		p.Strokes[i].DurationS *= k
	}
	for i := range p.Segments {
		p.Segments[i].StartS *= k
		p.Segments[i].EndS *= k
		p.Segments[i].BudgetS *= k
	}
	b := &p.Breakdown
	for _, x := range []*float64{&b.APWriteS, &b.FEWriteS, &b.DwellS, &b.TravelS, &b.ModeSwitchS, &b.RegistrationS, &b.VerificationS,
		&p.TotalS, &p.P10S, &p.P50S, &p.P90S, &p.FloorS, &p.ByHandS} {
		*x *= k
	}
	p.TotalS = b.Total()
	for _, f := range []Format{FormatPDF, FormatSVG, FormatJSON, FormatCSV} {
		var buf bytes.Buffer
		if err := Write(context.Background(), &buf, f, p, Options{}); err != nil {
			t.Errorf("%s: %v", f, err)
		}
	}
}
