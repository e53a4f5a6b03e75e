package render

import (
	"image"
	"image/color"
	"math"
	"math/bits"
	"slices"
	"sort"
	"unsafe"

	"github.com/golang/geo/r2"

	"dimerpath/lattice"
)

// Scene is what one frame of the lattice view shows. The renderer only
// reads it. Layers and overlays are prepared by the editor state when the
// design, plan or selection change, not per frame.
type Scene struct {
	Surface *lattice.Surface
	// Layers are the regions of the current variant, bottom first: where
	// two overlap, the one with more sites in a pixel colours it.
	Layers []Layer
	// DimLayers mutes the region colours so that a route drawn over them
	// stands out.
	DimLayers bool
	Route     *RouteOverlay
	Fiducials []r2.Point
	Marks     []Mark
	Preview   *Preview
	// Selected outlines, in field nm.
	Selected []r2.Rect
	// SelectedShape is the extent of the selected shape (nm), drawn with
	// corner handles, or nil.
	SelectedShape *r2.Rect
}

// Layer is one region's sites as the view draws them.
type Layer struct {
	Sites *lattice.SiteSet
	Color color.NRGBA
	// Bounds is the field rectangle (nm) holding every site of Sites; the
	// renderer skips the pixels outside it.
	Bounds   r2.Rect
	Selected bool
}

// Mark is a design-rule finding drawn on the view.
type Mark struct {
	Bounds   r2.Rect // field nm; a point finding has a degenerate rectangle
	Error    bool    // error (red) or warning (amber)
	Selected bool
}

// Preview is a tool's shape while it is being drawn, in field nm.
type Preview struct {
	Points  []r2.Point
	Closed  bool    // a polygon rather than a polyline
	WidthNM float64 // a line's width; 0 draws the centre line only
	Rect    bool    // Points[0] and Points[1] are opposite corners
	// BrushNM, when > 0, draws a circle of this radius at Points[0].
	BrushNM float64
}

// RouteOverlay is a plan's route reduced to what the view draws.
type RouteOverlay struct {
	Strokes []RouteStroke
	Moves   [][2]r2.Point
	// Registrations are the fiducial positions segments register on.
	Registrations []r2.Point
}

// RouteStroke is one written stroke: a path of a given width, or a dwell
// point when Path has one point.
type RouteStroke struct {
	Path    []r2.Point
	WidthNM float64
	Segment int
	Bounds  r2.Rect
}

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
}

// FrameStats describes the last frame, for the status bar and tests.
type FrameStats struct {
	Atomic bool // drew single sites rather than coverage
	Pixels int  // pixels on a terrace
}

// coverage levels: a pixel's share of painted sites is shown in this
// many steps.
const levels = 16

// maxLayers is the most regions a frame draws (owners are 16-bit).
const maxLayers = 1<<16 - 1

// axisTables holds, for one terrace, the lattice range each pixel column
// and pixel row covers. For a RowsAlongX terrace the columns give site
// indices along the row and the pixel rows give dimer rows; for
// RowsAlongY the other way round.
type axisTables struct {
	// along and across are indexed by column or row depending on the
	// terrace's direction (see alongOfX).
	along, across []rng
	shade         []uint8 // per across pixel: 0 plain, 1 trough, 2 hatch
	alongOfX      bool    // along indexes columns (RowsAlongX)
	nRows, nIdx   int
	// Atomic mode.
	aDimer []int32 // nearest dimer per along pixel, -1 outside
	aDu2   []float32
	aBond  []bool
	cRow   []int32 // nearest row per across pixel, -1 outside
	cSide  []uint8
	cDv2   []float32
	cBond  []bool
	// Visible window of the owner grid.
	r0, r1, i0, i1 int
	gridOff        int
}

// rng is a half-open range [lo, hi) of rows or site indices.
type rng struct{ lo, hi int32 }

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

// prepareTerraces sets r.terr to the terrace of every pixel (by pixel
// centre) and builds each terrace's axis tables. Terraces with a
// boundary are scan-converted row by row; the first terrace that holds a
// point wins, as in lattice.Surface.TerraceAt.
func (r *Renderer) prepareTerraces(surf *lattice.Surface, v View) {
	w, h := v.W, v.H
	nt := len(surf.Terraces)
	if len(r.tabs) < nt {
		r.tabs = append(r.tabs, make([]axisTables, nt-len(r.tabs))...)
	}
	fallback := -1
	for i := range surf.Terraces {
		if len(surf.Terraces[i].Boundary) < 3 {
			fallback = i
			break
		}
	}
	// Field extent in pixels.
	fx0, fy1 := v.ToScreen(r2.Point{X: 0, Y: 0})
	fx1, fy0 := v.ToScreen(r2.Point{X: surf.Width(), Y: surf.Height()})
	cx0, cx1 := pixelSpan(fx0, fx1, w)
	cy0, cy1 := pixelSpan(fy0, fy1, h)
	base := int8(-1)
	if fallback >= 0 {
		base = int8(fallback)
	}
	for y := range h {
		row := r.terr[y*w : y*w+w]
		if y < cy0 || y >= cy1 {
			fill(row, -2)
			continue
		}
		fill(row[:cx0], -2)
		fill(row[cx0:cx1], base)
		fill(row[cx1:], -2)
	}
	// Bounded terraces, last first, so the first one ends on top.
	for t := nt - 1; t >= 0; t-- {
		poly := surf.Terraces[t].Boundary
		if len(poly) < 3 {
			continue
		}
		for y := cy0; y < cy1; y++ {
			yc := v.ToField(0, float64(y)+0.5).Y
			r.xs = r.xs[:0]
			j := len(poly) - 1
			for i := range poly {
				a, b := poly[i], poly[j]
				if (a.Y > yc) != (b.Y > yc) {
					r.xs = append(r.xs, a.X+(yc-a.Y)*(b.X-a.X)/(b.Y-a.Y))
				}
				j = i
			}
			slices.Sort(r.xs)
			row := r.terr[y*w : y*w+w]
			for k := 0; k+1 < len(r.xs); k += 2 {
				sx0, _ := v.ToScreen(r2.Point{X: r.xs[k]})
				sx1, _ := v.ToScreen(r2.Point{X: r.xs[k+1]})
				a, b := pixelSpan(sx0, sx1, w)
				a, b = max(a, cx0), min(b, cx1)
				if a < b {
					fill(row[a:b], int8(t))
				}
			}
		}
	}
	for t := range nt {
		r.buildTables(surf, t, v)
	}
}

// pixelSpan returns the pixels [a, b) whose centres lie in [x0, x1),
// clipped to [0, n).
func pixelSpan(x0, x1 float64, n int) (int, int) {
	a := int(math.Ceil(x0 - 0.5))
	b := int(math.Ceil(x1 - 0.5))
	return min(max(a, 0), n), min(max(b, 0), n)
}

// buildTables fills r.tabs[t] for the view.
func (r *Renderer) buildTables(surf *lattice.Surface, t int, v View) {
	tr := &surf.Terraces[t]
	tb := &r.tabs[t]
	tb.alongOfX = tr.Rows == lattice.RowsAlongX
	tb.nRows = surf.RowCount(t)
	tb.nIdx = lattice.SitesPerDimer * surf.DimerCount(t)
	// Field coordinate of the left edge of column 0 and the top edge of
	// row 0, relative to the terrace offset.
	left := v.ToField(0, 0).X
	top := v.ToField(0, 0).Y
	var nAlong, nAcross int
	var alongStart, acrossStart, alongDir, acrossDir float64
	if tb.alongOfX {
		nAlong, nAcross = v.W, v.H
		alongStart, alongDir = left-tr.Offset.X, 1
		acrossStart, acrossDir = top-tr.Offset.Y, -1
	} else {
		nAlong, nAcross = v.H, v.W
		alongStart, alongDir = top-tr.Offset.Y, -1
		acrossStart, acrossDir = left-tr.Offset.X, 1
	}
	s := v.Scale
	tb.along = growRng(tb.along, nAlong)
	tb.across = growRng(tb.across, nAcross)
	tb.shade = grow(tb.shade, nAcross)
	nDim := tb.nIdx / 2
	for i := range nAlong {
		lo, hi := alongStart+alongDir*float64(i)*s, alongStart+alongDir*float64(i+1)*s
		if lo > hi {
			lo, hi = hi, lo
		}
		d0, d1 := cellRange(lo, hi, lattice.DimerPitch, nDim)
		tb.along[i] = rng{int32(2 * d0), int32(2 * d1)}
	}
	// Row-direction hatching every few rows when single rows are too
	// fine to see; the pitch is a whole number of rows so the hatch
	// moves with the lattice.
	hatchRows := 0
	if s > lattice.RowSpacing/3 {
		hatchRows = int(math.Ceil(14 * s / lattice.RowSpacing))
	}
	for i := range nAcross {
		lo, hi := acrossStart+acrossDir*float64(i)*s, acrossStart+acrossDir*float64(i+1)*s
		if lo > hi {
			lo, hi = hi, lo
		}
		r0, r1 := cellRange(lo, hi, lattice.RowSpacing, tb.nRows)
		tb.across[i] = rng{int32(r0), int32(r1)}
		mid := (lo + hi) / 2 / lattice.RowSpacing
		var sh uint8
		switch {
		case hatchRows > 0:
			// A hatch line on the pixel holding the centre of a row whose
			// number is a multiple of hatchRows.
			hr := float64(hatchRows)
			m := math.Floor(math.Floor(hi/lattice.RowSpacing)/hr) * hr
			if m >= math.Ceil(lo/lattice.RowSpacing) && m >= 0 {
				sh = 2
			}
		case math.Abs(mid-math.Round(mid)) > 0.36:
			sh = 1
		}
		tb.shade[i] = sh
	}
	if s <= atomicScale {
		r.buildAtomicTables(tb, nAlong, nAcross, alongStart, alongDir, acrossStart, acrossDir, s)
	}
}

// cellRange returns the lattice cells [a, b) of pitch p that a pixel
// covering [lo, hi) shows, clipped to [0, n): the cells whose centres it
// holds when the pixel is larger than a cell, else the one cell under
// its centre.
func cellRange(lo, hi, p float64, n int) (int, int) {
	var a, b int
	if hi-lo >= p {
		a, b = int(math.Ceil(lo/p)), int(math.Ceil(hi/p))
	} else {
		a = int(math.Round((lo + hi) / 2 / p))
		b = a + 1
	}
	a, b = max(a, 0), min(b, n)
	if a >= b {
		return 0, 0
	}
	return a, b
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

// rowSpan returns the index of the first set bit of a row bitset and one
// past its last, or -1, -1 for an empty row.
func rowSpan(w []uint64) (first, last int) {
	i := 0
	for i < len(w) && w[i] == 0 {
		i++
	}
	if i == len(w) {
		return -1, -1
	}
	j := len(w) - 1
	for w[j] == 0 {
		j--
	}
	return i*64 + bits.TrailingZeros64(w[i]), j*64 + 64 - bits.LeadingZeros64(w[j])
}

// CountRange returns the number of set bits [lo, hi) of a row bitset.
func CountRange(w []uint64, lo, hi int) uint32 {
	n := len(w) * 64
	if hi > n {
		hi = n
	}
	if lo >= hi {
		return 0
	}
	k0, k1 := lo>>6, (hi-1)>>6
	m0 := ^uint64(0) << (uint(lo) & 63)
	m1 := ^uint64(0) >> (63 - (uint(hi-1) & 63))
	if k0 == k1 {
		return uint32(bits.OnesCount64(w[k0] & m0 & m1))
	}
	c := bits.OnesCount64(w[k0]&m0) + bits.OnesCount64(w[k1]&m1)
	for k := k0 + 1; k < k1; k++ {
		c += bits.OnesCount64(w[k])
	}
	return uint32(c)
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

// drawCoverage draws each pixel by the share of its sites that are
// painted, using popcounts over each pixel's index range of each row.
func (r *Renderer) drawCoverage(sc *Scene, v View) {
	w := v.W
	clear(r.total)
	clear(r.best)
	clear(r.owner)
	nt := len(sc.Surface.Terraces)
	for li, L := range sc.Layers {
		if L.Sites == nil || li >= maxLayers {
			continue
		}
		x0, y0, x1, y1 := screenBox(L.Bounds, v)
		if x0 >= x1 {
			continue
		}
		for t := 0; t < min(nt, L.Sites.TerraceCount()); t++ {
			tb := &r.tabs[t]
			setRows := L.Sites.RowCount(t)
			if setRows == 0 {
				continue
			}
			for y := y0; y < y1; y++ {
				terr := r.terr[y*w : y*w+w]
				// line is all zero here; the pixels [tx0, tx1) are the
				// ones this row may have counted into, cleared again after
				// the merge.
				line := r.line
				any := false
				tx0, tx1 := x1, x0
				if tb.alongOfX {
					rr := tb.across[y]
					hi := min(int(rr.hi), setRows)
					if int(rr.lo) >= hi {
						continue
					}
					for row := int(rr.lo); row < hi; row++ {
						words := L.Sites.Row(t, row)
						first, last := rowSpan(words)
						if first < 0 {
							continue
						}
						// Only the pixels over the row's painted span: along
						// grows with x on a RowsAlongX terrace.
						xa := x0 + sort.Search(x1-x0, func(i int) bool { return int(tb.along[x0+i].hi) > first })
						xb := x0 + sort.Search(x1-x0, func(i int) bool { return int(tb.along[x0+i].lo) >= last })
						tx0, tx1 = min(tx0, xa), max(tx1, xb)
						n := len(words) * 64
						for x := xa; x < xb; x++ {
							if int(terr[x]) != t {
								continue
							}
							a := tb.along[x]
							lo, hi := int(a.lo), min(int(a.hi), n)
							if lo >= hi {
								continue
							}
							var c uint32
							if k := lo >> 6; k == (hi-1)>>6 {
								// The common case, one word: inline.
								c = uint32(bits.OnesCount64(words[k] >> (uint(lo) & 63) & (^uint64(0) >> (64 - uint(hi-lo)))))
							} else {
								c = CountRange(words, lo, hi)
							}
							if c != 0 {
								line[x] += c
								any = true
							}
						}
					}
				} else {
					a := tb.along[y]
					if a.lo >= a.hi {
						continue
					}
					tx0, tx1 = x0, x1
					for x := x0; x < x1; x++ {
						if int(terr[x]) != t {
							continue
						}
						rr := tb.across[x]
						var c uint32
						for row := int(rr.lo); row < min(int(rr.hi), setRows); row++ {
							c += CountRange(L.Sites.Row(t, row), int(a.lo), int(a.hi))
						}
						if c != 0 {
							line[x] = c
							any = true
						}
					}
				}
				if !any {
					continue
				}
				base := y * w
				for x := tx0; x < tx1; x++ {
					c := line[x]
					if c == 0 {
						continue
					}
					line[x] = 0
					c = min(c, 0xffff)
					i := base + x
					r.total[i] = uint16(min(uint32(r.total[i])+c, 0xffff))
					if uint16(c) > r.best[i] {
						r.best[i] = uint16(c)
						r.owner[i] = uint16(li + 1)
					}
				}
			}
		}
	}
	r.buildLUT(sc)
	bg := r.background()
	// Per pixel row, each terrace's background: constant along the row
	// for RowsAlongX terraces, per column for RowsAlongY.
	var rowBG [128]uint32
	nt = min(nt, len(rowBG))
	for y := range v.H {
		for t := range nt {
			tb := &r.tabs[t]
			if tb.alongOfX {
				rowBG[t] = bg.terrace[t%len(ColTerrace)][tb.shade[y]]
			}
		}
		base := y * w
		terr := r.terr[base : base+w]
		total := r.total[base : base+w]
		pix := r.pix[base : base+w]
		for x, t := range terr {
			if t < 0 {
				if t == -2 {
					pix[x] = bg.outside
				} else {
					pix[x] = bg.noTerrace
				}
				continue
			}
			tb := &r.tabs[t]
			n := total[x]
			if n == 0 {
				if tb.alongOfX {
					pix[x] = rowBG[t]
				} else {
					pix[x] = bg.terrace[int(t)%len(ColTerrace)][tb.shade[x]]
				}
				continue
			}
			var a, c rng
			if tb.alongOfX {
				a, c = tb.along[x], tb.across[y]
			} else {
				a, c = tb.along[y], tb.across[x]
			}
			capacity := uint32(a.hi-a.lo) * uint32(c.hi-c.lo)
			if capacity == 0 {
				pix[x] = bg.noTerrace
				continue
			}
			lvl := (uint32(n)*levels + capacity - 1) / capacity
			if lvl > levels {
				lvl = levels
			}
			pix[x] = r.lut[int(r.owner[base+x]-1)*(levels+1)+int(lvl)]
			r.stats.Pixels++
		}
	}
}

type backgrounds struct {
	outside, noTerrace uint32
	terrace            [][3]uint32
}

// background returns the packed background colours, computed once.
func (r *Renderer) background() *backgrounds {
	if r.bg != nil {
		return r.bg
	}
	b := &backgrounds{outside: packRGBA(ColOutside), noTerrace: packRGBA(ColNoTerrace)}
	b.terrace = make([][3]uint32, len(ColTerrace))
	for i, c := range ColTerrace {
		// plain, trough between rows, hatch line
		b.terrace[i] = [3]uint32{packRGBA(c), packRGBA(Mix(c, RGB(0, 0, 0), 0.3)), packRGBA(Mix(c, ColHatch, 0.6))}
	}
	r.bg = b
	return b
}

// buildLUT fills the colour of every (layer, coverage level).
func (r *Renderer) buildLUT(sc *Scene) {
	n := len(sc.Layers) * (levels + 1)
	r.lut = grow(r.lut, n)
	for li, L := range sc.Layers {
		c := L.Color
		if sc.DimLayers {
			c = desaturate(c)
		}
		if L.Selected {
			c = Mix(c, RGB(0xff, 0xff, 0xff), 0.3)
		}
		for l := 0; l <= levels; l++ {
			f := 0.3 + 0.7*float64(l)/levels
			r.lut[li*(levels+1)+l] = packRGBA(Mix(ColTerrace[0], c, f))
		}
	}
}

// Atomic-mode geometry, in nm: the drawn radius of an H site and the
// half-width of the dimer bond between the two sites of a dimer.
const (
	siteRadius   = 0.105
	bondHalfWide = 0.045
)

func (r *Renderer) buildAtomicTables(tb *axisTables, nAlong, nAcross int, alongStart, alongDir, acrossStart, acrossDir, s float64) {
	tb.aDimer = grow(tb.aDimer, nAlong)
	tb.aDu2 = grow(tb.aDu2, nAlong)
	tb.aBond = grow(tb.aBond, nAlong)
	tb.cRow = grow(tb.cRow, nAcross)
	tb.cSide = grow(tb.cSide, nAcross)
	tb.cDv2 = grow(tb.cDv2, nAcross)
	tb.cBond = grow(tb.cBond, nAcross)
	nDim := tb.nIdx / 2
	dmin, dmax := math.MaxInt, -1
	for i := range nAlong {
		a := alongStart + alongDir*(float64(i)+0.5)*s
		d := int(math.Round(a / lattice.DimerPitch))
		du := a - float64(d)*lattice.DimerPitch
		if d < 0 || d >= nDim {
			tb.aDimer[i] = -1
			continue
		}
		tb.aDimer[i] = int32(d)
		tb.aDu2[i] = float32(du * du)
		tb.aBond[i] = math.Abs(du) < bondHalfWide
		dmin, dmax = min(dmin, d), max(dmax, d)
	}
	rmin, rmax := math.MaxInt, -1
	for j := range nAcross {
		c := acrossStart + acrossDir*(float64(j)+0.5)*s
		row := int(math.Round(c / lattice.RowSpacing))
		dc := c - float64(row)*lattice.RowSpacing
		if row < 0 || row >= tb.nRows {
			tb.cRow[j] = -1
			continue
		}
		tb.cRow[j] = int32(row)
		if dc >= 0 {
			tb.cSide[j] = 1
		} else {
			tb.cSide[j] = 0
		}
		dv := math.Abs(dc) - lattice.HOffset
		tb.cDv2[j] = float32(dv * dv)
		tb.cBond[j] = math.Abs(dc) < lattice.HOffset
		rmin, rmax = min(rmin, row), max(rmax, row)
	}
	if dmax < 0 || rmax < 0 {
		tb.r0, tb.r1, tb.i0, tb.i1 = 0, -1, 0, -1
		return
	}
	tb.r0, tb.r1 = rmin, rmax
	tb.i0, tb.i1 = 2*dmin, 2*dmax+1
}

// drawAtomic draws every visible H site as a dot (clean: faint; painted:
// its region's colour), the dimer bond between the two sites of each
// dimer, and the troughs between dimer rows.
func (r *Renderer) drawAtomic(sc *Scene, v View) {
	surf := sc.Surface
	nt := len(surf.Terraces)
	// Owner of every visible site, per terrace.
	total := 0
	for t := range nt {
		tb := &r.tabs[t]
		tb.gridOff = total
		if tb.r1 >= tb.r0 {
			total += (tb.r1 - tb.r0 + 1) * (tb.i1 - tb.i0 + 1)
		}
	}
	r.grid = grow(r.grid, total)
	clear(r.grid)
	for li, L := range sc.Layers {
		if L.Sites == nil || li >= maxLayers {
			continue
		}
		for t := 0; t < min(nt, L.Sites.TerraceCount()); t++ {
			tb := &r.tabs[t]
			ni := tb.i1 - tb.i0 + 1
			for row := tb.r0; row <= tb.r1; row++ {
				words := L.Sites.Row(t, row)
				if len(words) == 0 {
					continue
				}
				g := r.grid[tb.gridOff+(row-tb.r0)*ni:]
				for k := tb.i0 >> 6; k <= tb.i1>>6 && k < len(words); k++ {
					word := words[k]
					for word != 0 {
						b := bits.TrailingZeros64(word)
						word &= word - 1
						idx := k<<6 + b
						if idx >= tb.i0 && idx <= tb.i1 {
							g[idx-tb.i0] = uint16(li + 1)
						}
					}
				}
			}
		}
	}
	// Colours: per layer dot, bond and tint (the cell around a painted
	// site), then the clean ones.
	r.alut = grow(r.alut, 3*len(sc.Layers))
	base := ColTerrace[0]
	for li, L := range sc.Layers {
		c := L.Color
		if sc.DimLayers {
			c = desaturate(c)
		}
		if L.Selected {
			c = Mix(c, RGB(0xff, 0xff, 0xff), 0.3)
		}
		r.alut[3*li] = packRGBA(c)
		r.alut[3*li+1] = packRGBA(Mix(base, c, 0.6))
		r.alut[3*li+2] = packRGBA(Mix(base, c, 0.22))
	}
	bg := r.background()
	cleanH, bond := packRGBA(ColCleanH), packRGBA(ColBond)
	const r2max = float32(siteRadius * siteRadius)
	w := v.W
	for y := range v.H {
		for x := range w {
			i := y*w + x
			t := r.terr[i]
			if t < 0 {
				if t == -2 {
					r.pix[i] = bg.outside
				} else {
					r.pix[i] = bg.noTerrace
				}
				continue
			}
			tb := &r.tabs[t]
			ai, ci := x, y
			if !tb.alongOfX {
				ai, ci = y, x
			}
			d, row := tb.aDimer[ai], tb.cRow[ci]
			if d < 0 || row < 0 {
				r.pix[i] = bg.noTerrace
				continue
			}
			idx := 2*int(d) + int(tb.cSide[ci])
			o := r.grid[tb.gridOff+(int(row)-tb.r0)*(tb.i1-tb.i0+1)+idx-tb.i0]
			switch {
			case tb.aDu2[ai]+tb.cDv2[ci] < r2max:
				if o > 0 {
					r.pix[i] = r.alut[3*int(o-1)]
					r.stats.Pixels++
				} else {
					r.pix[i] = cleanH
				}
			case tb.aBond[ai] && tb.cBond[ci]:
				if o > 0 {
					r.pix[i] = r.alut[3*int(o-1)+1]
				} else {
					r.pix[i] = bond
				}
			case o > 0:
				r.pix[i] = r.alut[3*int(o-1)+2]
			default:
				r.pix[i] = bg.terrace[int(t)%len(ColTerrace)][tb.shade[ci]&1]
			}
		}
	}
}

// drawOverlays draws step edges, the field edge, the route, fiducials,
// findings, the selection and the tool preview over the lattice.
func (r *Renderer) drawOverlays(sc *Scene, v View) {
	pb := &pixbuf{pix: r.pix, w: v.W, h: v.H, aa: !r.Aliased}
	surf := sc.Surface
	// Field edge.
	x0, y1 := v.ToScreen(r2.Point{})
	x1, y0 := v.ToScreen(r2.Point{X: surf.Width(), Y: surf.Height()})
	pb.rectOutline(x0-1, y0-1, x1, y1, 1, ColFieldEdge, 256)
	// Step edges.
	for _, t := range surf.Terraces {
		if len(t.Boundary) < 3 {
			continue
		}
		drawPath(pb, v, t.Boundary, true, 2, ColStep, 200)
	}
	if rt := sc.Route; rt != nil {
		vb := v.Bounds()
		for _, m := range rt.Moves {
			ax, ay := v.ToScreen(m[0])
			bx, by := v.ToScreen(m[1])
			pb.dashed(ax, ay, bx, by, 4, 3, ColMove, 170)
		}
		for _, st := range rt.Strokes {
			if !st.Bounds.IsEmpty() && !st.Bounds.ExpandedByMargin(4*v.Scale+st.WidthNM).Intersects(vb) {
				continue
			}
			c := SegmentColor(st.Segment)
			// At least 2 px so a stroke shows; thin lines get no more, so a
			// dense raster does not merge into a block when zoomed out.
			wpx := math.Max(2, st.WidthNM/v.Scale)
			// Wide strokes (zoomed in) are see-through, so the sites they
			// clear stay visible under them.
			alpha := 256
			if wpx >= 8 {
				alpha = 150
			}
			if len(st.Path) == 1 {
				x, y := v.ToScreen(st.Path[0])
				pb.disk(x, y, math.Max(2.5, wpx/2), c, alpha)
				continue
			}
			drawPath(pb, v, st.Path, false, wpx, c, alpha)
		}
		for _, p := range rt.Registrations {
			x, y := v.ToScreen(p)
			pb.diamond(x, y, 11, ColMove, 256)
		}
	}
	for _, p := range sc.Fiducials {
		x, y := v.ToScreen(p)
		pb.ring(x, y, 7, ColFiducial, 256)
		pb.thickLine(x-11, y, x+11, y, 2, ColFiducial, 256)
		pb.thickLine(x, y-11, x, y+11, 2, ColFiducial, 256)
	}
	for _, m := range sc.Marks {
		c := ColWarning
		if m.Error {
			c = ColError
		}
		ax, ay := v.ToScreen(r2.Point{X: m.Bounds.X.Lo, Y: m.Bounds.Y.Hi})
		bx, by := v.ToScreen(r2.Point{X: m.Bounds.X.Hi, Y: m.Bounds.Y.Lo})
		// At least 16 px, so a point finding shows.
		if bx-ax < 16 {
			cx := (ax + bx) / 2
			ax, bx = cx-8, cx+8
		}
		if by-ay < 16 {
			cy := (ay + by) / 2
			ay, by = cy-8, cy+8
		}
		wd := 2
		if m.Selected {
			wd = 4
		}
		pb.rectOutline(ax-3, ay-3, bx+3, by+3, wd, c, 256)
	}
	for _, b := range sc.Selected {
		ax, ay := v.ToScreen(r2.Point{X: b.X.Lo, Y: b.Y.Hi})
		bx, by := v.ToScreen(r2.Point{X: b.X.Hi, Y: b.Y.Lo})
		pb.dashed(ax-4, ay-4, bx+4, ay-4, 5, 4, ColSelect, 256)
		pb.dashed(bx+4, ay-4, bx+4, by+4, 5, 4, ColSelect, 256)
		pb.dashed(bx+4, by+4, ax-4, by+4, 5, 4, ColSelect, 256)
		pb.dashed(ax-4, by+4, ax-4, ay-4, 5, 4, ColSelect, 256)
	}
	if b := sc.SelectedShape; b != nil && !b.IsEmpty() {
		ax, ay := v.ToScreen(r2.Point{X: b.X.Lo, Y: b.Y.Hi})
		bx, by := v.ToScreen(r2.Point{X: b.X.Hi, Y: b.Y.Lo})
		ax, ay, bx, by = ax-2, ay-2, bx+2, by+2
		pb.rectOutline(ax, ay, bx, by, 1, ColSelect, 256)
		for _, c := range [4][2]float64{{ax, ay}, {bx, ay}, {ax, by}, {bx, by}} {
			pb.fillRect(int(c[0])-3, int(c[1])-3, int(c[0])+4, int(c[1])+4, ColSelect, 256)
		}
	}
	if p := sc.Preview; p != nil && len(p.Points) > 0 {
		switch {
		case p.BrushNM > 0:
			x, y := v.ToScreen(p.Points[0])
			pb.ring(x, y, math.Max(3, p.BrushNM/v.Scale), ColPreview, 200)
		case p.Rect && len(p.Points) == 2:
			a, b := p.Points[0], p.Points[1]
			ax, ay := v.ToScreen(r2.Point{X: math.Min(a.X, b.X), Y: math.Max(a.Y, b.Y)})
			bx, by := v.ToScreen(r2.Point{X: math.Max(a.X, b.X), Y: math.Min(a.Y, b.Y)})
			pb.fillRect(int(ax), int(ay), int(bx), int(by), ColPreview, 40)
			pb.rectOutline(ax, ay, bx, by, 1, ColPreview, 256)
		default:
			if p.WidthNM > 0 && len(p.Points) > 1 {
				drawPath(pb, v, p.Points, p.Closed, p.WidthNM/v.Scale, ColPreview, 60)
			}
			drawPath(pb, v, p.Points, p.Closed, 1, ColPreview, 256)
			for _, q := range p.Points {
				x, y := v.ToScreen(q)
				pb.fillRect(int(x)-2, int(y)-2, int(x)+3, int(y)+3, ColPreview, 256)
			}
		}
	}
}

// drawPath draws a polyline (or closed polygon outline) w pixels wide.
func drawPath(pb *pixbuf, v View, pts []r2.Point, closed bool, w float64, c color.NRGBA, a int) {
	n := len(pts)
	if n < 2 {
		return
	}
	last := n - 1
	if closed {
		last = n
	}
	for i := 0; i < last; i++ {
		ax, ay := v.ToScreen(pts[i])
		bx, by := v.ToScreen(pts[(i+1)%n])
		pb.thickLine(ax, ay, bx, by, w, c, a)
	}
}
