package render

import (
	"math"

	"github.com/golang/geo/r2"
)

// View maps the field (nm, y up) to the pixels of one frame (y down). It
// is a value: zooming and panning return a new View.
type View struct {
	// Center is the field point, in nm, at the centre of the frame.
	Center r2.Point
	// Scale is the size of one device pixel in nm (nm/px); smaller is
	// more zoomed in.
	Scale float64
	// W and H are the frame size in device pixels.
	W, H int
}

// Zoom limits, in nm per device pixel. The finest shows a dimer about 77
// pixels wide; the coarsest shows a 20 µm field in 1000 pixels.
const (
	MinScale = 0.005
	MaxScale = 20.0
)

// atomicScale is the largest scale (nm/px) at which the frame draws
// individual H sites and dimer bonds: a dimer is then at least about five
// pixels wide, enough to tell its two sites apart.
const atomicScale = 0.08

// Atomic reports whether the frame draws single H sites and dimer bonds
// at this scale (atomic zoom), where anything laid over the view hides
// sites.
func (v View) Atomic() bool { return v.Scale <= atomicScale }

// ToScreen returns the frame position, in device pixels, of field point p.
func (v View) ToScreen(p r2.Point) (x, y float64) {
	x = (p.X-v.Center.X)/v.Scale + float64(v.W)/2
	y = float64(v.H)/2 - (p.Y-v.Center.Y)/v.Scale
	return x, y
}

// ToField returns the field point, in nm, under frame position (x, y)
// in device pixels.
func (v View) ToField(x, y float64) r2.Point {
	return r2.Point{
		X: v.Center.X + (x-float64(v.W)/2)*v.Scale,
		Y: v.Center.Y - (y-float64(v.H)/2)*v.Scale,
	}
}

// Bounds returns the field rectangle, in nm, that the frame shows.
func (v View) Bounds() r2.Rect {
	return r2.RectFromPoints(v.ToField(0, float64(v.H)), v.ToField(float64(v.W), 0))
}

// ZoomAt returns the view zoomed by factor (> 1 zooms in) keeping the
// field point under frame position (x, y) where it is. The scale is
// clamped to [MinScale, MaxScale].
func (v View) ZoomAt(x, y, factor float64) View {
	if !(factor > 0) || math.IsInf(factor, 0) {
		return v
	}
	p := v.ToField(x, y)
	v.Scale = clampf(v.Scale/factor, MinScale, MaxScale)
	// Put p back under (x, y).
	q := v.ToField(x, y)
	v.Center = v.Center.Add(p.Sub(q))
	return v
}

// Pan returns the view moved so that the content follows a pointer
// dragged by (dx, dy) device pixels.
func (v View) Pan(dx, dy float64) View {
	v.Center = v.Center.Add(r2.Point{X: -dx * v.Scale, Y: dy * v.Scale})
	return v
}

// Resized returns the view with a new frame size, keeping centre and
// scale.
func (v View) Resized(w, h int) View {
	v.W, v.H = w, h
	return v
}

// FitView returns the view of a w x h pixel frame that shows rect whole,
// with margin pixels to spare on every side.
func FitView(rect r2.Rect, w, h, margin int) View {
	v := View{Center: rect.Center(), W: w, H: h, Scale: 1}
	aw, ah := float64(w-2*margin), float64(h-2*margin)
	if aw < 1 {
		aw = 1
	}
	if ah < 1 {
		ah = 1
	}
	size := rect.Size()
	s := math.Max(size.X/aw, size.Y/ah)
	if !(s > 0) {
		s = 1
	}
	v.Scale = clampf(s, MinScale, MaxScale)
	return v
}

// CenteredOn returns the view moved to centre p, zoomed in to scale
// unless it already shows more detail.
func (v View) CenteredOn(p r2.Point, scale float64) View {
	v.Center = p
	if scale < v.Scale {
		v.Scale = clampf(scale, MinScale, MaxScale)
	}
	return v
}

func clampf(v, lo, hi float64) float64 { return min(max(v, lo), hi) }
