package editor_test

import (
	"errors"
	"math"
	"strings"
	"testing"

	"github.com/golang/geo/r2"

	"dimerpath/app/editor"
	"dimerpath/app/editor/editortest"
	"dimerpath/lattice"
	"dimerpath/lattice/design"
)

// Issue 13, drawing by numbers: a rectangle typed as x, y, width,
// height is snapped as the tool snaps (edges to the nearest cell edge),
// the panel gets the snapped values back, the written area reports the
// same size, and undo restores the shape drawn.
func TestSetRectangleByNumber(t *testing.T) {
	s := editortest.Tiny(t)
	if !s.SelectShape(0, 0) {
		t.Fatal("cannot select the island's rectangle")
	}
	before := s.Variant().Regions[0].Shapes[0]
	typed := editor.ShapeFields{Kind: design.ShapeRect, X: 50, Y: 60, W: 10, H: 8}
	got, err := s.SetSelectedShapeFields(typed)
	if err != nil {
		t.Fatal(err)
	}
	// Each edge moves to the nearest cell edge: at most half a cell.
	for _, e := range [][2]float64{{got.X, 50}, {got.Y, 60}, {got.X + got.W, 60}, {got.Y + got.H, 68}} {
		if math.Abs(e[0]-e[1]) > lattice.RowSpacing/2+1e-6 {
			t.Errorf("snapped edge %.3f nm is more than half a cell from the typed %.0f nm", e[0], e[1])
		}
	}
	// On the tiny design's lattice (offset 0) that is 26 dimers x 10 rows.
	if math.Abs(got.W-26*lattice.DimerPitch) > 1e-3 || math.Abs(got.H-10*lattice.RowSpacing) > 1e-3 {
		t.Errorf("snapped to %.3f x %.3f nm, want 26 dimers (%.3f) x 10 rows (%.3f)", got.W, got.H, 26*lattice.DimerPitch, 10*lattice.RowSpacing)
	}
	if n := s.RegionSites(0).Count(); n != 2*26*10 {
		t.Errorf("the island holds %d sites, want 2 x 26 x 10", n)
	}
	b := s.SelectedShapeBounds()
	if math.Abs(b.X.Length()-got.W) > 1e-3 || math.Abs(b.Y.Length()-got.H) > 1e-3 {
		t.Errorf("the written area is %.3f x %.3f nm, the shape %.3f x %.3f: one size, shown two ways", b.X.Length(), b.Y.Length(), got.W, got.H)
	}
	if w := s.WrittenArea(); !strings.Contains(w, "26 dimers × 10 rows, 520 H sites") {
		t.Errorf("WrittenArea = %q", w)
	}
	if i, k := s.SelectedShape(); i != 0 || k != 0 {
		t.Errorf("selection (%d, %d) after the edit, want the same shape", i, k)
	}
	s.Undo()
	if !sameShape(s.Variant().Regions[0].Shapes[0], before) {
		t.Errorf("undo left %+v, want %+v", s.Variant().Regions[0].Shapes[0], before)
	}
}

func sameShape(a, b design.Shape) bool {
	if a.Kind != b.Kind || len(a.Points) != len(b.Points) {
		return false
	}
	for i := range a.Points {
		if a.Points[i] != b.Points[i] {
			return false
		}
	}
	return true
}

// Every kind of shape snaps as its tool does, and bad values are refused
// with the field named, leaving the design as it was.
func TestShapeFieldsSnapAndRefuse(t *testing.T) {
	s := editortest.Tiny(t)
	surf := s.Surface()
	near := r2.Point{X: 100.1, Y: 50.2}
	site, _, _ := surf.Snap(near)
	dimerCentre := surf.DimerCentre(site.Terrace, site.Row, site.Dimer)
	tests := []struct {
		name  string
		f     editor.ShapeFields
		check func(t *testing.T, sh design.Shape)
	}{
		{"window to a dimer centre", editor.ShapeFields{Kind: design.ShapeWindow, Template: "As", X: near.X, Y: near.Y}, func(t *testing.T, sh design.Shape) {
			if p := (r2.Point{X: sh.Points[0][0], Y: sh.Points[0][1]}); p.Sub(dimerCentre).Norm() > 1e-3 || sh.Template != "As" {
				t.Errorf("window at %v (%s), want the dimer centre %v", p, sh.Template, dimerCentre)
			}
		}},
		{"site to a site", editor.ShapeFields{Kind: design.ShapeSite, X: near.X, Y: near.Y}, func(t *testing.T, sh design.Shape) {
			if p := (r2.Point{X: sh.Points[0][0], Y: sh.Points[0][1]}); p.Sub(surf.Position(site)).Norm() > 1e-3 {
				t.Errorf("site at %v, want %v", p, surf.Position(site))
			}
		}},
		{"line vertices to dimer centres", editor.ShapeFields{Kind: design.ShapePolyline, WidthNM: 3, Points: []r2.Point{near, {X: 150.3, Y: 50.1}}}, func(t *testing.T, sh design.Shape) {
			if p := (r2.Point{X: sh.Points[0][0], Y: sh.Points[0][1]}); p.Sub(dimerCentre).Norm() > 1e-3 || sh.WidthNM != 3 || len(sh.Points) != 2 {
				t.Errorf("line %+v, want its first vertex at %v, 3 nm wide", sh, dimerCentre)
			}
		}},
		{"array origin, count and pitch", editor.ShapeFields{Kind: design.ShapeArray, Of: design.ShapeWindow, Template: "P", X: near.X, Y: near.Y, Cols: 3, Rows: 2, PitchDimers: 6, PitchRows: 3}, func(t *testing.T, sh design.Shape) {
			a := sh.Array
			if a == nil || a.Cols != 3 || a.Rows != 2 || a.PitchDimers != 6 || a.PitchRows != 3 || a.Of.Template != "P" {
				t.Fatalf("array %+v", a)
			}
			if p := (r2.Point{X: a.Of.Points[0][0], Y: a.Of.Points[0][1]}); p.Sub(dimerCentre).Norm() > 1e-3 {
				t.Errorf("array origin %v, want the dimer centre %v", p, dimerCentre)
			}
		}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			sh, err := s.SnapShape(tc.f)
			if err != nil {
				t.Fatal(err)
			}
			tc.check(t, sh)
			if back := editor.FieldsOf(sh); back.Kind != tc.f.Kind {
				t.Errorf("FieldsOf gives kind %s", back.Kind)
			}
		})
	}
	for _, bad := range []struct {
		f    editor.ShapeFields
		want string
	}{
		{editor.ShapeFields{Kind: design.ShapeRect, X: 1, Y: 1, W: 0, H: 5}, "width and height must be above 0"},
		{editor.ShapeFields{Kind: design.ShapeRect, X: math.NaN(), Y: 1, W: 5, H: 5}, "x NaN nm"},
		{editor.ShapeFields{Kind: design.ShapeRect, X: 1, Y: 2e4, W: 5, H: 5}, "y 20000 nm"},
		{editor.ShapeFields{Kind: design.ShapePolygon, Points: []r2.Point{{X: 10, Y: 10}, {X: 10.01, Y: 10}, {X: 10, Y: 10.01}}}, "at least 3 different vertices"},
		{editor.ShapeFields{Kind: design.ShapePolyline, WidthNM: 0, Points: []r2.Point{{X: 10, Y: 10}, {X: 20, Y: 10}}}, "line width 0 nm"},
		{editor.ShapeFields{Kind: design.ShapeWindow, Template: "Sb", X: 10, Y: 10}, `template "Sb"`},
		{editor.ShapeFields{Kind: design.ShapeArray, Of: design.ShapeDimer, X: 10, Y: 10, Cols: 0, Rows: 1, PitchDimers: 1, PitchRows: 1}, "array size 0 x 1"},
	} {
		if _, err := s.SnapShape(bad.f); err == nil || !strings.Contains(err.Error(), bad.want) {
			t.Errorf("SnapShape(%+v) = %v, want an error saying %q", bad.f, err, bad.want)
		}
	}
	s.SelectShape(0, 0)
	before := s.Variant().Regions[0].Shapes[0]
	if _, err := s.SetSelectedShapeFields(editor.ShapeFields{Kind: design.ShapeRect, X: 1, Y: 1, W: -1, H: 5}); err == nil {
		t.Error("a negative width was accepted")
	}
	if !sameShape(s.Variant().Regions[0].Shapes[0], before) || s.CanUndo() {
		t.Error("a refused edit changed the design or left an undo step")
	}
}

// Issue 13: the field size is editable (a new design was always 2 x 2 µm),
// as one undo step; a field that would leave painted sites off it is
// refused by the design's rules.
func TestSetFieldSize(t *testing.T) {
	s := editortest.Tiny(t)
	if err := s.SetFieldSize(500, 300); err != nil {
		t.Fatal(err)
	}
	if f := s.Design().Field; f.WidthNM != 500 || f.HeightNM != 300 || s.Surface().Width() != 500 || s.Surface().Height() != 300 {
		t.Errorf("field %+v, surface %g x %g", f, s.Surface().Width(), s.Surface().Height())
	}
	island := s.RegionSites(0).Count()
	if island == 0 {
		t.Error("the island lost its sites on the larger field")
	}
	s.Undo()
	if f := s.Design().Field; f.WidthNM != 200 || s.Surface().Width() != 200 {
		t.Errorf("undo left the field %+v", f)
	}
	// The painted lead runs along row 100 (y 76.8 nm) from x 38.4 to
	// 49.9 nm: a 40 nm field leaves it off.
	err := s.SetFieldSize(40, 200)
	var ee *editor.EditError
	if err == nil || !errors.As(err, &ee) {
		t.Errorf("a field leaving painted sites off was accepted (%v)", err)
	}
	if s.Design().Field.WidthNM != 200 {
		t.Error("a refused field size changed the design")
	}
	if err := s.SetFieldSize(0, 100); err == nil {
		t.Error("a field 0 nm wide was accepted")
	}
}
