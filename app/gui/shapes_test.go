package gui

import (
	"image/color"
	"math"
	"testing"

	"fyne.io/fyne/v2"
	"github.com/golang/geo/r2"

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
	if !u.regions.shapeBox.Visible() {
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
