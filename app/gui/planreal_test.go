package gui

import (
	"strings"
	"testing"
	"time"

	"dimerpath/app/editor/editortest"
	"dimerpath/app/render"
	"dimerpath/internal/units"
	"fyne.io/fyne/v2/test"
)

// waitJob runs start and waits until the background job it starts has
// reported back.
func waitJob(t *testing.T, u *UI, start func()) {
	t.Helper()
	done := make(chan struct{}, 1)
	u.jobDone = func() { done <- struct{}{} }
	defer func() { u.jobDone = nil }()
	start()
	select {
	case <-done:
	case <-time.After(2 * time.Minute):
		t.Fatal("the background job did not finish")
	}
}

// TestPlanButtonPlansDemo taps Plan on the demo: the real planner runs in
// the background, and its plan reaches the panel and the canvas.
func TestPlanButtonPlansDemo(t *testing.T) {
	u, w := newTestUI(t, editortest.Demo(t))
	waitJob(t, u, func() { test.Tap(u.planButton) })
	p, stale := u.Session.Plan()
	if p == nil || stale {
		t.Fatalf("after Plan: plan %v, stale %v", p != nil, stale)
	}
	if p.Variant != u.Session.Variant().Name || len(p.Strokes) == 0 || !p.Coverage.OK {
		t.Fatalf("plan of %q with %d strokes, coverage ok %v", p.Variant, len(p.Strokes), p.Coverage.OK)
	}
	if u.tabs.Selected() != u.tabPlan {
		t.Error("the Plan tab is not shown after planning")
	}
	panel := texts(u.planView.content)
	if !strings.Contains(panel, units.Duration(p.TotalS)) {
		t.Errorf("plan panel lacks the total %s", units.Duration(p.TotalS))
	}
	// Issue 11: the panel shows the process steps and how long each
	// window stays open before its dose.
	for _, want := range []string{"Process steps", "lithography As, from ", "dose P, from ", "before its dose", "local registration, segment"} {
		if !strings.Contains(panel, want) {
			t.Errorf("plan panel lacks %q:\n%s", want, panel)
		}
	}
	// The first AP line stroke is drawn in its segment's colour.
	for _, st := range p.Strokes {
		if st.Kind != "line" || len(st.Path) < 2 {
			continue
		}
		mid := st.Path[0].Add(st.Path[1]).Mul(0.5)
		img := zoomOn(w, u, mid, 0.5)
		if got, want := pixelAt(img, u, mid), render.SegmentColor(st.Segment); got != want {
			t.Errorf("stroke %d drawn %v, want segment %d's %v", st.ID, got, st.Segment, want)
		}
		break
	}
	if u.Busy() || !u.progressBox.Hidden {
		t.Error("progress still shown after the plan came back")
	}

	// Planning the other variant and comparing both.
	u.variantSelect.SetSelected(u.Session.VariantNames()[1])
	if got, _ := u.Session.Plan(); got != nil {
		t.Error("the second variant shows the first one's plan")
	}
	waitJob(t, u, u.compareVariants)
	top := w.Canvas().Overlays().Top()
	if top == nil {
		t.Fatal("comparison shows no dialog")
	}
	// Issue 13: the two rows looked the same; the dialog says what
	// differs and each variant's coverage check.
	got := texts(top)
	for _, want := range []string{"What differs from gap-9", "tunnel gap sensor-island – source-lead",
		"6.91 nm (9.0 dimer rows across the rows)", "9.22 nm (12.0 dimer rows across the rows)", "Coverage", "passed"} {
		if !strings.Contains(got, want) {
			t.Errorf("comparison dialog lacks %q:\n%s", want, got)
		}
	}
}

// TestCancelPlanning cancels a plan just started: nothing is planned, the
// status says so, and the progress bar goes away.
func TestCancelPlanning(t *testing.T) {
	u, _ := newTestUI(t, editortest.Demo(t))
	waitJob(t, u, func() {
		u.StartPlan()
		if !u.Busy() || u.progressBox.Hidden {
			t.Error("no progress shown while planning")
		}
		u.cancelPlan()
	})
	if p, _ := u.Session.Plan(); p != nil {
		t.Error("a cancelled plan was shown")
	}
	if got := u.hintLabel.Text; got != "Planning cancelled." {
		t.Errorf("status %q after cancelling", got)
	}
	if u.Busy() || !u.progressBox.Hidden {
		t.Error("still busy after cancelling")
	}
}
