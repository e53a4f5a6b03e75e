package export

import (
	"fmt"
	"math"

	"dimerpath/planner"
)

// Charts drawn on a canvas, shared by the operator's PDF and the
// comparison reports (PDF and SVG). Categories are told apart by grey
// level and hatching, never by colour.

// timePart is one category of the time breakdown with its fill.
type timePart struct {
	name string
	s    float64
	fill paint
}

var partFills = map[planner.TimeKind]paint{
	planner.TimeAPWrite:      solid(0),
	planner.TimeFEWrite:      solid(0.5),
	planner.TimeDwell:        {fill: true, grey: 0.8, hatch: hatchDiag, hatchGrey: 0, hatchStep: 1.1},
	planner.TimeTravel:       {fill: true, grey: 1, hatch: hatchBackDiag, hatchGrey: 0.15, hatchStep: 1.1},
	planner.TimeModeSwitch:   {fill: true, grey: 1, hatch: hatchCross, hatchGrey: 0.2, hatchStep: 1.3},
	planner.TimeRegistration: {fill: true, grey: 0.88, hatch: hatchHorizontal, hatchGrey: 0.1, hatchStep: 0.9},
	planner.TimeVerification: {fill: true, grey: 1, hatch: hatchVertical, hatchGrey: 0.1, hatchStep: 0.9},
	// The session around the writing.
	planner.TimeSurvey:        solid(0.25),
	planner.TimeConditioning:  {fill: true, grey: 0.7, hatch: hatchDiag, hatchGrey: 0.2, hatchStep: 0.9},
	planner.TimeTipChange:     {fill: true, grey: 1, hatch: hatchDiag, hatchGrey: 0, hatchStep: 0.5},
	planner.TimeRepair:        {fill: true, grey: 0.6, hatch: hatchCross, hatchGrey: 0, hatchStep: 1.1},
	planner.TimeDocumentation: solid(0.75),
	planner.TimeDose:          {fill: true, grey: 0.55, hatch: hatchHorizontal, hatchGrey: 0, hatchStep: 0.9},
	planner.TimeAnneal:        {fill: true, grey: 0.4, hatch: hatchVertical, hatchGrey: 1, hatchStep: 0.9},
}

// timeParts returns the breakdown's categories in the order of
// planner.TimeKinds, named as planner names them.
func timeParts(b planner.Breakdown) []timePart {
	parts := make([]timePart, len(planner.TimeKinds))
	for i, k := range planner.TimeKinds {
		parts[i] = timePart{k.String(), b.Seconds(k), partFills[k]}
	}
	return parts
}

var (
	penBar   = pen{width: 0.2, grey: 0}
	penAxis  = pen{width: 0.25, grey: 0}
	penGrid  = pen{width: 0.12, grey: 0.7, dash: []float64{0.6, 0.6}}
	fontAxis = font{size: 7, grey: 0.15}
	fontBody = font{size: 8}
	fontBold = font{size: 8, bold: true}
)

// drawBreakdownBars draws one horizontal bar per category in b, with the
// time and share at its end; returns the height used.
func drawBreakdownBars(c canvas, b planner.Breakdown, area box) float64 {
	u := c.mm()
	parts := timeParts(b)
	total := b.Total()
	labelW := 0.0
	for _, p := range parts {
		labelW = math.Max(labelW, c.textWidth(p.name, fontBody))
	}
	labelW += 3 * u
	valueW := c.textWidth("0:00:00 (100.0 %)", fontBody) + 2*u
	barMax := area.w - labelW - valueW
	rowH := 6.5 * u
	maxS := 0.0
	for _, p := range parts {
		maxS = math.Max(maxS, p.s)
	}
	c.group(tag{id: "breakdown-bars", class: "chart"}, penBar, noPaint)
	y := area.y
	for _, p := range parts {
		c.text(vec{area.x + labelW - 2*u, y + rowH/2 + textHeight(c, fontBody)/2}, p.name, fontBody, anchorEnd, tag{})
		w := 0.0
		if maxS > 0 {
			w = barMax * p.s / maxS
		}
		if w > 0 {
			c.rect(box{area.x + labelW, y + 1*u, math.Max(w, 0.4*u), rowH - 2*u}, penBar, p.fill, tag{class: "bar"})
		}
		share := 0.0
		if total > 0 {
			share = p.s / total
		}
		c.text(vec{area.x + labelW + w + 2*u, y + rowH/2 + textHeight(c, fontBody)/2},
			fmt.Sprintf("%s (%s)", clock(p.s), percent(share)), fontBody, anchorStart, tag{})
		y += rowH
	}
	c.polyline([]vec{{area.x + labelW, area.y}, {area.x + labelW, y}}, false, penAxis, noPaint, tag{})
	c.endGroup()
	return y - area.y
}

// drawSpread draws the P10–P90 range of the write time as a box on a
// time axis, with P50 and the expected total marked; returns the height
// used.
func drawSpread(c canvas, p10, p50, p90, total float64, area box) float64 {
	u := c.mm()
	lo, hi := math.Min(p10, total), math.Max(p90, total)
	span := hi - lo
	if span <= 0 {
		span = math.Max(hi, 1) * 0.1
	}
	lo, hi = math.Max(0, lo-0.15*span), hi+0.15*span
	step := niceTimeStep(hi-lo, 5)
	lo = math.Floor(lo/step) * step
	hi = math.Ceil(hi/step) * step
	x := func(t float64) float64 { return area.x + area.w*(t-lo)/(hi-lo) }
	top := area.y + 7*u
	bh := 7 * u
	axisY := top + bh + 3*u
	c.group(tag{id: "spread", class: "chart"}, penBar, noPaint)
	for _, t := range ticks(lo, hi, step) {
		c.polyline([]vec{{x(t), top - 1*u}, {x(t), axisY}}, false, penGrid, noPaint, tag{})
		c.polyline([]vec{{x(t), axisY}, {x(t), axisY + 1.2*u}}, false, penAxis, noPaint, tag{})
		c.text(vec{x(t), axisY + 1.2*u + textHeight(c, fontAxis) + 0.8*u}, clock(t), fontAxis, anchorMiddle, tag{})
	}
	c.polyline([]vec{{area.x, axisY}, {area.right(), axisY}}, false, penAxis, noPaint, tag{})
	// whisker-free box: the 80 % interval
	c.rect(box{x(p10), top, math.Max(x(p90)-x(p10), 0.4*u), bh}, penBar, paint{fill: true, grey: 0.85}, tag{class: "p10-p90"})
	c.polyline([]vec{{x(p50), top - 1*u}, {x(p50), top + bh + 1*u}}, false, pen{width: 0.7}, noPaint, tag{class: "p50"})
	// expected total: a diamond
	d := 1.6 * u
	tx, ty := x(total), top+bh/2
	c.polyline([]vec{{tx, ty - d}, {tx + d, ty}, {tx, ty + d}, {tx - d, ty}}, true, pen{width: 0.25}, solid(1), tag{class: "expected"})
	lab := fontAxis
	c.text(vec{x(p10) - 0.8*u, top - 1.8*u}, "P10 "+clock(p10), lab, anchorEnd, tag{})
	c.text(vec{x(p90) + 0.8*u, top - 1.8*u}, "P90 "+clock(p90), lab, anchorStart, tag{})
	c.endGroup()
	return axisY + 1.2*u + textHeight(c, fontAxis) + 2*u - area.y
}

// spreadLegend draws the key of drawSpread, with the median and the
// expected total, at the given top-left point and returns its height.
func spreadLegend(c canvas, at vec, p50, total float64) float64 {
	return spreadSymbols(c, at, "P10 to P90: 80 % of the Monte Carlo runs",
		"median P50 "+clock(p50), "expected (mean) "+clock(total))
}

// spreadSymbols draws the key of the spread bars (the P10-P90 box, the
// median tick, the mean diamond) with the given labels and returns its
// height.
func spreadSymbols(c canvas, at vec, band, median, mean string) float64 {
	u := c.mm()
	y := at.y
	x := at.x
	item := func(s string) {
		c.text(vec{x, y + 2.3*u}, s, fontAxis, anchorStart, tag{})
		x += c.textWidth(s, fontAxis) + 5*u
	}
	c.rect(box{x, y, 6 * u, 3 * u}, penBar, paint{fill: true, grey: 0.85}, tag{})
	x += 7.5 * u
	item(band)
	c.polyline([]vec{{x + 1.5*u, y - 0.5*u}, {x + 1.5*u, y + 3.5*u}}, false, pen{width: 0.7}, noPaint, tag{})
	x += 4 * u
	item(median)
	d := 1.4 * u
	c.polyline([]vec{{x + d, y + 1.5*u - d}, {x + 2*d, y + 1.5*u}, {x + d, y + 1.5*u + d}, {x, y + 1.5*u}}, true, pen{width: 0.25}, solid(1), tag{})
	x += 2*d + 2*u
	item(mean)
	return 4 * u
}

// drawDistribution draws P(k good windows) as bars over the range of k
// that holds nearly all the probability; returns the height used.
func drawDistribution(c canvas, dist []float64, area box) float64 {
	u := c.mm()
	if len(dist) == 0 {
		return 0
	}
	peak := 0.0
	for _, q := range dist {
		peak = math.Max(peak, q)
	}
	// Show k where P(k) >= peak/1000, so the tails of a large array do
	// not shrink the bars to nothing.
	k0, k1 := 0, len(dist)-1
	for k0 < k1 && dist[k0] < peak*1e-3 {
		k0++
	}
	for k1 > k0 && dist[k1] < peak*1e-3 {
		k1--
	}
	// Group k into at most 60 bins.
	binW := int(math.Ceil(float64(k1-k0+1) / 60))
	type bin struct {
		k0, k1 int
		p      float64
	}
	var bins []bin
	for k := k0; k <= k1; k += binW {
		b := bin{k0: k, k1: min(k+binW-1, k1)}
		for j := b.k0; j <= b.k1; j++ {
			b.p += dist[j]
		}
		bins = append(bins, b)
	}
	maxP := 0.0
	for _, b := range bins {
		maxP = math.Max(maxP, b.p)
	}
	left := c.textWidth("0.00", fontAxis) + 3*u
	plot := box{area.x + left, area.y + 2*u, area.w - left, area.h - 12*u}
	c.group(tag{id: "yield-distribution", class: "chart"}, penBar, noPaint)
	ystep := niceStep(maxP, 4)
	ytop := math.Ceil(maxP/ystep-1e-9) * ystep
	for _, t := range ticks(0, ytop, ystep) {
		y := plot.bottom() - plot.h*t/ytop
		c.polyline([]vec{{plot.x, y}, {plot.right(), y}}, false, penGrid, noPaint, tag{})
		c.text(vec{plot.x - 1.5*u, y + textHeight(c, fontAxis)/2}, sig(t, 3), fontAxis, anchorEnd, tag{})
	}
	bw := plot.w / float64(len(bins))
	for i, b := range bins {
		h := plot.h * b.p / ytop
		c.rect(box{plot.x + float64(i)*bw + 0.12*bw, plot.bottom() - h, 0.76 * bw, h}, penBar, solid(0.55), tag{class: "bar"})
	}
	c.polyline([]vec{{plot.x, plot.bottom()}, {plot.right(), plot.bottom()}}, false, penAxis, noPaint, tag{})
	c.polyline([]vec{{plot.x, plot.y}, {plot.x, plot.bottom()}}, false, penAxis, noPaint, tag{})
	// k labels: a few, never overlapping. A bar of several k is
	// labelled with its range; the spacing follows the widest label.
	label := func(b bin) string {
		if b.k1 > b.k0 {
			return fmt.Sprintf("%d–%d", b.k0, b.k1)
		}
		return fmt.Sprint(b.k0)
	}
	widest := 0.0
	for _, b := range bins {
		widest = math.Max(widest, c.textWidth(label(b), fontAxis))
	}
	every := max(1, int(math.Ceil((widest+2*u)/bw)))
	for i, b := range bins {
		if i%every != 0 {
			continue
		}
		c.text(vec{plot.x + (float64(i)+0.5)*bw, plot.bottom() + textHeight(c, fontAxis) + 1.5*u}, label(b), fontAxis, anchorMiddle, tag{})
	}
	c.text(vec{plot.x + plot.w/2, plot.bottom() + 2*textHeight(c, fontAxis) + 4*u}, "number of windows with exactly one donor",
		fontAxis, anchorMiddle, tag{})
	c.endGroup()
	return area.h
}
