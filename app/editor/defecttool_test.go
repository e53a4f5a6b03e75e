package editor_test

import (
	"errors"
	"strings"
	"testing"

	"github.com/golang/geo/r2"

	"dimerpath/app/editor"
	"dimerpath/app/editor/editortest"
	"dimerpath/lattice/design"
)

// The Defect tool on the demo's survey: a click on a clear spot adds a
// defect of the options' kind and width there and selects it, a click on
// a marker selects that defect, a drag moves the defect by the drag, the
// selected one is deleted; each edit is one undo step and undoing them
// all gives back the survey as loaded. A click on nothing edits nothing
// and leaves no undo step.
func TestDefectTool(t *testing.T) {
	s := editortest.Demo(t)
	s.SetTool(editor.ToolDefect)
	const near = 0.4 // nm: 8 px at 0.05 nm/px
	sv0 := s.Design().Survey
	n := len(sv0.Defects)
	if n < 2 {
		t.Fatalf("the demo's survey has %d defects", n)
	}
	defect := func(i int) design.FieldDefect { return s.Design().Survey.FieldDefects()[i] }
	undoLabel := s.UndoLabel()
	same := func(what string) {
		t.Helper()
		if l := s.UndoLabel(); l != undoLabel {
			t.Errorf("%s left an undo step %q", what, l)
		}
	}

	// Add: a clear spot on the image, the default kind (bright) and width.
	clear := sv0.ToField(sv0.PixelToSurvey(30.5, 40.5))
	if i := s.DefectAt(clear, 5*near); i >= 0 {
		t.Fatalf("the test's spot is near defect %d", i+1)
	}
	s.Click(clear, near)
	if got := len(s.Design().Survey.Defects); got != n+1 {
		t.Fatalf("%d defects after a click, want %d", got, n+1)
	}
	d := defect(n)
	if d.At.Sub(clear).Norm() > 1e-9 || d.Kind != design.DefectBright || d.SizeNM != editor.DefaultDefectSizeNM || !d.ByHand || d.Class != "dangling bond" {
		t.Errorf("added %+v at %v, want a bright %g nm dangling bond by hand at %v", d.SurveyDefect, d.At, editor.DefaultDefectSizeNM, clear)
	}
	if s.SelectedDefect() != n {
		t.Errorf("selected %d after adding defect %d", s.SelectedDefect(), n)
	}
	if sc := s.Scene(editor.SceneOptions{Survey: true}); !sc.Survey.Defects[n].Selected {
		t.Error("the added defect is not marked selected")
	}
	if l := s.UndoLabel(); !strings.HasPrefix(l, "add bright defect") {
		t.Errorf("undo label %q after adding", l)
	}

	// The options choose dark.
	o := s.Opts
	o.DefectKind, o.DefectSizeNM = design.DefectDark, 2
	if err := s.SetOptions(o); err != nil {
		t.Fatal(err)
	}
	clear2 := sv0.ToField(sv0.PixelToSurvey(60.5, 40.5))
	s.Click(clear2, near)
	if d := defect(n + 1); d.Kind != design.DefectDark || d.SizeNM != 2 || d.Class != "missing dimers" {
		t.Errorf("added %+v with the options dark, 2 nm", d.SurveyDefect)
	}
	bad := s.Opts
	bad.DefectKind = "grey"
	if err := s.SetOptions(bad); err == nil || s.Opts.DefectKind != design.DefectDark {
		t.Errorf("defect kind grey accepted (%v)", err)
	}
	bad = s.Opts
	bad.DefectSizeNM = 0
	if err := s.SetOptions(bad); err == nil {
		t.Error("a defect width of 0 nm accepted")
	}

	// Select: a click on defect 0's marker, a little off its centre.
	undoLabel = s.UndoLabel()
	s.Click(defect(0).At.Add(r2.Point{X: 0.3 * near, Y: 0.2 * near}), near)
	if s.SelectedDefect() != 0 || len(s.Design().Survey.Defects) != n+2 {
		t.Errorf("click on defect 1's marker: selected %d, %d defects", s.SelectedDefect(), len(s.Design().Survey.Defects))
	}
	same("selecting")

	// Move: a drag grabbed off the marker's centre moves it by the drag;
	// the view shows it where the drag has it before the release.
	was := defect(0).At
	grab := was.Add(r2.Point{X: -0.1, Y: 0.1})
	by := r2.Point{X: 2.5, Y: -1.25}
	s.SetNear(near)
	s.Press(grab)
	s.Drag(grab.Add(by.Mul(0.5)))
	if sc := s.Scene(editor.SceneOptions{Survey: true}); sc.Survey.Defects[0].At.Sub(was.Add(by.Mul(0.5))).Norm() > 1e-9 {
		t.Errorf("mid-drag the marker is drawn at %v, want %v", sc.Survey.Defects[0].At, was.Add(by.Mul(0.5)))
	}
	same("dragging before the release")
	s.Release(grab.Add(by))
	if d := defect(0); d.At.Sub(was.Add(by)).Norm() > 1e-9 || !d.ByHand {
		t.Errorf("dragged defect at %v (by hand %v), want %v", d.At, d.ByHand, was.Add(by))
	}
	if l := s.UndoLabel(); !strings.HasPrefix(l, "move defect 1") {
		t.Errorf("undo label %q after the drag", l)
	}
	if s.SelectedDefect() != 0 {
		t.Errorf("selected %d after dragging defect 1", s.SelectedDefect())
	}

	// A drag that starts on no marker moves nothing.
	undoLabel = s.UndoLabel()
	s.Press(clear.Add(r2.Point{X: 0, Y: 3}))
	s.Drag(clear.Add(r2.Point{X: 4, Y: 3}))
	s.Release(clear.Add(r2.Point{X: 4, Y: 3}))
	same("a drag from a clear spot")

	// A click off the image adds nothing and says why.
	off := sv0.ToField(sv0.PixelToSurvey(-20, 40))
	s.Click(off, near)
	if s.Err == nil || !strings.Contains(s.Err.Error(), "off the survey image") || len(s.Design().Survey.Defects) != n+2 {
		t.Errorf("click off the image: %v, %d defects", s.Err, len(s.Design().Survey.Defects))
	}
	s.Err = nil
	same("a click off the image")

	// Delete: the selected one.
	second := defect(1)
	if ok, err := s.DeleteSelectedDefect(); !ok || err != nil {
		t.Fatalf("delete the selected defect: %v, %v", ok, err)
	}
	if len(s.Design().Survey.Defects) != n+1 || defect(0).At != second.At || s.SelectedDefect() != -1 {
		t.Errorf("after deleting defect 1: %d defects, the first at %v (want %v), selected %d", len(s.Design().Survey.Defects), defect(0).At, second.At, s.SelectedDefect())
	}
	if ok, _ := s.DeleteSelectedDefect(); ok {
		t.Error("deleted with nothing selected")
	}

	// Undo each: the delete, the move, the dark add, the bright add.
	steps := []struct {
		label string
		check func() bool
	}{
		{"delete defect 1", func() bool {
			return len(s.Design().Survey.Defects) == n+2 && defect(0).At.Sub(was.Add(by)).Norm() < 1e-9
		}},
		{"move defect 1", func() bool { return defect(0).At.Sub(was).Norm() < 1e-9 }},
		{"add dark defect", func() bool { return len(s.Design().Survey.Defects) == n+1 }},
		{"add bright defect", func() bool { return len(s.Design().Survey.Defects) == n && s.Design().Survey == sv0 }},
	}
	for _, st := range steps {
		if l := s.UndoLabel(); !strings.HasPrefix(l, st.label) {
			t.Fatalf("next undo is %q, want %q", l, st.label)
		}
		s.Undo()
		if !st.check() {
			t.Errorf("undoing %q did not restore the defects", st.label)
		}
		if i := s.SelectedDefect(); i >= len(s.Design().Survey.Defects) {
			t.Errorf("after undoing %q the selection %d is past the %d defects", st.label, i, len(s.Design().Survey.Defects))
		}
	}
}

// Deleting a defect before the selected one keeps the selection on the
// same defect.
func TestDeleteDefectKeepsTheSelection(t *testing.T) {
	s := editortest.Demo(t)
	keep := s.Design().Survey.FieldDefects()[5].At
	s.SelectDefect(5)
	if err := s.DeleteDefect(2); err != nil {
		t.Fatal(err)
	}
	if i := s.SelectedDefect(); i != 4 || s.Design().Survey.FieldDefects()[i].At != keep {
		t.Errorf("selected %d after deleting defect 3 before defect 6", i)
	}
}

// Without a survey the Defect tool says so and edits nothing.
func TestDefectToolWithoutSurvey(t *testing.T) {
	s := editortest.Tiny(t)
	s.SetTool(editor.ToolDefect)
	s.Click(r2.Point{X: 50, Y: 50}, 0.4)
	if !errors.Is(s.Err, editor.ErrNoSurvey) || s.CanUndo() {
		t.Errorf("click without a survey: err %v, undo %v", s.Err, s.CanUndo())
	}
	s.Err = nil
	s.Press(r2.Point{X: 50, Y: 50})
	s.Release(r2.Point{X: 60, Y: 50})
	if !errors.Is(s.Err, editor.ErrNoSurvey) || s.CanUndo() || s.Design().Survey != nil {
		t.Errorf("drag without a survey: err %v, undo %v", s.Err, s.CanUndo())
	}
	if ok, err := s.DeleteSelectedDefect(); ok || err != nil {
		t.Errorf("delete without a survey: %v, %v", ok, err)
	}
}
