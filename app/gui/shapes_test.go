package gui

import (
	"fmt"
	"image/color"
	"math"
	"testing"

	"fyne.io/fyne/v2"
	"github.com/golang/geo/r2"

	"dimerpath/lattice"
)

// islandWithTwoRects is the tiny design's variant A with a second
// rectangle added to the island, away from the first.
func islandWithTwoRects(t *testing.T) *Session {
	t.Helper()
	s := newTestSession(t)
	s.Select(0)
	s.SetTool(ToolRect)
	s.Press(r2.Point{X: 130, Y: 130})
	s.Drag(r2.Point{X: 140, Y: 140})
	s.Release(r2.Point{X: 140, Y: 140})
	if n := len(s.Variant().Regions[0].Shapes); n != 2 {
		t.Fatalf("island has %d shapes, want 2", n)
	}
	s.SetTool(ToolSelect)
	return s
}

func TestSelectAndDeleteOneShape(t *testing.T) {
	s := islandWithTwoRects(t)
	all := s.RegionSites(0).Count()
	s.Click(r2.Point{X: 135, Y: 135}, 1)
	if i, k := s.SelectedShape(); i != 0 || k != 1 {
		t.Fatalf("click on the second rectangle selected shape (%d, %d), want (0, 1)", i, k)
	}
	second := s.shapeSel.sites.Count()
	s.Click(r2.Point{X: 100, Y: 100}, 1)
	if i, k := s.SelectedShape(); i != 0 || k != 0 {
		t.Fatalf("click on the first rectangle selected shape (%d, %d), want (0, 0)", i, k)
	}
	s.Click(r2.Point{X: 135, Y: 135}, 1)
	if !s.DeleteSelectedShape() {
		t.Fatal("nothing deleted")
	}
	if n := len(s.Variant().Regions[0].Shapes); n != 1 {
		t.Fatalf("after deleting one shape the island has %d", n)
	}
	// The two rectangles do not overlap, so the island loses exactly the
	// second one's sites.
	if got := s.RegionSites(0).Count(); got != all-second {
		t.Errorf("island holds %d sites after the delete, want %d - %d", got, all, second)
	}
	if s.UndoLabel() != "delete rectangle from island" {
		t.Errorf("undo label %q", s.UndoLabel())
	}
	s.Undo()
	if n, got := len(s.Variant().Regions[0].Shapes), s.RegionSites(0).Count(); n != 2 || got != all {
		t.Errorf("after undo: %d shapes, %d sites; want 2, %d", n, got, all)
	}
	s.Redo()
	if got := s.RegionSites(0).Count(); got != all-second {
		t.Errorf("after redo %d sites, want %d", got, all-second)
	}
	// Clicking empty lattice selects nothing.
	s.Click(r2.Point{X: 20, Y: 180}, 1)
	if i, _ := s.SelectedShape(); i >= 0 || len(s.Selection()) > 0 {
		t.Errorf("a click on clean H left shape %d, regions %v selected", i, s.Selection())
	}
}

func TestDeletingTheLastShapeDeletesTheRegion(t *testing.T) {
	s := newTestSession(t)
	s.SetTool(ToolSelect)
	s.Click(r2.Point{X: 100, Y: 100}, 1)
	if !s.DeleteSelectedShape() {
		t.Fatal("nothing deleted")
	}
	v := s.Variant()
	if len(v.Regions) != 1 || v.Regions[0].Name != "lead" {
		t.Fatalf("regions after deleting the island's only shape: %v", s.VariantNames())
	}
	s.Undo()
	if got := s.Variant().Regions[0].Name; got != "island" || len(s.Variant().Regions) != 2 {
		t.Errorf("undo did not bring the island back (%d regions, first %q)", len(s.Variant().Regions), got)
	}
	// A hand-painted region has no shape to select: the click selects the
	// region only.
	lead := s.Surface().Position(lattice.Site{Row: 100, Dimer: 110})
	s.Click(lead, 1)
	if i, k := s.SelectedShape(); i != -1 || k != -1 || s.Active() != 1 {
		t.Errorf("click on painted sites: shape (%d, %d), active region %d; want no shape, region 1", i, k, s.Active())
	}
	if s.DeleteSelectedShape() {
		t.Error("DeleteSelectedShape deleted something with no shape selected")
	}
}

// shifted returns set with every site moved by rows and dimers on its
// terrace.
func shifted(set *lattice.SiteSet, rows, dimers int) *lattice.SiteSet {
	out := lattice.NewSiteSet()
	for site := range set.All() {
		site.Row += rows
		site.Dimer += dimers
		out.Add(site)
	}
	return out
}

func TestDragMovesAShapeByLatticeVectors(t *testing.T) {
	s := newTestSession(t)
	before := s.RegionSites(0).Clone()
	pts := s.Variant().Regions[0].Shapes[0].Points
	s.SetTool(ToolSelect)
	// Drag the island 3.1 nm along the rows and 2.0 nm across them:
	// nearest lattice vector 8 dimer pitches (3.072 nm) and 3 row
	// spacings (2.304 nm), lattice constants from CODATA a (geometry.go).
	s.Press(r2.Point{X: 100, Y: 100})
	s.Drag(r2.Point{X: 101.5, Y: 101})
	if p := s.Preview(); p == nil || !p.Rect {
		t.Fatalf("no rectangle preview while moving: %+v", p)
	}
	s.Drag(r2.Point{X: 103.1, Y: 102})
	s.Release(r2.Point{X: 103.1, Y: 102})
	got := s.Variant().Regions[0].Shapes[0].Points
	wantDX, wantDY := 8*lattice.DimerPitch, 3*lattice.RowSpacing
	for i := range got {
		if math.Abs(got[i][0]-pts[i][0]-wantDX) > 1e-3 || math.Abs(got[i][1]-pts[i][1]-wantDY) > 1e-3 {
			t.Fatalf("corner %d moved from %v to %v, want by (%.4f, %.4f)", i, pts[i], got[i], wantDX, wantDY)
		}
	}
	// Moved by a lattice vector, the island covers the same pattern of
	// sites, each 3 rows and 8 dimers on: checked site by site.
	if want := shifted(before, 3, 8); !s.RegionSites(0).Equal(want) {
		t.Errorf("moved island holds %d sites, not the %d sites shifted by 3 rows and 8 dimers", s.RegionSites(0).Count(), want.Count())
	}
	if i, k := s.SelectedShape(); i != 0 || k != 0 {
		t.Errorf("the moved shape is no longer selected (%d, %d)", i, k)
	}
	if want := fmt.Sprintf("move rectangle of island by (%.2f, %.2f) nm", wantDX, wantDY); s.UndoLabel() != want {
		t.Errorf("undo label %q, want %q", s.UndoLabel(), want)
	}
	s.Undo()
	if !s.RegionSites(0).Equal(before) {
		t.Error("undo did not put the island back")
	}
	// A press and release without a drag moves nothing.
	s.Press(r2.Point{X: 100, Y: 100})
	s.Release(r2.Point{X: 100, Y: 100})
	if !s.RegionSites(0).Equal(before) || !s.CanRedo() {
		t.Error("a click with the Select tool changed the design")
	}
}

func TestMovedShapeShowsWholeOverErasedSites(t *testing.T) {
	s := newTestSession(t)
	// Erase a dimer just right of the island, then move the island over it.
	s.SetTool(ToolEraser)
	target := lattice.Site{Row: 130, Dimer: 300}
	s.Click(s.Surface().Position(target), 1)
	s.SetTool(ToolSelect)
	s.Click(r2.Point{X: 100, Y: 100}, 1)
	if s.MoveSelectedShape(r2.Point{X: 8 * lattice.DimerPitch}) == (r2.Point{}) {
		t.Fatal("no move")
	}
	r := s.Variant().Regions[0]
	moved, _ := shapeSites(s.Surface(), s.Design(), &r.Shapes[0])
	if !s.RegionSites(0).Equal(moved) {
		t.Errorf("the moved island holds %d sites, its shape %d: erased sites left holes", s.RegionSites(0).Count(), moved.Count())
	}
}

func TestSelectToolOnTheCanvas(t *testing.T) {
	s := islandWithTwoRects(t)
	u, w := newTestUI(t, s)
	zoomOn(w, u, r2.Point{X: 120, Y: 120}, 0.1)
	tap(w, u, r2.Point{X: 135, Y: 135})
	if i, k := u.S.SelectedShape(); i != 0 || k != 1 {
		t.Fatalf("a click selected shape (%d, %d), want (0, 1)", i, k)
	}
	if !u.regions.shapeBox.Visible() {
		t.Error("the Regions panel does not show the selected shape")
	}
	img := w.Canvas().Capture()
	b := u.S.SelectedShapeBounds()
	corner := screenPos(u, r2.Point{X: b.X.Hi, Y: b.Y.Lo})
	if got := color.NRGBAModel.Convert(img.At(int(corner.X)+2, int(corner.Y)+2)).(color.NRGBA); got != colSelect {
		t.Errorf("the selected shape's corner handle is %v, want %v", got, colSelect)
	}
	// Drag it 5 nm left: it moves; Delete then removes it.
	before := u.S.Variant().Regions[0].Shapes[1].Points[0][0]
	drag(w, u, r2.Point{X: 135, Y: 135}, r2.Point{X: 130, Y: 135})
	after := u.S.Variant().Regions[0].Shapes[1].Points[0][0]
	if want := -13 * lattice.DimerPitch; math.Abs(after-before-want) > 1e-3 {
		t.Errorf("dragging 5 nm moved the shape by %.4f nm, want %.4f (13 dimer pitches)", after-before, want)
	}
	u.typedKey(&fyne.KeyEvent{Name: fyne.KeyDelete})
	if n := len(u.S.Variant().Regions[0].Shapes); n != 1 {
		t.Errorf("Delete left %d shapes, want 1", n)
	}
	u.typedKey(&fyne.KeyEvent{Name: fyne.KeyEscape})
	if len(u.S.Selection()) != 0 {
		t.Error("Esc did not clear the selection")
	}
}
