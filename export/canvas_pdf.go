package export

import (
	"codeberg.org/go-pdf/fpdf"
)

// pdfCanvas draws on the current page of an fpdf document, in page
// millimetres.
type pdfCanvas struct {
	f *fpdf.Fpdf
	// last state set on f, to skip redundant operators
	lineWidth float64
	drawGrey  int
	fillGrey  int
	dashed    bool
	round     bool
	font      font // the font last set, when fontSet
	fontSet   bool
}

func newPDFCanvas(f *fpdf.Fpdf) *pdfCanvas {
	return &pdfCanvas{f: f, lineWidth: -1, drawGrey: -1, fillGrey: -1}
}

// reset forgets the cached graphics state (fpdf restores its own state
// on each new page).
func (c *pdfCanvas) reset() {
	c.lineWidth, c.drawGrey, c.fillGrey, c.dashed, c.round = -1, -1, -1, true, true
	c.fontSet = false
}

func (c *pdfCanvas) mm() float64 { return 1 }

func (c *pdfCanvas) group(tg tag, p pen, f paint) {}
func (c *pdfCanvas) endGroup()                    {}

func (c *pdfCanvas) setPen(p pen) {
	if p.width != c.lineWidth {
		c.f.SetLineWidth(p.width)
		c.lineWidth = p.width
	}
	if g := p.grey.byte255(); g != c.drawGrey {
		c.f.SetDrawColor(g, g, g)
		c.drawGrey = g
	}
	if len(p.dash) > 0 || c.dashed {
		c.f.SetDashPattern(p.dash, 0)
		c.dashed = len(p.dash) > 0
	}
	if p.round != c.round {
		if p.round {
			c.f.SetLineCapStyle("round")
			c.f.SetLineJoinStyle("round")
		} else {
			c.f.SetLineCapStyle("butt")
			c.f.SetLineJoinStyle("miter")
		}
		c.round = p.round
	}
}

func (c *pdfCanvas) setFill(g grey) {
	if v := g.byte255(); v != c.fillGrey {
		c.f.SetFillColor(v, v, v)
		c.fillGrey = v
	}
}

// op returns fpdf's style string for a shape with pen p and paint f, and
// sets the state it needs; "" draws nothing.
func (c *pdfCanvas) op(p pen, f paint) string {
	s := ""
	if f.fill {
		c.setFill(f.grey)
		s += "F"
	}
	if p.width > 0 {
		c.setPen(p)
		s += "D"
	}
	return s
}

func (c *pdfCanvas) polyline(pts []vec, closed bool, p pen, f paint, tg tag) {
	if len(pts) == 0 {
		return
	}
	if !closed {
		f = noPaint
	}
	if f.hatch != hatchNone && closed {
		c.hatchPolygon(pts, f)
		f.hatch = hatchNone
	}
	op := c.op(p, f)
	if op == "" {
		return
	}
	if len(pts) == 1 {
		// A dot: a zero-length line with round caps.
		p.round = true
		c.setPen(p)
		c.f.Line(pts[0].x, pts[0].y, pts[0].x, pts[0].y)
		return
	}
	c.f.MoveTo(pts[0].x, pts[0].y)
	for _, q := range pts[1:] {
		c.f.LineTo(q.x, q.y)
	}
	if closed {
		c.f.ClosePath()
	}
	c.f.DrawPath(op)
}

func (c *pdfCanvas) rect(b box, p pen, f paint, tg tag) {
	if f.fill {
		c.f.Rect(b.x, b.y, b.w, b.h, c.op(noPen, f))
	}
	if f.hatch != hatchNone {
		c.f.ClipRect(b.x, b.y, b.w, b.h, false)
		c.drawHatch(b, f)
		c.f.ClipEnd()
	}
	if p.width > 0 {
		c.f.Rect(b.x, b.y, b.w, b.h, c.op(p, noPaint))
	}
}

func (c *pdfCanvas) hatchPolygon(pts []vec, f paint) {
	poly := make([]fpdf.PointType, len(pts))
	bb := box{pts[0].x, pts[0].y, 0, 0}
	for i, q := range pts {
		poly[i] = fpdf.PointType{X: q.x, Y: q.y}
		if q.x < bb.x {
			bb.w += bb.x - q.x
			bb.x = q.x
		}
		if q.y < bb.y {
			bb.h += bb.y - q.y
			bb.y = q.y
		}
		bb.w = max(bb.w, q.x-bb.x)
		bb.h = max(bb.h, q.y-bb.y)
	}
	if f.fill {
		c.f.Polygon(poly, c.op(noPen, f))
	}
	c.f.ClipPolygon(poly, false)
	c.drawHatch(bb, f)
	c.f.ClipEnd()
}

func (c *pdfCanvas) drawHatch(b box, f paint) {
	c.setPen(pen{width: 0.18, grey: f.hatchGrey})
	for _, l := range hatchLines(b, f.hatch, f.hatchStepMM()) {
		c.f.Line(l[0].x, l[0].y, l[1].x, l[1].y)
	}
}

func (c *pdfCanvas) circle(ctr vec, r float64, p pen, f paint, tg tag) {
	if op := c.op(p, f); op != "" {
		c.f.Circle(ctr.x, ctr.y, r, op)
	}
}

func (c *pdfCanvas) setFont(f font) {
	// fpdf's SetFont does real work on every call (a long table of text
	// called it for every cell and every measure).
	if c.fontSet && c.font == f {
		return
	}
	c.font, c.fontSet = f, true
	style := ""
	if f.bold {
		style = "B"
	}
	c.f.SetFont(pdfFontFamily, style, f.size)
	g := f.grey.byte255()
	c.f.SetTextColor(g, g, g)
}

func (c *pdfCanvas) text(at vec, s string, f font, a anchor, tg tag) {
	c.setFont(f)
	x := at.x
	switch a {
	case anchorMiddle:
		x -= c.f.GetStringWidth(s) / 2
	case anchorEnd:
		x -= c.f.GetStringWidth(s)
	}
	c.f.Text(x, at.y, s)
}

func (c *pdfCanvas) textWidth(s string, f font) float64 {
	c.setFont(f)
	return c.f.GetStringWidth(s)
}

func (c *pdfCanvas) dots(pts []vec, r float64, g grey, tg tag) {
	if len(pts) == 0 {
		return
	}
	// Zero-length subpaths with round caps: the most compact dot in PDF.
	c.setPen(pen{width: 2 * r, grey: g, round: true})
	for _, q := range pts {
		c.f.MoveTo(q.x, q.y)
		c.f.LineTo(q.x, q.y)
	}
	c.f.DrawPath("D")
}

func (c *pdfCanvas) clip(b box) { c.f.ClipRect(b.x, b.y, b.w, b.h, false) }

// endClip restores the graphics state saved by clip, so the cached pen
// and fill are forgotten.
func (c *pdfCanvas) endClip() {
	c.f.ClipEnd()
	c.reset()
}

func (c *pdfCanvas) segments(pairs []vec, p pen, tg tag) {
	if len(pairs) < 2 || p.width <= 0 {
		return
	}
	c.setPen(p)
	for i := 0; i+1 < len(pairs); i += 2 {
		c.f.MoveTo(pairs[i].x, pairs[i].y)
		c.f.LineTo(pairs[i+1].x, pairs[i+1].y)
	}
	c.f.DrawPath("D")
}
