package gui

import (
	"context"
	"strings"
	"sync/atomic"
	"testing"

	"fyne.io/fyne/v2/test"

	"dimerpath/app/editor/editortest"
	"dimerpath/app/render/rendertest"
	"dimerpath/internal/units"
	"dimerpath/lattice/design"
	"dimerpath/planner"
)

// TestSweepFormPlansAndShows sweeps the demo's registration time from the
// Variants tab with the real planner: the result opens with a row per
// value and both charts, and the planned totals are the ones shown.
func TestSweepFormPlansAndShows(t *testing.T) {
	u, w := newTestUI(t, editortest.Demo(t))
	u.tabs.Select(u.tabVariants)
	f := u.variants.sweep
	f.param.SetSelected("drift.registration_s")
	if got := f.values.Text; got != "128,256,512,1024" {
		t.Errorf("suggested values %q", got)
	}
	if !strings.Contains(f.about.Text, "the profile has 256") {
		t.Errorf("about %q", f.about.Text)
	}
	f.values.SetText("100, 400")
	rendertest.SaveImage(t, "window-sweep-form.png", w.Canvas().Capture())
	var got *planner.Sweep
	sweep := u.jobs.Sweep
	u.jobs.Sweep = func(ctx context.Context, d *design.Design, variant string, prof planner.Profile, param string, values []string, opt planner.SweepOptions) (*planner.Sweep, error) {
		sw, err := sweep(ctx, d, variant, prof, param, values, opt)
		got = sw
		return sw, err
	}
	waitJob(t, u, func() { test.Tap(f.run) })
	if got == nil || len(got.Points) != 2 {
		t.Fatalf("sweep %+v", got)
	}
	top := w.Canvas().Overlays().Top()
	if top == nil {
		t.Fatal("the sweep shows no dialog")
	}
	shown := texts(top)
	for _, pt := range got.Points {
		if pt.Plan == nil {
			t.Fatalf("%s not planned: %v", pt.Value, pt.Err)
		}
		for _, want := range []string{pt.Value, units.Clock(pt.Plan.TotalS)} {
			if !strings.Contains(shown, want) {
				t.Errorf("the sweep dialog lacks %q", want)
			}
		}
	}
	for _, want := range []string{"Write time: expected, median and the P10–P90 band", "Chance every window takes one donor", "drift.registration_s (s)", planner.Caution} {
		if !strings.Contains(shown, want) {
			t.Errorf("the sweep dialog lacks %q", want)
		}
	}
	rendertest.SaveImage(t, "window-sweep.png", w.Canvas().Capture())
	if u.Busy() || !u.progressBox.Hidden || f.run.Disabled() {
		t.Error("still busy after the sweep came back")
	}
}

// TestSweepFormRefusesBadValues shows a refused value in the form and
// plans nothing.
func TestSweepFormRefusesBadValues(t *testing.T) {
	u, _ := newTestUI(t, editortest.Demo(t))
	f := u.variants.sweep
	var calls atomic.Int32
	u.jobs.Sweep = func(context.Context, *design.Design, string, planner.Profile, string, []string, planner.SweepOptions) (*planner.Sweep, error) {
		calls.Add(1)
		return nil, nil
	}
	for _, c := range []struct{ param, values, want string }{
		{"", "1", "Choose a parameter first."},
		{"fe.current_a", "5e-9,2e-8", "limits.max_current_a = 10 nA"},
		{"drift.rate_nm_per_min", "0.1,-1", "drift.rate_nm_per_min = -1"},
		{"drift.rate_nm_per_min", "", "no values"},
	} {
		if c.param != "" {
			f.param.SetSelected(c.param)
		}
		f.values.SetText(c.values)
		test.Tap(f.run)
		if f.msg.Hidden || !strings.Contains(f.msg.Text, c.want) {
			t.Errorf("%s = %s: message %q (hidden %v), want %q", c.param, c.values, f.msg.Text, f.msg.Hidden, c.want)
		}
	}
	if calls.Load() != 0 || u.Busy() {
		t.Errorf("refused sweeps started %d jobs", calls.Load())
	}
}
