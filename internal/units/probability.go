package units

import (
	"math"
	"strconv"
	"strings"
)

// Probability formats a probability for reading, with log10 its base-10
// logarithm (used where p itself underflows to 0): three significant
// digits from 0.001 up ("0.536", "0.0412"), below that a mantissa and an
// exponent with the typographic minus ("2.4e−14", "1.2e−1429" from the
// logarithm alone). A p of 0 with log10 −Inf (or NaN) prints as "0"; a NaN
// or infinite p as NoValue.
func Probability(p, log10 float64) string {
	switch {
	case math.IsNaN(p) || math.IsInf(p, 0):
		return NoValue
	case p >= 0.001:
		return strconv.FormatFloat(p, 'g', 3, 64)
	case p > 0:
		return pow10(math.Log10(p))
	case math.IsInf(log10, -1) || math.IsNaN(log10) || log10 > 0:
		return "0"
	}
	return pow10(log10)
}

// ProbabilityRange formats an interval of probabilities, "0.45 to 0.623",
// each end as Probability does.
func ProbabilityRange(p, log10 [2]float64) string {
	return Probability(p[0], log10[0]) + " to " + Probability(p[1], log10[1])
}

// pow10 formats 10^l as "2.3e−1324", for any finite l.
func pow10(l float64) string {
	e := math.Floor(l)
	m := math.Pow(10, l-e)
	if m >= 9.95 {
		m, e = 1, e+1
	}
	return strconv.FormatFloat(m, 'f', 1, 64) + "e" + strings.Replace(strconv.FormatFloat(e, 'f', 0, 64), "-", minus, 1)
}
