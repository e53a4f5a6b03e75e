package export

import (
	"bufio"
	"encoding/xml"
	"io"
	"math"
	"strconv"
	"strings"
)

// svgCanvas writes SVG elements to w. Its user unit is unit device
// units per millimetre (set by the document: nm per mm for the pattern
// file, 1 for the millimetre-based reports). Write errors are kept and
// reported by err; later writes are skipped.
type svgCanvas struct {
	w       *bufio.Writer
	werr    error
	unit    float64
	buf     []byte
	styles  []groupStyle // open groups, innermost last
	metrics *fontMetrics
	hatches []paint // hatched paints used, in first-use order
	hatchID map[string]bool
	clips   int // clip paths written so far
}

type groupStyle struct {
	p pen
	f paint
}

func newSVGCanvas(w io.Writer, unit float64) *svgCanvas {
	bw, ok := w.(*bufio.Writer)
	if !ok {
		bw = bufio.NewWriterSize(w, 1<<16)
	}
	return &svgCanvas{w: bw, unit: unit, metrics: sansMetrics()}
}

func (c *svgCanvas) mm() float64 { return c.unit }

func (c *svgCanvas) raw(s string) {
	if c.werr == nil {
		_, c.werr = c.w.WriteString(s)
	}
}

func (c *svgCanvas) flushBuf() {
	if c.werr == nil {
		_, c.werr = c.w.Write(c.buf)
	}
	c.buf = c.buf[:0]
}

// err flushes and returns the first write error.
func (c *svgCanvas) err() error {
	if c.werr == nil {
		c.werr = c.w.Flush()
	}
	return c.werr
}

// appendNum appends v rounded to 3 decimals without trailing zeros.
func appendNum(b []byte, v float64) []byte {
	if math.Abs(v) < 5e-4 {
		return append(b, '0')
	}
	b = strconv.AppendFloat(b, v, 'f', 3, 64)
	i := len(b) - 1
	for b[i] == '0' {
		i--
	}
	if b[i] == '.' {
		i--
	}
	return b[:i+1]
}

func (c *svgCanvas) attrNum(name string, v float64) {
	c.buf = append(c.buf, ' ')
	c.buf = append(c.buf, name...)
	c.buf = append(c.buf, '=', '"')
	c.buf = appendNum(c.buf, v)
	c.buf = append(c.buf, '"')
}

func (c *svgCanvas) attrStr(name, v string) {
	c.buf = append(c.buf, ' ')
	c.buf = append(c.buf, name...)
	c.buf = append(c.buf, '=', '"')
	c.buf = appendEscaped(c.buf, v)
	c.buf = append(c.buf, '"')
}

// appendEscaped appends s with XML's special characters escaped, for
// text and attribute values alike.
func appendEscaped(b []byte, s string) []byte {
	if !strings.ContainsAny(s, "<>&'\"\t\n\r") && validXMLText(s) {
		return append(b, s...)
	}
	var sb strings.Builder
	xml.EscapeText(&sb, []byte(s)) // also replaces invalid characters with U+FFFD
	return append(b, sb.String()...)
}

func validXMLText(s string) bool {
	for _, r := range s {
		if r < 0x20 || r == 0xFFFE || r == 0xFFFF || r == '\uFFFD' {
			return false
		}
	}
	return true
}

func greyHex(g grey) string {
	v := g.byte255()
	const hexd = "0123456789abcdef"
	return string([]byte{'#', hexd[v>>4], hexd[v&15], hexd[v>>4], hexd[v&15], hexd[v>>4], hexd[v&15]})
}

// patternID names the SVG pattern of a hatched paint.
func (f paint) patternID() string {
	return "hatch-" + strconv.Itoa(int(f.hatch)) + "-" + strconv.Itoa(f.hatchGrey.byte255()) + "-" +
		strconv.FormatFloat(f.hatchStepMM(), 'f', -1, 64) + "-" + strconv.Itoa(f.bg())
}

func (p pen) equal(o pen) bool {
	if p.width != o.width || p.grey != o.grey || p.round != o.round || len(p.dash) != len(o.dash) {
		return false
	}
	for i := range p.dash {
		if p.dash[i] != o.dash[i] {
			return false
		}
	}
	return true
}

// styleAttrs appends the presentation attributes of p and f, leaving
// out those the innermost group already sets.
func (c *svgCanvas) styleAttrs(p pen, f paint) {
	if n := len(c.styles); n > 0 {
		g := c.styles[n-1]
		if g.p.equal(p) && g.f == f {
			return
		}
	}
	c.fillAttrs(f)
	c.penAttrs(p)
}

// inherited returns the pen the innermost group passes on.
func (c *svgCanvas) inherited() pen {
	if n := len(c.styles); n > 0 {
		return c.styles[n-1].p
	}
	return pen{}
}

func (c *svgCanvas) fillAttrs(f paint) {
	switch {
	case f.hatch != hatchNone:
		// A hatched shape is drawn as fill then pattern; the pattern
		// carries its own background (see hatchDefs).
		id := f.patternID()
		if !c.hatchID[id] {
			if c.hatchID == nil {
				c.hatchID = map[string]bool{}
			}
			c.hatchID[id] = true
			c.hatches = append(c.hatches, f)
		}
		c.attrStr("fill", "url(#"+id+")")
	case f.fill:
		c.attrStr("fill", greyHex(f.grey))
	default:
		c.attrStr("fill", "none")
	}
}

func (f paint) hatchStepMM() float64 {
	if f.hatchStep > 0 {
		return f.hatchStep
	}
	return 1.2
}

// bg returns the pattern background: the fill grey, or 256 for none.
func (f paint) bg() int {
	if f.fill {
		return f.grey.byte255()
	}
	return 256
}

func (c *svgCanvas) penAttrs(p pen) {
	if p.width <= 0 {
		c.attrStr("stroke", "none")
		return
	}
	c.attrStr("stroke", greyHex(p.grey))
	c.attrNum("stroke-width", p.width*c.unit)
	// Attributes a group sets are inherited: undo those p does not want.
	g := c.inherited()
	if len(p.dash) > 0 {
		var sb []byte
		for i, d := range p.dash {
			if i > 0 {
				sb = append(sb, ' ')
			}
			sb = appendNum(sb, d*c.unit)
		}
		c.attrStr("stroke-dasharray", string(sb))
	} else if len(g.dash) > 0 {
		c.attrStr("stroke-dasharray", "none")
	}
	if p.round {
		c.attrStr("stroke-linecap", "round")
		c.attrStr("stroke-linejoin", "round")
	} else if g.round {
		c.attrStr("stroke-linecap", "butt")
		c.attrStr("stroke-linejoin", "miter")
	}
}

func (c *svgCanvas) tagAttrs(tg tag) {
	if tg.id != "" {
		c.attrStr("id", tg.id)
	}
	if tg.class != "" {
		c.attrStr("class", tg.class)
	}
}

func (c *svgCanvas) group(tg tag, p pen, f paint) {
	c.buf = append(c.buf, "<g"...)
	c.tagAttrs(tg)
	c.fillAttrs(f)
	c.penAttrs(p)
	c.buf = append(c.buf, ">\n"...)
	c.flushBuf()
	c.styles = append(c.styles, groupStyle{p, f})
}

func (c *svgCanvas) endGroup() {
	c.styles = c.styles[:len(c.styles)-1]
	c.raw("</g>\n")
}

func (c *svgCanvas) polyline(pts []vec, closed bool, p pen, f paint, tg tag) {
	if len(pts) == 0 {
		return
	}
	if len(pts) == 1 {
		pts = []vec{pts[0], pts[0]}
	}
	if closed {
		c.buf = append(c.buf, "<polygon"...)
	} else {
		c.buf = append(c.buf, "<polyline"...)
	}
	c.tagAttrs(tg)
	c.buf = append(c.buf, ` points="`...)
	for i, q := range pts {
		if i > 0 {
			c.buf = append(c.buf, ' ')
		}
		c.buf = appendNum(c.buf, q.x)
		c.buf = append(c.buf, ',')
		c.buf = appendNum(c.buf, q.y)
	}
	c.buf = append(c.buf, '"')
	c.styleAttrs(p, f)
	c.buf = append(c.buf, "/>\n"...)
	c.flushBuf()
}

func (c *svgCanvas) rect(b box, p pen, f paint, tg tag) {
	c.buf = append(c.buf, "<rect"...)
	c.tagAttrs(tg)
	c.attrNum("x", b.x)
	c.attrNum("y", b.y)
	c.attrNum("width", math.Max(b.w, 0))
	c.attrNum("height", math.Max(b.h, 0))
	c.styleAttrs(p, f)
	c.buf = append(c.buf, "/>\n"...)
	c.flushBuf()
}

func (c *svgCanvas) circle(ctr vec, r float64, p pen, f paint, tg tag) {
	c.buf = append(c.buf, "<circle"...)
	c.tagAttrs(tg)
	c.attrNum("cx", ctr.x)
	c.attrNum("cy", ctr.y)
	c.attrNum("r", r)
	c.styleAttrs(p, f)
	c.buf = append(c.buf, "/>\n"...)
	c.flushBuf()
}

// svgFontFamily lists Liberation Sans first and its metric-compatible
// equivalents after it, so text measured with Liberation's metrics fits.
const svgFontFamily = "Liberation Sans, Arial, Helvetica, sans-serif"

func (c *svgCanvas) text(at vec, s string, f font, a anchor, tg tag) {
	c.buf = append(c.buf, "<text"...)
	c.tagAttrs(tg)
	c.attrNum("x", at.x)
	c.attrNum("y", at.y)
	c.attrNum("font-size", f.size*ptMM*c.unit)
	if f.bold {
		c.attrStr("font-weight", "bold")
	}
	switch a {
	case anchorMiddle:
		c.attrStr("text-anchor", "middle")
	case anchorEnd:
		c.attrStr("text-anchor", "end")
	}
	// Text must not inherit a group's fill or outline.
	if n := len(c.styles); f.grey != 0 || (n > 0 && (c.styles[n-1].f != solid(0))) {
		c.attrStr("fill", greyHex(f.grey))
	}
	if c.inherited().width > 0 {
		c.attrStr("stroke", "none")
	}
	c.buf = append(c.buf, '>')
	c.buf = appendEscaped(c.buf, s)
	c.buf = append(c.buf, "</text>\n"...)
	c.flushBuf()
}

func (c *svgCanvas) textWidth(s string, f font) float64 {
	return c.metrics.width(s, f.bold) * f.size * ptMM * c.unit
}

// hatchDefs writes the <pattern> definitions of every hatch drawn so far
// (SVG allows references ahead of their definitions); the patterns are
// sized in millimetres of paper.
func (c *svgCanvas) hatchDefs() {
	if len(c.hatches) == 0 {
		return
	}
	c.raw("<defs>\n")
	for _, f := range c.hatches {
		id := f.patternID()
		step := f.hatchStepMM() * c.unit
		lw := 0.18 * c.unit
		c.buf = append(c.buf, "<pattern"...)
		c.attrStr("id", id)
		c.attrStr("patternUnits", "userSpaceOnUse")
		c.attrNum("width", step)
		c.attrNum("height", step)
		switch f.hatch {
		case hatchDiag:
			c.attrStr("patternTransform", "rotate(-45)")
		case hatchBackDiag, hatchCross:
			c.attrStr("patternTransform", "rotate(45)")
		}
		c.buf = append(c.buf, ">"...)
		if f.fill {
			c.buf = append(c.buf, `<rect x="0" y="0"`...)
			c.attrNum("width", step)
			c.attrNum("height", step)
			c.attrStr("fill", greyHex(f.grey))
			c.buf = append(c.buf, "/>"...)
		}
		line := func(x1, y1, x2, y2 float64) {
			c.buf = append(c.buf, "<line"...)
			c.attrNum("x1", x1)
			c.attrNum("y1", y1)
			c.attrNum("x2", x2)
			c.attrNum("y2", y2)
			c.attrStr("stroke", greyHex(f.hatchGrey))
			c.attrNum("stroke-width", lw)
			c.buf = append(c.buf, "/>"...)
		}
		switch f.hatch {
		case hatchVertical:
			line(step/2, 0, step/2, step)
		case hatchCross:
			line(0, step/2, step, step/2)
			line(step/2, 0, step/2, step)
		default: // horizontal, and the diagonals rotated
			line(0, step/2, step, step/2)
		}
		c.buf = append(c.buf, "</pattern>\n"...)
		c.flushBuf()
	}
	c.raw("</defs>\n")
}

func (c *svgCanvas) dots(pts []vec, r float64, g grey, tg tag) {
	if len(pts) == 0 {
		return
	}
	c.buf = append(c.buf, "<path"...)
	c.tagAttrs(tg)
	c.buf = append(c.buf, ` d="`...)
	for i, q := range pts {
		if i > 0 {
			c.buf = append(c.buf, ' ')
		}
		// A tiny horizontal segment: zero-length subpaths are not drawn
		// by every renderer.
		c.buf = append(c.buf, 'M')
		c.buf = appendNum(c.buf, q.x)
		c.buf = append(c.buf, ' ')
		c.buf = appendNum(c.buf, q.y)
		c.buf = append(c.buf, "h.001"...)
		if len(c.buf) > 1<<15 {
			c.flushBuf()
		}
	}
	c.buf = append(c.buf, '"')
	c.attrStr("fill", "none")
	c.attrStr("stroke", greyHex(g))
	c.attrNum("stroke-width", 2*r)
	c.attrStr("stroke-linecap", "round")
	c.buf = append(c.buf, "/>\n"...)
	c.flushBuf()
}

func (c *svgCanvas) clip(b box) {
	c.clips++
	id := "clip-" + strconv.Itoa(c.clips)
	c.buf = append(c.buf, `<clipPath id="`...)
	c.buf = append(c.buf, id...)
	c.buf = append(c.buf, `"><rect`...)
	c.attrNum("x", b.x)
	c.attrNum("y", b.y)
	c.attrNum("width", b.w)
	c.attrNum("height", b.h)
	c.buf = append(c.buf, "/></clipPath>\n<g clip-path=\"url(#"...)
	c.buf = append(c.buf, id...)
	c.buf = append(c.buf, ")\" fill=\"none\" stroke=\"none\">\n"...)
	c.flushBuf()
	c.styles = append(c.styles, groupStyle{})
}

func (c *svgCanvas) endClip() { c.endGroup() }

func (c *svgCanvas) segments(pairs []vec, p pen, tg tag) {
	if len(pairs) < 2 || p.width <= 0 {
		return
	}
	c.buf = append(c.buf, "<path"...)
	c.tagAttrs(tg)
	c.buf = append(c.buf, ` d="`...)
	for i := 0; i+1 < len(pairs); i += 2 {
		if i > 0 {
			c.buf = append(c.buf, ' ')
		}
		c.buf = append(c.buf, 'M')
		c.buf = appendNum(c.buf, pairs[i].x)
		c.buf = append(c.buf, ' ')
		c.buf = appendNum(c.buf, pairs[i].y)
		c.buf = append(c.buf, 'L')
		c.buf = appendNum(c.buf, pairs[i+1].x)
		c.buf = append(c.buf, ' ')
		c.buf = appendNum(c.buf, pairs[i+1].y)
		if len(c.buf) > 1<<15 {
			c.flushBuf()
		}
	}
	c.buf = append(c.buf, '"')
	c.attrStr("fill", "none")
	c.penAttrs(p)
	c.buf = append(c.buf, "/>\n"...)
	c.flushBuf()
}
