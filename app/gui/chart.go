package gui

import (
	"image/color"
	"math"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/canvas"
	"fyne.io/fyne/v2/theme"
	"fyne.io/fyne/v2/widget"
)

// Bar is one bar of a BarChart.
type Bar struct {
	Label string
	Value float64 // bar length, in any unit shared by the chart's bars
	Text  string  // printed after the bar
	Color color.Color
}

// BarChart is a horizontal bar chart: a label column, bars scaled to the
// largest value, and each bar's value as text. It is drawn with Fyne
// rectangles and text, so it stays crisp at any size.
type BarChart struct {
	widget.BaseWidget
	bars []Bar
}

// NewBarChart returns a chart of bars.
func NewBarChart(bars []Bar) *BarChart {
	c := &BarChart{bars: bars}
	c.ExtendBaseWidget(c)
	return c
}

// SetBars replaces the bars.
func (c *BarChart) SetBars(bars []Bar) {
	c.bars = bars
	c.Refresh()
}

// CreateRenderer implements fyne.Widget.
func (c *BarChart) CreateRenderer() fyne.WidgetRenderer {
	r := &barRenderer{c: c}
	r.rebuild()
	return r
}

type barRenderer struct {
	c      *BarChart
	labels []*canvas.Text
	rects  []*canvas.Rectangle
	texts  []*canvas.Text
	track  []*canvas.Rectangle
	objectList
}

const barHeight = 14

func (r *barRenderer) rebuild() {
	r.labels, r.rects, r.texts, r.track, r.objs = nil, nil, nil, nil, nil
	fg := theme.Color(theme.ColorNameForeground)
	for _, b := range r.c.bars {
		l := canvas.NewText(b.Label, fg)
		l.TextSize = theme.TextSize() * 0.9
		t := canvas.NewText(b.Text, fg)
		t.TextSize = theme.TextSize() * 0.9
		tr := canvas.NewRectangle(color.NRGBA{0x80, 0x80, 0x80, 0x30})
		rc := canvas.NewRectangle(b.Color)
		r.labels, r.texts, r.track, r.rects = append(r.labels, l), append(r.texts, t), append(r.track, tr), append(r.rects, rc)
		r.objs = append(r.objs, l, tr, rc, t)
	}
}

func (r *barRenderer) columns() (lw, tw, rowH float32) {
	for i := range r.labels {
		lw = max(lw, r.labels[i].MinSize().Width)
		tw = max(tw, r.texts[i].MinSize().Width)
		rowH = max(rowH, r.labels[i].MinSize().Height)
	}
	return lw, tw, max(rowH, barHeight) + 4
}

func (r *barRenderer) Layout(size fyne.Size) {
	lw, tw, rowH := r.columns()
	// The right margin keeps the figures clear of a scroll bar.
	const gap, margin = 6, 10
	barMax := size.Width - lw - tw - 2*gap - margin
	if barMax < 10 {
		barMax = 10
	}
	top := 0.0
	for _, b := range r.c.bars {
		top = math.Max(top, b.Value)
	}
	for i, b := range r.c.bars {
		y := float32(i) * rowH
		r.labels[i].Move(fyne.NewPos(0, y))
		frac := float32(0)
		if top > 0 && b.Value > 0 {
			frac = float32(b.Value / top)
		}
		w := max(frac*barMax, 0)
		if b.Value > 0 {
			w = max(w, 2)
		}
		by := y + (rowH-barHeight)/2 - 1
		r.track[i].Move(fyne.NewPos(lw+gap, by))
		r.track[i].Resize(fyne.NewSize(barMax, barHeight))
		r.rects[i].Move(fyne.NewPos(lw+gap, by))
		r.rects[i].Resize(fyne.NewSize(w, barHeight))
		r.texts[i].Move(fyne.NewPos(lw+gap+barMax+gap, y))
	}
}

func (r *barRenderer) MinSize() fyne.Size {
	lw, tw, rowH := r.columns()
	// Bars need little room to be read; the labels and figures set the
	// width, so a chart of long names (the session's fourteen kinds of
	// time) still fits a narrow panel.
	return fyne.NewSize(lw+tw+48, rowH*float32(len(r.c.bars)))
}

func (r *barRenderer) Refresh() {
	r.rebuild()
	r.Layout(r.c.Size())
	canvas.Refresh(r.c)
}

// objectList gives the charts' renderers the Objects and Destroy of
// fyne.WidgetRenderer over the objects they draw (rebuilt on Refresh).
type objectList struct{ objs []fyne.CanvasObject }

func (o *objectList) Objects() []fyne.CanvasObject { return o.objs }
func (o *objectList) Destroy()                     {}
