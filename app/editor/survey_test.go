package editor_test

import (
	"context"
	"image/color"
	"math"
	"testing"

	"github.com/golang/geo/r2"

	"dimerpath/app/editor"
	"dimerpath/app/editor/editortest"
	"dimerpath/app/render"
	"dimerpath/lattice/design"
	"dimerpath/lattice/placement"
)

// The demo's survey in the editor: its built-in image loads and is drawn
// under the lattice, defects are added, moved and deleted one undo step
// each, a placement found on a copy applies as one undoable move of the
// core (the pads stay), and the survey's terraces become the design's.
func TestSurveyInTheEditor(t *testing.T) {
	s := editortest.Demo(t)
	path, embedded := s.SurveySource()
	if embedded == nil {
		t.Fatalf("the demo's survey image %q is not the built-in one", path)
	}
	img, err := editor.LoadSurveyImage(path, embedded)
	if err != nil {
		t.Fatal(err)
	}
	sv := s.Design().Survey
	if img.W != sv.SizePx[0] || img.H != sv.SizePx[1] {
		t.Fatalf("image %d x %d, the survey says %v", img.W, img.H, sv.SizePx)
	}
	s.SetSurveyImage(img)

	// Drawn: at the survey's centre, off every region, the frame shows the
	// image's own grey at opacity 1.
	sc := s.Scene(editor.SceneOptions{Survey: true, SurveyOpacity: 1})
	if sc.Survey == nil || len(sc.Survey.Grey) == 0 || len(sc.Survey.Defects) != len(sv.Defects) {
		t.Fatalf("scene survey %+v", sc.Survey)
	}
	centre := sv.ToField(sv.PixelToSurvey(20.5, 20.5)) // near a corner of the image, off the device
	if s.RegionAt(centre) >= 0 {
		t.Fatal("the test's point lies on a region")
	}
	v := render.View{Center: centre, Scale: 0.02, W: 200, H: 200} // a screen pixel is a seventh of an image pixel
	var r render.Renderer
	r.Render(sc, v)
	x, y := v.ToScreen(centre)
	got := color.NRGBAModel.Convert(r.Image().At(int(x), int(y))).(color.NRGBA)
	g := img.Grey[20*img.W+20]
	if d := int(got.R) - int(g); got.R != got.G || d < -12 || d > 12 {
		t.Errorf("pixel at the image's (20, 20) drawn %v, want grey %d", got, g)
	}
	off := s.Scene(editor.SceneOptions{Survey: false})
	if off.Survey != nil {
		t.Error("survey drawn while hidden")
	}

	// Defects by hand, one undo step each.
	n := len(sv.Defects)
	at := centre.Add(r2.Point{X: 3, Y: 2})
	if err := s.AddDefect(at, design.DefectDark, 0.8); err != nil {
		t.Fatal(err)
	}
	i := s.DefectAt(at, 0.5)
	if i != n || !s.Design().Survey.Defects[i].ByHand {
		t.Fatalf("added defect found at %d, want %d (by hand)", i, n)
	}
	to := at.Add(r2.Point{X: 1.5, Y: 0})
	if err := s.MoveDefect(i, to); err != nil {
		t.Fatal(err)
	}
	if s.DefectAt(to, 0.1) != i || s.DefectAt(at, 0.1) == i {
		t.Error("moved defect not where it was moved to")
	}
	if err := s.DeleteDefect(i); err != nil {
		t.Fatal(err)
	}
	if len(s.Design().Survey.Defects) != n {
		t.Fatalf("%d defects after add and delete, want %d", len(s.Design().Survey.Defects), n)
	}
	for k, want := range []int{n + 1, n + 1} { // undo the delete, the move
		if !s.Undo() {
			t.Fatal("nothing to undo")
		}
		if got := len(s.Design().Survey.Defects); got != want {
			t.Errorf("undo %d: %d defects, want %d", k+1, got, want)
		}
	}
	if s.DefectAt(at, 0.1) != n {
		t.Error("undoing the move did not put the defect back")
	}
	s.Undo() // the add
	if len(s.Design().Survey.Defects) != n || sv != s.Design().Survey {
		t.Error("undoing every defect edit did not give back the survey as loaded")
	}

	// Placement: searched on a copy, applied as one edit.
	ps, err := editor.FindPlacements(context.Background(), s.DesignCopy(), s.Variant().Name, placement.Options{Best: 3})
	if err != nil {
		t.Fatal(err)
	}
	s.SetPlacements(ps, s.Token())
	if s.Placements() == nil || len(s.Placements().Best) == 0 {
		t.Fatal("no placements kept")
	}
	if sc := s.Scene(editor.SceneOptions{Survey: true}); len(sc.Survey.Placements) != len(ps.Best) {
		t.Errorf("%d placements drawn, %d found", len(sc.Survey.Placements), len(ps.Best))
	}
	best := ps.Best[0]
	padBefore, coreBefore := regionBounds(t, s, "pad-source"), regionBounds(t, s, "sensor-island")
	if err := s.ApplyPlacement(0); err != nil {
		t.Fatal(err)
	}
	padAfter, coreAfter := regionBounds(t, s, "pad-source"), regionBounds(t, s, "sensor-island")
	if padAfter != padBefore {
		t.Error("applying a placement moved the pad")
	}
	if d := coreAfter.Lo().Sub(coreBefore.Lo()).Sub(best.MoveNM); math.Hypot(d.X, d.Y) > 1e-6 {
		t.Errorf("island moved by %v, the placement says %v", coreAfter.Lo().Sub(coreBefore.Lo()), best.MoveNM)
	}
	if s.Placements() != nil {
		t.Error("placements kept after the core moved")
	}
	if !s.Undo() || regionBounds(t, s, "sensor-island") != coreBefore {
		t.Error("undo did not put the core back in one step")
	}

	// Terraces from the survey: the demo's survey shows one terrace, whose
	// rows run along x in the field.
	if err := s.TerracesFromSurvey(); err != nil {
		t.Fatal(err)
	}
	ts := s.Design().Terraces
	if len(ts) != 1 || ts[0].Rows != "x" || len(ts[0].Boundary) != 0 {
		t.Errorf("terraces from the demo's survey: %+v", ts)
	}
}

func regionBounds(t *testing.T, s *editor.Session, name string) r2.Rect {
	t.Helper()
	for i, r := range s.Variant().Regions {
		if r.Name == name {
			return s.RegionBounds(i)
		}
	}
	t.Fatalf("no region %q", name)
	return r2.Rect{}
}
