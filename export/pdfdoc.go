package export

import (
	"fmt"
	"io"
	"time"

	"codeberg.org/go-fonts/liberation/liberationsansbold"
	"codeberg.org/go-fonts/liberation/liberationsansregular"
	"codeberg.org/go-pdf/fpdf"

	"dimerpath/planner"
)

// pdfFontFamily is the embedded Liberation Sans (regular and bold).
const pdfFontFamily = "LiberationSans"

// Page layout, mm.
const (
	marginSide   = 15
	marginTop    = 16
	footerHeight = 17 // caution (two lines) and page number
	headerBase   = 10 // baseline of the running header
)

// pdfDoc is a report under construction: an fpdf document, a canvas on
// it, a layout cursor, and the running header and footer.
type pdfDoc struct {
	f      *fpdf.Fpdf
	c      *pdfCanvas
	pageW  float64
	pageH  float64
	y      float64 // layout cursor, mm from the top
	header string  // running header, left
	date   string  // running header, right
	// onBreak is called after an automatic page break (a table repeats
	// its header there).
	onBreak func()
}

// newPDFDoc starts a document on paper with the given running header.
func newPDFDoc(paper Paper, header string, opt Options, title string) *pdfDoc {
	w, h := paper.size()
	f := fpdf.NewCustom(&fpdf.InitType{OrientationStr: "P", UnitStr: "mm", Size: fpdf.SizeType{Wd: w, Ht: h}})
	f.AddUTF8FontFromBytes(pdfFontFamily, "", liberationsansregular.TTF)
	f.AddUTF8FontFromBytes(pdfFontFamily, "B", liberationsansbold.TTF)
	f.SetMargins(marginSide, marginTop, marginSide)
	f.SetAutoPageBreak(false, 0)
	f.AliasNbPages("{nb}")
	f.SetTitle(title, true)
	f.SetSubject(planner.Caution, true)
	creator := "dimerpath"
	if opt.Generator != "" {
		creator = opt.Generator
	}
	f.SetCreator(creator, true)
	f.SetProducer(creator, true)
	// Fixed dates keep the file the same for the same inputs.
	d := opt.Date
	if d.IsZero() {
		d = time.Date(2000, 1, 1, 0, 0, 0, 0, time.UTC)
	}
	f.SetCreationDate(d)
	f.SetModificationDate(d)
	f.SetCatalogSort(true)
	doc := &pdfDoc{f: f, c: newPDFCanvas(f), pageW: w, pageH: h, header: header}
	if !opt.Date.IsZero() {
		doc.date = opt.Date.Format("2 January 2006")
	}
	f.SetFooterFunc(doc.footer)
	return doc
}

func (d *pdfDoc) left() float64    { return marginSide }
func (d *pdfDoc) width() float64   { return d.pageW - 2*marginSide }
func (d *pdfDoc) bottom() float64  { return d.pageH - footerHeight - 4 }
func (d *pdfDoc) remains() float64 { return d.bottom() - d.y }

// page starts a new page with the running header.
func (d *pdfDoc) page() {
	d.f.AddPage()
	d.c.reset()
	if d.f.PageNo() > 1 {
		hf := font{size: 7.5, grey: 0.3}
		room := d.width()
		if d.date != "" {
			d.c.text(vec{d.left() + d.width(), headerBase}, d.date, hf, anchorEnd, tag{})
			room -= d.c.textWidth(d.date, hf) + 6
		}
		d.c.text(vec{d.left(), headerBase}, fitText(d.c, d.header, hf, room), hf, anchorStart, tag{})
		d.c.polyline([]vec{{d.left(), headerBase + 1.8}, {d.left() + d.width(), headerBase + 1.8}}, false,
			pen{width: 0.15, grey: 0.5}, noPaint, tag{})
	}
	d.y = marginTop
}

// need starts a new page unless h mm remain; it reports whether it did.
func (d *pdfDoc) need(h float64) bool {
	if d.y+h <= d.bottom() {
		return false
	}
	d.page()
	if d.onBreak != nil {
		d.onBreak()
	}
	return true
}

// footer prints the caution and the page number on every page.
func (d *pdfDoc) footer() {
	c := d.c
	top := d.pageH - footerHeight
	c.polyline([]vec{{d.left(), top}, {d.left() + d.width(), top}}, false, pen{width: 0.3}, noPaint, tag{})
	f := font{size: 7.5, bold: true}
	num := fmt.Sprintf("Page %d of {nb}", d.f.PageNo())
	numW := c.textWidth("Page 000 of 000", font{size: 7.5})
	lines := wrapText(c, planner.Caution, f, d.width()-numW-6)
	y := top + 4
	for _, l := range lines {
		c.text(vec{d.left(), y}, l, f, anchorStart, tag{})
		y += 3.4
	}
	c.text(vec{d.left() + d.width(), top + 4}, num, font{size: 7.5}, anchorEnd, tag{})
}

// heading prints a section heading, starting a page if little room is
// left.
func (d *pdfDoc) heading(s string, room float64) {
	d.need(10 + room)
	d.y += 2
	d.c.text(vec{d.left(), d.y + 5}, s, font{size: 13, bold: true}, anchorStart, tag{})
	d.y += 9
}

// para prints wrapped text in f and advances the cursor.
func (d *pdfDoc) para(s string, f font) {
	lh := f.size * ptMM * 1.35
	for _, l := range wrapText(d.c, s, f, d.width()) {
		d.need(lh)
		d.c.text(vec{d.left(), d.y + lh*0.8}, l, f, anchorStart, tag{})
		d.y += lh
	}
	d.y += 1.5
}

// output writes the finished document.
func (d *pdfDoc) output(w io.Writer) error {
	if err := d.f.Error(); err != nil {
		return fmt.Errorf("export: building PDF: %w", err)
	}
	return d.f.Output(w)
}

// tableColumn is one column of a table: its title, its share of the
// width and its alignment.
type tableColumn struct {
	title string
	share float64
	right bool
}

// table lays out rows of wrapped cells, repeating its header row after
// every page break.
type table struct {
	d      *pdfDoc
	cols   []tableColumn
	widths []float64
	f      font
	hf     font
	pad    float64
	lh     float64
}

func newTable(d *pdfDoc, f font, cols ...tableColumn) *table {
	t := &table{d: d, cols: cols, f: f, hf: font{size: f.size, bold: true}, pad: 1.2, lh: f.size * ptMM * 1.3}
	total := 0.0
	for _, c := range cols {
		total += c.share
	}
	for _, c := range cols {
		t.widths = append(t.widths, d.width()*c.share/total)
	}
	return t
}

// start prints the header now and after every page break until end.
func (t *table) start() {
	t.d.onBreak = t.header
	t.d.need(3 * (t.lh + 2*t.pad))
	t.header()
}

func (t *table) end() { t.d.onBreak = nil; t.d.y += 3 }

func (t *table) header() {
	d := t.d
	cells := make([][]string, len(t.cols))
	for i, c := range t.cols {
		cells[i] = wrapText(d.c, c.title, t.hf, t.widths[i]-2*t.pad)
	}
	h := t.height(cells)
	d.c.rect(box{d.left(), d.y, d.width(), h}, noPen, solid(0.88), tag{})
	t.draw(cells, h, t.hf)
	d.c.polyline([]vec{{d.left(), d.y + h}, {d.left() + d.width(), d.y + h}}, false, pen{width: 0.35}, noPaint, tag{})
	d.y += h
}

func (t *table) height(cells [][]string) float64 {
	n := 1
	for _, c := range cells {
		n = max(n, len(c))
	}
	return float64(n)*t.lh + 2*t.pad
}

func (t *table) draw(cells [][]string, h float64, f font) {
	d := t.d
	x := d.left()
	for i, lines := range cells {
		for k, l := range lines {
			y := d.y + t.pad + float64(k)*t.lh + t.lh*0.78
			if t.cols[i].right {
				d.c.text(vec{x + t.widths[i] - t.pad, y}, l, f, anchorEnd, tag{})
			} else {
				d.c.text(vec{x + t.pad, y}, l, f, anchorStart, tag{})
			}
		}
		x += t.widths[i]
	}
}

// row prints one row; each cell's text is wrapped to its column (a
// "\n" forces a line). A row never splits across pages. It returns the
// row's top y and height, for drawing into it.
func (t *table) row(texts ...string) (top, h float64) {
	d := t.d
	cells := make([][]string, len(t.cols))
	for i := range t.cols {
		s := ""
		if i < len(texts) {
			s = texts[i]
		}
		cells[i] = wrapText(d.c, s, t.f, t.widths[i]-2*t.pad)
	}
	h = t.height(cells)
	d.need(h)
	t.draw(cells, h, t.f)
	d.c.polyline([]vec{{d.left(), d.y + h}, {d.left() + d.width(), d.y + h}}, false, pen{width: 0.12, grey: 0.55}, noPaint, tag{})
	top = d.y
	d.y += h
	return top, h
}

// spanRow prints a row whose first cell is first and whose second cell,
// rest, spans all the other columns. It returns the row's top y.
func (t *table) spanRow(first, rest string) (top float64) {
	return t.spanRowFont(first, rest, t.f)
}

// spanRowFont is spanRow with rest in font f.
func (t *table) spanRowFont(first, rest string, f font) (top float64) {
	d := t.d
	w0 := t.widths[0]
	cells := [][]string{wrapText(d.c, first, t.f, w0-2*t.pad), wrapText(d.c, rest, f, d.width()-w0-2*t.pad)}
	h := t.height(cells)
	d.need(h)
	for i, lines := range cells {
		x, cf := d.left()+t.pad, t.f
		if i == 1 {
			x, cf = x+w0, f
		}
		for k, l := range lines {
			d.c.text(vec{x, d.y + t.pad + float64(k)*t.lh + t.lh*0.78}, l, cf, anchorStart, tag{})
		}
	}
	d.c.polyline([]vec{{d.left(), d.y + h}, {d.left() + d.width(), d.y + h}}, false, pen{width: 0.12, grey: 0.55}, noPaint, tag{})
	top = d.y
	d.y += h
	return top
}

// colX returns the left edge of column i.
func (t *table) colX(i int) float64 {
	x := t.d.left()
	for k := range i {
		x += t.widths[k]
	}
	return x
}

// keyValues prints a two-column list of label and value.
func (d *pdfDoc) keyValues(rows [][2]string, labelShare float64) {
	t := newTable(d, fontBody, tableColumn{share: labelShare}, tableColumn{share: 1 - labelShare})
	for _, r := range rows {
		cells := [][]string{wrapText(d.c, r[0], fontBold, t.widths[0]-2*t.pad), wrapText(d.c, r[1], fontBody, t.widths[1]-2*t.pad)}
		h := t.height(cells)
		d.need(h)
		x := d.left()
		for i, lines := range cells {
			f := fontBody
			if i == 0 {
				f = fontBold
			}
			for k, l := range lines {
				d.c.text(vec{x + t.pad, d.y + t.pad + float64(k)*t.lh + t.lh*0.78}, l, f, anchorStart, tag{})
			}
			x += t.widths[i]
		}
		d.y += h
	}
	d.y += 2
}

// cautionBox prints the caution in a heavy frame.
func (d *pdfDoc) cautionBox() {
	f := font{size: 11, bold: true}
	lines := wrapText(d.c, planner.Caution, f, d.width()-12)
	lh := f.size * ptMM * 1.35
	h := float64(len(lines))*lh + 8
	d.need(h + 4)
	b := box{d.left(), d.y, d.width(), h}
	d.c.rect(b, pen{width: 1.2}, solid(0.92), tag{})
	d.c.rect(b.inset(1.4), pen{width: 0.3}, noPaint, tag{})
	y := d.y + 4 + lh*0.8
	for _, l := range lines {
		d.c.text(vec{d.left() + 6, y}, l, f, anchorStart, tag{})
		y += lh
	}
	d.y += h + 5
}

// errorBox draws a boxed block of lines, heavier than the caution: what
// the operator must see before anything else on the page.
func (d *pdfDoc) errorBox(title string, lines []string) {
	ft, f := font{size: 12, bold: true}, font{size: 8.5}
	lh := f.size * ptMM * 1.35
	var wrapped []string
	for _, l := range lines {
		wrapped = append(wrapped, wrapText(d.c, l, f, d.width()-14)...)
	}
	h := ft.size*ptMM*1.4 + float64(len(wrapped))*lh + 8
	d.need(h + 4)
	b := box{d.left(), d.y, d.width(), h}
	d.c.rect(b, pen{width: 2}, solid(0.8), tag{})
	y := d.y + 4 + ft.size*ptMM
	d.c.text(vec{d.left() + 6, y}, title, ft, anchorStart, tag{})
	y += ft.size*ptMM*0.4 + lh
	for _, l := range wrapped {
		d.c.text(vec{d.left() + 7, y}, l, f, anchorStart, tag{})
		y += lh
	}
	d.y += h + 5
}

// tickBox draws an empty square for the operator to tick.
func (d *pdfDoc) tickBox(x, y, size float64) {
	d.c.rect(box{x, y, size, size}, pen{width: 0.35}, solid(1), tag{})
}
