package gui

import (
	"context"
	"errors"
	"fmt"
	"path/filepath"
	"strings"
	"time"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/theme"
	"fyne.io/fyne/v2/widget"

	"dimerpath/app/editor"
	"dimerpath/app/render"
	"dimerpath/export"
	"dimerpath/internal/units"
	"dimerpath/lattice/design"
	"dimerpath/planner"
)

// Long work (planning, checks, comparisons, exports) runs in a goroutine
// on a copy of the design, with a context the Cancel button cancels, and
// reports back through fyne.Do. The session is touched only on Fyne's
// goroutine.

// showProgress shows the progress bar with a message and a fraction
// (0..1).
func (u *UI) showProgress(msg string, f float64) {
	u.progressMsg.SetText(msg)
	u.progress.SetValue(f)
	u.progressBox.Show()
	u.refreshBusy()
}

func (u *UI) hideProgress() {
	u.progressBox.Hide()
	u.refreshBusy()
}

// refreshBusy enables Plan > Cancel planning while a plan or comparison
// runs, and only then.
func (u *UI) refreshBusy() {
	if u.cancelItem == nil || u.cancelItem.Disabled == !u.Busy() {
		return
	}
	u.cancelItem.Disabled = !u.Busy()
	if u.menu != nil {
		u.menu.Refresh()
	}
}

// Busy reports whether a plan or comparison is running.
func (u *UI) Busy() bool { return u.planCancel != nil }

// progressFunc returns a progress callback for the planner that updates
// the bar at most every 50 ms, prefixing prefix to the stage.
func (u *UI) progressFunc(prefix string, scale, offset float64) func(string, float64) {
	var last time.Time
	return func(stage string, f float64) {
		if time.Since(last) < 50*time.Millisecond && f < 1 {
			return
		}
		last = time.Now()
		fyne.Do(func() { u.showProgress(prefix+stage, offset+scale*f) })
	}
}

// StartPlan plans the current variant in the background.
func (u *UI) StartPlan() {
	if u.Busy() {
		return
	}
	s := u.Session
	d, variant, tok, prof := s.DesignCopy(), s.Variant().Name, s.Token(), s.Profile
	ctx, cancel := context.WithCancel(context.Background())
	u.planCancel = cancel
	u.planStarted = time.Now()
	u.planButton.Disable()
	u.showProgress("Planning "+variant+"…", 0)
	opt := planner.Options{Seed: u.opts.Seed, Progress: u.progressFunc(variant+": ", 1, 0)}
	plan := u.jobs.Plan
	go func() {
		var p *planner.Plan
		var rt *render.RouteOverlay
		err := editor.Guard(func() (err error) {
			p, err = plan(ctx, d, variant, prof, opt)
			if err == nil && p != nil {
				// The route overlay of a million strokes takes a good part
				// of a second: made here, not on Fyne's goroutine.
				rt = render.RouteOf(p)
			}
			return err
		})
		fyne.Do(func() {
			if rt != nil {
				u.View.SetRoute(p, rt)
			}
			u.planDone(s, p, variant, tok, err)
		})
	}()
}

func (u *UI) planDone(s *editor.Session, p *planner.Plan, variant string, tok editor.PlanToken, err error) {
	if u.jobDone != nil {
		defer u.jobDone()
	}
	defer u.recoverUI("Showing the plan of variant " + variant)
	u.planCancel = nil
	u.planButton.Enable()
	u.hideProgress()
	then := u.afterPlan
	u.afterPlan = nil
	if s != u.Session {
		return // another design was opened meanwhile
	}
	switch {
	case errors.Is(err, context.Canceled):
		u.hintLabel.SetText("Planning cancelled.")
	case err != nil:
		u.showJobError("Planning variant "+variant, err)
	default:
		s.SetPlan(p, variant, tok)
		u.tabs.Select(u.tabPlan)
		u.hintLabel.SetText(fmt.Sprintf("Planned variant %s in %s.", variant, units.Duration(time.Since(u.planStarted).Seconds())))
		if then != nil {
			then()
		}
	}
}

// PlanNow plans the current variant on the calling goroutine (for the
// screenshot mode and tests).
func (u *UI) PlanNow(ctx context.Context) error {
	s := u.Session
	var p *planner.Plan
	err := editor.Guard(func() (err error) {
		p, err = u.jobs.Plan(ctx, s.DesignCopy(), s.Variant().Name, s.Profile, planner.Options{Seed: u.opts.Seed})
		return err
	})
	if err != nil {
		return err
	}
	s.SetPlan(p, s.Variant().Name, s.Token())
	u.tabs.Select(u.tabPlan)
	return nil
}

// cancelPlan cancels a running plan or comparison.
func (u *UI) cancelPlan() {
	if u.planCancel != nil {
		u.planCancel()
	}
}

// scheduleCheck checks the design rules again shortly after an edit.
func (u *UI) scheduleCheck() {
	if u.opts.CheckDelay < 0 {
		return
	}
	if u.checkTimer != nil {
		u.checkTimer.Stop()
	}
	u.checkTimer = time.AfterFunc(u.opts.CheckDelay, func() { fyne.Do(u.CheckNow) })
}

// CheckNow runs the design-rule checks on the current variant in the
// background; a newer check cancels an older one.
func (u *UI) CheckNow() {
	if u.checkCancel != nil {
		u.checkCancel()
	}
	s := u.Session
	d, variant, tok, prof := s.DesignCopy(), s.Variant().Name, s.Token(), s.Profile
	ctx, cancel := context.WithCancel(context.Background())
	u.checkCancel = cancel
	check := u.jobs.Check
	go func() {
		res, err := guardedCheck(check, ctx, d, variant, prof)
		fyne.Do(func() {
			if u.jobDone != nil {
				defer u.jobDone()
			}
			if ctx.Err() != nil || s != u.Session || variant != s.Variant().Name {
				return
			}
			defer u.recoverUI("Showing the design-rule check of variant " + variant)
			u.checkCancel = nil
			u.checkDone(s, variant, res, err, tok)
		})
	}()
}

// checkJob is the design-rule check (editor.Jobs.Check).
type checkJob = func(context.Context, *design.Design, string, planner.Profile) (editor.CheckResult, error)

// guardedCheck runs the design-rule check job through Guard.
func guardedCheck(check checkJob, ctx context.Context, d *design.Design, variant string, prof planner.Profile) (res editor.CheckResult, err error) {
	err = editor.Guard(func() (err error) {
		res, err = check(ctx, d, variant, prof)
		return err
	})
	return res, err
}

// checkDone records a check's result; a variant that cannot be checked
// becomes one finding saying why, and a bug is also reported once.
func (u *UI) checkDone(s *editor.Session, variant string, res editor.CheckResult, err error, tok editor.PlanToken) {
	if err != nil {
		if _, bug := editor.BugDetails(err); bug {
			u.showBugOnce("Checking the design rules of variant "+variant, err)
		}
		res = editor.CheckResult{Findings: []editor.Finding{{Rule: "design", Error: true, Message: err.Error()}}}
	}
	s.SetCheck(res, tok)
}

// CheckSync runs the checks on the calling goroutine (tests, screenshot).
func (u *UI) CheckSync() {
	s := u.Session
	res, err := guardedCheck(u.jobs.Check, context.Background(), s.DesignCopy(), s.Variant().Name, s.Profile)
	u.checkDone(s, s.Variant().Name, res, err, s.Token())
}

// compareVariants plans every variant in the background and shows the
// comparison.
func (u *UI) compareVariants() {
	if u.Busy() {
		return
	}
	s := u.Session
	d, prof := s.DesignCopy(), s.Profile
	names := s.VariantNames()
	ctx, cancel := context.WithCancel(context.Background())
	u.planCancel = cancel
	u.planButton.Disable()
	u.showProgress("Comparing variants…", 0)
	seed := u.opts.Seed
	shown, tok := s.Variant().Name, s.Token()
	plan, check := u.jobs.Plan, u.jobs.Check
	go func() {
		res := make([]export.VariantResult, len(names))
		rules := make([]string, len(names))
		for i, n := range names {
			frac := 1 / float64(len(names))
			opt := planner.Options{Seed: seed, Progress: u.progressFunc(fmt.Sprintf("variant %s (%d of %d): ", n, i+1, len(names)), frac, float64(i)*frac)}
			var p *planner.Plan
			err := editor.Guard(func() (err error) {
				p, err = plan(ctx, d, n, prof, opt)
				return err
			})
			res[i] = export.VariantResult{Variant: n, Plan: p, Err: err}
			rules[i] = rulesSummary(check, ctx, d, n, prof)
			if ctx.Err() != nil {
				break
			}
		}
		// How each variant differs from the first: two rows that look
		// alike still say what changed.
		var diffs map[string][]design.Difference
		if ctx.Err() == nil {
			_ = editor.Guard(func() (err error) {
				diffs, err = editor.VariantDifferences(ctx, d)
				return err
			})
		}
		for i := range res {
			if ds, ok := diffs[res[i].Variant]; ok {
				res[i].Differences, res[i].Compared = ds, true
			}
		}
		fyne.Do(func() {
			if u.jobDone != nil {
				defer u.jobDone()
			}
			defer u.recoverUI("Showing the comparison")
			u.planCancel = nil
			u.planButton.Enable()
			u.hideProgress()
			if ctx.Err() != nil {
				u.hintLabel.SetText("Comparison cancelled.")
				return
			}
			// The variant shown keeps its plan from the comparison, so it
			// can be exported without planning it again.
			for _, r := range res {
				if r.Variant == shown && r.Err == nil && r.Plan != nil && s == u.Session {
					s.SetPlan(r.Plan, shown, tok)
				}
			}
			u.showComparison(res, rules)
			// A bug in planning a variant is reported over the comparison,
			// which still shows the others.
			for _, r := range res {
				if _, bug := editor.BugDetails(r.Err); bug {
					u.showJobError("Planning variant "+r.Variant+" for the comparison", r.Err)
					break
				}
			}
		})
	}()
}

// rulesSummary says how variant fares under the design rules: "passes",
// "2 errors", "1 warning".
func rulesSummary(check checkJob, ctx context.Context, d *design.Design, variant string, prof planner.Profile) string {
	res, err := guardedCheck(check, ctx, d, variant, prof)
	if err != nil {
		return "cannot be checked"
	}
	errs, warns := countFindings(res.Findings)
	switch {
	case errs > 0:
		return plural(errs, "error")
	case warns > 0:
		return plural(warns, "warning")
	}
	return "passes"
}

// comparisonView is the table and charts of a comparison: per variant
// the session time with its spread, the lithography steps, the
// probability of staying within tolerance, and the dopant yield. The
// full breakdown is in the exported report.
//
// rules, when given, is each variant's design-rule summary, shown in a
// last column: a fast variant that breaks the rules is no choice.
func comparisonView(res []export.VariantResult, rules []string) fyne.CanvasObject {
	header := []string{"Variant", "Session (mean)", "P10 – P90", "Steps", "Within tolerance", "All windows good", "95 % interval", "Coverage"}
	if rules != nil {
		header = append(header, "Design rules")
	}
	cols := len(header)
	var cells []fyne.CanvasObject
	for _, h := range header {
		cells = append(cells, heading(h))
	}
	var timeBars, yieldBars []Bar
	for i, r := range res {
		if r.Err != nil || r.Plan == nil {
			msg := "not planned"
			if r.Err != nil {
				msg = r.Err.Error()
			}
			cells = append(cells, widget.NewLabel(r.Variant))
			l := widget.NewLabel(msg)
			l.Importance = widget.DangerImportance
			l.Truncation = fyne.TextTruncateEllipsis
			cells = append(cells, l)
			for k := 2; k < cols; k++ {
				cells = append(cells, widget.NewLabel(""))
			}
			continue
		}
		p := r.Plan
		// P(all windows good) is exact for the templates' mean
		// probabilities; the interval comes from their uncertainties.
		all, interval, bar := "no windows", "—", "no windows"
		if y := p.Yield; y.Windows > 0 {
			all = formatProbability(y.All)
			interval = formatProbabilityRange(y.All95, y.Log10All95)
			bar = all + " (95 %: " + interval + ")"
		}
		var steps []string
		for _, st := range p.Steps {
			if st.Kind == planner.StepLithography {
				steps = append(steps, st.Species)
			}
		}
		// Times to the second (h:mm:ss): variants a few seconds apart read
		// alike in whole minutes.
		for _, t := range []string{r.Variant, units.Clock(p.TotalS), units.Clock(p.P10S) + " – " + units.Clock(p.P90S),
			strings.Join(steps, ", "), formatProbability(p.PInTolerance), all, interval} {
			cells = append(cells, widget.NewLabel(t))
		}
		cov := widget.NewLabel("passed")
		if !p.Coverage.OK {
			cov.SetText("failed")
			cov.Importance = widget.DangerImportance
		}
		cells = append(cells, cov)
		if rules != nil {
			l := widget.NewLabel(rules[i])
			if rules[i] != "passes" {
				l.Importance = widget.WarningImportance
			}
			cells = append(cells, l)
		}
		timeBars = append(timeBars, Bar{Label: r.Variant, Value: p.TotalS, Text: units.Clock(p.TotalS), Color: render.SegmentColor(i)})
		yieldBars = append(yieldBars, Bar{Label: r.Variant, Value: p.Yield.All, Text: bar, Color: colYield})
	}
	table := container.New(&tableLayout{cols: cols}, cells...)
	charts := container.NewGridWithColumns(2,
		container.NewVBox(heading("Session time per variant"), NewBarChart(timeBars)),
		container.NewVBox(heading("Chance every window is opened as drawn and takes one donor"), NewBarChart(yieldBars)))
	parts := []fyne.CanvasObject{table}
	if diffs := differencesView(res); diffs != nil {
		parts = append(parts, widget.NewSeparator(), diffs)
	}
	parts = append(parts, widget.NewSeparator(), charts, widget.NewSeparator(), mutedLabel(planner.Caution))
	return container.NewVBox(parts...)
}

// differencesView lists how each compared variant differs from the
// first, a table of what, its value in the first variant and here; nil
// when no variant was compared.
func differencesView(res []export.VariantResult) fyne.CanvasObject {
	if len(res) < 2 {
		return nil
	}
	cells := []fyne.CanvasObject{heading("Variant"), heading("What differs from " + res[0].Variant), heading("In " + res[0].Variant), heading("In this variant")}
	n := 0
	for _, r := range res[1:] {
		if !r.Compared {
			continue
		}
		n++
		if len(r.Differences) == 0 {
			cells = append(cells, widget.NewLabel(r.Variant), widget.NewLabel("the same layout"), widget.NewLabel(""), widget.NewLabel(""))
		}
		for _, d := range r.Differences {
			cells = append(cells, widget.NewLabel(r.Variant), widget.NewLabel(d.What), widget.NewLabel(d.From), widget.NewLabel(d.To))
		}
	}
	if n == 0 {
		return nil
	}
	return container.New(&tableLayout{cols: 4}, cells...)
}

// exportComparisonTo writes the comparison report of res to path in the
// background.
func (u *UI) exportComparisonTo(path string, res []export.VariantResult, es editor.ExportSettings) {
	write := u.jobs.ExportComparison
	u.runInBackground("Writing "+filepath.Base(path)+"…", func(ctx context.Context, _ func(string, float64)) error {
		return write(ctx, path, res, es)
	}, "Wrote "+path)
}

func (u *UI) showComparison(res []export.VariantResult, rules []string) {
	// Scrolls both ways: a long variant name widens the table rather
	// than being cut off.
	content := container.NewScroll(comparisonView(res, rules))
	var d *dialog.CustomDialog
	report := widget.NewButtonWithIcon("Export report…", theme.DocumentPrintIcon(), func() {
		u.withCaution("the comparison report", "report", func(es editor.ExportSettings) {
			u.chooseFile(safeFileName(u.Session.Design().Name)+"-variants.pdf", []string{".pdf", ".svg"}, func(path string) {
				u.exportComparisonTo(path, res, es)
			})
		})
	})
	closeBtn := widget.NewButton("Close", func() { d.Hide() })
	d = dialog.NewCustomWithoutButtons("Compare variants", container.New(&fixedSize{fyne.NewSize(1100, 560)}, content), u.Win)
	d.SetButtons([]fyne.CanvasObject{closeBtn, report})
	d.Show()
}

// tableLayout lays cells out in rows of cols, each column as wide as
// its widest cell (a grid gives every column the widest cell's width,
// which cuts a table with one long name off).
type tableLayout struct{ cols int }

func (t *tableLayout) sizes(objs []fyne.CanvasObject) (widths, heights []float32) {
	widths = make([]float32, t.cols)
	heights = make([]float32, (len(objs)+t.cols-1)/t.cols)
	for i, o := range objs {
		m := o.MinSize()
		widths[i%t.cols] = max(widths[i%t.cols], m.Width)
		heights[i/t.cols] = max(heights[i/t.cols], m.Height)
	}
	return widths, heights
}

func (t *tableLayout) Layout(objs []fyne.CanvasObject, size fyne.Size) {
	widths, heights := t.sizes(objs)
	pad := theme.Padding()
	var y float32
	for r, h := range heights {
		var x float32
		for c, w := range widths {
			if i := r*t.cols + c; i < len(objs) {
				objs[i].Move(fyne.NewPos(x, y))
				objs[i].Resize(fyne.NewSize(w, h))
			}
			x += w + pad
		}
		y += h
	}
}

func (t *tableLayout) MinSize(objs []fyne.CanvasObject) fyne.Size {
	widths, heights := t.sizes(objs)
	var w, h float32
	for _, x := range widths {
		w += x
	}
	for _, y := range heights {
		h += y
	}
	return fyne.NewSize(w+theme.Padding()*float32(max(len(widths)-1, 0)), h)
}

// fixedSize lays out its child at a fixed minimum size.
type fixedSize struct{ s fyne.Size }

func (f *fixedSize) Layout(objs []fyne.CanvasObject, size fyne.Size) {
	for _, o := range objs {
		o.Move(fyne.NewPos(0, 0))
		o.Resize(size)
	}
}

func (f *fixedSize) MinSize([]fyne.CanvasObject) fyne.Size { return f.s }
