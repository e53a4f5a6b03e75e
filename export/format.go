package export

import (
	"math"
	"strconv"
	"strings"

	"dimerpath/internal/chartaxis"
	"dimerpath/internal/units"
)

// clock (h:mm:ss on the plan's clock) and duration ("12 min 05 s") are
// the formatters the command line and the GUI use too (internal/units),
// under the short names the page builders use.
var (
	clock    = units.Clock
	duration = units.Duration
)

// The axes' steps and ticks are package chartaxis's, which the window's
// charts share.
var (
	niceStep     = chartaxis.NiceStep
	niceBelow    = chartaxis.NiceBelow
	niceTimeStep = chartaxis.NiceTimeStep
	ticks        = chartaxis.Ticks
)

// sig formats v with n significant digits, without trailing zeros or
// an exponent for ordinary magnitudes.
func sig(v float64, n int) string {
	if v == 0 || math.IsNaN(v) || math.IsInf(v, 0) {
		if v == 0 {
			return "0"
		}
		return "–"
	}
	e := int(math.Floor(math.Log10(math.Abs(v))))
	if e < -4 || e >= 7 {
		s := strconv.FormatFloat(v, 'e', n-1, 64)
		mant, exp, _ := strings.Cut(s, "e")
		if strings.Contains(mant, ".") {
			mant = strings.TrimRight(strings.TrimRight(mant, "0"), ".")
		}
		x, _ := strconv.Atoi(exp)
		// Liberation Sans lacks the superscript minus, zero and nine, so
		// exponents are written e−4.
		return strings.Replace(mant, "-", "−", 1) + "e" + strings.Replace(strconv.Itoa(x), "-", "−", 1)
	}
	dec := max(0, n-1-e)
	s := strconv.FormatFloat(v, 'f', dec, 64)
	if strings.Contains(s, ".") {
		s = strings.TrimRight(strings.TrimRight(s, "0"), ".")
	}
	return strings.Replace(s, "-", "−", 1)
}

// nanoAmps formats a current given in A as nA.
func nanoAmps(a float64) string { return sig(a*1e9, 3) }

// milliCoulombPerCm formats a line dose given in C/cm as mC/cm.
func milliCoulombPerCm(d float64) string { return sig(d*1e3, 3) }

// nm2 prints a width in nm to 0.01 nm, as dimerpath plan prints the
// line widths and the FE pitch ("1.00": the default AP line is 0.999 nm
// wide, which the PDF once printed while the command line said 1.00).
func nm2(v float64) string { return strings.Replace(strconv.FormatFloat(v, 'f', 2, 64), "-", "−", 1) }

// nm1 formats a length in nm with one decimal.
func nm1(v float64) string { return strings.Replace(strconv.FormatFloat(v, 'f', 1, 64), "-", "−", 1) }

// percent formats a fraction 0..1 as a percentage.
func percent(f float64) string {
	switch {
	case f >= 0.9995 && f < 1:
		return ">99.9 %"
	case f > 0 && f < 0.001:
		return "<0.1 %"
	}
	return strconv.FormatFloat(100*f, 'f', 1, 64) + " %"
}

// probability formats p for print: 0.614, 6.2×10⁻⁴.
func probability(p float64) string {
	if p >= 0.001 || p == 0 {
		return strconv.FormatFloat(p, 'f', 3, 64)
	}
	return sig(p, 2)
}

// lengthLabel formats a scale-bar length given in nm.
func lengthLabel(v float64) string {
	if v >= 1000 {
		return sig(v/1000, 3) + " µm"
	}
	return sig(v, 3) + " nm"
}
