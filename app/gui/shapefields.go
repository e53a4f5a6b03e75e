package gui

import (
	"fmt"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/theme"
	"fyne.io/fyne/v2/widget"
	"github.com/golang/geo/r2"

	"dimerpath/app/editor"
	"dimerpath/lattice/design"
)

// shapeEditor is the Regions panel's card for the selected shape: its
// position and size as fields to type into (drawing by numbers), what
// the typed values snapped to, and what the shape writes. Entries keep
// what was typed; the line under them shows the snapped values, and the
// entries are filled again only when the shape changes by other means
// (another selection, a drag, undo).
type shapeEditor struct {
	u       *UI
	box     *fyne.Container
	title   *widget.Label
	fields  *fyne.Container
	snapped *widget.Label
	msg     *widget.Label
	entries map[string]*keyEntry
	order   []string
	// shown is the shape the entries were filled from or last set to.
	ref   [2]int
	shown design.Shape
}

// The fields of each kind of shape, in the order shown.
var shapeFieldNames = map[design.ShapeKind][]string{
	design.ShapeRect:     {"x (nm)", "y (nm)", "width (nm)", "height (nm)"},
	design.ShapeWindow:   {"x (nm)", "y (nm)", "template"},
	design.ShapeSite:     {"x (nm)", "y (nm)"},
	design.ShapeDimer:    {"x (nm)", "y (nm)"},
	design.ShapePolyline: {"points (x, y a line)", "line width (nm)"},
	design.ShapePolygon:  {"points (x, y a line)"},
	design.ShapeArray:    {"x (nm)", "y (nm)", "columns", "rows", "pitch (dimers)", "pitch (rows)", "template"},
}

func newShapeEditor(u *UI) *shapeEditor {
	e := &shapeEditor{u: u, ref: [2]int{-1, -1}}
	e.title = wrapLabel("")
	e.fields = container.NewVBox()
	e.snapped = mutedLabel("")
	e.msg = errorLabel()
	apply := widget.NewButtonWithIcon("Apply", theme.ConfirmIcon(), e.apply)
	del := widget.NewButtonWithIcon("Delete shape", theme.DeleteIcon(), func() { u.Session.DeleteSelectedShape() })
	e.box = container.NewVBox(e.title, e.fields, e.msg, e.snapped, container.NewGridWithColumns(2, apply, del))
	e.box.Hide()
	return e
}

// refresh shows the selected shape of region a, or hides the card.
func (e *shapeEditor) refresh(a int) {
	s := e.u.Session
	i, k := s.SelectedShape()
	if a < 0 || i != a || k < 0 {
		e.box.Hide()
		e.ref = [2]int{-1, -1}
		return
	}
	r := s.Variant().Regions[i]
	sh := r.Shapes[k]
	e.title.SetText(fmt.Sprintf("Shape %d of %d: %s. Type its position and size, or drag it with the Select tool.", k+1, len(r.Shapes), editor.ShapeName(sh)))
	if e.ref != [2]int{i, k} || !sameDesignShape(sh, e.shown) {
		e.build(sh)
		e.ref, e.shown = [2]int{i, k}, sh
		e.msg.Hide()
	}
	e.snapped.SetText("Snapped to the lattice: " + fieldsText(editor.FieldsOf(sh)) + ". Writes " + s.WrittenArea() + ".")
	e.box.Show()
}

// build makes the entries for sh's kind, filled with its values.
func (e *shapeEditor) build(sh design.Shape) {
	f := editor.FieldsOf(sh)
	names := shapeFieldNames[sh.Kind]
	if sh.Kind == design.ShapeArray && f.Of != design.ShapeWindow {
		names = names[:len(names)-1] // no template for dimers or sites
	}
	e.entries, e.order = map[string]*keyEntry{}, names
	form := widget.NewForm()
	for _, n := range names {
		en := e.u.newEntry()
		if strings.HasPrefix(n, "points") {
			en = e.u.newMultiLineEntry()
			en.SetMinRowsVisible(3)
		} else {
			en.OnSubmitted = func(string) { e.apply() }
		}
		en.SetText(fieldText(f, n))
		e.entries[n] = en
		form.Append(n, en)
	}
	e.fields.Objects = []fyne.CanvasObject{form}
	e.fields.Refresh()
}

// fieldText is field n of f as the entry shows it.
func fieldText(f editor.ShapeFields, n string) string {
	num := func(v float64) string { return trimZeros(fmt.Sprintf("%.3f", v)) }
	switch n {
	case "x (nm)":
		return num(f.X)
	case "y (nm)":
		return num(f.Y)
	case "width (nm)":
		return num(f.W)
	case "height (nm)":
		return num(f.H)
	case "line width (nm)":
		return num(f.WidthNM)
	case "template":
		return f.Template
	case "columns":
		return fmt.Sprint(f.Cols)
	case "rows":
		return fmt.Sprint(f.Rows)
	case "pitch (dimers)":
		return fmt.Sprint(f.PitchDimers)
	case "pitch (rows)":
		return fmt.Sprint(f.PitchRows)
	}
	var lines []string
	for _, p := range f.Points {
		lines = append(lines, num(p.X)+", "+num(p.Y))
	}
	return strings.Join(lines, "\n")
}

// apply reads the entries and sets the selected shape to them, snapped;
// the entries keep what was typed, the line under them shows the
// snapped values.
func (e *shapeEditor) apply() {
	s := e.u.Session
	i, k := s.SelectedShape()
	if i < 0 {
		return
	}
	f, err := e.read(editor.FieldsOf(s.Variant().Regions[i].Shapes[k]))
	var sh design.Shape
	if err == nil {
		sh, err = s.SnapShape(f)
	}
	if err != nil {
		showErr(e.msg, err)
		return
	}
	// The edit's own refresh must keep the typed values: the shape they
	// describe is the one shown.
	before := e.shown
	e.shown = sh
	if _, err := s.SetSelectedShapeFields(f); err != nil {
		e.shown = before
		showErr(e.msg, err)
		return
	}
	e.msg.Hide()
	e.refresh(s.Active())
}

// read parses the entries over f (the shape's current fields).
func (e *shapeEditor) read(f editor.ShapeFields) (editor.ShapeFields, error) {
	for _, n := range e.order {
		text := e.entries[n].Text
		var err error
		switch n {
		case "x (nm)":
			f.X, err = parseNumber("x", text)
		case "y (nm)":
			f.Y, err = parseNumber("y", text)
		case "width (nm)":
			f.W, err = parseNumber("width", text)
		case "height (nm)":
			f.H, err = parseNumber("height", text)
		case "line width (nm)":
			f.WidthNM, err = parseNumber("line width", text)
		case "template":
			f.Template = strings.TrimSpace(text)
		case "columns":
			f.Cols, err = parseInt("columns", text)
		case "rows":
			f.Rows, err = parseInt("rows", text)
		case "pitch (dimers)":
			f.PitchDimers, err = parseInt("pitch (dimers)", text)
		case "pitch (rows)":
			f.PitchRows, err = parseInt("pitch (rows)", text)
		default:
			f.Points, err = parsePoints(text)
		}
		if err != nil {
			return f, err
		}
	}
	return f, nil
}

// parsePoints reads one "x, y" (or "x y") point a line.
func parsePoints(text string) ([]r2.Point, error) {
	var ps []r2.Point
	for i, line := range strings.Split(text, "\n") {
		line = strings.TrimSpace(line)
		if line == "" {
			continue
		}
		parts := strings.FieldsFunc(line, func(r rune) bool { return r == ',' || r == ' ' || r == '\t' || r == ';' })
		if len(parts) != 2 {
			return nil, fmt.Errorf("point %d: %q: write x, y (nm)", i+1, line)
		}
		x, err := parseNumber(fmt.Sprintf("point %d x", i+1), parts[0])
		if err != nil {
			return nil, err
		}
		y, err := parseNumber(fmt.Sprintf("point %d y", i+1), parts[1])
		if err != nil {
			return nil, err
		}
		ps = append(ps, r2.Point{X: x, Y: y})
	}
	return ps, nil
}

// fieldsText states a shape's snapped fields in one line.
func fieldsText(f editor.ShapeFields) string {
	num := func(v float64) string { return trimZeros(fmt.Sprintf("%.3f", v)) }
	pt := func(x, y float64) string { return "(" + num(x) + ", " + num(y) + ") nm" }
	switch f.Kind {
	case design.ShapeRect:
		return fmt.Sprintf("x %s, y %s, %s × %s nm", num(f.X), num(f.Y), num(f.W), num(f.H))
	case design.ShapePolygon, design.ShapePolyline:
		var ps []string
		for _, p := range f.Points {
			ps = append(ps, "("+num(p.X)+", "+num(p.Y)+")")
		}
		s := strings.Join(ps, ", ") + " nm"
		if f.Kind == design.ShapePolyline {
			s += ", " + num(f.WidthNM) + " nm wide"
		}
		return s
	case design.ShapeArray:
		return fmt.Sprintf("first at %s, %d × %d at %d dimers × %d rows", pt(f.X, f.Y), f.Cols, f.Rows, f.PitchDimers, f.PitchRows)
	}
	return pt(f.X, f.Y)
}

// sameDesignShape reports whether a and b are the same shape.
func sameDesignShape(a, b design.Shape) bool {
	fa, fb := editor.FieldsOf(a), editor.FieldsOf(b)
	return fa.Kind == fb.Kind && fa.Of == fb.Of && fa.X == fb.X && fa.Y == fb.Y && fa.W == fb.W && fa.H == fb.H &&
		fa.WidthNM == fb.WidthNM && fa.Template == fb.Template && fa.Cols == fb.Cols && fa.Rows == fb.Rows &&
		fa.PitchDimers == fb.PitchDimers && fa.PitchRows == fb.PitchRows && pointsEqual(fa.Points, fb.Points)
}

func pointsEqual(a, b []r2.Point) bool {
	if len(a) != len(b) {
		return false
	}
	for i := range a {
		if a[i] != b[i] {
			return false
		}
	}
	return true
}
