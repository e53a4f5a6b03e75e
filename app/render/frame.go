package render

import (
	"image"
	"math"
	"unsafe"

	"github.com/golang/geo/r2"
)

// Renderer fills a frame buffer from a Scene and a View. It keeps its
// buffers between frames, so a frame allocates nothing once the size is
// stable. A Renderer is not safe for concurrent use.
type Renderer struct {
	// Aliased draws the overlays without antialiasing (the benchmark's
	// baseline for what antialiasing costs).
	Aliased bool

	img *image.RGBA
	pix []uint32

	terr  []int8   // terrace index per pixel, -1 none, -2 outside the field
	total []uint16 // painted sites per pixel, all layers (saturating)
	best  []uint16 // the largest single layer's count per pixel
	owner []uint16 // 1 + index of that layer, 0 for none
	line  []uint32 // one layer's counts along one pixel row

	tabs  []axisTables
	xs    []float64 // scanline crossings, reused
	lut   []uint32  // layer colours by coverage level
	grid  []uint16  // atomic mode: owner per visible site
	alut  []uint32  // atomic mode: dot, bond, tint per layer
	bg    *backgrounds
	stats FrameStats
	near  []int32 // route items near the view (routeGrid), reused
}

// FrameStats describes the last frame, for the status bar and tests.
type FrameStats struct {
	Atomic bool // drew single sites rather than coverage
	Pixels int  // pixels on a terrace
}

// maxLayers is the most regions a frame draws (owners are 16-bit).
const maxLayers = 1<<16 - 1

// Image returns the buffer of the last frame. It is reused by the next
// call to Render.
func (r *Renderer) Image() *image.RGBA { return r.img }

// Stats returns a description of the last frame.
func (r *Renderer) Stats() FrameStats { return r.stats }

// Render draws the scene through view into the renderer's buffer and
// returns it. The cost is proportional to the pixels of the frame plus
// the painted sites in view divided by 64 (row bitsets are counted a word
// at a time), never to the number of sites in the design.
func (r *Renderer) Render(sc *Scene, v View) *image.RGBA {
	r.resize(v.W, v.H)
	r.stats = FrameStats{}
	if v.W == 0 || v.H == 0 {
		return r.img
	}
	if sc == nil || sc.Surface == nil {
		fill(r.pix, packRGBA(ColOutside))
		return r.img
	}
	r.prepareTerraces(sc.Surface, v)
	if v.Scale <= atomicScale {
		r.stats.Atomic = true
		r.drawAtomic(sc, v)
	} else {
		r.drawCoverage(sc, v)
	}
	r.drawSurveyImage(sc.Survey, v)
	r.drawOverlays(sc, v)
	return r.img
}

func (r *Renderer) resize(w, h int) {
	if r.img != nil && r.img.Rect.Dx() == w && r.img.Rect.Dy() == h {
		return
	}
	r.img = image.NewRGBA(image.Rect(0, 0, w, h))
	n := w * h
	if n > 0 {
		r.pix = unsafe.Slice((*uint32)(unsafe.Pointer(&r.img.Pix[0])), n)
	} else {
		r.pix = nil
	}
	r.terr = make([]int8, n)
	r.total = make([]uint16, n)
	r.best = make([]uint16, n)
	r.owner = make([]uint16, n)
	r.line = make([]uint32, w)
}

func fill[T any](s []T, v T) {
	for i := range s {
		s[i] = v
	}
}

func growRng(s []rng, n int) []rng {
	if cap(s) < n {
		return make([]rng, n)
	}
	return s[:n]
}

func grow[T any](s []T, n int) []T {
	if cap(s) < n {
		return make([]T, n)
	}
	return s[:n]
}

// screenBox returns the pixel rectangle [x0, x1) x [y0, y1) holding the
// field rectangle b, grown by one pixel and clipped to the frame.
func screenBox(b r2.Rect, v View) (x0, y0, x1, y1 int) {
	if b.IsEmpty() {
		return 0, 0, 0, 0
	}
	ax, ay := v.ToScreen(r2.Point{X: b.X.Lo, Y: b.Y.Hi})
	bx, by := v.ToScreen(r2.Point{X: b.X.Hi, Y: b.Y.Lo})
	x0 = max(int(math.Floor(ax))-1, 0)
	y0 = max(int(math.Floor(ay))-1, 0)
	x1 = min(int(math.Ceil(bx))+2, v.W)
	y1 = min(int(math.Ceil(by))+2, v.H)
	if x0 >= x1 || y0 >= y1 {
		return 0, 0, 0, 0
	}
	return x0, y0, x1, y1
}
