package render

import (
	"image/color"
	"math"
	"slices"

	"github.com/golang/geo/r2"
)

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
	drawReferences(pb, v, sc.References)
	drawSurveyMarks(pb, v, sc.Survey)
	if rt := sc.Route; rt != nil {
		r.near = drawRoute(pb, v, rt, r.near[:0])
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
		// A 16 px box around the point, so it shows at any zoom.
		x, y := v.ToScreen(m.At)
		ax, ay, bx, by := x-8, y-8, x+8, y+8
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
			for _, c := range p.Cells {
				cx, cy := v.ToScreen(r2.Point{X: c.X.Lo, Y: c.Y.Hi})
				dx, dy := v.ToScreen(r2.Point{X: c.X.Hi, Y: c.Y.Lo})
				pb.fillRect(int(cx), int(cy), max(int(dx), int(cx)+1), max(int(dy), int(cy)+1), ColPreview, 140)
			}
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

// drawReferences outlines the reference overlays' polygons, dashed, so
// they read as guides rather than as sites to write.
func drawReferences(pb *pixbuf, v View, refs []Reference) {
	vb := v.Bounds()
	for _, r := range refs {
		for i, poly := range r.Polygons {
			if i < len(r.Bounds) && !r.Bounds[i].Intersects(vb) {
				continue
			}
			for k := range poly {
				ax, ay := v.ToScreen(poly[k])
				bx, by := v.ToScreen(poly[(k+1)%len(poly)])
				pb.dashed(ax, ay, bx, by, 6, 3, ColReference, 230)
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

// drawRoute draws the route: moves dashed, then strokes in their
// segment's colour, then the registration diamonds. A plan of a million
// windows has a million strokes and moves, so the work per item is kept
// small. Zoomed out, the moves too short to show (under 2 pixels: no
// dash pattern shows) are never visited (RouteOf sorts them by length),
// and a stroke under a pixel long and at most 2 pixels wide is set as a
// 2 x 2 block from RouteOf's packed dots rather than drawn as a capsule.
// Zoomed in, only the items RouteOf's grids file near the view are
// visited, in the plan's order. near is scratch space, returned for
// reuse.
func drawRoute(pb *pixbuf, v View, rt *RouteOverlay, near []int32) []int32 {
	vb := v.Bounds()
	// The view's bounds grown by a pixel or two, in nm: what may touch a
	// pixel of the frame.
	grown := vb.ExpandedByMargin(2 * v.Scale)
	move := func(m [2]r2.Point) {
		if max(m[0].X, m[1].X) < grown.X.Lo || min(m[0].X, m[1].X) > grown.X.Hi ||
			max(m[0].Y, m[1].Y) < grown.Y.Lo || min(m[0].Y, m[1].Y) > grown.Y.Hi {
			return
		}
		ax, ay := v.ToScreen(m[0])
		bx, by := v.ToScreen(m[1])
		if math.Abs(bx-ax) < 2 && math.Abs(by-ay) < 2 {
			return
		}
		pb.dashed(ax, ay, bx, by, 4, 3, ColMove, 170)
	}
	// A grid pays where the view shows a small part of the route.
	zoomed := func(g *routeGrid) bool { return g != nil && g.covers(grown) < 0.25 }
	switch {
	case zoomed(rt.moveGrid):
		near = rt.moveGrid.near(grown.ExpandedByMargin(2*v.Scale), near[:0])
		for _, i := range near {
			move(rt.Moves[i])
		}
	case len(rt.longMoves) == len(rt.Moves):
		for _, lm := range rt.longMoves {
			if float64(lm.span) < 2*v.Scale {
				break // the rest are shorter still
			}
			move(rt.Moves[lm.i])
		}
	default:
		for _, m := range rt.Moves {
			move(m)
		}
	}

	dots := len(rt.dots) == len(rt.Strokes)
	// The frame transform for the packed path, in float32 (zoomed out,
	// where it is used, a field of 10^4 nm spans a few thousand pixels):
	// x = X·inv + ox, y = oy − Y·inv (View.ToScreen), less half a pixel
	// so that a block covers the centre.
	inv := float32(1 / v.Scale)
	ox := float32(float64(v.W)/2 - v.Center.X/v.Scale - 0.5)
	oy := float32(float64(v.H)/2 + v.Center.Y/v.Scale - 0.5)
	small, thin := float32(v.Scale), float32(2*v.Scale)
	w, h := pb.w, pb.h
	// block sets the 2 x 2 pixels of a dot; it reports false for a dot
	// too large for it.
	block := func(d *routeDot) bool {
		if d.extent >= small || d.width > thin {
			return false
		}
		fx, fy := d.x*inv+ox, oy-d.y*inv
		if fx < -1 || fy < -1 || fx >= float32(w) || fy >= float32(h) {
			return true
		}
		xi, yi := int(fx+1)-1, int(fy+1)-1 // floor, for fx, fy >= -1
		if xi >= 0 && yi >= 0 && xi+1 < w && yi+1 < h {
			k := yi*w + xi
			px := pb.pix[k : k+w+2]
			px[0], px[1], px[w], px[w+1] = d.col, d.col, d.col, d.col
			return true
		}
		for y := max(yi, 0); y < min(yi+2, h); y++ {
			row := pb.pix[y*w : y*w+w]
			for x := max(xi, 0); x < min(xi+2, w); x++ {
				row[x] = d.col
			}
		}
		return true
	}
	// The view's centre and half size, nm, for culling on the dots.
	cx, cy := float32(vb.Center().X), float32(vb.Center().Y)
	hx, hy := float32(vb.Size().X/2+4*v.Scale), float32(vb.Size().Y/2+4*v.Scale)
	stroke := func(i int) {
		if dots {
			d := &rt.dots[i]
			if block(d) {
				return
			}
			// Out of sight: the bounds' half extent and the stroke's width
			// from the view's edge (a dwell's disk: its width, the margin).
			m := d.width
			if !math.IsInf(float64(d.extent), 1) {
				m += d.extent / 2
			}
			if abs32(d.x-cx) > hx+m || abs32(d.y-cy) > hy+m {
				return
			}
		}
		st := &rt.Strokes[i]
		if !st.Bounds.IsEmpty() && !st.Bounds.ExpandedByMargin(4*v.Scale+st.WidthNM).Intersects(vb) {
			return
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
			return
		}
		drawPath(pb, v, st.Path, false, wpx, c, alpha)
	}
	switch {
	case zoomed(rt.strokeGrid):
		// In the plan's order, as without the grid, so that where strokes
		// overlap the same one shows on top.
		near = rt.strokeGrid.near(grown.ExpandedByMargin(4*v.Scale), near[:0])
		slices.Sort(near)
		for _, i := range near {
			stroke(int(i))
		}
	case dots:
		for i := range rt.dots {
			if !block(&rt.dots[i]) {
				stroke(i)
			}
		}
	default:
		for i := range rt.Strokes {
			stroke(i)
		}
	}
	for _, p := range rt.Registrations {
		x, y := v.ToScreen(p)
		pb.diamond(x, y, 11, ColMove, 256)
	}
	for _, p := range rt.LocalRegistrations {
		x, y := v.ToScreen(p)
		pb.square(x, y, 5, ColMove, 256)
	}
	return near
}

func abs32(x float32) float32 {
	if x < 0 {
		return -x
	}
	return x
}
