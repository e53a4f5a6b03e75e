package gui

import (
	"fmt"
	"image"
	"strings"
	"testing"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/test"
	"github.com/golang/geo/r2"

	"dimerpath/app/editor"
	"dimerpath/app/editor/editortest"
	"dimerpath/app/render"
)

// markerPixels counts the pixels of img within 20 px of field point p
// drawn in the colour of a defect marker (or nearly: rings are
// antialiased).
func markerPixels(img image.Image, u *UI, p r2.Point, bright bool) int {
	c := render.ColDefectDark
	if bright {
		c = render.ColDefectBright
	}
	q := screenPos(u, p)
	n := 0
	for y := int(q.Y) - 20; y <= int(q.Y)+20; y++ {
		for x := int(q.X) - 20; x <= int(q.X)+20; x++ {
			r, g, b, _ := img.At(x, y).RGBA()
			d := func(a uint32, b uint8) int { return max(int(a>>8)-int(b), int(b)-int(a>>8)) }
			if d(r, c.R) < 24 && d(g, c.G) < 24 && d(b, c.B) < 24 {
				n++
			}
		}
	}
	return n
}

// The Defect tool through the widgets on the demo: K picks it and shows
// the Survey tab; a click on a clear spot of the survey adds a bright
// defect drawn there and selected in the list; a click on a marker
// selects that defect in the list without moving the view; a drag moves
// it; choosing in the list selects on the canvas; Delete removes the
// selected one; Ctrl+Z undoes each.
func TestDefectToolOnTheCanvas(t *testing.T) {
	u, w := newTestUI(t, editortest.Demo(t))
	p := u.survey
	p.imageJobs.Wait() // the demo's image, loaded in the background
	c := w.Canvas()
	test.TypeOnCanvas(c, "k")
	if u.Session.Tool != editor.ToolDefect {
		t.Fatalf("typing k chose %v, want the Defect tool", u.Session.Tool.Info().Name)
	}
	if u.tabs.Selected() != u.tabSurvey {
		t.Error("the Defect tool did not bring the Survey tab forward")
	}
	if !strings.Contains(u.hintLabel.Text, "adds a bright defect") {
		t.Errorf("status line %q", u.hintLabel.Text)
	}
	sv := u.Session.Design().Survey
	n := len(sv.Defects)

	// Add.
	spot := sv.ToField(sv.PixelToSurvey(30.5, 40.5))
	before := zoomOn(w, u, spot, 0.05)
	if markerPixels(before, u, spot, true) != 0 {
		t.Fatal("a marker is drawn at the test's clear spot already")
	}
	tap(w, u, spot)
	if got := len(u.Session.Design().Survey.Defects); got != n+1 || p.defects.Length() != n+1 {
		t.Fatalf("after a click: %d defects, %d listed; want %d", got, p.defects.Length(), n+1)
	}
	if d := u.Session.Design().Survey.FieldDefects()[n]; d.At.Sub(spot).Norm() > 0.05 || d.Kind != "bright" {
		t.Errorf("added a %s defect at %v, clicked at %v", d.Kind, d.At, spot)
	}
	if p.listSel != n || u.Session.SelectedDefect() != n {
		t.Errorf("list shows %d selected, session %d; want the new one, %d", p.listSel, u.Session.SelectedDefect(), n)
	}
	if got := markerPixels(c.Capture(), u, spot, true); got < 10 {
		t.Errorf("%d marker pixels drawn at the new defect", got)
	}

	// Select on the canvas: the list follows, the view stays.
	first := u.Session.Design().Survey.FieldDefects()[0]
	zoomOn(w, u, first.At.Add(r2.Point{X: 1, Y: 1}), 0.05)
	view := u.View.View()
	tap(w, u, first.At)
	if u.Session.SelectedDefect() != 0 || p.listSel != 0 {
		t.Errorf("click on defect 1's marker: session %d, list %d", u.Session.SelectedDefect(), p.listSel)
	}
	if u.View.View() != view {
		t.Error("selecting on the canvas moved the view")
	}
	if want := fmt.Sprintf("%.2f", first.At.X); p.defX.Text != want {
		t.Errorf("x field %q, want %q", p.defX.Text, want)
	}
	if !strings.Contains(u.hintLabel.Text, "Selected defect 1") {
		t.Errorf("status line %q with defect 1 selected", u.hintLabel.Text)
	}

	// Drag it.
	to := first.At.Add(r2.Point{X: 2, Y: -1})
	drag(w, u, first.At, to)
	moved := u.Session.Design().Survey.FieldDefects()[0]
	if moved.At.Sub(to).Norm() > 0.05 || !moved.ByHand {
		t.Errorf("dragged defect 1 to %v, it is at %v (by hand %v)", to, moved.At, moved.ByHand)
	}
	if want := fmt.Sprintf("%.2f", moved.At.X); p.defX.Text != want {
		t.Errorf("x field %q after the drag, want %q", p.defX.Text, want)
	}

	// Choose in the list: the canvas selects it.
	p.defects.Select(3)
	if u.Session.SelectedDefect() != 3 {
		t.Errorf("choosing defect 4 in the list selected %d", u.Session.SelectedDefect())
	}
	// Delete with the key, on the lattice.
	u.focusLattice()
	c.Focused().TypedKey(&fyne.KeyEvent{Name: fyne.KeyDelete})
	if got := len(u.Session.Design().Survey.Defects); got != n || p.defects.Length() != n || p.listSel != -1 {
		t.Errorf("after Delete: %d defects, %d listed, list selection %d", got, p.defects.Length(), p.listSel)
	}

	// Esc deselects.
	tap(w, u, moved.At)
	key(w, fyne.KeyEscape)
	if u.Session.SelectedDefect() != -1 || p.listSel != -1 {
		t.Errorf("after Esc: session %d, list %d", u.Session.SelectedDefect(), p.listSel)
	}

	// Undo each: the delete, the move, the add.
	for _, want := range []string{"delete defect 4", "move defect 1", "add bright defect"} {
		if l := u.Session.UndoLabel(); !strings.HasPrefix(l, want) {
			t.Fatalf("next undo %q, want %q", l, want)
		}
		shortcut(w, &fyne.ShortcutUndo{})
	}
	if u.Session.Design().Survey != sv || p.defects.Length() != n {
		t.Errorf("after undoing each: %d listed, the survey as loaded: %v", p.defects.Length(), u.Session.Design().Survey == sv)
	}

	// With the survey removed the panel keeps none of its numbers.
	u.Session.RemoveSurvey()
	if p.defects.Length() != 0 || p.defX.Text != "" || p.atX.Text != "" {
		t.Errorf("survey removed: %d listed, x field %q, corner %q", p.defects.Length(), p.defX.Text, p.atX.Text)
	}
}

// Without a survey the Defect tool says so in the status line and a
// click edits nothing.
func TestDefectToolWithoutSurveySaysSo(t *testing.T) {
	u, w := newTestUI(t, nil)
	test.TypeOnCanvas(w.Canvas(), "k")
	if !strings.Contains(u.hintLabel.Text, "no survey") {
		t.Errorf("status line %q with no survey", u.hintLabel.Text)
	}
	tap(w, u, r2.Point{X: 50, Y: 50})
	if !strings.Contains(u.hintLabel.Text, "no survey") || u.Session.CanUndo() {
		t.Errorf("after a click: status %q, undo %v", u.hintLabel.Text, u.Session.CanUndo())
	}
}

// Choosing a defect in the Survey list while another tool holds a
// region selection, then pressing Delete on the lattice, deletes that
// defect and keeps the regions: the list hands the Defect tool over, so
// the status line and the key act on what was chosen last.
func TestDefectChosenInListIsWhatDeleteRemoves(t *testing.T) {
	u, w := newTestUI(t, editortest.Demo(t))
	p := u.survey
	p.imageJobs.Wait()
	u.Session.SetTool(editor.ToolSelect)
	u.Session.Select(0)
	regions := len(u.Session.Variant().Regions)
	n := len(u.Session.Design().Survey.Defects)

	p.defects.Select(2)
	if u.Session.Tool != editor.ToolDefect {
		t.Errorf("choosing a defect in the list left the %s tool", u.Session.Tool.Info().Name)
	}
	if !strings.Contains(u.hintLabel.Text, "Selected defect 3") {
		t.Errorf("status line %q after choosing defect 3", u.hintLabel.Text)
	}
	u.focusLattice()
	w.Canvas().Focused().TypedKey(&fyne.KeyEvent{Name: fyne.KeyDelete})
	if got := len(u.Session.Variant().Regions); got != regions {
		t.Errorf("Delete removed regions: %d left of %d", got, regions)
	}
	if got := len(u.Session.Design().Survey.Defects); got != n-1 {
		t.Errorf("Delete left %d defects, want %d", got, n-1)
	}
}
