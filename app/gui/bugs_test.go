package gui

import (
	"context"
	"path/filepath"
	"strings"
	"testing"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/test"
	"fyne.io/fyne/v2/widget"

	"dimerpath/app/editor"
	"dimerpath/app/render/rendertest"
	"dimerpath/export"
	"dimerpath/lattice/design"
	"dimerpath/planner"
)

// findButton returns the button labelled text under o, or nil.
func findButton(o fyne.CanvasObject, text string) *widget.Button {
	switch x := o.(type) {
	case *widget.Button:
		if x.Text == text {
			return x
		}
	case *fyne.Container:
		for _, c := range x.Objects {
			if b := findButton(c, text); b != nil {
				return b
			}
		}
	case fyne.Widget:
		for _, c := range test.WidgetRenderer(x).Objects() {
			if b := findButton(c, text); b != nil {
				return b
			}
		}
	}
	return nil
}

// TestPanickingJobKeepsTheDesign puts a job that panics into each kind of
// background work the window runs (plan, check, comparison, export of a
// plan and of a comparison, autosave) and checks that the window
// survives it: the panic's message is shown in the internal-error
// dialog, "Copy details" puts the message and the stack on the
// clipboard, the window is no longer busy, and the user's design and
// its undo history are exactly as they were.
func TestPanickingJobKeepsTheDesign(t *testing.T) {
	boom := func(job string) string { return "test bug in " + job }
	cases := []struct {
		name string
		// inject replaces one job with one that panics.
		inject func(j *editor.Jobs)
		// run starts the work and waits until it has reported back.
		run func(t *testing.T, u *UI)
	}{
		{"plan", func(j *editor.Jobs) {
			j.Plan = func(context.Context, *design.Design, string, planner.Profile, planner.Options) (*planner.Plan, error) {
				panic(boom("plan"))
			}
		}, func(t *testing.T, u *UI) { waitJob(t, u, u.StartPlan) }},
		{"check", func(j *editor.Jobs) {
			j.Check = func(context.Context, *design.Design, string, planner.Profile) (editor.CheckResult, error) {
				panic(boom("check"))
			}
		}, func(t *testing.T, u *UI) { waitJob(t, u, u.CheckNow) }},
		{"compare", func(j *editor.Jobs) {
			j.Plan = func(context.Context, *design.Design, string, planner.Profile, planner.Options) (*planner.Plan, error) {
				panic(boom("compare"))
			}
		}, func(t *testing.T, u *UI) { waitJob(t, u, u.compareVariants) }},
		{"export", func(j *editor.Jobs) {
			j.Export = func(context.Context, string, *design.Design, *planner.Plan, editor.ExportSettings, func(string, float64)) error {
				panic(boom("export"))
			}
		}, func(t *testing.T, u *UI) {
			waitJob(t, u, func() {
				u.exportPlanTo(filepath.Join(t.TempDir(), "plan.pdf"), u.Session.DesignCopy(), &planner.Plan{Variant: "A"}, editor.ExportSettings{})
			})
		}},
		{"export-comparison", func(j *editor.Jobs) {
			j.ExportComparison = func(context.Context, string, []export.VariantResult, editor.ExportSettings) error {
				panic(boom("export-comparison"))
			}
		}, func(t *testing.T, u *UI) {
			waitJob(t, u, func() {
				u.exportComparisonTo(filepath.Join(t.TempDir(), "cmp.pdf"), nil, editor.ExportSettings{})
			})
		}},
		{"autosave", func(j *editor.Jobs) {
			j.SaveRecovery = func(string, *design.Design) error { panic(boom("autosave")) }
		}, func(t *testing.T, u *UI) {
			if err := <-u.Autosave(); err == nil {
				t.Error("a panicking autosave reported no error")
			}
		}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			u, w := newTestUI(t, nil)
			s := u.Session
			// Unsaved work with an undo history.
			s.AddRegion("unsaved idea", design.RoleDevice)
			s.RenameRegion(0, "island renamed")
			before, err := design.Marshal(s.Design())
			if err != nil {
				t.Fatal(err)
			}
			label := s.UndoLabel()
			c.inject(&u.jobs)
			c.run(t, u)

			top := w.Canvas().Overlays().Top()
			if top == nil {
				t.Fatal("no dialog after the job panicked")
			}
			rendertest.SaveImage(t, "bug-"+c.name+".png", w.Canvas().Capture())
			if txt := texts(top); !strings.Contains(txt, "Internal error") || !strings.Contains(txt, boom(c.name)) {
				t.Errorf("the dialog does not report the bug and its message %q:\n%s", boom(c.name), txt)
			}
			cp := findButton(top, "Copy details")
			if cp == nil {
				t.Fatal("the dialog has no Copy details button")
			}
			test.Tap(cp)
			clip := u.App.Clipboard().Content()
			if !strings.Contains(clip, boom(c.name)) || !strings.Contains(clip, "goroutine") || !strings.Contains(clip, "bugs_test.go") {
				t.Errorf("the copied details lack the message or the stack:\n%s", clip)
			}
			if u.Busy() || !u.progressBox.Hidden || u.planButton.Disabled() {
				t.Error("the window is still busy after the job panicked")
			}
			after, err := design.Marshal(u.Session.Design())
			if err != nil {
				t.Fatal(err)
			}
			if u.Session != s || string(after) != string(before) || !s.Dirty() || s.UndoLabel() != label {
				t.Fatalf("the design or its history changed: same session %v, same design %v, dirty %v, undo %q (was %q)",
					u.Session == s, string(after) == string(before), s.Dirty(), s.UndoLabel(), label)
			}
			s.Undo()
			s.Undo()
			if n := len(s.Variant().Regions); n != 2 || s.Variant().Regions[0].Name != "island" {
				t.Errorf("undoing the two edits left %d regions, the first named %q", n, s.Variant().Regions[0].Name)
			}
		})
	}
}

// TestBugInACheckIsReportedOnce: the checks run after every edit, so a
// bug in them is reported in a dialog once and then in the status bar,
// and the findings list says the variant could not be checked.
func TestBugInACheckIsReportedOnce(t *testing.T) {
	u, w := newTestUI(t, nil)
	u.jobs.Check = func(context.Context, *design.Design, string, planner.Profile) (editor.CheckResult, error) {
		panic("test bug in check")
	}
	u.CheckSync()
	top := w.Canvas().Overlays().Top()
	if top == nil {
		t.Fatal("no dialog for the first failed check")
	}
	top.Hide()
	w.Canvas().Overlays().Remove(top)
	u.CheckSync()
	if again := w.Canvas().Overlays().Top(); again != nil {
		t.Error("the same bug was reported in a second dialog")
	}
	if !strings.Contains(u.hintLabel.Text, "again") {
		t.Errorf("status %q does not say the check failed again", u.hintLabel.Text)
	}
	f, _ := u.Session.Findings()
	if len(f) != 1 || !f[0].Error || !strings.Contains(f[0].Message, "test bug in check") {
		t.Errorf("findings %+v, want one error naming the bug", f)
	}
}

// TestInternalErrorOfThePlannerIsABug: an error the planner marks as its
// own bug (planner.ErrInternal) gets the bug dialog too, with its stack.
func TestInternalErrorOfThePlannerIsABug(t *testing.T) {
	u, w := newTestUI(t, nil)
	u.jobs.Plan = func(context.Context, *design.Design, string, planner.Profile, planner.Options) (*planner.Plan, error) {
		return nil, &planner.InternalError{Message: "timeline and segments disagree", Stack: []byte("goroutine 1 [running]:\nplanner.Build")}
	}
	waitJob(t, u, u.StartPlan)
	top := w.Canvas().Overlays().Top()
	if top == nil || !strings.Contains(texts(top), "Internal error") {
		t.Fatal("an internal error of the planner was not reported as a bug")
	}
	test.Tap(findButton(top, "Copy details"))
	if clip := u.App.Clipboard().Content(); !strings.Contains(clip, "timeline and segments disagree") || !strings.Contains(clip, "planner.Build") {
		t.Errorf("copied details %q lack the message or the stack", clip)
	}
}
