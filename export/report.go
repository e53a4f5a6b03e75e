package export

import (
	"fmt"
	"io"
	"time"

	"dimerpath/internal/atomicfile"
	"dimerpath/planner"
)

// The frame shared by the one-file reports, the variant comparison
// (compare.go) and the sweep (sweep.go): their summary table, whose first
// row is the header and whose two-cell rows are a variant or value that
// could not be planned with its reason across the row; the SVG's head and
// caution; and the file writer that picks PDF or SVG by extension.

// printedDate is the date a report prints among its facts: opt.Date
// in words, or "(not given)".
func printedDate(opt Options) string {
	if opt.Date.IsZero() {
		return "(not given)"
	}
	return opt.Date.Format("Monday 2 January 2006")
}

// reportFacts prints a report's facts (kv, then what planned it when
// opt names it) and the caution box below them.
func reportFacts(d *pdfDoc, opt Options, kv [][2]string) {
	if opt.Generator != "" {
		kv = append(kv, [2]string{"Planned with", opt.Generator})
	}
	d.keyValues(kv, 0.28)
	d.cautionBox()
}

// summaryTable prints rows under the heading "Summary" as a table of
// columns sized by shares: the first column left-aligned, the others
// right-aligned.
func summaryTable(d *pdfDoc, rows [][]string, shares []float64) {
	cols := make([]tableColumn, len(shares))
	for i, s := range shares {
		cols[i] = tableColumn{title: rows[0][i], share: s, right: i > 0}
	}
	t := newTable(d, font{size: 7.5}, cols...)
	d.heading("Summary", 20)
	t.start()
	for _, r := range rows[1:] {
		if len(r) == 2 {
			t.spanRow(r[0], r[1]) // not planned: its reason across the row
			continue
		}
		t.row(r...)
	}
	t.end()
}

// svgTable is a summary table laid out for an SVG report: the rows'
// cells wrapped to their columns and each row's height, in mm.
type svgTable struct {
	rows    [][]string
	colW    []float64
	cells   [][][]string
	heights []float64
	f       font
}

// layoutSVGTable wraps rows into columns sized by shares over inner mm,
// measured with m; a two-cell row's second cell spans the rest of the row.
func layoutSVGTable(m canvas, rows [][]string, shares []float64, inner float64) *svgTable {
	t := &svgTable{rows: rows, colW: make([]float64, len(shares)), f: font{size: 6.5}}
	total := 0.0
	for _, s := range shares {
		total += s
	}
	for i, s := range shares {
		t.colW[i] = inner * s / total
	}
	t.cells = make([][][]string, len(rows))
	t.heights = make([]float64, len(rows))
	for i, r := range rows {
		t.cells[i] = make([][]string, len(r))
		n := 1
		for j, s := range r {
			cw := t.colW[j]
			if len(r) == 2 && j == 1 {
				cw = inner - t.colW[0]
			}
			f := t.f
			if i == 0 {
				f.bold = true
			}
			t.cells[i][j] = wrapText(m, s, f, cw-2)
			n = max(n, len(t.cells[i][j]))
		}
		t.heights[i] = float64(n)*3.2 + 1.6
	}
	return t
}

// below returns y moved down past the table.
func (t *svgTable) below(y float64) float64 {
	for _, h := range t.heights {
		y += h
	}
	return y
}

// draw draws the table as the group "summary" from (margin, y), inner mm
// wide, and returns the y below it.
func (t *svgTable) draw(c *svgCanvas, margin, y, inner float64) float64 {
	c.group(tag{id: "summary", class: "table"}, noPen, noPaint)
	for i, r := range t.rows {
		if i == 0 {
			c.rect(box{margin, y, inner, t.heights[i]}, noPen, solid(0.88), tag{})
		}
		x := margin
		for j := range r {
			f := t.f
			if i == 0 || j == 0 {
				f.bold = true
			}
			right := j > 0 && len(r) > 2
			for k, l := range t.cells[i][j] {
				yy := y + 0.8 + float64(k)*3.2 + 2.5
				if right {
					c.text(vec{x + t.colW[j] - 1, yy}, l, f, anchorEnd, tag{})
				} else {
					c.text(vec{x + 1, yy}, l, f, anchorStart, tag{})
				}
			}
			x += t.colW[j]
		}
		y += t.heights[i]
		c.polyline([]vec{{margin, y}, {margin + inner, y}}, false, pen{width: 0.12, grey: 0.55}, noPaint, tag{})
	}
	c.endGroup()
	return y
}

// startSVGReport opens a report's SVG of width x height mm on w: its
// title and the caution as the document's title and description, a white
// background, the title in titleSize points and the date (when given) at
// the top right.
func startSVGReport(w io.Writer, width, height, margin float64, title string, titleSize float64, date time.Time) *svgCanvas {
	c := newSVGCanvas(w, 1)
	c.raw(`<?xml version="1.0" encoding="UTF-8"?>` + "\n")
	c.buf = append(c.buf, `<svg xmlns="http://www.w3.org/2000/svg" version="1.1"`...)
	c.attrStr("viewBox", fmt.Sprintf("0 0 %s %s", fnum(width), fnum(height)))
	c.attrStr("width", fnum(width)+"mm")
	c.attrStr("height", fnum(height)+"mm")
	c.attrStr("font-family", svgFontFamily)
	c.buf = append(c.buf, ">\n"...)
	c.flushBuf()
	c.raw("<title>" + string(appendEscaped(nil, title)) + "</title>\n")
	c.raw("<desc>" + string(appendEscaped(nil, planner.Caution)) + "</desc>\n")
	c.rect(box{0, 0, width, height}, noPen, solid(1), tag{id: "background"})
	c.text(vec{margin, 12}, title, font{size: titleSize, bold: true}, anchorStart, tag{id: "title"})
	if !date.IsZero() {
		c.text(vec{width - margin, 12}, date.Format("2 January 2006"), fontBody, anchorEnd, tag{id: "date"})
	}
	return c
}

// endSVGReport draws the caution's lines (wrapped by the caller, who
// counted them into the height) as the group "caution" below y, closes
// the SVG and returns the first write error.
func endSVGReport(c *svgCanvas, caution []string, margin, y float64) error {
	c.group(tag{id: "caution", class: "caution"}, noPen, noPaint)
	for _, l := range caution {
		y += 4.2
		c.text(vec{margin, y}, l, fontCaution, anchorStart, tag{})
	}
	c.endGroup()
	c.hatchDefs()
	c.raw("</svg>\n")
	return c.err()
}

// writeReportFile writes a report to path through a temporary file
// renamed into place (see WriteFile): pdf or svg by the extension; any
// other is an error wrapping ErrFormat that names what (e.g. "a sweep
// report").
func writeReportFile(path, what string, pdf, svg func(w io.Writer) error) error {
	f, err := FormatFromPath(path)
	if err != nil {
		return err
	}
	if f != FormatPDF && f != FormatSVG {
		return fmt.Errorf("%s: %w: %s is .pdf or .svg", path, ErrFormat, what)
	}
	return atomicfile.Write(path, 0o644, func(w io.Writer) error {
		w = wrapWriter(w)
		if f == FormatPDF {
			return pdf(w)
		}
		return svg(w)
	})
}
