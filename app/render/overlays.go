package render

import (
	"image/color"
	"math"

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
