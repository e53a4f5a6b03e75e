package gui

import (
	"fmt"
	"strconv"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/theme"
	"fyne.io/fyne/v2/widget"
)

// A link is a tunnel gap or a coupling of the selected region, shown in
// the Regions panel as one row: what it is, the tolerance the planner
// holds between the two regions, and a remove button. The rows stay
// while the list of links stays, so typing a tolerance (which commits
// on every key, as the region's own tolerance does) keeps its field.

// linkRow is one link's row.
type linkRow struct {
	box   fyne.CanvasObject
	label *widget.Label
	tol   *keyEntry
	index int // into the variant's TunnelGaps or Couplings
	// shown is the tolerance the row last showed (-1 before the first).
	shown float64
}

// linkRows are the rows of one kind of link.
type linkRows struct {
	u    *UI
	box  *fyne.Container
	rows []*linkRow
	key  string // the links the rows were built for
	// set commits a typed tolerance of link i; remove removes it.
	set    func(i int, typed string) error
	remove func(i int)
	// field is the text before the tolerance field ("width ±").
	field string
	msg   func(error)
}

// link is one link to show: its index, its two regions, its text and
// its tolerance (0 and placeholder for the rule's).
type link struct {
	index       int
	a, b        string
	text        string
	tolNM       float64
	placeholder string
}

// show makes the rows show links; the rows are rebuilt only when the
// links are others than those shown.
func (l *linkRows) show(links []link) {
	var key strings.Builder
	for _, k := range links {
		fmt.Fprintf(&key, "%d %q %q;", k.index, k.a, k.b)
	}
	if key.String() != l.key {
		l.key = key.String()
		l.rows = l.rows[:0]
		var objs []fyne.CanvasObject
		for _, k := range links {
			r := l.newRow(k.index)
			l.rows = append(l.rows, r)
			objs = append(objs, r.box)
		}
		l.box.Objects = objs
		l.box.Refresh()
	}
	for i, k := range links {
		r := l.rows[i]
		r.label.SetText(k.text)
		r.tol.SetPlaceHolder(k.placeholder)
		text := ""
		if k.tolNM > 0 {
			text = trimZeros(fmt.Sprintf("%.3f", k.tolNM))
		}
		// Rewrite the field only when the tolerance changed elsewhere (an
		// undo, a new row) to a value it does not show: never while the
		// user types, a refused value included.
		if r.shown != k.tolNM {
			if cur, err := strconv.ParseFloat(strings.TrimSpace(r.tol.Text), 64); err != nil || cur != k.tolNM {
				r.tol.SetText(text)
			}
			r.shown = k.tolNM
		}
	}
}

func (l *linkRows) newRow(i int) *linkRow {
	r := &linkRow{label: wrapLabel(""), tol: l.u.newEntry(), index: i, shown: -1}
	r.tol.OnChanged = func(s string) {
		if l.u.regions.updating {
			return
		}
		l.msg(l.set(r.index, s))
	}
	rm := widget.NewButtonWithIcon("", theme.ContentRemoveIcon(), func() { l.remove(r.index) })
	tolRow := container.NewBorder(nil, nil, widget.NewLabel(l.field), widget.NewLabel("nm"), r.tol)
	r.box = container.NewVBox(container.NewBorder(nil, nil, nil, rm, r.label), tolRow)
	return r
}

// parseTolerance reads a typed tolerance in nm; empty is 0 (the rule's,
// where there is one).
func parseTolerance(s string) (float64, error) {
	if strings.TrimSpace(s) == "" {
		return 0, nil
	}
	return parseNumber("tolerance", s)
}
