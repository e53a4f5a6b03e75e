package gui

import (
	"image/color"
	"math"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/canvas"
	"fyne.io/fyne/v2/theme"
	"fyne.io/fyne/v2/widget"

	"dimerpath/internal/chartaxis"
)

// LineSeries is what a LineChart draws: a line through (X[i], Y[i]) with
// a marker at each point, optionally a second, fainter line (Second) and
// a band from Lo to Hi. The points are in the order of X.
type LineSeries struct {
	X, Y   []float64
	Second []float64
	Lo, Hi []float64
}

// LineChart draws one series against axes chosen by package chartaxis
// (as the printed reports choose them), with grid lines, tick labels and
// an axis title below, in Fyne lines, circles and text, and the band as
// a raster.
type LineChart struct {
	widget.BaseWidget
	x, y           chartaxis.Scale
	xLabel, yLabel func(float64) string
	xTitle         string
	s              LineSeries
}

// NewLineChart returns a chart of s on the axes x and y, their tick
// labels written by xLabel and yLabel, and xTitle under the x axis.
func NewLineChart(s LineSeries, x, y chartaxis.Scale, xLabel, yLabel func(float64) string, xTitle string) *LineChart {
	c := &LineChart{x: x, y: y, xLabel: xLabel, yLabel: yLabel, xTitle: xTitle, s: s}
	c.ExtendBaseWidget(c)
	return c
}

// CreateRenderer implements fyne.Widget.
func (c *LineChart) CreateRenderer() fyne.WidgetRenderer {
	r := &lineChartRenderer{c: c}
	r.band = canvas.NewRasterWithPixels(r.bandPixel)
	r.build()
	return r
}

type lineChartRenderer struct {
	c      *LineChart
	band   *canvas.Raster
	grid   []*canvas.Line
	xTicks []*canvas.Text
	yTicks []*canvas.Text
	title  *canvas.Text
	axes   [2]*canvas.Line
	lines  []*canvas.Line // the main line's segments
	second []*canvas.Line
	marks  []*canvas.Circle
	objectList
	// plot is the plot area, set by Layout: the band's raster covers it.
	plotW, plotH float32
}

var (
	chartLine   = color.NRGBA{0x1f, 0x5f, 0xb4, 0xff}
	chartBand   = color.NRGBA{0x1f, 0x5f, 0xb4, 0x40}
	chartSecond = color.NRGBA{0x1f, 0x5f, 0xb4, 0x90}
	chartGrid   = color.NRGBA{0x80, 0x80, 0x80, 0x40}
)

func (r *lineChartRenderer) build() {
	c := r.c
	fg := theme.Color(theme.ColorNameForeground)
	small := theme.TextSize() * 0.85
	text := func(s string) *canvas.Text {
		t := canvas.NewText(s, fg)
		t.TextSize = small
		return t
	}
	r.objs = []fyne.CanvasObject{r.band}
	r.grid, r.xTicks, r.yTicks, r.lines, r.second, r.marks = nil, nil, nil, nil, nil, nil
	for _, v := range c.x.Marks {
		r.grid = append(r.grid, canvas.NewLine(chartGrid))
		r.xTicks = append(r.xTicks, text(c.xLabel(v)))
	}
	for _, v := range c.y.Marks {
		r.grid = append(r.grid, canvas.NewLine(chartGrid))
		r.yTicks = append(r.yTicks, text(c.yLabel(v)))
	}
	for _, g := range r.grid {
		r.objs = append(r.objs, g)
	}
	for _, t := range r.xTicks {
		r.objs = append(r.objs, t)
	}
	for _, t := range r.yTicks {
		r.objs = append(r.objs, t)
	}
	for i := range r.axes {
		r.axes[i] = canvas.NewLine(fg)
		r.objs = append(r.objs, r.axes[i])
	}
	r.title = text(c.xTitle)
	r.objs = append(r.objs, r.title)
	for i := 1; i < len(c.s.Second); i++ {
		l := canvas.NewLine(chartSecond)
		l.StrokeWidth = 1
		r.second = append(r.second, l)
		r.objs = append(r.objs, l)
	}
	for i := 1; i < len(c.s.Y); i++ {
		l := canvas.NewLine(chartLine)
		l.StrokeWidth = 2
		r.lines = append(r.lines, l)
		r.objs = append(r.objs, l)
	}
	for range c.s.Y {
		m := canvas.NewCircle(theme.Color(theme.ColorNameBackground))
		m.StrokeColor, m.StrokeWidth = chartLine, 2
		r.marks = append(r.marks, m)
		r.objs = append(r.objs, m)
	}
}

// layout returns the plot area's left edge, width and height within size.
func (r *lineChartRenderer) areas(size fyne.Size) (left, w, h float32) {
	for _, t := range r.yTicks {
		left = max(left, t.MinSize().Width)
	}
	left += 6
	th := r.title.MinSize().Height
	h = size.Height - 2*th - 8
	w = size.Width - left - 12
	return left, max(w, 10), max(h, 10)
}

func (r *lineChartRenderer) px(left, w float32, x float64) float32 {
	return left + w*float32(r.c.x.Frac(x))
}

func (r *lineChartRenderer) py(h float32, y float64) float32 {
	return h - h*float32(r.c.y.Frac(y))
}

func (r *lineChartRenderer) Layout(size fyne.Size) {
	c := r.c
	left, w, h := r.areas(size)
	r.plotW, r.plotH = w, h
	r.band.Move(fyne.NewPos(left, 0))
	r.band.Resize(fyne.NewSize(w, h))
	g := 0
	for i, v := range c.x.Marks {
		x := r.px(left, w, v)
		r.grid[g].Position1, r.grid[g].Position2 = fyne.NewPos(x, 0), fyne.NewPos(x, h)
		g++
		ts := r.xTicks[i].MinSize()
		r.xTicks[i].Move(fyne.NewPos(x-ts.Width/2, h+2))
	}
	for i, v := range c.y.Marks {
		y := r.py(h, v)
		r.grid[g].Position1, r.grid[g].Position2 = fyne.NewPos(left, y), fyne.NewPos(left+w, y)
		g++
		ts := r.yTicks[i].MinSize()
		r.yTicks[i].Move(fyne.NewPos(left-6-ts.Width, y-ts.Height/2))
	}
	r.axes[0].Position1, r.axes[0].Position2 = fyne.NewPos(left, 0), fyne.NewPos(left, h)
	r.axes[1].Position1, r.axes[1].Position2 = fyne.NewPos(left, h), fyne.NewPos(left+w, h)
	ts := r.title.MinSize()
	r.title.Move(fyne.NewPos(left+w/2-ts.Width/2, h+2+ts.Height+2))
	pt := func(i int, ys []float64) fyne.Position {
		return fyne.NewPos(r.px(left, w, c.s.X[i]), r.py(h, ys[i]))
	}
	for i, l := range r.lines {
		l.Position1, l.Position2 = pt(i, c.s.Y), pt(i+1, c.s.Y)
	}
	for i, l := range r.second {
		l.Position1, l.Position2 = pt(i, c.s.Second), pt(i+1, c.s.Second)
	}
	const d = 4
	for i, m := range r.marks {
		p := pt(i, c.s.Y)
		m.Position1, m.Position2 = fyne.NewPos(p.X-d, p.Y-d), fyne.NewPos(p.X+d, p.Y+d)
	}
	r.band.Refresh()
}

// bandPixel colours the pixels of the plot area between the band's
// lower and upper lines, interpolated between the points.
func (r *lineChartRenderer) bandPixel(x, y, w, h int) color.Color {
	s := r.c.s
	if len(s.Lo) == 0 || len(s.Lo) != len(s.X) || w == 0 || h == 0 {
		return color.Transparent
	}
	// The raster's pixels may be finer than the layout's units.
	fx := float64(x) / float64(w)
	var lo, hi float64
	found := false
	for i := 0; i+1 < len(s.X); i++ {
		a, b := r.c.x.Frac(s.X[i]), r.c.x.Frac(s.X[i+1])
		if fx < a || fx > b || b <= a {
			continue
		}
		t := (fx - a) / (b - a)
		lo = lerp(r.c.y.Frac(s.Lo[i]), r.c.y.Frac(s.Lo[i+1]), t)
		hi = lerp(r.c.y.Frac(s.Hi[i]), r.c.y.Frac(s.Hi[i+1]), t)
		found = true
		break
	}
	if len(s.X) == 1 {
		a := r.c.x.Frac(s.X[0])
		if math.Abs(fx-a)*float64(w) <= 3 {
			lo, hi, found = r.c.y.Frac(s.Lo[0]), r.c.y.Frac(s.Hi[0]), true
		}
	}
	fy := 1 - float64(y)/float64(h)
	if found && fy >= lo && fy <= hi {
		return chartBand
	}
	return color.Transparent
}

func lerp(a, b, t float64) float64 { return a + (b-a)*t }

func (r *lineChartRenderer) MinSize() fyne.Size {
	return fyne.NewSize(360, 180)
}

func (r *lineChartRenderer) Refresh() {
	r.build()
	r.Layout(r.c.Size())
	canvas.Refresh(r.c)
}
