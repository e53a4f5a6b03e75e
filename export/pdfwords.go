package export

import (
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"dimerpath/lattice/design"
	"dimerpath/planner"
)

// strokeSummary counts strokes by mode and kind: "12 AP lines, 6 dwell
// points, 2 FE rasters".
func strokeSummary(p *planner.Plan) string {
	type k struct {
		m design.Mode
		s planner.StrokeKind
	}
	n := map[k]int{}
	for i := range p.Strokes {
		n[k{p.Strokes[i].Mode, p.Strokes[i].Kind}]++
	}
	var parts []string
	for _, key := range []k{{design.ModeAP, planner.StrokeLine}, {design.ModeAP, planner.StrokeDwell}, {design.ModeAP, planner.StrokeOutline},
		{design.ModeFE, planner.StrokeRaster}, {design.ModeFE, planner.StrokeOutline}, {design.ModeFE, planner.StrokeLine}, {design.ModeFE, planner.StrokeDwell},
		{design.ModeAP, planner.StrokeRaster}} {
		if c := n[key]; c > 0 {
			parts = append(parts, fmt.Sprintf("%s %s %s", thousands(c), key.m.Abbrev(), plural(kindNoun(key.s), c)))
		}
	}
	return strings.Join(parts, ", ")
}

func kindNoun(k planner.StrokeKind) string {
	switch k {
	case planner.StrokeDwell:
		return "dwell point"
	case planner.StrokeRaster:
		return "raster fill"
	case planner.StrokeOutline:
		return "outline pass"
	}
	return "line"
}

func plural(s string, n int) string {
	switch {
	case n == 1:
		return s
	case strings.HasSuffix(s, "s"):
		return s + "es"
	}
	return s + "s"
}

// thousands formats n with thin spaces between groups of three digits.
func thousands(n int) string {
	s := strconv.Itoa(n)
	if len(s) <= 4 {
		return s
	}
	var b strings.Builder
	for i, r := range s {
		if i > 0 && (len(s)-i)%3 == 0 {
			b.WriteString("\u2009")
		}
		b.WriteRune(r)
	}
	return b.String()
}

// floorLine compares the plan with the physical floor (the writing
// alone) and with the same work planned by hand.
func floorLine(p *planner.Plan) string {
	var parts []string
	if p.FloorS > 0 {
		parts = append(parts, fmt.Sprintf("%s× the physical floor of %s (writing alone, no travel, switches or registrations)",
			sig(p.TotalS/p.FloorS, 3), clock(p.FloorS)))
	}
	if p.ByHandS > 0 {
		parts = append(parts, fmt.Sprintf("planned by hand (regions in file order, rows in raster order, registrations at a fixed interval) it would take %s, %s× as long",
			clock(p.ByHandS), sig(p.ByHandS/p.TotalS, 3)))
	}
	if len(parts) == 0 {
		return "not estimated"
	}
	return strings.Join(parts, "; ")
}

func devicesPerPerfect(y planner.Yield) string {
	if y.DevicesPerPerfect == 0 {
		if l := y.Log10All; !math.IsInf(l, -1) && l < 0 {
			return "about " + pow10(-l) + ": a perfect device is practically out of reach"
		}
		return "no number suffices: some window can never be good"
	}
	return sig(y.DevicesPerPerfect, 3) + " devices written on average to get one with every window good"
}

// allGood formats the probability that every window is good, from its
// log10 where the probability itself underflows.
func allGood(y planner.Yield) string {
	if y.All == 0 && !math.IsInf(y.Log10All, -1) {
		return pow10(y.Log10All)
	}
	return probability(y.All)
}

// pow10 formats 10^l as "2.3e−1324", for any finite l.
func pow10(l float64) string {
	e := math.Floor(l)
	m := math.Pow(10, l-e)
	if m >= 9.95 {
		m, e = 1, e+1
	}
	return strconv.FormatFloat(m, 'f', 1, 64) + "e" + strings.Replace(strconv.Itoa(int(e)), "-", "−", 1)
}

// meanGood formats the mean and spread of the number of good windows.
func meanGood(y planner.Yield) string {
	s := fmt.Sprintf("%s of %s on average", sig(y.MeanGood, 4), thousands(y.Windows))
	if y.SDGood > 0 {
		s += fmt.Sprintf(" (standard deviation %s)", sig(y.SDGood, 2))
	}
	return s
}

// listShort joins up to n names, then "and K more".
func listShort(names []string, n int) string {
	if len(names) <= n {
		return strings.Join(names, ", ")
	}
	return strings.Join(names[:n], ", ") + fmt.Sprintf(" and %d more", len(names)-n)
}

func signedV(v float64) string {
	if v > 0 {
		return "+" + sig(v, 3)
	}
	return sig(v, 3)
}

func countOf[T comparable](s []T, v T) int {
	n := 0
	for _, x := range s {
		if x == v {
			n++
		}
	}
	return n
}

// numberRanges formats stroke numbers on paper as "4–9, 12": every
// number, however many ranges (a long list wraps in its cell, never cut).
func numberRanges(nums []int) string {
	nums = slices.Sorted(slices.Values(nums))
	var parts []string
	for i := 0; i < len(nums); {
		j := i
		for j+1 < len(nums) && nums[j+1] == nums[j]+1 {
			j++
		}
		if j > i {
			parts = append(parts, fmt.Sprintf("%d–%d", nums[i], nums[j]))
		} else {
			parts = append(parts, strconv.Itoa(nums[i]))
		}
		i = j + 1
	}
	return strings.Join(parts, ", ")
}

func capitalise(s string) string {
	if s == "" {
		return s
	}
	r := []rune(s)
	return strings.ToUpper(string(r[0])) + string(r[1:])
}

func safeDiv(a, b float64) float64 {
	if b == 0 {
		return 0
	}
	return a / b
}
