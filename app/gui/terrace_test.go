package gui

import (
	"strings"
	"testing"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/test"
	"fyne.io/fyne/v2/widget"
	"github.com/golang/geo/r2"

	"dimerpath/lattice"
)

// Issue 10 §1: a step up and a step down put the new terrace's lattice
// 0.27 nm apart, so the Terrace tool asks which way the step goes before
// it adds a terrace, and the Design tab shows and changes it.
func TestTerraceToolAsksWhichWayTheStepGoes(t *testing.T) {
	u, w := newTestUI(t, nil)
	zoomOn(w, u, r2.Point{X: 150, Y: 100}, 0.3)
	test.TypeOnCanvas(w.Canvas(), "t")
	opts := texts(u.toolOptions)
	if !strings.Contains(opts, "goes") {
		t.Fatalf("the Terrace tool's options do not ask which way the step goes:\n%s", opts)
	}
	var step *widget.RadioGroup
	for _, o := range u.toolOptions.Objects {
		if r, ok := o.(*widget.RadioGroup); ok {
			step = r
		}
	}
	if step == nil || step.Selected != "" || len(step.Options) != 2 {
		t.Fatalf("the Terrace tool's options have no unanswered up/down choice: %v", step)
	}
	for _, p := range []r2.Point{{X: 150, Y: 60}, {X: 190, Y: 60}, {X: 190, Y: 140}, {X: 150, Y: 140}} {
		tap(w, u, p)
	}
	key(w, fyne.KeyReturn)
	if !u.Session.Drawing() || len(u.Session.Design().Terraces) > 1 || !strings.Contains(u.hintLabel.Text, "up or down") {
		t.Fatalf("Enter without the step's direction: drawing %v, %d terraces, hint %q; want the outline kept and the question",
			u.Session.Drawing(), len(u.Session.Design().Terraces), u.hintLabel.Text)
	}
	step.SetSelected("up")
	key(w, fyne.KeyReturn)
	ts := u.Session.Design().Terraces
	if len(ts) != 2 || ts[1].Step != "up" || ts[1].StepFrom != ts[0].Name {
		t.Fatalf("terraces %+v: want a second one a step up from the first", ts)
	}
	surf := u.Session.Surface()
	up := surf.Terraces[0].AcrossStep(lattice.StepUp).Offset
	if surf.Terraces[1].Offset != up {
		t.Errorf("the new terrace's lattice offset %v, want a step up's %v", surf.Terraces[1].Offset, up)
	}

	// The Design tab lists it as a step up and changes it to a step down.
	u.marks.terrs.Select(1)
	if !u.marks.terrStepForm.Visible() || u.marks.terrStep.Selected != "up" {
		t.Fatalf("the terrace form shows the step: visible %v, selected %q", u.marks.terrStepForm.Visible(), u.marks.terrStep.Selected)
	}
	u.marks.terrStep.SetSelected("down")
	if got := u.Session.Design().Terraces[1].Step; got != "down" {
		t.Fatalf("after choosing down the terrace's step is %q", got)
	}
	if got, want := u.Session.Surface().Terraces[1].Offset, surf.Terraces[0].AcrossStep(lattice.StepDown).Offset; got != want || got == up {
		t.Errorf("after a step down the offset is %v, want %v", got, want)
	}
	item := widget.NewLabel("")
	u.marks.terrs.UpdateItem(1, item)
	if !strings.Contains(item.Text, "a step down from "+ts[0].Name) {
		t.Errorf("the terrace list does not say which way the step goes: %q", item.Text)
	}
	// The first terrace steps from none: no step to choose.
	u.marks.terrs.Select(0)
	if u.marks.terrStepForm.Visible() {
		t.Error("the form asks for the step of a terrace that steps from none")
	}
}
