package gui

import (
	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/widget"
)

// Keys and focus. Fyne sends keys to the focused widget alone, and a
// text field, a list, a choice or a check box keeps the focus after a
// click, so Esc, Delete and the tool letters once went nowhere after the
// user touched a panel. The rule: the lattice takes the keys whenever
// the pointer is over it (LatticeView.MouseIn takes the focus) or
// nothing is being typed (reclaimFocus gives it back after a panel
// widget that takes no text was used); in a text field Esc stops typing
// and then acts on the lattice (keyEntry).

// keyEntry is a panel's text field: Esc leaves it and goes to the
// lattice, as if typed there.
type keyEntry struct {
	widget.Entry
	u *UI
}

// newEntry returns a one-line panel text field of u.
func (u *UI) newEntry() *keyEntry {
	e := &keyEntry{u: u}
	e.ExtendBaseWidget(e)
	return e
}

// newMultiLineEntry returns a multi-line panel text field of u.
func (u *UI) newMultiLineEntry() *keyEntry {
	e := &keyEntry{u: u}
	e.MultiLine = true
	e.Wrapping = fyne.TextWrapOff
	e.ExtendBaseWidget(e)
	return e
}

// TypedKey hands Esc to the lattice, taking the focus there; every
// other key edits the text.
func (e *keyEntry) TypedKey(k *fyne.KeyEvent) {
	if k.Name == fyne.KeyEscape && e.u != nil {
		e.u.focusLattice()
		e.u.typedKey(k)
		return
	}
	e.Entry.TypedKey(k)
}

// focusLattice gives the keyboard focus to the lattice view.
func (u *UI) focusLattice() {
	if c := u.Win.Canvas(); c.Focused() != u.View {
		c.Focus(u.View)
	}
}

// reclaimFocus gives the focus back to the lattice when a panel widget
// that takes no text holds it (a list, a choice, a check box, a radio
// button, a tab): nothing is being typed, so the keys are the lattice's.
// A text field keeps it, and so does a dialog's content.
func (u *UI) reclaimFocus() {
	c := u.Win.Canvas()
	switch c.Focused().(type) {
	case nil, *LatticeView, *keyEntry, *widget.Entry, *widget.SelectEntry:
		return
	}
	if c.Overlays().Top() != nil {
		return // a dialog or pop-up has the keys
	}
	c.Focus(u.View)
}
