package gui

import (
	"math"
	"testing"
	"time"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/test"
	"fyne.io/fyne/v2/widget"
	"github.com/golang/geo/r2"

	"dimerpath/app/editor"
	"dimerpath/app/editor/editortest"
	"dimerpath/lattice/design"
)

// Issue 13: after a kill -9 the recovered design lacked the last edit,
// made 8 s after the once-a-minute copy, and came back on another
// variant, zoom and without its plan. The copy is now written a moment
// after each change, and it keeps the variant shown, the view and the
// last plan's inputs, so a recovered session resumes where it was.
func TestRecoveryResumesTheWorkingState(t *testing.T) {
	dir := t.TempDir()
	open := func() *UI {
		a := test.NewTempApp(t)
		w := test.NewTempWindow(t, widget.NewLabel(""))
		u := New(a, w, editortest.Tiny(t), Options{ConfigDir: dir, CheckDelay: -1, AutosaveDelay: 20 * time.Millisecond})
		w.Resize(fyne.NewSize(1280, 800))
		w.Canvas().Capture()
		t.Cleanup(func() {
			// No copy may be written once the test's directory goes.
			u.StopAutosave()
			for end := time.Now().Add(10 * time.Second); u.autosaving && time.Now().Before(end); {
				time.Sleep(10 * time.Millisecond)
			}
		})
		return u
	}
	u := open()
	u.Session.SetVariant(1) // B
	waitJob(t, u, u.StartPlan)
	planned, _ := u.Session.Plan()
	if planned == nil {
		t.Fatal("no plan")
	}
	view := u.View.View()
	view.Center, view.Scale = r2.Point{X: 95.5, Y: 104.25}, 0.05
	u.View.SetView(view)
	u.Session.AddRegion("late idea", design.RoleOther) // the last edit before the kill

	// No minute-long wait: the copy follows the edit within moments.
	deadline := time.Now().Add(10 * time.Second)
	var info editor.RecoveryInfo
	for {
		d, in, err := editor.LoadRecovery(dir)
		if err == nil && in.View != nil && in.Plan != nil {
			regions := d.Variants[1].Regions
			if regions[len(regions)-1].Name == "late idea" {
				info = in
				break
			}
		}
		if time.Now().After(deadline) {
			t.Fatalf("no recovery copy with the last edit and the working state 10 s after it (last error %v, info %+v)", err, in)
		}
		time.Sleep(20 * time.Millisecond)
	}
	if info.Variant != "B" || info.Plan.Variant != "B" || info.Plan.Seed != planned.Seed {
		t.Errorf("recovery description %+v, plan %+v; want variant B and the plan's seed %d", info, *info.Plan, planned.Seed)
	}

	// The next start (the first window killed, never closed).
	v := open()
	waitJob(t, v, func() {
		if err := v.Recover(); err != nil {
			t.Fatal(err)
		}
	})
	s := v.Session
	if got := s.Variant().Name; got != "B" {
		t.Errorf("recovered on variant %q, want B", got)
	}
	regions := s.Variant().Regions
	if got := regions[len(regions)-1].Name; got != "late idea" {
		t.Errorf("recovered design ends with region %q, want the last edit", got)
	}
	got := v.View.View()
	if math.Abs(got.Center.X-95.5) > 1e-9 || math.Abs(got.Center.Y-104.25) > 1e-9 || math.Abs(got.Scale-0.05) > 1e-12 {
		t.Errorf("recovered view centre %v at %g nm/px, want (95.5, 104.25) at 0.05", got.Center, got.Scale)
	}
	p, stale := s.Plan()
	if p == nil || stale || p.Variant != "B" || p.Seed != planned.Seed {
		t.Fatalf("recovered plan %v (stale %v); want an up-to-date plan of B with seed %d", p != nil, stale, planned.Seed)
	}
	if !s.Dirty() {
		t.Error("the recovered design should count as unsaved")
	}
}
