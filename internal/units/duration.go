package units

import (
	"fmt"
	"math"
	"strconv"
	"strings"
)

// NoValue is what the formatters print for NaN and ±Inf: a value the model
// could not give.
const NoValue = "–"

// minus is the typographic minus sign (U+2212), as the printed plan writes
// it.
const minus = "−"

// maxHoursAndMinutes is the largest duration, in hours, written as
// "H h MM min"; longer ones are written in hours with three significant
// digits ("1.23e6 h"). 10^6 h is over a century: such a value is a model's
// output on absurd input, and its minutes mean nothing.
const maxHoursAndMinutes = 1e6

// Duration formats s seconds for reading, with the precision a schedule
// needs: three significant digits below a minute ("0.40 ms", "45.3 ms",
// "4.53 s", "45.3 s"), whole seconds below an hour ("12 min 05 s"), whole
// minutes above ("3 h 07 min"). The value is rounded before its unit is
// chosen, so 59.96 s is "1 min 00 s" and 3599.6 s is "1 h 00 min".
// Positive values below 0.005 ms print as "<0.01 ms"; negative ones as the
// duration with a leading "−"; NaN and ±Inf as NoValue.
func Duration(s float64) string {
	switch {
	case math.IsNaN(s) || math.IsInf(s, 0):
		return NoValue
	case s < 0:
		return minus + Duration(-s)
	case s == 0:
		return "0 s"
	}
	// Below a minute: the first band whose rounded value stays below its
	// limit (so 9.996 s is "10.0 s", not "10.00 s").
	for _, b := range []struct {
		scale, limit float64 // value shown = s·scale, must round below limit
		decimals     int
		unit         string
	}{
		{1e3, 10, 2, " ms"},
		{1e3, 100, 1, " ms"},
		{1e3, 1000, 0, " ms"},
		{1, 10, 2, " s"},
		{1, 60, 1, " s"},
	} {
		if text, ok := roundedBelow(s*b.scale, b.decimals, b.limit); ok {
			if text == "0.00" {
				return "<0.01 ms"
			}
			return text + b.unit
		}
	}
	if t := math.Round(s); t < 3600 {
		sec := int64(t)
		return fmt.Sprintf("%d min %02d s", sec/60, sec%60)
	}
	if m := math.Round(s / 60); m < 60*maxHoursAndMinutes {
		mins := int64(m)
		return fmt.Sprintf("%d h %02d min", mins/60, mins%60)
	}
	mant, exp, _ := strings.Cut(strconv.FormatFloat(s/3600, 'e', 2, 64), "e")
	x, _ := strconv.Atoi(exp)
	return mant + "e" + strconv.Itoa(x) + " h"
}

// roundedBelow formats v with the given decimals and reports whether the
// printed value is below limit.
func roundedBelow(v float64, decimals int, limit float64) (string, bool) {
	text := strconv.FormatFloat(v, 'f', decimals, 64)
	r, err := strconv.ParseFloat(text, 64)
	return text, err == nil && r < limit
}

// Clock formats s seconds on a plan's clock as h:mm:ss, rounded to the
// second ("0:00:00", "27:46:40"); negative values get a leading "−", NaN and
// ±Inf print as NoValue. Beyond maxHoursAndMinutes hours, where seconds mean
// nothing, it prints what Duration prints.
func Clock(s float64) string {
	switch {
	case math.IsNaN(s) || math.IsInf(s, 0):
		return NoValue
	case s < 0:
		if math.Round(-s) == 0 {
			return Clock(0)
		}
		return minus + Clock(-s)
	case s >= 3600*maxHoursAndMinutes:
		return Duration(s)
	}
	t := int64(math.Round(s))
	return fmt.Sprintf("%d:%02d:%02d", t/3600, t/60%60, t%60)
}
