package export

import (
	"fmt"
	"io"
	"math"
	"strings"

	"dimerpath/planner"
)

// svgFigureWidthMM is the nominal printed width of the pattern SVG's
// field; its viewBox is in nm whatever the field size.
const svgFigureWidthMM = 170

// WriteSVG writes the pattern and route of p as one SVG image whose
// viewBox is in field nm (x to the right, y up on screen as in the
// field: the SVG's own y axis is flipped). It holds groups with ids
// "regions" (one "region-NAME" each, when opt.Pattern is given),
// "terraces", "strokes" ("strokes-fe" and "strokes-ap", one element
// "stroke-N" per stroke, N its number on paper, classes naming mode,
// kind, segment and its id in the plan file as "id-I"), "moves",
// "fiducials", "segment-labels", "axes", "scale-bar", "legend" and
// "caution". Only opt.Pattern and opt.Generator are used. O(strokes +
// actions + region runs).
func WriteSVG(w io.Writer, p *planner.Plan, opt Options) error {
	if err := checkPlan(p); err != nil {
		return err
	}
	sc := newScene(p, opt.Pattern)
	field := sc.field()
	W, H := field.Size().X, field.Size().Y
	// device units (nm) per mm of the nominal print
	u := math.Max(W, H*svgFigureWidthMM/200) / svgFigureWidthMM
	m := &measureCanvas{unit: u, metrics: sansMetrics()}

	left, right, top := 16.0, 6.0, 12.0
	totalW := W/u + left + right
	legend := overviewLegend(m, sc, 1)
	legendH := drawLegend(m, legend, vec{}, (totalW-left-right)*u) / u
	caution := wrapText(m, planner.Caution, fontCaution, (totalW-left-right)*u)
	bottom := 14 + 8 + legendH + 4 + float64(len(caution))*4.2 + 4
	totalH := H/u + top + bottom

	c := newSVGCanvas(w, u)
	c.raw(`<?xml version="1.0" encoding="UTF-8"?>` + "\n")
	c.buf = append(c.buf, `<svg xmlns="http://www.w3.org/2000/svg" version="1.1"`...)
	c.attrStr("viewBox", fmt.Sprintf("%s %s %s %s", fnum(-left*u), fnum(-top*u), fnum(totalW*u), fnum(totalH*u)))
	c.attrStr("width", fnum(totalW)+"mm")
	c.attrStr("height", fnum(totalH)+"mm")
	c.attrStr("font-family", svgFontFamily)
	c.buf = append(c.buf, ">\n"...)
	c.flushBuf()
	title := fmt.Sprintf("%s, variant %s: write plan pattern and route", p.Design, p.Variant)
	c.raw("<title>" + string(appendEscaped(nil, title)) + "</title>\n")
	desc := fmt.Sprintf("Field %s x %s nm; viewBox in nm. %d strokes in %d segments. %s", sig(W, 6), sig(H, 6),
		len(p.Strokes), len(p.Segments), planner.Caution)
	if opt.Generator != "" {
		desc = "Written by " + opt.Generator + ". " + desc
	}
	c.raw("<desc>" + string(appendEscaped(nil, desc)) + "</desc>\n")
	c.rect(box{-left * u, -top * u, totalW * u, totalH * u}, noPen, solid(1), tag{id: "background"})
	c.text(vec{0, -top * u * 0.45}, title, font{size: 10, bold: true}, anchorStart, tag{id: "title"})

	v := view{win: field, origin: vec{}, s: 1}
	res := drawOverview(c, sc, v)
	y := H + 14*u
	drawScaleBar(c, v, vec{0, y}, W/4)
	if res.unlabelled > 0 {
		c.text(vec{W, y + 1.2*u}, fmt.Sprintf("%d segment numbers left out for lack of room", res.unlabelled),
			fontSmall, anchorEnd, tag{class: "note"})
	}
	y += 8 * u
	y += drawLegend(c, legend, vec{0, y}, (totalW-left-right)*u) + 4*u
	c.group(tag{id: "caution", class: "caution"}, noPen, noPaint)
	for _, line := range caution {
		y += 4.2 * u
		c.text(vec{0, y}, line, fontCaution, anchorStart, tag{})
	}
	c.endGroup()
	c.hatchDefs()
	c.raw("</svg>\n")
	return c.err()
}

func fnum(v float64) string { return string(appendNum(nil, v)) }

// fontCaution is the caution's style in figures and footers.
var fontCaution = font{size: 8, bold: true}

// wrapText breaks s into lines no wider than width device units, at
// spaces; a word wider than the line is broken after a hyphen or
// underscore if it can be, else between characters. A "\n" starts a
// new line.
func wrapText(c canvas, s string, f font, width float64) []string {
	var lines []string
	for _, para := range strings.Split(s, "\n") {
		line := ""
		for _, w := range strings.Fields(para) {
			try := w
			if line != "" {
				try = line + " " + w
			}
			if c.textWidth(try, f) <= width {
				line = try
				continue
			}
			if line != "" {
				lines = append(lines, line)
			}
			line = ""
			for c.textWidth(w, f) > width {
				head, tail := breakWord(c, w, f, width)
				lines = append(lines, head)
				w = tail
			}
			line = w
		}
		lines = append(lines, line)
	}
	return lines
}

// breakWord splits w into a head that fits width and the rest.
func breakWord(c canvas, w string, f font, width float64) (head, tail string) {
	runes := []rune(w)
	fit := 1
	for fit < len(runes) && c.textWidth(string(runes[:fit+1]), f) <= width {
		fit++
	}
	// Prefer to break after a hyphen or underscore in the second half.
	for k := fit; k > fit/2; k-- {
		if r := runes[k-1]; r == '-' || r == '_' || r == '/' || r == '.' {
			fit = k
			break
		}
	}
	return string(runes[:fit]), string(runes[fit:])
}

// fitText returns s, or its longest prefix that fits width with "…"
// appended.
func fitText(c canvas, s string, f font, width float64) string {
	if c.textWidth(s, f) <= width {
		return s
	}
	runes := []rune(s)
	for n := len(runes) - 1; n > 0; n-- {
		if t := strings.TrimSpace(string(runes[:n])) + "…"; c.textWidth(t, f) <= width {
			return t
		}
	}
	return "…"
}

// measureCanvas measures text and draws nothing, for laying a document
// out before writing it.
type measureCanvas struct {
	unit    float64
	metrics *fontMetrics
}

func (m *measureCanvas) mm() float64                                             { return m.unit }
func (m *measureCanvas) group(tag, pen, paint)                                   {}
func (m *measureCanvas) endGroup()                                               {}
func (m *measureCanvas) polyline(pts []vec, closed bool, p pen, f paint, tg tag) {}
func (m *measureCanvas) rect(b box, p pen, f paint, tg tag)                      {}
func (m *measureCanvas) circle(c vec, r float64, p pen, f paint, tg tag)         {}
func (m *measureCanvas) text(at vec, s string, f font, a anchor, tg tag)         {}
func (m *measureCanvas) segments(pairs []vec, p pen, tg tag)                     {}
func (m *measureCanvas) dots(pts []vec, r float64, g grey, tg tag)               {}
func (m *measureCanvas) clip(b box)                                              {}
func (m *measureCanvas) endClip()                                                {}
func (m *measureCanvas) textWidth(s string, f font) float64 {
	return m.metrics.width(s, f.bold) * f.size * ptMM * m.unit
}
