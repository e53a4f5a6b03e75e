package gui

import (
	"fmt"
	"strings"
	"testing"

	"fyne.io/fyne/v2/test"
	"github.com/golang/geo/r2"

	"dimerpath/app/editor/editortest"
)

// The Survey tab on the demo: its image loads in the background and is
// drawn (the opacity slider reaches the view), placements are found and
// listed, and applying the first moves the core as one undo step.
func TestSurveyPanel(t *testing.T) {
	u, w := newTestUI(t, editortest.Demo(t))
	p := u.survey
	p.imageJobs.Wait()
	if u.Session.SurveyImageShown() == nil {
		t.Fatal("the demo's survey image was not loaded")
	}
	if !strings.Contains(p.summary.Text, "16 defects") || p.defects.Length() != 16 {
		t.Errorf("summary %q, %d defects listed", p.summary.Text, p.defects.Length())
	}
	p.opacity.SetValue(1)
	if u.View.Opts.SurveyOpacity != 1 || !u.View.Opts.Survey {
		t.Errorf("view options %+v after the slider moved to 1", u.View.Opts)
	}
	sv := u.Session.Design().Survey
	at := sv.ToField(sv.PixelToSurvey(20.5, 20.5))
	img := zoomOn(w, u, at, 0.02)
	got := pixelAt(img, u, at)
	want := u.Session.SurveyImageShown().Grey[20*sv.SizePx[0]+20]
	if d := int(got.R) - int(want); got.R != got.G || d < -12 || d > 12 {
		t.Errorf("survey pixel drawn %v, the image's grey is %d", got, want)
	}

	// Registering the survey: the corner and angle entered move it, one
	// undo step.
	p.atX.SetText("940")
	p.atY.SetText("930.5")
	p.turn.SetText("-2.5")
	p.applyPlace()
	if sv := u.Session.Design().Survey; sv.OffsetNM != [2]float64{940, 930.5} || sv.RotationDeg != -2.5 {
		t.Errorf("survey at %v turned %g after Apply", sv.OffsetNM, sv.RotationDeg)
	}
	u.Session.Undo()
	if sv := u.Session.Design().Survey; sv.OffsetNM != [2]float64{932.5, 932.5} || p.atX.Text != "932.50" {
		t.Errorf("undo left the survey at %v, the entry says %q", sv.OffsetNM, p.atX.Text)
	}

	p.searchBox.SetText("1, 2, 3")
	test.Tap(p.find)
	if !strings.Contains(p.msg.Text, "want X0,Y0,X1,Y1") || u.Session.Placements() != nil {
		t.Errorf("a box of three numbers searched; message %q", p.msg.Text)
	}
	p.searchBox.SetText("")
	// The test driver runs the job's report on the job's goroutine: the
	// test touches no widget until it is done.
	waitJob(t, u, func() { test.Tap(p.find) })
	if u.Session.Placements() == nil {
		t.Fatal("no placements kept")
	}
	if p.places.Length() == 0 {
		t.Fatal("no placements listed")
	}
	// A box just around the core as drawn keeps every placement found in it.
	first := u.Session.Placements()
	box := first.Core.ExpandedByMargin(3)
	p.searchBox.SetText(fmt.Sprintf("%g,%g,%g,%g", box.X.Lo, box.Y.Lo, box.X.Hi, box.Y.Hi))
	waitJob(t, u, func() { test.Tap(p.find) })
	if ps := u.Session.Placements(); ps == nil || ps == first {
		t.Fatal("no new placements kept for the box")
	}
	for i, pl := range u.Session.Placements().Best {
		moved := r2.Rect{X: first.Core.X, Y: first.Core.Y}
		moved.X.Lo, moved.X.Hi = moved.X.Lo+pl.MoveNM.X, moved.X.Hi+pl.MoveNM.X
		moved.Y.Lo, moved.Y.Hi = moved.Y.Lo+pl.MoveNM.Y, moved.Y.Hi+pl.MoveNM.Y
		if !box.ExpandedByMargin(1e-6).Contains(moved) {
			t.Errorf("placement %d moves the core to %v, outside the search box %v", i+1, moved, box)
		}
	}
	p.places.Select(0)
	if p.apply.Disabled() {
		t.Fatal("Move the core there is disabled with a placement chosen")
	}
	test.Tap(p.apply)
	if l := u.Session.UndoLabel(); !strings.HasPrefix(l, "move the core by") {
		t.Errorf("undo label %q after applying a placement", l)
	}
	if u.Session.Placements() != nil || !p.apply.Disabled() {
		t.Error("placements still offered after the core moved")
	}
}
