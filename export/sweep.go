package export

import (
	"context"
	"fmt"
	"io"
	"math"
	"sort"

	"dimerpath/internal/chartaxis"
	"dimerpath/planner"
)

// The sweep report (planner.PlanSweep): a table of every value and two
// charts against the parameter on one axis: the write time with its
// P10–P90 band, and the probability that every dopant window is good.

// checkSweep validates every plan of the sweep.
func checkSweep(sw *planner.Sweep) error {
	if sw == nil || len(sw.Points) == 0 {
		return fmt.Errorf("%w: a sweep without values", ErrInvalid)
	}
	for _, pt := range sw.Points {
		if pt.Plan == nil {
			if pt.Err == nil {
				return fmt.Errorf("%w: sweep value %s has neither a plan nor an error", ErrInvalid, pt.Value)
			}
			continue
		}
		if err := checkPlan(pt.Plan); err != nil {
			return fmt.Errorf("sweep value %s: %w", pt.Value, err)
		}
	}
	return nil
}

// sweepShares are the widths of SweepRows' columns, in shares of the
// table's width (the PDF and the SVG alike).
var sweepShares = []float64{13, 9, 10, 10, 10, 9, 9, 13, 11}

// SweepRows returns the sweep's table as the command line prints it and
// the reports lay it out: a header and one row per value, in the order
// the values were given. A value that could not be planned has two
// cells: the value and "not planned: " with the reason.
func SweepRows(sw *planner.Sweep) [][]string {
	head := sw.Param.Name
	if u := sw.Param.Unit; u != "" {
		head += " (" + u + ")"
	}
	rows := [][]string{{head, "Windows", "Expected", "P10", "P90", "Segments", "Strokes", "All windows good", "Mean good"}}
	for _, pt := range sw.Points {
		if pt.Plan == nil {
			rows = append(rows, []string{pt.Value, "not planned: " + pt.Err.Error()})
			continue
		}
		p := pt.Plan
		all, mean := "–", "–"
		if len(p.Windows) > 0 {
			all = allGood(p.Yield)
			mean = sig(p.Yield.MeanGood, 6)
		}
		rows = append(rows, []string{pt.Value, thousands(len(p.Windows)), clock(p.TotalS), clock(p.P10S), clock(p.P90S),
			thousands(len(p.Segments)), thousands(len(p.Strokes)), all, mean})
	}
	return rows
}

// plotAxis places a chartaxis.Scale on the page: from x0 (or y0 + h
// for a vertical axis, which grows upwards) over w.
type plotAxis struct {
	chartaxis.Scale
	x0, w    float64
	vertical bool
}

func (a plotAxis) at(v float64) float64 {
	if a.vertical {
		return a.x0 + a.w - a.w*a.Frac(v)
	}
	return a.x0 + a.w*a.Frac(v)
}

// sweepPlotted are the planned points in display units, sorted along the
// axis.
type sweepPlotted struct {
	x    float64
	plan *planner.Plan
}

func plottedPoints(sw *planner.Sweep) []sweepPlotted {
	var pts []sweepPlotted
	for _, pt := range sw.Points {
		if pt.Plan != nil {
			pts = append(pts, sweepPlotted{sw.Param.DisplayValue(pt.X), pt.Plan})
		}
	}
	sort.SliceStable(pts, func(i, j int) bool { return pts[i].x < pts[j].x })
	return pts
}

// drawSweepXAxis draws the parameter axis at y with its ticks and title;
// returns the height used below y.
func drawSweepXAxis(c canvas, ax plotAxis, y float64, title string) float64 {
	u := c.mm()
	c.polyline([]vec{{ax.x0, y}, {ax.x0 + ax.w, y}}, false, penAxis, noPaint, tag{})
	for _, t := range ax.Marks {
		x := ax.at(t)
		c.polyline([]vec{{x, y}, {x, y + 1.2*u}}, false, penAxis, noPaint, tag{})
		c.text(vec{x, y + 1.2*u + textHeight(c, fontAxis) + 0.8*u}, sig(t, 3), fontAxis, anchorMiddle, tag{})
	}
	h := 1.2*u + textHeight(c, fontAxis) + 0.8*u + 2*u
	if ax.Log {
		title += ", logarithmic"
	}
	c.text(vec{ax.x0 + ax.w/2, y + h + textHeight(c, fontAxis)}, title, fontAxis, anchorMiddle, tag{})
	return h + textHeight(c, fontAxis) + 2*u
}

// drawSweepTime draws the expected write time against the parameter
// with the P10–P90 band of the Monte Carlo spread and the median;
// returns the height used.
func drawSweepTime(c canvas, sw *planner.Sweep, area box) float64 {
	u := c.mm()
	pts := plottedPoints(sw)
	left := c.textWidth("000:00:00", fontAxis) + 3*u
	plotH := 45 * u
	xs := make([]float64, len(pts))
	lo, hi := math.Inf(1), 0.0
	for i, p := range pts {
		xs[i] = p.x
		lo = math.Min(lo, math.Min(p.plan.P10S, p.plan.TotalS))
		hi = math.Max(hi, math.Max(p.plan.P90S, p.plan.TotalS))
	}
	ax := plotAxis{Scale: chartaxis.ForValues(xs), x0: area.x + left, w: area.w - left - 3*u}
	ty := plotAxis{Scale: chartaxis.ForTimes(lo, hi, ax.Log), x0: area.y, w: plotH, vertical: true}
	y := ty.at
	c.group(tag{id: "sweep-time", class: "chart"}, penBar, noPaint)
	drawSweepYAxis(c, ax, ty, clock)
	if len(pts) > 0 {
		// The band: P90 left to right, then P10 back.
		band := make([]vec, 0, 2*len(pts))
		for _, p := range pts {
			band = append(band, vec{ax.at(p.x), y(p.plan.P90S)})
		}
		for i := len(pts) - 1; i >= 0; i-- {
			band = append(band, vec{ax.at(pts[i].x), y(pts[i].plan.P10S)})
		}
		if len(pts) == 1 {
			x := band[0].x
			band = []vec{{x - 1.2*u, band[0].y}, {x + 1.2*u, band[0].y}, {x + 1.2*u, band[1].y}, {x - 1.2*u, band[1].y}}
		}
		c.polyline(band, true, pen{width: 0.15, grey: 0.5}, paint{fill: true, grey: 0.85}, tag{class: "p10-p90"})
		median := make([]vec, len(pts))
		expected := make([]vec, len(pts))
		for i, p := range pts {
			median[i] = vec{ax.at(p.x), y(p.plan.P50S)}
			expected[i] = vec{ax.at(p.x), y(p.plan.TotalS)}
		}
		c.polyline(median, false, pen{width: 0.35, dash: []float64{1.2, 0.8}}, noPaint, tag{class: "p50"})
		c.polyline(expected, false, pen{width: 0.5}, noPaint, tag{class: "expected"})
		d := 1.4 * u
		for _, e := range expected {
			c.polyline([]vec{{e.x, e.y - d}, {e.x + d, e.y}, {e.x, e.y + d}, {e.x - d, e.y}}, true, pen{width: 0.25}, solid(1), tag{class: "expected-point"})
		}
	}
	h := plotH + drawSweepXAxis(c, ax, area.y+plotH, sw.Param.Axis())
	key := "Vertical: write time, h:mm:ss"
	if ty.Log {
		key += " (logarithmic)"
	}
	c.text(vec{area.x, area.y + h + textHeight(c, fontAxis)}, key, fontAxis, anchorStart, tag{})
	h += textHeight(c, fontAxis) + 3*u
	h += spreadSymbols(c, vec{area.x, area.y + h}, "P10 to P90 of the Monte Carlo runs", "median P50", "expected (mean)")
	c.endGroup()
	return h + 2*u
}

// drawSweepYield draws the probability that every dopant window takes
// exactly one donor against the parameter: on a 0–1 axis, or on a
// logarithmic one when every value lies below 1 %; returns the height
// used (0 when no plan has windows).
func drawSweepYield(c canvas, sw *planner.Sweep, area box) float64 {
	u := c.mm()
	var pts []sweepPlotted
	for _, p := range plottedPoints(sw) {
		if p.plan.Yield.Windows > 0 {
			pts = append(pts, p)
		}
	}
	if len(pts) == 0 {
		return 0
	}
	left := c.textWidth("000:00:00", fontAxis) + 3*u
	plotH := 25 * u
	xs := make([]float64, len(pts))
	logs := make([]float64, len(pts))
	for i, p := range pts {
		xs[i], logs[i] = p.x, p.plan.Yield.Log10All
	}
	ax := plotAxis{Scale: chartaxis.ForValues(xs), x0: area.x + left, w: area.w - left - 3*u}
	ys, logY := chartaxis.ForProbabilities(logs)
	py := plotAxis{Scale: ys, x0: area.y, w: plotH, vertical: true}
	value := func(p *planner.Plan) float64 {
		if logY {
			return p.Yield.Log10All
		}
		return p.Yield.All
	}
	yLabel := func(v float64) string { return sig(v, 2) }
	if logY {
		yLabel = pow10
	}
	y := py.at
	c.group(tag{id: "sweep-yield", class: "chart"}, penBar, noPaint)
	drawSweepYAxis(c, ax, py, yLabel)
	line := make([]vec, len(pts))
	for i, p := range pts {
		line[i] = vec{ax.at(p.x), y(value(p.plan))}
	}
	c.polyline(line, false, pen{width: 0.5}, noPaint, tag{class: "yield"})
	for _, v := range line {
		c.rect(box{v.x - 1.1*u, v.y - 1.1*u, 2.2 * u, 2.2 * u}, pen{width: 0.25}, solid(0.3), tag{class: "yield-point"})
	}
	h := plotH + drawSweepXAxis(c, ax, area.y+plotH, sw.Param.Axis())
	what := "probability that every window takes exactly one donor"
	if logY {
		what += " (logarithmic)"
	}
	c.text(vec{area.x, area.y + h + textHeight(c, fontAxis)}, "Vertical: "+what, fontAxis, anchorStart, tag{})
	h += textHeight(c, fontAxis) + 3*u
	c.endGroup()
	return h
}

// drawSweepYAxis draws a chart's vertical axis ty against the
// horizontal ax: a grid line across the plot and a label (by label) at
// each mark, and the axis line.
func drawSweepYAxis(c canvas, ax, ty plotAxis, label func(float64) string) {
	u := c.mm()
	for _, t := range ty.Marks {
		c.polyline([]vec{{ax.x0, ty.at(t)}, {ax.x0 + ax.w, ty.at(t)}}, false, penGrid, noPaint, tag{})
		c.text(vec{ax.x0 - 1.5*u, ty.at(t) + textHeight(c, fontAxis)/2}, label(t), fontAxis, anchorEnd, tag{})
	}
	c.polyline([]vec{{ax.x0, ty.x0}, {ax.x0, ty.x0 + ty.w}}, false, penAxis, noPaint, tag{})
}

// sweepCharts are the report's charts in order, with their titles.
var sweepCharts = []struct {
	title string
	draw  func(c canvas, sw *planner.Sweep, area box) float64
}{
	{"Write time", drawSweepTime},
	{"Dopant yield", drawSweepYield},
}

// WriteSweepPDF writes the sweep report of sw to w on opt.Paper: the
// design, variant, profile, parameter, date and caution; a table of
// every value (expected time, P10, P90, segments, strokes, yield); and
// the write time with its P10–P90 band and the probability that every
// window is good, against the parameter. Values that could not be
// planned are listed with the reason. Only opt.Paper, opt.Date and
// opt.Generator are used. It returns ctx.Err() when cancelled.
func WriteSweepPDF(ctx context.Context, w io.Writer, sw *planner.Sweep, opt Options) error {
	if err := checkSweep(sw); err != nil {
		return err
	}
	if err := ctx.Err(); err != nil {
		return err
	}
	title := "Sweep of " + sw.Param.Name
	d := newPDFDoc(opt.Paper, "dimerpath sweep · "+sw.Design, opt, title+": "+sw.Design)
	d.page()
	d.c.text(vec{d.left(), d.y + 8}, title, font{size: 20, bold: true}, anchorStart, tag{})
	d.y += 13
	date := printedDate(opt)
	kv := [][2]string{{"Design", sw.Design}, {"Variant", sw.Variant}, {"Instrument profile", sw.Profile},
		{"Parameter", sweepParamText(sw)}, {"Seed", fmt.Sprint(sw.Seed)}, {"Date", date}}
	reportFacts(d, opt, kv)
	for _, warn := range sw.Warnings {
		d.para("Note: "+warn, fontBody)
	}

	summaryTable(d, SweepRows(sw), sweepShares)

	m := &measureCanvas{unit: 1, metrics: sansMetrics()}
	for _, ch := range sweepCharts {
		if err := ctx.Err(); err != nil {
			return err
		}
		h := ch.draw(m, sw, box{d.left(), 0, d.width(), 0})
		if h == 0 {
			continue
		}
		d.heading(ch.title, h)
		d.y += ch.draw(d.c, sw, box{d.left(), d.y, d.width(), 0}) + 4
	}
	return d.output(w)
}

// sweepParamText says what was swept: the parameter, its unit and, for
// an array, what the values are.
func sweepParamText(sw *planner.Sweep) string {
	s := sw.Param.Name
	if sw.Param.Array != nil {
		s += " (the size of the array, columns x rows; the axis counts its copies)"
	} else if sw.Param.Unit != "" {
		s += " (" + sw.Param.Unit + ")"
	}
	if sw.Param.Array != nil {
		s += "; the design holds " + sw.Param.Current
	} else if sw.Param.Current != "" {
		s += "; the profile holds " + sw.Param.Current
	}
	return s
}

// WriteSweepSVG writes the same report as WriteSweepPDF as one SVG in
// millimetres (A4 width), with groups "summary", "sweep-time",
// "sweep-yield" and "caution".
func WriteSweepSVG(w io.Writer, sw *planner.Sweep, opt Options) error {
	if err := checkSweep(sw); err != nil {
		return err
	}
	const width, margin = 210.0, 12.0
	inner := width - 2*margin
	m := &measureCanvas{unit: 1, metrics: sansMetrics()}
	table := layoutSVGTable(m, SweepRows(sw), sweepShares, inner)
	notes := make([][]string, len(sw.Warnings))
	for i, warn := range sw.Warnings {
		notes[i] = wrapText(m, "Note: "+warn, fontBody, inner)
	}
	y := 26.0
	for _, n := range notes {
		y += float64(len(n)) * 4
	}
	y = table.below(y)
	y += 6
	for _, ch := range sweepCharts {
		if h := ch.draw(m, sw, box{margin, 0, inner, 0}); h > 0 {
			y += 8 + h + 4
		}
	}
	caution := wrapText(m, planner.Caution, fontCaution, inner)
	height := y + float64(len(caution))*4.2 + 8

	c := startSVGReport(w, width, height, margin, "Sweep of "+sw.Param.Name+": "+sw.Design+", variant "+sw.Variant, 12, opt.Date)
	c.text(vec{margin, 18}, fmt.Sprintf("Profile %s, seed %d; %s", sw.Profile, sw.Seed, sweepParamText(sw)), fontAxis, anchorStart, tag{id: "parameter"})
	y = 22
	for _, n := range notes {
		for _, l := range n {
			y += 4
			c.text(vec{margin, y}, l, fontBody, anchorStart, tag{class: "note"})
		}
	}
	y = table.draw(c, margin, y+2, inner)
	y += 6
	for _, ch := range sweepCharts {
		if h := ch.draw(m, sw, box{margin, 0, inner, 0}); h == 0 {
			continue
		}
		c.text(vec{margin, y + 4}, ch.title, font{size: 10, bold: true}, anchorStart, tag{})
		y += 8
		y += ch.draw(c, sw, box{margin, y, inner, 0}) + 4
	}
	return endSVGReport(c, caution, margin, y)
}

// WriteSweepFile writes the sweep report to path, PDF or SVG by its
// extension (any other is an error wrapping ErrFormat), through a
// temporary file renamed into place (see WriteFile).
func WriteSweepFile(ctx context.Context, path string, sw *planner.Sweep, opt Options) error {
	return writeReportFile(path, "a sweep report",
		func(w io.Writer) error { return WriteSweepPDF(ctx, w, sw, opt) },
		func(w io.Writer) error { return WriteSweepSVG(w, sw, opt) })
}
