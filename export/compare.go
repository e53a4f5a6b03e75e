package export

import (
	"context"
	"fmt"
	"io"
	"math"
	"strings"

	"dimerpath/planner"
)

// VariantResult is one variant's outcome for the comparison report, as
// planner.Compare returns it: its plan, or why it could not be planned.
type VariantResult = planner.VariantResult

// ResultsOf wraps plans as results, one per plan, named by their variant.
func ResultsOf(plans []*planner.Plan) []VariantResult {
	out := make([]VariantResult, len(plans))
	for i, p := range plans {
		out[i] = VariantResult{Variant: p.Variant, Plan: p}
	}
	return out
}

// checkResults validates every plan of rs and returns the first name of
// a design among them.
func checkResults(rs []VariantResult) (string, error) {
	if len(rs) == 0 {
		return "", fmt.Errorf("%w: no variants to compare", ErrInvalid)
	}
	design := ""
	for i, r := range rs {
		if r.Plan == nil {
			if r.Err == nil {
				return "", fmt.Errorf("%w: variant %d (%q) has neither a plan nor an error", ErrInvalid, i, r.Variant)
			}
			continue
		}
		if err := checkPlan(r.Plan); err != nil {
			return "", fmt.Errorf("variant %q: %w", r.Variant, err)
		}
		if design == "" {
			design = r.Plan.Design
		}
	}
	return design, nil
}

// compareShares are the widths of compareRows' columns, in shares of
// the table's width (the PDF and the SVG alike).
var compareShares = []float64{10, 8, 11, 7, 8, 6, 6, 8, 6, 6, 11, 6, 7, 10}

// compareRows returns the comparison table: a header and one row per
// variant.
func compareRows(rs []VariantResult) [][]string {
	rows := [][]string{{"Variant", "Session (mean)", "P10 – P90", "By hand", "Lithography steps", "Segments", "Strokes", "P(within tolerance)",
		"Windows", "All good", "All good: 95 % interval", "Mean good", "Devices per perfect one", "Coverage check"}}
	for _, r := range rs {
		if r.Plan == nil {
			rows = append(rows, []string{r.Variant, "not planned: " + r.Err.Error()})
			continue
		}
		p := r.Plan
		dpp := "–"
		if len(p.Windows) > 0 {
			dpp = sig(p.Yield.DevicesPerPerfect, 3)
			if p.Yield.DevicesPerPerfect == 0 {
				dpp = "out of reach"
				if l := p.Yield.Log10All; !math.IsInf(l, -1) && l < 0 {
					dpp = pow10(-l)
				}
			}
		}
		all, all95, mean := "–", "–", "–"
		if len(p.Windows) > 0 {
			all = allGood(p.Yield)
			all95 = probabilityRange(p.Yield.All95, p.Yield.Log10All95)
			mean = fmt.Sprintf("%s of %s", sig(p.Yield.MeanGood, 4), thousands(p.Yield.Windows))
		}
		byHand := "–"
		if p.ByHandS > 0 {
			byHand = clock(p.ByHandS)
		}
		var steps []string
		for _, st := range p.Steps {
			if st.Kind == planner.StepLithography {
				steps = append(steps, st.Species)
			}
		}
		rows = append(rows, []string{r.Variant, clock(p.TotalS), clock(p.P10S) + " – " + clock(p.P90S), byHand,
			strings.Join(steps, ", "), thousands(len(p.Segments)), thousands(len(p.Strokes)), probability(p.PInTolerance),
			thousands(len(p.Windows)), all, all95, mean, dpp, coverageWord(p.Coverage)})
	}
	return rows
}

// coverageWord is a coverage check's result in a word.
func coverageWord(c planner.Coverage) string {
	if c.OK {
		return "passed"
	}
	return "failed"
}

// differenceRows returns how each variant after the first differs from
// it (planner.VariantResult.Differences), one row per difference:
// variant, what, its value in the first variant, its value here; a
// variant compared and found the same as the first gets one row saying
// so. Nothing when no variant was compared.
func differenceRows(rs []VariantResult) [][4]string {
	var rows [][4]string
	for _, r := range rs {
		if !r.Compared {
			continue
		}
		if len(r.Differences) == 0 {
			rows = append(rows, [4]string{r.Variant, "the same layout", "", ""})
		}
		for _, d := range r.Differences {
			rows = append(rows, [4]string{r.Variant, d.What, d.From, d.To})
		}
	}
	return rows
}

// drawStackedBreakdown draws one stacked horizontal bar per planned
// variant, the seven time categories in order, on a shared h:mm:ss axis,
// with the key below; returns the height used.
func drawStackedBreakdown(c canvas, rs []VariantResult, area box) float64 {
	u := c.mm()
	labelW := 0.0
	maxT := 0.0
	for _, r := range rs {
		labelW = math.Max(labelW, c.textWidth(r.Variant, fontBold))
		if r.Plan != nil {
			maxT = math.Max(maxT, r.Plan.Breakdown.Total())
		}
	}
	labelW += 3 * u
	valueW := c.textWidth("0:00:00", fontBody) + 3*u
	plot := box{area.x + labelW, area.y, area.w - labelW - valueW, 0}
	step := niceTimeStep(maxT, 5)
	top := math.Max(step, math.Ceil(maxT/step-1e-9)*step)
	x := func(t float64) float64 { return plot.x + plot.w*t/top }
	rowH := 8 * u
	c.group(tag{id: "breakdown-compare", class: "chart"}, penBar, noPaint)
	y := area.y
	for _, r := range rs {
		c.text(vec{plot.x - 2*u, y + rowH/2 + textHeight(c, fontBold)/2}, r.Variant, fontBold, anchorEnd, tag{})
		if r.Plan == nil {
			c.text(vec{plot.x + 1*u, y + rowH/2 + textHeight(c, fontBody)/2}, "not planned", fontBody, anchorStart, tag{})
			y += rowH
			continue
		}
		t := 0.0
		for _, part := range timeParts(r.Plan.Breakdown) {
			if part.s <= 0 {
				continue
			}
			c.rect(box{x(t), y + 1.2*u, x(t+part.s) - x(t), rowH - 2.4*u}, penBar, part.fill, tag{class: "bar"})
			t += part.s
		}
		c.text(vec{x(t) + 1.5*u, y + rowH/2 + textHeight(c, fontBody)/2}, clock(t), fontBody, anchorStart, tag{})
		y += rowH
	}
	for _, tk := range ticks(0, top, step) {
		c.polyline([]vec{{x(tk), area.y}, {x(tk), y}}, false, penGrid, noPaint, tag{})
		c.polyline([]vec{{x(tk), y}, {x(tk), y + 1.2*u}}, false, penAxis, noPaint, tag{})
		c.text(vec{x(tk), y + 1.2*u + textHeight(c, fontAxis) + 0.8*u}, clock(tk), fontAxis, anchorMiddle, tag{})
	}
	c.polyline([]vec{{plot.x, y}, {plot.x + plot.w, y}}, false, penAxis, noPaint, tag{})
	y += 1.2*u + textHeight(c, fontAxis) + 4*u
	var key []legendEntry
	for _, part := range timeParts(planner.Breakdown{}) {
		f := part.fill
		key = append(key, legendEntry{part.name, func(c canvas, b box) { c.rect(b.inset(0.2*c.mm()), penBar, f, tag{}) }})
	}
	y += drawLegend(c, key, vec{area.x, y}, area.w)
	c.endGroup()
	return y - area.y
}

// drawSpreadCompare draws each planned variant's P10–P90 box, median
// and expected total on one time axis; returns the height used.
func drawSpreadCompare(c canvas, rs []VariantResult, area box) float64 {
	u := c.mm()
	lo, hi := math.Inf(1), 0.0
	labelW := 0.0
	for _, r := range rs {
		labelW = math.Max(labelW, c.textWidth(r.Variant, fontBold))
		if r.Plan != nil {
			lo = math.Min(lo, math.Min(r.Plan.P10S, r.Plan.TotalS))
			hi = math.Max(hi, math.Max(r.Plan.P90S, r.Plan.TotalS))
		}
	}
	if math.IsInf(lo, 1) {
		return 0
	}
	labelW += 3 * u
	span := math.Max(hi-lo, math.Max(hi, 1)*0.05)
	lo, hi = math.Max(0, lo-0.1*span), hi+0.1*span
	step := niceTimeStep(hi-lo, 5)
	lo, hi = math.Floor(lo/step)*step, math.Ceil(hi/step)*step
	plot := box{area.x + labelW, area.y, area.w - labelW - 2*u, 0}
	x := func(t float64) float64 { return plot.x + plot.w*(t-lo)/(hi-lo) }
	rowH := 7 * u
	c.group(tag{id: "spread-compare", class: "chart"}, penBar, noPaint)
	y := area.y
	for _, r := range rs {
		c.text(vec{plot.x - 2*u, y + rowH/2 + textHeight(c, fontBold)/2}, r.Variant, fontBold, anchorEnd, tag{})
		if p := r.Plan; p != nil {
			c.rect(box{x(p.P10S), y + 1.5*u, math.Max(x(p.P90S)-x(p.P10S), 0.4*u), rowH - 3*u}, penBar, paint{fill: true, grey: 0.85}, tag{class: "p10-p90"})
			c.polyline([]vec{{x(p.P50S), y + 0.8*u}, {x(p.P50S), y + rowH - 0.8*u}}, false, pen{width: 0.7}, noPaint, tag{class: "p50"})
			d, tx, ty := 1.4*u, x(p.TotalS), y+rowH/2
			c.polyline([]vec{{tx, ty - d}, {tx + d, ty}, {tx, ty + d}, {tx - d, ty}}, true, pen{width: 0.25}, solid(1), tag{class: "expected"})
		}
		y += rowH
	}
	for _, t := range ticks(lo, hi, step) {
		c.polyline([]vec{{x(t), area.y}, {x(t), y}}, false, penGrid, noPaint, tag{})
		c.polyline([]vec{{x(t), y}, {x(t), y + 1.2*u}}, false, penAxis, noPaint, tag{})
		c.text(vec{x(t), y + 1.2*u + textHeight(c, fontAxis) + 0.8*u}, clock(t), fontAxis, anchorMiddle, tag{})
	}
	c.polyline([]vec{{plot.x, y}, {plot.x + plot.w, y}}, false, penAxis, noPaint, tag{})
	y += 1.2*u + textHeight(c, fontAxis) + 4*u
	y += spreadKey(c, vec{area.x, y})
	c.endGroup()
	return y - area.y
}

// spreadKey explains the spread symbols; returns its height.
func spreadKey(c canvas, at vec) float64 {
	return spreadSymbols(c, at, "P10 to P90", "median P50", "expected (mean)")
}

// drawYieldCompare draws each variant's probability that every window
// is good as a bar on a 0–1 axis, with its 68 % (thick) and 95 % (thin)
// intervals from the templates' uncertainties as whiskers, labelled with
// the value, the 95 % interval and the mean number of good windows;
// returns the height used.
func drawYieldCompare(c canvas, rs []VariantResult, area box) float64 {
	u := c.mm()
	labelW := 0.0
	for _, r := range rs {
		labelW = math.Max(labelW, c.textWidth(r.Variant, fontBold))
	}
	labelW += 3 * u
	valueW := c.textWidth("0.000 (95 %: 0.000–0.000; mean 0000 of 0000 good)", fontBody) + 3*u
	plot := box{area.x + labelW, area.y, area.w - labelW - valueW, 0}
	rowH := 7 * u
	c.group(tag{id: "yield-compare", class: "chart"}, penBar, noPaint)
	y := area.y
	for _, r := range rs {
		c.text(vec{plot.x - 2*u, y + rowH/2 + textHeight(c, fontBold)/2}, r.Variant, fontBold, anchorEnd, tag{})
		label := "not planned"
		w := 0.0
		if p := r.Plan; p != nil {
			if len(p.Windows) == 0 {
				label = "no dopant windows"
			} else {
				yl := p.Yield
				w = plot.w * yl.All
				label = fmt.Sprintf("%s (95 %%: %s; mean %s of %s good)", allGood(yl), probabilityRange(yl.All95, yl.Log10All95), sig(yl.MeanGood, 4), thousands(yl.Windows))
				c.rect(box{plot.x, y + 1.5*u, math.Max(w, 0.3*u), rowH - 3*u}, penBar, paint{fill: true, grey: 0.45}, tag{class: "bar"})
				// The intervals as whiskers across the bar's end; the
				// label starts after the 95 % whisker.
				mid := y + rowH/2
				for _, iv := range []struct {
					r    [2]float64
					half float64
					pen  pen
				}{{yl.All95, 1.2 * u, pen{width: 0.25}}, {yl.All68, 0.8 * u, pen{width: 0.7}}} {
					x0, x1 := plot.x+plot.w*iv.r[0], plot.x+plot.w*iv.r[1]
					c.polyline([]vec{{x0, mid}, {x1, mid}}, false, iv.pen, noPaint, tag{class: "interval"})
					c.polyline([]vec{{x0, mid - iv.half}, {x0, mid + iv.half}}, false, iv.pen, noPaint, tag{})
					c.polyline([]vec{{x1, mid - iv.half}, {x1, mid + iv.half}}, false, iv.pen, noPaint, tag{})
				}
				w = math.Max(w, plot.w*yl.All95[1])
			}
		}
		c.text(vec{plot.x + w + 1.5*u, y + rowH/2 + textHeight(c, fontBody)/2}, label, fontBody, anchorStart, tag{})
		y += rowH
	}
	for k := 0; k <= 4; k++ {
		t := float64(k) / 4
		xx := plot.x + plot.w*t
		c.polyline([]vec{{xx, area.y}, {xx, y}}, false, penGrid, noPaint, tag{})
		c.polyline([]vec{{xx, y}, {xx, y + 1.2*u}}, false, penAxis, noPaint, tag{})
		c.text(vec{xx, y + 1.2*u + textHeight(c, fontAxis) + 0.8*u}, sig(t, 2), fontAxis, anchorMiddle, tag{})
	}
	c.polyline([]vec{{plot.x, y}, {plot.x + plot.w, y}}, false, penAxis, noPaint, tag{})
	c.polyline([]vec{{plot.x, area.y}, {plot.x, y}}, false, penAxis, noPaint, tag{})
	y += 1.2*u + textHeight(c, fontAxis) + 3*u
	c.text(vec{plot.x + plot.w/2, y + textHeight(c, fontAxis)}, "probability that every window is opened as drawn and takes exactly one donor (whiskers: 68 % and 95 % intervals)", fontAxis, anchorMiddle, tag{})
	y += textHeight(c, fontAxis) + 2*u
	c.endGroup()
	return y - area.y
}

// WriteComparisonPDF writes the variant comparison report of results to
// w on opt.Paper: the design, date and caution; a table of every
// variant's expected time, spread, segments, strokes and yield; and, side
// by side on shared axes, the time breakdowns, the P10–P90 spreads and
// the probability that every window is good. Variants that could not be
// planned are listed with the reason. Only opt.Paper, opt.Date and
// opt.Generator are used. It returns ctx.Err() when cancelled.
func WriteComparisonPDF(ctx context.Context, w io.Writer, results []VariantResult, opt Options) error {
	design, err := checkResults(results)
	if err != nil {
		return err
	}
	if err := ctx.Err(); err != nil {
		return err
	}
	d := newPDFDoc(opt.Paper, "dimerpath variant comparison · "+design, opt, "Variant comparison: "+design)
	d.page()
	d.c.text(vec{d.left(), d.y + 8}, "Variant comparison", font{size: 22, bold: true}, anchorStart, tag{})
	d.y += 13
	for _, l := range wrapText(d.c, design, font{size: 15, bold: true}, d.width()) {
		d.c.text(vec{d.left(), d.y + 6}, l, font{size: 15, bold: true}, anchorStart, tag{})
		d.y += 7
	}
	d.y += 2
	date := printedDate(opt)
	profiles := map[string]bool{}
	var profList []string
	for _, r := range results {
		if r.Plan != nil && !profiles[r.Plan.Profile] {
			profiles[r.Plan.Profile] = true
			profList = append(profList, r.Plan.Profile)
		}
	}
	kv := [][2]string{{"Date", date}, {"Instrument profile", listShort(profList, 4)}, {"Variants", fmt.Sprint(len(results))}}
	reportFacts(d, opt, kv)

	summaryTable(d, compareRows(results), compareShares)
	if diffs := differenceRows(results); len(diffs) > 0 {
		d.heading("What differs from "+results[0].Variant, 20)
		dt := newTable(d, font{size: 7.5},
			tableColumn{title: "Variant", share: 14},
			tableColumn{title: "What", share: 24},
			tableColumn{title: "In " + results[0].Variant, share: 31},
			tableColumn{title: "In this variant", share: 31},
		)
		dt.start()
		for _, r := range diffs {
			dt.row(r[:]...)
		}
		dt.end()
	}

	m := &measureCanvas{unit: 1, metrics: sansMetrics()}
	for _, ch := range []struct {
		title string
		draw  func(c canvas, rs []VariantResult, area box) float64
	}{
		{"Session time by kind", drawStackedBreakdown},
		{"Spread of the session time", drawSpreadCompare},
		{"Dopant yield", drawYieldCompare},
	} {
		if err := ctx.Err(); err != nil {
			return err
		}
		h := ch.draw(m, results, box{d.left(), 0, d.width(), 0})
		d.heading(ch.title, h)
		d.y += ch.draw(d.c, results, box{d.left(), d.y, d.width(), 0}) + 4
	}
	return d.output(w)
}

// WriteComparisonSVG writes the same comparison as WriteComparisonPDF as
// one SVG in millimetres (A4 width): the table as text, then the three
// charts, with groups "summary", "breakdown-compare", "spread-compare",
// "yield-compare" and "caution".
func WriteComparisonSVG(w io.Writer, results []VariantResult, opt Options) error {
	design, err := checkResults(results)
	if err != nil {
		return err
	}
	const width, margin = 210.0, 12.0
	inner := width - 2*margin
	m := &measureCanvas{unit: 1, metrics: sansMetrics()}
	table := layoutSVGTable(m, compareRows(results), compareShares, inner)
	charts := []func(c canvas, rs []VariantResult, area box) float64{drawStackedBreakdown, drawSpreadCompare, drawYieldCompare}
	y := table.below(22.0)
	y += 6
	for _, ch := range charts {
		y += 8 + ch(m, results, box{margin, 0, inner, 0}) + 4
	}
	caution := wrapText(m, planner.Caution, fontCaution, inner)
	height := y + float64(len(caution))*4.2 + 8

	c := startSVGReport(w, width, height, margin, "Variant comparison: "+design, 13, opt.Date)
	y = table.draw(c, margin, 18, inner)
	y += 6
	for i, ch := range charts {
		c.text(vec{margin, y + 4}, []string{"Write time by kind", "Spread of the write time", "Dopant yield"}[i], font{size: 10, bold: true}, anchorStart, tag{})
		y += 8
		y += ch(c, results, box{margin, y, inner, 0}) + 4
	}
	return endSVGReport(c, caution, margin, y)
}

// WriteComparisonFile writes the comparison report to path, PDF or SVG
// by its extension (any other is an error wrapping ErrFormat), through a
// temporary file renamed into place (see WriteFile).
func WriteComparisonFile(ctx context.Context, path string, results []VariantResult, opt Options) error {
	return writeReportFile(path, "a comparison report",
		func(w io.Writer) error { return WriteComparisonPDF(ctx, w, results, opt) },
		func(w io.Writer) error { return WriteComparisonSVG(w, results, opt) })
}
