package gui

import (
	"fmt"
	"image"
	"image/color"
	"math"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/canvas"
	"fyne.io/fyne/v2/driver/desktop"
	"fyne.io/fyne/v2/theme"
	"fyne.io/fyne/v2/widget"
	"github.com/golang/geo/r2"

	"dimerpath/app/editor"
	"dimerpath/app/render"
	"dimerpath/planner"
)

// LatticeView is the canvas: it draws the session's current variant on
// the lattice with a raster filled by Renderer, and turns pointer events
// into pan, zoom and tool actions on the session. It keeps only view
// state (where it looks and how close); everything drawn comes from the
// session.
type LatticeView struct {
	widget.BaseWidget

	s    *editor.Session
	Opts editor.SceneOptions

	view     render.View
	pxPerDot float32 // device pixels per Fyne unit, from the last frame
	fitted   bool
	// atFit says the view shows the whole field as Fit made it, and the
	// user has not panned or zoomed since: it is fitted again when the
	// view is resized or the legend beside the field changes size.
	atFit   bool
	rend    render.Renderer
	raster  *canvas.Raster
	scene   *render.Scene
	route   *render.RouteOverlay
	routeOf *planner.Plan

	button   desktop.MouseButton
	panning  bool
	pressed  bool
	lastDrag fyne.Position
	rightAt  *fyne.Position

	// OnCursor is called with the field point under the pointer (ok false
	// when it leaves the view).
	OnCursor func(p r2.Point, ok bool)
	// OnViewChanged is called after a pan or zoom.
	OnViewChanged func()
	// OnKey and OnRune receive keys typed while the view has focus.
	OnKey  func(*fyne.KeyEvent)
	OnRune func(rune)

	scaleBar   *canvas.Rectangle
	scaleTicks [2]*canvas.Rectangle
	scaleText  *canvas.Text
	scaleBack  *canvas.Rectangle
	legend     fyne.CanvasObject
	focused    bool
}

// NewLatticeView returns the canvas of session s.
func NewLatticeView(s *editor.Session) *LatticeView {
	lv := &LatticeView{s: s, Opts: editor.SceneOptions{Route: true, Findings: true}, pxPerDot: 1}
	lv.raster = canvas.NewRaster(lv.generate)
	lv.raster.ScaleMode = canvas.ImageScalePixels
	lv.scaleBar = canvas.NewRectangle(color.White)
	lv.scaleTicks = [2]*canvas.Rectangle{canvas.NewRectangle(color.White), canvas.NewRectangle(color.White)}
	lv.scaleText = canvas.NewText("", color.White)
	lv.scaleText.TextSize = theme.TextSize() * 0.9
	lv.scaleBack = canvas.NewRectangle(color.NRGBA{0, 0, 0, 0x90})
	lv.scaleBack.CornerRadius = 4
	lv.ExtendBaseWidget(lv)
	return lv
}

// View returns the current view.
func (lv *LatticeView) View() render.View { return lv.view }

// SetView replaces the view and redraws.
func (lv *LatticeView) SetView(v render.View) {
	v.W, v.H = lv.view.W, lv.view.H
	v.Scale = min(max(v.Scale, render.MinScale), render.MaxScale)
	lv.view = v
	lv.fitted, lv.atFit = true, false
	lv.changed()
}

// SetLegend places obj in the top-right corner of the view.
func (lv *LatticeView) SetLegend(obj fyne.CanvasObject) {
	lv.legend = obj
	lv.Refresh()
}

// SetRoute gives the view the route overlay of plan p, made by the
// caller (render.RouteOf) off Fyne's goroutine; the view uses it while
// p is the session's plan, instead of making its own.
func (lv *LatticeView) SetRoute(p *planner.Plan, rt *render.RouteOverlay) {
	lv.route, lv.routeOf = rt, p
}

// Invalidate rebuilds the scene from the session and redraws.
func (lv *LatticeView) Invalidate() {
	lv.scene = nil
	lv.raster.Refresh()
}

func (lv *LatticeView) changed() {
	lv.raster.Refresh()
	lv.updateScaleBar()
	if lv.OnViewChanged != nil {
		lv.OnViewChanged()
	}
}

// buildScene returns the scene, rebuilding it when the session changed.
func (lv *LatticeView) buildScene() *render.Scene {
	if lv.scene != nil {
		return lv.scene
	}
	opts := lv.Opts
	opts.Route = false // the overlay is kept here, made in the planning goroutine
	sc := lv.s.Scene(opts)
	if lv.Opts.Route {
		if p, _ := lv.s.Plan(); p != nil {
			if lv.routeOf != p {
				lv.route, lv.routeOf = render.RouteOf(p), p
			}
			sc.Route = lv.route
			sc.DimLayers = true
		}
	}
	lv.scene = sc
	return sc
}

// generate is the raster's generator: w x h device pixels.
func (lv *LatticeView) generate(w, h int) image.Image {
	if sz := lv.Size(); sz.Width > 0 {
		lv.pxPerDot = float32(w) / sz.Width
	}
	if w != lv.view.W || h != lv.view.H {
		lv.view = lv.view.Resized(w, h)
		if lv.atFit {
			lv.fitted = false
		}
	}
	if !lv.fitted && w > 0 && h > 0 && lv.s.Surface() != nil {
		lv.view = lv.fitView()
		lv.fitted, lv.atFit = true, true
		lv.updateScaleBar()
	}
	return lv.rend.Render(lv.buildScene(), lv.view)
}

// Fit shows the whole field.
func (lv *LatticeView) Fit() {
	if lv.s.Surface() == nil {
		return
	}
	lv.view = lv.fitView()
	lv.fitted, lv.atFit = true, true
	lv.changed()
}

// LegendChanged fits the field again beside the legend if the view shows
// the whole field and the legend now covers part of it, so a legend that
// grew (a plan's route, findings) or was shown does not hide the field.
// A legend that still fits leaves the view alone: the field does not
// jump under the pointer while the user draws. A view the user zoomed
// or panned is left alone too.
func (lv *LatticeView) LegendChanged() {
	if lv.atFit && lv.view.W > 0 && lv.s.Surface() != nil && lv.legendCoversField() {
		lv.view = lv.fitView()
		lv.changed()
	}
}

// legendCoversField reports whether the legend, laid out in the view's
// top-right corner at its current size, overlaps the field.
func (lv *LatticeView) legendCoversField() bool {
	if lv.legend == nil || !lv.legend.Visible() {
		return false
	}
	ls := lv.legend.MinSize()
	w := float64(lv.view.W) / float64(lv.pxPerDot)
	legend := r2.RectFromPoints(
		r2.Point{X: w - float64(ls.Width) - legendPad, Y: legendPad},
		r2.Point{X: w - legendPad, Y: legendPad + float64(ls.Height)})
	f := lv.s.Surface().Field
	a, b := lv.PositionOf(r2.Point{X: f.X.Lo, Y: f.Y.Hi}), lv.PositionOf(r2.Point{X: f.X.Hi, Y: f.Y.Lo})
	field := r2.RectFromPoints(r2.Point{X: float64(a.X), Y: float64(a.Y)}, r2.Point{X: float64(b.X), Y: float64(b.Y)})
	return legend.Intersects(field)
}

// fitView returns the view showing the whole field beside the legend:
// the field is fitted into the part of the view the legend leaves free,
// unless that would leave it less than 40 % of the view's width (then
// the legend, which can be hidden, overlaps it).
func (lv *LatticeView) fitView() render.View {
	w, h := lv.view.W, lv.view.H
	free := w
	if lv.legend != nil && lv.legend.Visible() {
		lw := int(float32(lv.legend.MinSize().Width+legendPad+12) * lv.pxPerDot)
		if w-lw >= w*2/5 {
			free = w - lw
		}
	}
	v := render.FitView(lv.s.Surface().Field, free, h, 24)
	v.Center.X += float64(w-free) / 2 * v.Scale
	v.W = w
	return v
}

// ZoomTo shows rect (nm) filling most of the view, at least as close as
// minScale nm/px allows.
func (lv *LatticeView) ZoomTo(rect r2.Rect) {
	if lv.view.W == 0 {
		return
	}
	grown := rect.ExpandedByMargin(math.Max(rect.Size().X, rect.Size().Y)*0.3 + 5)
	v := render.FitView(grown, lv.view.W, lv.view.H, 40)
	lv.view = v
	lv.fitted, lv.atFit = true, false
	lv.changed()
}

// ZoomBy zooms around the centre of the view.
func (lv *LatticeView) ZoomBy(f float64) {
	lv.view = lv.view.ZoomAt(float64(lv.view.W)/2, float64(lv.view.H)/2, f)
	lv.atFit = false
	lv.changed()
}

// toDevice converts a widget position to device pixels.
func (lv *LatticeView) toDevice(p fyne.Position) (float64, float64) {
	return float64(p.X * lv.pxPerDot), float64(p.Y * lv.pxPerDot)
}

// FieldAt returns the field point (nm) under widget position p.
func (lv *LatticeView) FieldAt(p fyne.Position) r2.Point {
	x, y := lv.toDevice(p)
	return lv.view.ToField(x, y)
}

// PositionOf returns the widget position of field point q.
func (lv *LatticeView) PositionOf(q r2.Point) fyne.Position {
	x, y := lv.view.ToScreen(q)
	return fyne.NewPos(float32(x)/lv.pxPerDot, float32(y)/lv.pxPerDot)
}

// nearNM is how close, in nm, a click must be to a path vertex to hit
// it: eight units on screen.
func (lv *LatticeView) nearNM() float64 { return 8 * float64(lv.pxPerDot) * lv.view.Scale }

// Scrolled zooms around the pointer; a real wheel notch is 25 units and
// zooms by 1.25.
func (lv *LatticeView) Scrolled(ev *fyne.ScrollEvent) {
	f := math.Pow(1.25, float64(ev.Scrolled.DY)/25)
	x, y := lv.toDevice(ev.Position)
	lv.view = lv.view.ZoomAt(x, y, f)
	lv.atFit = false
	lv.changed()
}

// MouseDown and MouseUp record the button, so a middle-button drag pans
// with any tool.
func (lv *LatticeView) MouseDown(ev *desktop.MouseEvent) {
	lv.takeFocus()
	lv.button = ev.Button
	if ev.Button == desktop.MouseButtonSecondary {
		p := ev.Position
		lv.rightAt = &p
	}
}

// MouseUp forgets the button pressed.
func (lv *LatticeView) MouseUp(ev *desktop.MouseEvent) {
	lv.button = 0
	lv.rightAt = nil
}

// Dragged pans (pan tool, middle button) or drives the tool.
func (lv *LatticeView) Dragged(ev *fyne.DragEvent) {
	if !lv.pressed {
		lv.pressed = true
		start := ev.Position.Subtract(fyne.NewPos(ev.Dragged.DX, ev.Dragged.DY))
		lv.panning = lv.s.Tool == editor.ToolPan || lv.button == desktop.MouseButtonTertiary
		if !lv.panning {
			lv.s.SetNear(lv.nearNM())
			lv.s.Press(lv.FieldAt(start))
		}
	}
	if lv.panning {
		dx, dy := float64(ev.Dragged.DX*lv.pxPerDot), float64(ev.Dragged.DY*lv.pxPerDot)
		lv.view = lv.view.Pan(dx, dy)
		lv.atFit = false
		lv.changed()
	} else {
		lv.s.Drag(lv.FieldAt(ev.Position))
	}
	lv.lastDrag = ev.Position
	lv.cursor(ev.Position)
}

// DragEnd ends a pan or a tool drag.
func (lv *LatticeView) DragEnd() {
	if lv.pressed && !lv.panning {
		lv.s.Release(lv.FieldAt(lv.lastDrag))
	}
	lv.pressed, lv.panning = false, false
}

// Tapped is a click with the current tool.
func (lv *LatticeView) Tapped(ev *fyne.PointEvent) {
	lv.takeFocus()
	if lv.s.Tool == editor.ToolPan {
		return
	}
	lv.s.Click(lv.FieldAt(ev.Position), lv.nearNM())
}

// MouseIn, MouseMoved and MouseOut track the pointer for the status bar
// and the tool previews; a right-button drag pans. The pointer coming
// over the view takes the keyboard focus: Esc, Delete and the tool keys
// then act on the lattice, whatever panel field was used last (see
// keys.go).
func (lv *LatticeView) MouseIn(ev *desktop.MouseEvent) {
	lv.takeFocus()
	lv.MouseMoved(ev)
}

// MouseMoved reports the pointer and pans during a right-button drag.
func (lv *LatticeView) MouseMoved(ev *desktop.MouseEvent) {
	if ev.Button == desktop.MouseButtonSecondary && lv.rightAt != nil {
		d := ev.Position.Subtract(*lv.rightAt)
		lv.view = lv.view.Pan(float64(d.X*lv.pxPerDot), float64(d.Y*lv.pxPerDot))
		p := ev.Position
		lv.rightAt = &p
		lv.atFit = false
		lv.changed()
	}
	lv.cursor(ev.Position)
	lv.s.Hover(lv.FieldAt(ev.Position))
}

// MouseOut clears the pointer readout and previews.
func (lv *LatticeView) MouseOut() {
	lv.s.Unhover()
	if lv.OnCursor != nil {
		lv.OnCursor(r2.Point{}, false)
	}
}

func (lv *LatticeView) cursor(p fyne.Position) {
	if lv.OnCursor != nil {
		lv.OnCursor(lv.FieldAt(p), true)
	}
}

// takeFocus makes the view the focused widget, as a text field does
// when clicked: Fyne leaves the focus where it was on a click into a
// focusable widget, so without this the keys typed after drawing (Enter
// to close a polygon, a tool's letter, Delete) would still go to the
// last text field, renaming a region instead.
func (lv *LatticeView) takeFocus() {
	if c := fyne.CurrentApp().Driver().CanvasForObject(lv); c != nil && c.Focused() != lv {
		c.Focus(lv)
	}
}

// FocusGained makes the view focusable, so that keys typed after
// clicking it reach the tool shortcuts rather than the last text field.
func (lv *LatticeView) FocusGained() { lv.focused = true }

// FocusLost implements fyne.Focusable.
func (lv *LatticeView) FocusLost() { lv.focused = false }

// TypedRune passes a typed character to OnRune.
func (lv *LatticeView) TypedRune(r rune) {
	if lv.OnRune != nil {
		lv.OnRune(r)
	}
}

// TypedKey passes a typed key to OnKey.
func (lv *LatticeView) TypedKey(k *fyne.KeyEvent) {
	if lv.OnKey != nil {
		lv.OnKey(k)
	}
}

// legendPad is the legend's distance from the view's top-right corner.
const legendPad = 12

// MinSize lets the view shrink: the window decides its size.
func (lv *LatticeView) MinSize() fyne.Size { return fyne.NewSize(200, 150) }

// updateScaleBar sizes the scale bar for the view: the longest 1-2-5
// length that fits in 160 units.
func (lv *LatticeView) updateScaleBar() {
	nmPerUnit := lv.view.Scale * float64(lv.pxPerDot)
	if !(nmPerUnit > 0) {
		return
	}
	l := niceLength(160 * nmPerUnit)
	text := formatLength(l)
	w := float32(l / nmPerUnit)
	if text == lv.scaleText.Text && w == lv.scaleBar.Size().Width {
		return
	}
	lv.scaleText.Text = text
	lv.scaleBar.Resize(fyne.NewSize(w, 4))
	// Only the scale bar moves; the legend is left alone while panning.
	lv.layoutScale(lv.Size())
	for _, o := range []fyne.CanvasObject{lv.scaleBack, lv.scaleBar, lv.scaleTicks[0], lv.scaleTicks[1], lv.scaleText} {
		canvas.Refresh(o)
	}
}

// formatLength prints a length in nm in the unit that reads best.
func formatLength(nm float64) string {
	switch {
	case nm >= 1000:
		return trimZeros(fmt.Sprintf("%.3f", nm/1000)) + " µm"
	case nm >= 1:
		return trimZeros(fmt.Sprintf("%.2f", nm)) + " nm"
	default:
		// Below a nanometre still in nm, as the lattice constants are
		// quoted (0.384 nm, not 384 pm).
		return trimZeros(fmt.Sprintf("%.3f", nm)) + " nm"
	}
}

func trimZeros(s string) string {
	for len(s) > 1 && s[len(s)-1] == '0' && containsDot(s) {
		s = s[:len(s)-1]
	}
	if s != "" && s[len(s)-1] == '.' {
		s = s[:len(s)-1]
	}
	return s
}

func containsDot(s string) bool {
	for _, c := range s {
		if c == '.' {
			return true
		}
	}
	return false
}

// CreateRenderer implements fyne.Widget.
func (lv *LatticeView) CreateRenderer() fyne.WidgetRenderer {
	return &latticeRenderer{lv: lv}
}

type latticeRenderer struct{ lv *LatticeView }

func (r *latticeRenderer) Layout(size fyne.Size) {
	lv := r.lv
	lv.raster.Resize(size)
	lv.raster.Move(fyne.NewPos(0, 0))
	lv.layoutScale(size)
	if lv.legend != nil {
		ls := lv.legend.MinSize()
		lv.legend.Resize(ls)
		lv.legend.Move(fyne.NewPos(size.Width-ls.Width-legendPad, legendPad))
	}
}

// layoutScale places the scale bar in the bottom-left corner.
func (lv *LatticeView) layoutScale(size fyne.Size) {
	const pad = 12
	bw := lv.scaleBar.Size().Width
	ts := lv.scaleText.MinSize()
	backW := float32(math.Max(float64(bw), float64(ts.Width))) + 2*pad
	backH := ts.Height + 4 + 8 + pad
	lv.scaleBack.Resize(fyne.NewSize(backW, backH))
	lv.scaleBack.Move(fyne.NewPos(pad, size.Height-backH-pad))
	x0 := float32(pad + pad)
	lv.scaleText.Move(fyne.NewPos(x0, size.Height-backH-pad+4))
	yb := size.Height - pad - pad/2 - 6
	lv.scaleBar.Move(fyne.NewPos(x0, yb))
	for k, t := range lv.scaleTicks {
		t.Resize(fyne.NewSize(2, 10))
		t.Move(fyne.NewPos(x0+float32(k)*(bw-2), yb-3))
	}
}

func (r *latticeRenderer) MinSize() fyne.Size { return r.lv.MinSize() }

func (r *latticeRenderer) Refresh() {
	r.Layout(r.lv.Size())
	canvas.Refresh(r.lv.scaleText)
	canvas.Refresh(r.lv.scaleBar)
	if r.lv.legend != nil {
		r.lv.legend.Refresh()
	}
}

func (r *latticeRenderer) Objects() []fyne.CanvasObject {
	lv := r.lv
	objs := []fyne.CanvasObject{lv.raster, lv.scaleBack, lv.scaleBar, lv.scaleTicks[0], lv.scaleTicks[1], lv.scaleText}
	if lv.legend != nil {
		objs = append(objs, lv.legend)
	}
	return objs
}

func (r *latticeRenderer) Destroy() {}

// niceLength returns the largest 1, 2 or 5 x 10^k that is at most max,
// for the length of a scale bar (max > 0).
func niceLength(max float64) float64 {
	if !(max > 0) {
		return 0
	}
	e := math.Floor(math.Log10(max))
	base := math.Pow(10, e)
	for _, m := range []float64{5, 2, 1} {
		if m*base <= max*(1+1e-12) {
			return m * base
		}
	}
	return base
}
