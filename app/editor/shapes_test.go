package editor_test

import (
	"fmt"
	"math"
	"testing"

	"github.com/golang/geo/r2"

	"dimerpath/app/editor"
	"dimerpath/app/editor/editortest"
	"dimerpath/lattice"
)

func TestSelectAndDeleteOneShape(t *testing.T) {
	s := editortest.IslandWithTwoRects(t)
	all := s.RegionSites(0).Count()
	s.Click(r2.Point{X: 135, Y: 135}, 1)
	if i, k := s.SelectedShape(); i != 0 || k != 1 {
		t.Fatalf("click on the second rectangle selected shape (%d, %d), want (0, 1)", i, k)
	}
	shape, err := editor.ShapeSites(s.Surface(), s.Design(), &s.Variant().Regions[0].Shapes[1])
	if err != nil {
		t.Fatal(err)
	}
	second := shape.Count()
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
	s := editortest.Tiny(t)
	s.SetTool(editor.ToolSelect)
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
	s := editortest.Tiny(t)
	before := s.RegionSites(0).Clone()
	pts := s.Variant().Regions[0].Shapes[0].Points
	s.SetTool(editor.ToolSelect)
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
	s := editortest.Tiny(t)
	// Erase a dimer just right of the island, then move the island over it.
	s.SetTool(editor.ToolEraser)
	target := lattice.Site{Row: 130, Dimer: 300}
	s.Click(s.Surface().Position(target), 1)
	s.SetTool(editor.ToolSelect)
	s.Click(r2.Point{X: 100, Y: 100}, 1)
	if s.MoveSelectedShape(r2.Point{X: 8 * lattice.DimerPitch}) == (r2.Point{}) {
		t.Fatal("no move")
	}
	r := s.Variant().Regions[0]
	moved, _ := editor.ShapeSites(s.Surface(), s.Design(), &r.Shapes[0])
	if !s.RegionSites(0).Equal(moved) {
		t.Errorf("the moved island holds %d sites, its shape %d: erased sites left holes", s.RegionSites(0).Count(), moved.Count())
	}
}
