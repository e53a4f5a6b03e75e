package gui

import (
	"context"
	"errors"
	"fmt"
	"math"
	"path/filepath"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/theme"
	"fyne.io/fyne/v2/widget"

	"dimerpath/app/editor"
	"dimerpath/export"
	"dimerpath/internal/chartaxis"
	"dimerpath/internal/units"
	"dimerpath/planner"
)

// The sweep form of the Variants tab: pick a parameter of the profile or
// an array of the variant shown, give its values, and plan the variant
// once per value on every core (planner.PlanSweep, through editor.Jobs);
// the result opens in a window of its own with the table and the charts,
// and can be exported as the same report the command line writes.

// sweepForm is the form's widgets.
type sweepForm struct {
	u      *UI
	box    *fyne.Container
	param  *widget.Select
	about  *widget.Label
	values *widget.Entry
	msg    *widget.Label
	run    *widget.Button
	params []planner.SweepParameter
}

func newSweepForm(u *UI) *sweepForm {
	f := &sweepForm{u: u}
	f.param = widget.NewSelect(nil, f.chosen)
	f.param.PlaceHolder = "(choose a parameter)"
	f.about = mutedLabel("")
	f.values = widget.NewEntry()
	f.values.SetPlaceHolder("values, such as 0.05,0.1,0.2")
	f.msg = widget.NewLabel("")
	f.msg.Wrapping = fyne.TextWrapWord
	f.msg.Importance = widget.DangerImportance
	f.msg.Hide()
	f.run = widget.NewButtonWithIcon("Sweep", theme.MediaPlayIcon(), f.start)
	help := mutedLabel("Plan the variant shown once for each value of one parameter, on every core, and chart the write time and yield against it.")
	f.box = container.NewVBox(widget.NewSeparator(), heading("Sweep a parameter"), help,
		f.param, f.about, f.values, f.msg, f.run)
	return f
}

// refresh lists the parameters of the variant shown and the profile.
func (f *sweepForm) refresh() {
	s := f.u.Session
	f.params = editor.SweepParameters(s.Design(), s.Variant().Name, s.Profile)
	names := make([]string, len(f.params))
	for i, p := range f.params {
		names[i] = p.Name
	}
	chosen := f.param.Selected
	f.param.Options = names
	f.param.Refresh()
	if chosen != "" && !containsString(names, chosen) {
		f.param.ClearSelected()
		f.about.SetText("")
	}
}

func containsString(list []string, s string) bool {
	for _, v := range list {
		if v == s {
			return true
		}
	}
	return false
}

// chosen fills the values with suggestions for the parameter picked.
func (f *sweepForm) chosen(name string) {
	s := f.u.Session
	for _, p := range f.params {
		if p.Name != name {
			continue
		}
		switch {
		case p.Array != nil:
			f.about.SetText(fmt.Sprintf("Array of region %s: columns x rows (or N for N x N); %s now.", p.Array.Region, p.Current))
		case p.Unit != "":
			f.about.SetText(fmt.Sprintf("In %s; the profile has %s.", p.Unit, p.Current))
		default:
			f.about.SetText(fmt.Sprintf("The profile has %s.", p.Current))
		}
		f.values.SetText(editor.SuggestSweepValues(s.Design(), s.Variant().Name, s.Profile, p))
	}
	f.msg.Hide()
}

// start checks the form and plans the sweep in the background; a refused
// parameter or value is shown in the form and nothing is planned.
func (f *sweepForm) start() {
	u := f.u
	if u.Busy() {
		dialog.ShowInformation("Busy", "Wait for the running job to finish, or cancel it.", u.Win)
		return
	}
	s := u.Session
	param := f.param.Selected
	var values []string
	for _, v := range strings.Split(f.values.Text, ",") {
		if v = strings.TrimSpace(v); v != "" {
			values = append(values, v)
		}
	}
	if param == "" {
		f.show("Choose a parameter first.")
		return
	}
	d, variant, prof := s.DesignCopy(), s.Variant().Name, s.Profile
	if err := editor.CheckSweep(d, variant, prof, param, values); err != nil {
		f.show(sweepMessage(err))
		return
	}
	f.msg.Hide()
	ctx, cancel := context.WithCancel(context.Background())
	u.planCancel = cancel
	u.planButton.Disable()
	f.run.Disable()
	u.showProgress("Sweeping "+param+"…", 0)
	opt := planner.SweepOptions{Options: planner.Options{Seed: u.opts.Seed, Progress: u.progressFunc("", 1, 0)}}
	sweep := u.jobs.Sweep
	go func() {
		var sw *planner.Sweep
		err := editor.Guard(func() (err error) {
			sw, err = sweep(ctx, d, variant, prof, param, values, opt)
			return err
		})
		fyne.Do(func() { f.done(sw, err) })
	}()
}

func (f *sweepForm) show(msg string) {
	f.msg.SetText(msg)
	f.msg.Show()
}

// sweepMessage is a refused sweep's message for the form: the problems,
// one a line, without the error's own heading.
func sweepMessage(err error) string {
	var se *planner.SweepError
	if errors.As(err, &se) {
		return strings.Join(se.Problems, "\n")
	}
	return err.Error()
}

func (f *sweepForm) done(sw *planner.Sweep, err error) {
	u := f.u
	if u.jobDone != nil {
		defer u.jobDone()
	}
	defer u.recoverUI("Showing the sweep")
	u.planCancel = nil
	u.planButton.Enable()
	f.run.Enable()
	u.hideProgress()
	switch {
	case errors.Is(err, context.Canceled):
		u.hintLabel.SetText("Sweep cancelled.")
	case errors.Is(err, planner.ErrSweep):
		f.show(sweepMessage(err))
	case err != nil:
		u.showJobError("Sweeping "+f.param.Selected, err)
	default:
		u.showSweep(sw)
		for _, pt := range sw.Points {
			if _, bug := editor.BugDetails(pt.Err); bug {
				u.showJobError(fmt.Sprintf("Planning %s = %s for the sweep", sw.Param.Name, pt.Value), pt.Err)
				break
			}
		}
	}
}

// sweepView is the sweep's table and its two charts.
func sweepView(sw *planner.Sweep) fyne.CanvasObject {
	rows := export.SweepRows(sw)
	cols := len(rows[0])
	var cells []fyne.CanvasObject
	for _, h := range rows[0] {
		cells = append(cells, heading(h))
	}
	for _, r := range rows[1:] {
		if len(r) == 2 {
			cells = append(cells, widget.NewLabel(r[0]))
			l := widget.NewLabel(r[1])
			l.Importance = widget.DangerImportance
			cells = append(cells, l)
			for k := 2; k < cols; k++ {
				cells = append(cells, widget.NewLabel(""))
			}
			continue
		}
		for _, c := range r {
			cells = append(cells, widget.NewLabel(c))
		}
	}
	parts := []fyne.CanvasObject{container.New(&tableLayout{cols: cols}, cells...)}
	for _, w := range sw.Warnings {
		parts = append(parts, mutedLabel("Note: "+w))
	}
	if tc := sweepTimeChart(sw); tc != nil {
		parts = append(parts, widget.NewSeparator(), heading("Write time: expected, median and the P10–P90 band"), tc)
	}
	if yc := sweepYieldChart(sw); yc != nil {
		parts = append(parts, widget.NewSeparator(), heading("Chance every window takes one donor"), yc)
	}
	return container.NewVBox(append(parts, widget.NewSeparator(), mutedLabel(planner.Caution))...)
}

// sweepPlanned returns the planned points in the order of their axis
// values, with those values in the axis's display unit.
func sweepPlanned(sw *planner.Sweep) ([]float64, []*planner.Plan) {
	type pt struct {
		x float64
		p *planner.Plan
	}
	var pts []pt
	for _, p := range sw.Points {
		if p.Plan != nil {
			pts = append(pts, pt{sw.Param.DisplayValue(p.X), p.Plan})
		}
	}
	for i := 1; i < len(pts); i++ {
		for j := i; j > 0 && pts[j].x < pts[j-1].x; j-- {
			pts[j], pts[j-1] = pts[j-1], pts[j]
		}
	}
	xs := make([]float64, len(pts))
	plans := make([]*planner.Plan, len(pts))
	for i, p := range pts {
		xs[i], plans[i] = p.x, p.p
	}
	return xs, plans
}

func axisNumber(v float64) string {
	if math.Abs(v) >= 1e4 || (v != 0 && math.Abs(v) < 1e-3) {
		return fmt.Sprintf("%.3g", v)
	}
	return fmt.Sprintf("%.4g", v)
}

func sweepTimeChart(sw *planner.Sweep) fyne.CanvasObject {
	xs, plans := sweepPlanned(sw)
	if len(plans) == 0 {
		return nil
	}
	s := LineSeries{X: xs}
	lo, hi := math.Inf(1), 0.0
	for _, p := range plans {
		s.Y = append(s.Y, p.TotalS)
		s.Second = append(s.Second, p.P50S)
		s.Lo = append(s.Lo, p.P10S)
		s.Hi = append(s.Hi, p.P90S)
		lo, hi = math.Min(lo, math.Min(p.P10S, p.TotalS)), math.Max(hi, math.Max(p.P90S, p.TotalS))
	}
	xa := chartaxis.ForValues(xs)
	ya := chartaxis.ForTimes(lo, hi, xa.Log)
	title := sw.Param.Axis()
	if xa.Log {
		title += ", logarithmic"
	}
	if ya.Log {
		title += "; time logarithmic"
	}
	return NewLineChart(s, xa, ya, axisNumber, units.Clock, title)
}

func sweepYieldChart(sw *planner.Sweep) fyne.CanvasObject {
	xs, plans := sweepPlanned(sw)
	var kept []*planner.Plan
	var s LineSeries
	var logs []float64
	for i, p := range plans {
		if p.Yield.Windows > 0 {
			kept = append(kept, p)
			s.X = append(s.X, xs[i])
			logs = append(logs, p.Yield.Log10All)
		}
	}
	if len(kept) == 0 {
		return nil
	}
	xa := chartaxis.ForValues(s.X)
	ya, ofLog := chartaxis.ForProbabilities(logs)
	label := axisNumber
	for _, p := range kept {
		if ofLog {
			s.Y = append(s.Y, p.Yield.Log10All)
		} else {
			s.Y = append(s.Y, p.Yield.All)
		}
	}
	if ofLog {
		label = func(l float64) string { return fmt.Sprintf("1e%d", int(math.Round(l))) }
	}
	title := sw.Param.Axis()
	if xa.Log {
		title += ", logarithmic"
	}
	if ofLog {
		title += "; probability logarithmic"
	}
	return NewLineChart(s, xa, ya, axisNumber, label, title)
}

// showSweep opens the sweep's result in a dialog with its report.
func (u *UI) showSweep(sw *planner.Sweep) {
	content := container.NewScroll(sweepView(sw))
	var d *dialog.CustomDialog
	report := widget.NewButtonWithIcon("Export report…", theme.DocumentPrintIcon(), func() {
		u.withCaution("the sweep report", "report", func(es editor.ExportSettings) {
			name := safeFileName(u.Session.Design().Name) + "-sweep-" + safeFileName(sw.Param.Name) + ".pdf"
			u.chooseFile(name, []string{".pdf", ".svg"}, func(path string) {
				write := u.jobs.ExportSweep
				u.runInBackground("Writing "+filepath.Base(path)+"…", func(ctx context.Context, _ func(string, float64)) error {
					return write(ctx, path, sw, es)
				}, "Wrote "+path)
			})
		})
	})
	closeBtn := widget.NewButton("Close", func() { d.Hide() })
	title := fmt.Sprintf("Sweep of %s: variant %s", sw.Param.Name, sw.Variant)
	d = dialog.NewCustomWithoutButtons(title, container.New(&fixedSize{fyne.NewSize(1000, 620)}, content), u.Win)
	d.SetButtons([]fyne.CanvasObject{closeBtn, report})
	d.Show()
}
