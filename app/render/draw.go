package render

import (
	"image/color"
	"math"
)

// pixbuf is a frame's pixels as packed RGBA words, for the overlay
// drawing primitives below. They clip to the frame. With aa set, lines
// and opaque thick strokes are antialiased: one-pixel lines share each
// step between the two pixels the line passes between (Wu's method),
// and thick strokes blend each edge pixel by how far its centre lies
// inside the stroke. Filled rectangles, disks and translucent strokes
// stay aliased (a translucent stroke's joints would blend twice).
type pixbuf struct {
	pix  []uint32
	w, h int
	aa   bool
}

// blend returns the packed pixel p with c laid over it at opacity a
// (0..256).
func blend(p uint32, c color.NRGBA, a int) uint32 {
	if a >= 256 {
		return packRGBA(c)
	}
	r, g, b := int(p&0xff), int(p>>8&0xff), int(p>>16&0xff)
	r += (int(c.R) - r) * a >> 8
	g += (int(c.G) - g) * a >> 8
	b += (int(c.B) - b) * a >> 8
	return uint32(r) | uint32(g)<<8 | uint32(b)<<16 | 0xff<<24
}

func (b *pixbuf) plot(x, y int, c color.NRGBA, a int) {
	if x < 0 || y < 0 || x >= b.w || y >= b.h {
		return
	}
	i := y*b.w + x
	b.pix[i] = blend(b.pix[i], c, a)
}

// hspan fills pixels x0..x1 (inclusive) of row y.
func (b *pixbuf) hspan(y, x0, x1 int, c color.NRGBA, a int) {
	if y < 0 || y >= b.h {
		return
	}
	x0, x1 = max(x0, 0), min(x1, b.w-1)
	if x0 > x1 {
		return
	}
	row := b.pix[y*b.w : y*b.w+b.w]
	if a >= 256 {
		p := packRGBA(c)
		for x := x0; x <= x1; x++ {
			row[x] = p
		}
		return
	}
	for x := x0; x <= x1; x++ {
		row[x] = blend(row[x], c, a)
	}
}

// fillRect fills the pixel rectangle [x0, x1) x [y0, y1).
func (b *pixbuf) fillRect(x0, y0, x1, y1 int, c color.NRGBA, a int) {
	for y := max(y0, 0); y < min(y1, b.h); y++ {
		b.hspan(y, x0, x1-1, c, a)
	}
}

// disk fills a circle of radius r pixels centred on (cx, cy).
func (b *pixbuf) disk(cx, cy, r float64, c color.NRGBA, a int) {
	if cx+r < 0 || cy+r < 0 || cx-r > float64(b.w) || cy-r > float64(b.h) {
		return
	}
	y0, y1 := int(math.Floor(cy-r)), int(math.Ceil(cy+r))
	for y := max(y0, 0); y <= min(y1, b.h-1); y++ {
		dy := float64(y) + 0.5 - cy
		if dy*dy > r*r {
			continue
		}
		dx := math.Sqrt(r*r - dy*dy)
		b.hspan(y, int(math.Ceil(cx-dx-0.5)), int(math.Floor(cx+dx-0.5)), c, a)
	}
}

// ring draws a circle outline of radius r, width about one pixel.
func (b *pixbuf) ring(cx, cy, r float64, c color.NRGBA, a int) {
	n := max(int(2*math.Pi*r/2), 12)
	px, py := cx+r, cy
	for i := 1; i <= n; i++ {
		t := 2 * math.Pi * float64(i) / float64(n)
		x, y := cx+r*math.Cos(t), cy+r*math.Sin(t)
		b.line(px, py, x, y, c, a)
		px, py = x, y
	}
}

// rectOutline draws the outline of the pixel rectangle with corners
// (x0, y0) and (x1, y1), width pixels thick, inside the corners.
func (b *pixbuf) rectOutline(x0, y0, x1, y1 float64, width int, c color.NRGBA, a int) {
	ix0, iy0 := int(math.Floor(x0)), int(math.Floor(y0))
	ix1, iy1 := int(math.Ceil(x1)), int(math.Ceil(y1))
	for k := 0; k < width; k++ {
		b.hspan(iy0+k, ix0, ix1, c, a)
		b.hspan(iy1-k, ix0, ix1, c, a)
		for y := iy0 + width; y <= iy1-width; y++ {
			b.plot(ix0+k, y, c, a)
			b.plot(ix1-k, y, c, a)
		}
	}
}

// clipLine clips the segment to the frame grown by pad pixels
// (Liang–Barsky); ok is false when nothing is left.
func (b *pixbuf) clipLine(x0, y0, x1, y1, pad float64) (cx0, cy0, cx1, cy1 float64, ok bool) {
	t0, t1 := 0.0, 1.0
	dx, dy := x1-x0, y1-y0
	edges := [4][2]float64{
		{-dx, x0 + pad},
		{dx, float64(b.w) + pad - x0},
		{-dy, y0 + pad},
		{dy, float64(b.h) + pad - y0},
	}
	for _, e := range edges {
		p, q := e[0], e[1]
		if p == 0 {
			if q < 0 {
				return 0, 0, 0, 0, false
			}
			continue
		}
		r := q / p
		if p < 0 {
			if r > t1 {
				return 0, 0, 0, 0, false
			}
			t0 = math.Max(t0, r)
		} else {
			if r < t0 {
				return 0, 0, 0, 0, false
			}
			t1 = math.Min(t1, r)
		}
	}
	return x0 + t0*dx, y0 + t0*dy, x0 + t1*dx, y0 + t1*dy, true
}

// line draws a one-pixel line.
func (b *pixbuf) line(x0, y0, x1, y1 float64, c color.NRGBA, a int) {
	b.dashed(x0, y0, x1, y1, 0, 0, c, a)
}

// dashed draws a one-pixel line, on pixels long and off pixels short
// (off = 0 for a solid line).
func (b *pixbuf) dashed(x0, y0, x1, y1 float64, on, off int, c color.NRGBA, a int) {
	x0, y0, x1, y1, ok := b.clipLine(x0, y0, x1, y1, 1)
	if !ok {
		return
	}
	dx, dy := x1-x0, y1-y0
	n := int(math.Max(math.Abs(dx), math.Abs(dy)))
	if n == 0 {
		b.plot(int(x0), int(y0), c, a)
		return
	}
	sx, sy := dx/float64(n), dy/float64(n)
	x, y := x0, y0
	period := on + off
	steep := math.Abs(dy) > math.Abs(dx)
	for i := 0; i <= n; i++ {
		if off == 0 || i%period < on {
			switch {
			case !b.aa:
				b.plot(int(math.Floor(x)), int(math.Floor(y)), c, a)
			case steep:
				// Split between the two columns the line passes between,
				// by the distance of x from their centres.
				u := x - 0.5
				fx := math.Floor(u)
				f := u - fx
				yi := int(math.Floor(y))
				b.plot(int(fx), yi, c, int(float64(a)*(1-f)+0.5))
				b.plot(int(fx)+1, yi, c, int(float64(a)*f+0.5))
			default:
				v := y - 0.5
				fy := math.Floor(v)
				f := v - fy
				xi := int(math.Floor(x))
				b.plot(xi, int(fy), c, int(float64(a)*(1-f)+0.5))
				b.plot(xi, int(fy)+1, c, int(float64(a)*f+0.5))
			}
		}
		x += sx
		y += sy
	}
}

// thickLine draws a segment w pixels wide with round ends.
func (b *pixbuf) thickLine(x0, y0, x1, y1, w float64, c color.NRGBA, a int) {
	if w <= 1.5 {
		b.line(x0, y0, x1, y1, c, a)
		return
	}
	r := w / 2
	x0, y0, x1, y1, ok := b.clipLine(x0, y0, x1, y1, r+1)
	if !ok {
		return
	}
	dx, dy := x1-x0, y1-y0
	l := math.Hypot(dx, dy)
	if l < 0.5 {
		b.disk(x0, y0, r, c, a)
		return
	}
	if b.aa && a >= 256 {
		b.capsule(x0, y0, x1, y1, r, c)
		return
	}
	// The stroke is the quadrilateral offset by ±r along the normal.
	nx, ny := -dy/l*r, dx/l*r
	q := [4][2]float64{{x0 + nx, y0 + ny}, {x1 + nx, y1 + ny}, {x1 - nx, y1 - ny}, {x0 - nx, y0 - ny}}
	b.fillConvex(q[:], c, a)
	if a >= 256 {
		// Round joins; skipped for translucent strokes, which would
		// darken where the cap overlaps the body.
		b.disk(x0, y0, r, c, a)
		b.disk(x1, y1, r, c, a)
	}
}

// capsule draws the opaque stroke of radius r around the segment with
// round ends, antialiased: each pixel is blended by how far its centre
// lies inside the edge (full inside by half a pixel, none outside by
// half a pixel). Only the pixels of each row the stroke grown by half a
// pixel crosses are visited. The segment is already clipped.
func (b *pixbuf) capsule(x0, y0, x1, y1, r float64, c color.NRGBA) {
	dx, dy := x1-x0, y1-y0
	l2 := dx*dx + dy*dy
	R := r + 0.5
	R2 := R * R
	in := max(r-0.5, 0)
	in2 := in * in // a centre this close to the axis is fully covered
	var nx, ny float64
	if l2 > 0 {
		l := math.Sqrt(l2)
		nx, ny = -dy/l*R, dx/l*R
	}
	q := [4][2]float64{{x0 + nx, y0 + ny}, {x1 + nx, y1 + ny}, {x1 - nx, y1 - ny}, {x0 - nx, y0 - ny}}
	p := packRGBA(c)
	ymin, ymax := min(y0, y1)-R, max(y0, y1)+R
	for y := max(int(math.Floor(ymin)), 0); y <= min(int(math.Ceil(ymax)), b.h-1); y++ {
		yc := float64(y) + 0.5
		// The row's span of the grown capsule: its end disks and the band
		// between them (the band's edges are lines at ±R from the axis).
		xl, xr := math.Inf(1), math.Inf(-1)
		for _, e := range [2][2]float64{{x0, y0}, {x1, y1}} {
			if d := yc - e[1]; d*d <= R2 {
				h := math.Sqrt(R2 - d*d)
				xl, xr = min(xl, e[0]-h), max(xr, e[0]+h)
			}
		}
		if l2 > 0 {
			for i := range 4 {
				u, w := q[i], q[(i+1)%4]
				if (u[1] <= yc) == (w[1] <= yc) {
					continue
				}
				x := u[0] + (yc-u[1])*(w[0]-u[0])/(w[1]-u[1])
				xl, xr = min(xl, x), max(xr, x)
			}
		}
		if xl > xr {
			continue
		}
		row := b.pix[y*b.w : y*b.w+b.w]
		for x := max(int(math.Floor(xl)), 0); x <= min(int(math.Floor(xr)), b.w-1); x++ {
			// Distance from the pixel centre to the segment.
			px, py := float64(x)+0.5-x0, yc-y0
			t := 0.0
			if l2 > 0 {
				t = max(0, min(1, (px*dx+py*dy)/l2))
			}
			ex, ey := px-t*dx, py-t*dy
			switch d2 := ex*ex + ey*ey; {
			case d2 <= in2:
				row[x] = p
			case d2 < R2:
				row[x] = blend(row[x], c, int((R-math.Sqrt(d2))*256))
			}
		}
	}
}

// fillConvex fills a convex polygon given in pixel coordinates, covering
// pixels whose centres lie inside.
func (b *pixbuf) fillConvex(pts [][2]float64, c color.NRGBA, a int) {
	ymin, ymax := math.Inf(1), math.Inf(-1)
	for _, p := range pts {
		ymin, ymax = math.Min(ymin, p[1]), math.Max(ymax, p[1])
	}
	y0, y1 := max(int(math.Floor(ymin)), 0), min(int(math.Ceil(ymax)), b.h-1)
	n := len(pts)
	for y := y0; y <= y1; y++ {
		yc := float64(y) + 0.5
		xl, xr := math.Inf(1), math.Inf(-1)
		for i := range n {
			p, q := pts[i], pts[(i+1)%n]
			if (p[1] <= yc) == (q[1] <= yc) {
				continue
			}
			x := p[0] + (yc-p[1])*(q[0]-p[0])/(q[1]-p[1])
			xl, xr = math.Min(xl, x), math.Max(xr, x)
		}
		if xl > xr {
			continue
		}
		b.hspan(y, int(math.Ceil(xl-0.5)), int(math.Floor(xr-0.5)), c, a)
	}
}

// square draws a square outline of half-size r around (cx, cy).
func (b *pixbuf) square(cx, cy, r float64, c color.NRGBA, a int) {
	b.thickLine(cx-r, cy-r, cx+r, cy-r, 2, c, a)
	b.thickLine(cx+r, cy-r, cx+r, cy+r, 2, c, a)
	b.thickLine(cx+r, cy+r, cx-r, cy+r, 2, c, a)
	b.thickLine(cx-r, cy+r, cx-r, cy-r, 2, c, a)
}

// diamond draws a diamond outline of half-size r around (cx, cy).
func (b *pixbuf) diamond(cx, cy, r float64, c color.NRGBA, a int) {
	b.thickLine(cx, cy-r, cx+r, cy, 2, c, a)
	b.thickLine(cx+r, cy, cx, cy+r, 2, c, a)
	b.thickLine(cx, cy+r, cx-r, cy, 2, c, a)
	b.thickLine(cx-r, cy, cx, cy-r, 2, c, a)
}
