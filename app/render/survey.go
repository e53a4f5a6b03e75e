package render

import (
	"math"

	"github.com/golang/geo/r2"
)

// Survey colours: defects by their sign, so bright and dark read apart
// on the grey image; placements in one colour, the chosen one thicker.
var (
	ColSurveyEdge   = RGB(0xb0, 0xb8, 0xc8) // the survey image's outline
	ColSurveyStep   = RGB(0xff, 0x5c, 0xd6) // a step edge the survey found
	ColDefectBright = RGB(0xff, 0x6a, 0x3d) // dangling bonds, adsorbates, clusters
	ColDefectDark   = RGB(0x3d, 0xd6, 0xff) // vacancies, missing dimers
	ColPlacement    = RGB(0x7d, 0xff, 0x6a) // where a placement puts the core
)

// drawSurveyImage lays the survey's grey image over the terrace
// background at its opacity. On the zoomed-out frame it leaves the
// painted pixels alone, so the design stays on top; at atomic zoom it
// covers every pixel, so the imaged atoms and the lattice's sites can be
// compared. The cost is one inverse map per pixel of the image's extent
// on screen.
func (r *Renderer) drawSurveyImage(so *SurveyOverlay, v View) {
	if so == nil || len(so.Grey) == 0 || so.W*so.H != len(so.Grey) || !(so.Opacity > 0) {
		return
	}
	det := so.U.X*so.V.Y - so.U.Y*so.V.X
	if !(math.Abs(det) > 0) {
		return
	}
	a := int(math.Round(min(so.Opacity, 1) * 256))
	b := r2.EmptyRect()
	for _, p := range [4][2]float64{{0, 0}, {1, 0}, {0, 1}, {1, 1}} {
		b = b.AddPoint(so.Origin.Add(so.U.Mul(p[0] * float64(so.W))).Add(so.V.Mul(p[1] * float64(so.H))))
	}
	x0, y0, x1, y1 := screenBox(b, v)
	if x0 >= x1 || y0 >= y1 {
		return
	}
	// (u, v) = M⁻¹·(p − Origin), p = the pixel's centre; along a frame row
	// p moves by Scale in x, so u and v move by fixed steps.
	iu := r2.Point{X: so.V.Y / det, Y: -so.V.X / det} // first row of M⁻¹
	iv := r2.Point{X: -so.U.Y / det, Y: so.U.X / det} // second row
	du, dv := iu.X*v.Scale, iv.X*v.Scale
	skipPainted := !r.stats.Atomic
	w := v.W
	for y := y0; y < y1; y++ {
		p := v.ToField(float64(x0)+0.5, float64(y)+0.5).Sub(so.Origin)
		u, vv := iu.Dot(p), iv.Dot(p)
		for x := x0; x < x1; x, u, vv = x+1, u+du, vv+dv {
			if u < 0 || vv < 0 || u >= float64(so.W) || vv >= float64(so.H) {
				continue
			}
			i := y*w + x
			if skipPainted && r.owner[i] != 0 {
				continue
			}
			g := so.Grey[int(vv)*so.W+int(u)]
			r.pix[i] = blend(r.pix[i], RGB(g, g, g), a)
		}
	}
}

// defectMinRingPx is the smallest ring a defect is drawn as, in pixels,
// so a defect never vanishes when zoomed out.
const defectMinRingPx = 5

// defectRingPx is the radius (px) of defect d's ring at scale nm/px: its
// apparent width when it shows, defectMinRingPx at least.
func defectRingPx(d DefectMark, scale float64) float64 {
	return math.Max(defectMinRingPx, d.RadiusNM/scale)
}

// DefectMarkAt returns the index of the defect marker under field point
// p, or -1: the nearest whose centre lies within max(its apparent
// radius, near) + 3/4 near of p. near is the click's tolerance in nm:
// when it is at least 8 screen pixels, a click anywhere on a marker as
// drawn (its ring, at least defectMinRingPx, and the by-hand and
// selection rings up to 6 px outside it) takes that defect.
func DefectMarkAt(marks []DefectMark, p r2.Point, near float64) int {
	best, bestD := -1, math.Inf(1)
	for i, d := range marks {
		if dist := d.At.Sub(p).Norm(); dist <= math.Max(d.RadiusNM, near)+0.75*near && dist < bestD {
			best, bestD = i, dist
		}
	}
	return best
}

// drawSurveyMarks draws the survey's outline, step edges and defects and
// the placements found.
func drawSurveyMarks(pb *pixbuf, v View, so *SurveyOverlay) {
	if so == nil {
		return
	}
	if len(so.Outline) >= 3 {
		for k := range so.Outline {
			ax, ay := v.ToScreen(so.Outline[k])
			bx, by := v.ToScreen(so.Outline[(k+1)%len(so.Outline)])
			pb.dashed(ax, ay, bx, by, 8, 5, ColSurveyEdge, 220)
		}
	}
	for _, st := range so.Steps {
		drawPath(pb, v, st, false, 2, ColSurveyStep, 230)
	}
	vb := v.Bounds()
	for _, d := range so.Defects {
		if !vb.ExpandedByMargin(d.RadiusNM + 10*v.Scale).ContainsPoint(d.At) {
			continue
		}
		c := ColDefectDark
		if d.Bright {
			c = ColDefectBright
		}
		x, y := v.ToScreen(d.At)
		rad := defectRingPx(d, v.Scale)
		pb.ring(x, y, rad, c, 256)
		if d.ByHand {
			pb.ring(x, y, rad+3, c, 160)
		}
		if d.Selected {
			pb.ring(x, y, rad+6, ColSelect, 256)
		}
	}
	for _, p := range so.Placements {
		ax, ay := v.ToScreen(r2.Point{X: p.Bounds.X.Lo, Y: p.Bounds.Y.Hi})
		bx, by := v.ToScreen(r2.Point{X: p.Bounds.X.Hi, Y: p.Bounds.Y.Lo})
		if p.Chosen {
			pb.rectOutline(ax-2, ay-2, bx+2, by+2, 3, ColPlacement, 256)
			continue
		}
		pb.dashed(ax, ay, bx, ay, 4, 3, ColPlacement, 200)
		pb.dashed(bx, ay, bx, by, 4, 3, ColPlacement, 200)
		pb.dashed(bx, by, ax, by, 4, 3, ColPlacement, 200)
		pb.dashed(ax, by, ax, ay, 4, 3, ColPlacement, 200)
		// Its rank as that many dots above its top-left corner.
		for k := 0; k < min(p.Rank, 9); k++ {
			pb.disk(ax+2+float64(5*k), ay-5, 1.6, ColPlacement, 256)
		}
	}
}
