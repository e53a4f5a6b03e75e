package gui

import (
	"fmt"
	"image/color"
	"math"
	"strings"
	"testing"

	"fyne.io/fyne/v2"
	"github.com/golang/geo/r2"

	"dimerpath/app/editor"
	"dimerpath/app/editor/editortest"
	"dimerpath/app/render"
	"dimerpath/lattice"
)

func TestSelectToolOnTheCanvas(t *testing.T) {
	s := editortest.IslandWithTwoRects(t)
	u, w := newTestUI(t, s)
	zoomOn(w, u, r2.Point{X: 120, Y: 120}, 0.1)
	tap(w, u, r2.Point{X: 135, Y: 135})
	if i, k := u.Session.SelectedShape(); i != 0 || k != 1 {
		t.Fatalf("a click selected shape (%d, %d), want (0, 1)", i, k)
	}
	if !u.regions.shape.box.Visible() {
		t.Error("the Regions panel does not show the selected shape")
	}
	img := w.Canvas().Capture()
	b := u.Session.SelectedShapeBounds()
	corner := screenPos(u, r2.Point{X: b.X.Hi, Y: b.Y.Lo})
	if got := color.NRGBAModel.Convert(img.At(int(corner.X)+2, int(corner.Y)+2)).(color.NRGBA); got != render.ColSelect {
		t.Errorf("the selected shape's corner handle is %v, want %v", got, render.ColSelect)
	}
	// Drag it 5 nm left: it moves; Delete then removes it.
	before := u.Session.Variant().Regions[0].Shapes[1].Points[0][0]
	drag(w, u, r2.Point{X: 135, Y: 135}, r2.Point{X: 130, Y: 135})
	after := u.Session.Variant().Regions[0].Shapes[1].Points[0][0]
	if want := -13 * lattice.DimerPitch; math.Abs(after-before-want) > 1e-3 {
		t.Errorf("dragging 5 nm moved the shape by %.4f nm, want %.4f (13 dimer pitches)", after-before, want)
	}
	u.typedKey(&fyne.KeyEvent{Name: fyne.KeyDelete})
	if n := len(u.Session.Variant().Regions[0].Shapes); n != 1 {
		t.Errorf("Delete left %d shapes, want 1", n)
	}
	u.typedKey(&fyne.KeyEvent{Name: fyne.KeyEscape})
	if len(u.Session.Selection()) != 0 {
		t.Error("Esc did not clear the selection")
	}
}

// Issue 13, drawing by numbers in the window: the selected rectangle's
// card takes x, y, width and height typed (Enter applies), keeps what
// was typed in the entries and shows the snapped values and the written
// area under them; the Design tab edits the field size.
func TestShapeFieldsCard(t *testing.T) {
	s := editortest.IslandWithTwoRects(t)
	u, w := newTestUI(t, s)
	if !u.Session.SelectShape(0, 1) {
		t.Fatal("cannot select the second rectangle")
	}
	card := u.regions.shape
	if !card.box.Visible() {
		t.Fatal("no card for the selected shape")
	}
	for n, v := range map[string]string{"x (nm)": "150", "y (nm)": "150", "width (nm)": "10", "height (nm)": "8"} {
		e := card.entries[n]
		if e == nil {
			t.Fatalf("the rectangle's card has no %q field", n)
		}
		e.SetText(v)
	}
	card.entries["height (nm)"].OnSubmitted("8")
	sh := u.Session.Variant().Regions[0].Shapes[1]
	f := editor.FieldsOf(sh)
	if math.Abs(f.W-26*lattice.DimerPitch) > 1e-3 || math.Abs(f.H-10*lattice.RowSpacing) > 1e-3 {
		t.Errorf("typed 10 x 8 nm gave %.3f x %.3f nm, want 26 dimers x 10 rows", f.W, f.H)
	}
	if got := card.entries["width (nm)"].Text; got != "10" {
		t.Errorf("the width entry shows %q after applying, want the typed 10", got)
	}
	if got := card.snapped.Text; !strings.Contains(got, "9.985 × 7.681 nm") || !strings.Contains(got, "26 dimers × 10 rows") {
		t.Errorf("the card says %q, want the snapped size and the written area", got)
	}
	// A bad value is refused with the field named; nothing changes.
	card.entries["x (nm)"].SetText("1,5")
	card.apply()
	if !card.msg.Visible() || !strings.Contains(card.msg.Text, "x: ") || !strings.Contains(card.msg.Text, "point") {
		t.Errorf("a comma decimal gave the message %q", card.msg.Text)
	}
	if u.Session.Variant().Regions[0].Shapes[1].Points[0] != sh.Points[0] {
		t.Error("a refused value moved the shape")
	}
	// Undo puts the shape back; selected again, its card shows the
	// shape's own values, not what was typed before.
	u.Session.Undo()
	u.Session.SelectShape(0, 1)
	want := editor.FieldsOf(u.Session.Variant().Regions[0].Shapes[1])
	if got := card.entries["x (nm)"].Text; got != trimZeros(fmt.Sprintf("%.3f", want.X)) {
		t.Errorf("after undo the x entry shows %q, want the shape's %.3f", got, want.X)
	}

	// The field size, in the Design tab.
	u.marks.fieldW.SetText("500")
	u.marks.fieldH.SetText("400")
	u.marks.applyField()
	if f := u.Session.Design().Field; f.WidthNM != 500 || f.HeightNM != 400 {
		t.Errorf("field %+v after typing 500 x 400", f)
	}
	u.marks.fieldW.SetText("0")
	u.marks.applyField()
	if !u.marks.fieldMsg.Visible() || u.Session.Design().Field.WidthNM != 500 {
		t.Error("a field 0 nm wide was not refused with a message")
	}
	_ = w
}
