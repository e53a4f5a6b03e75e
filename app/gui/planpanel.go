package gui

import (
	"fmt"
	"image/color"
	"math"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/canvas"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/theme"
	"fyne.io/fyne/v2/widget"

	"dimerpath/app/render"
	"dimerpath/internal/units"
	"dimerpath/planner"
)

// Colours of the time breakdown, shared by the plan panel and the
// comparison view.
var timeColours = map[planner.TimeKind]color.Color{
	planner.TimeAPWrite:      render.RGB(0xff, 0x9f, 0x1c),
	planner.TimeFEWrite:      render.RGB(0x2e, 0xc4, 0xf0),
	planner.TimeDwell:        render.RGB(0xe8, 0x43, 0x93),
	planner.TimeTravel:       render.RGB(0x9a, 0xa4, 0xb4),
	planner.TimeModeSwitch:   render.RGB(0x9b, 0x6c, 0xff),
	planner.TimeRegistration: render.RGB(0xff, 0xd2, 0x3f),
	planner.TimeVerification: render.RGB(0x1d, 0xd3, 0xb0),
	// The session around the writing.
	planner.TimeSurvey:        render.RGB(0x4c, 0x6e, 0xf5),
	planner.TimeConditioning:  render.RGB(0xc0, 0x8b, 0x5c),
	planner.TimeTipChange:     render.RGB(0xf0, 0x3e, 0x3e),
	planner.TimeRepair:        render.RGB(0xae, 0x3e, 0xc9),
	planner.TimeDocumentation: render.RGB(0x74, 0xb8, 0x16),
	planner.TimeDose:          render.RGB(0x15, 0xaa, 0xbf),
	planner.TimeAnneal:        render.RGB(0xd9, 0x48, 0x0f),
}

var colYield = render.RGB(0x51, 0xcf, 0x66)

// formatProbability prints a probability as a percentage, always: three
// significant digits ("61.1 %", "0.0312 %"), and below 0.001 % two
// digits times a power of ten ("8.1·10⁻⁵ %"), so a yield table never mixes
// raw probabilities ("8.1e-07") with percentages.
func formatProbability(p float64) string {
	pct := 100 * p
	switch {
	case math.IsNaN(p):
		return "—"
	case p == 0:
		return "0 %"
	case pct >= 1e-3:
		return trimZeros(fmt.Sprintf("%.3g", pct)) + " %"
	}
	e := int(math.Floor(math.Log10(pct)))
	m := pct / math.Pow(10, float64(e))
	if math.Round(m*10)/10 >= 10 { // 9.96 rounds to 10.0: one more power
		m, e = m/10, e+1
	}
	return trimZeros(fmt.Sprintf("%.1f", m)) + "·10" + superscript(e) + " %"
}

// formatProbabilityRange prints an interval of probabilities as
// percentages, "36.1 – 69.4 %"; where the probabilities underflow to 0
// it prints them from their log10 (units.ProbabilityRange).
func formatProbabilityRange(p, log10 [2]float64) string {
	if p[1] == 0 && !math.IsInf(log10[1], -1) {
		return units.ProbabilityRange(p, log10)
	}
	return strings.TrimSuffix(formatProbability(p[0]), " %") + " – " + formatProbability(p[1])
}

// superscript writes n in superscript digits: -5 as ⁻⁵.
func superscript(n int) string {
	digits := []rune("⁰¹²³⁴⁵⁶⁷⁸⁹")
	var b strings.Builder
	if n < 0 {
		b.WriteRune('⁻')
		n = -n
	}
	for _, c := range fmt.Sprint(n) {
		b.WriteRune(digits[c-'0'])
	}
	return b.String()
}

// breakdownBars returns the bars of a time breakdown.
func breakdownBars(b planner.Breakdown, total float64) []Bar {
	var bars []Bar
	for _, k := range planner.TimeKinds {
		s := b.Seconds(k)
		pct := 0.0
		if total > 0 {
			pct = 100 * s / total
		}
		bars = append(bars, Bar{Label: k.String(), Value: s, Text: fmt.Sprintf("%s  %.0f %%", units.Duration(s), pct), Color: timeColours[k]})
	}
	return bars
}

type planPanel struct {
	u       *UI
	content fyne.CanvasObject
	body    *fyne.Container
	scroll  *container.Scroll
	shown   *planner.Plan // the plan the body shows
}

func newPlanPanel(u *UI) *planPanel {
	p := &planPanel{u: u}
	p.body = container.NewVBox()
	replan := widget.NewButtonWithIcon("Plan", theme.MediaPlayIcon(), u.StartPlan)
	top := container.NewBorder(nil, nil, heading("Write plan"), replan)
	p.scroll = container.NewVScroll(p.body)
	p.content = container.NewBorder(top, nil, nil, nil, p.scroll)
	return p
}

func warningLabel(s string) *widget.Label {
	l := wrapLabel(s)
	l.Importance = widget.WarningImportance
	return l
}

func bigText(s string) fyne.CanvasObject {
	t := canvas.NewText(s, theme.Color(theme.ColorNameForeground))
	t.TextSize = theme.TextSize() * 1.8
	t.TextStyle.Bold = true
	return t
}

func (p *planPanel) refresh() {
	s := p.u.Session
	pl, stale := s.Plan()
	var objs []fyne.CanvasObject
	if pl == nil {
		objs = append(objs, mutedLabel(fmt.Sprintf("Variant %s has not been planned yet. Plan (Ctrl+Return) chooses the write modes, orders the strokes, splits the write into drift-safe segments and estimates the time and the dopant yield, in the background.", s.Variant().Name)))
		p.body.Objects = objs
		p.body.Refresh()
		return
	}
	if pl != p.shown {
		// A new plan is read from its total down.
		p.shown = pl
		defer p.scroll.ScrollToTop()
	}
	if stale {
		objs = append(objs, warningLabel("The design or profile changed since this plan was made: plan again for current figures."))
	}
	objs = append(objs,
		wrapLabel("Session time (mean of the Monte Carlo on this plan), variant "+pl.Variant),
		bigText(units.Duration(pl.TotalS)),
		wrapLabel(fmt.Sprintf("Spread  P10 %s · P50 %s · P90 %s", units.Duration(pl.P10S), units.Duration(pl.P50S), units.Duration(pl.P90S))),
		wrapLabel(fmt.Sprintf("Every stroke and coupled pair within tolerance: %s (sampled on this plan).", formatProbability(pl.PInTolerance))),
	)
	// What needs the user's attention comes before the details.
	if f, fstale := s.Findings(); !fstale {
		if errs, _ := countFindings(f); errs > 0 {
			objs = append(objs, warningLabel(fmt.Sprintf("Variant %s has %s (see Checks): the plan writes the design as drawn.", s.Variant().Name, plural(errs, "design-rule error"))))
		}
	}
	if !pl.Coverage.OK {
		l := wrapLabel(fmt.Sprintf("Coverage check FAILED: %d site(s) outside every region clear with more than %s; they are marked on the lattice (see Coverage below).",
			pl.Coverage.OverLimit, formatProbability(pl.Coverage.StrayLimit)))
		l.Importance = widget.DangerImportance
		objs = append(objs, l)
	}
	for _, w := range pl.Warnings {
		objs = append(objs, warningLabel("Warning: "+w))
	}
	objs = append(objs,
		widget.NewSeparator(),
		heading("Time by kind"),
		NewBarChart(breakdownBars(pl.Breakdown, pl.TotalS)),
	)
	if len(pl.Steps) > 0 {
		objs = append(objs, widget.NewSeparator(), heading("Process steps"))
		for i, st := range pl.Steps {
			objs = append(objs, wrapLabel(stepLine(i, st)))
		}
	}
	objs = append(objs,
		widget.NewSeparator(),
		heading("Dopant yield"),
	)
	y := pl.Yield
	if y.Windows == 0 {
		objs = append(objs, mutedLabel("No dopant windows in this variant."))
	} else {
		dev := "—"
		if y.DevicesPerPerfect > 0 {
			dev = fmt.Sprintf("%.1f", y.DevicesPerPerfect)
		} else if y.All == 0 {
			dev = "no number of devices suffices"
		}
		intervals := ""
		if y.All95[1] >= y.All && y.All95[1] > 0 {
			intervals = fmt.Sprintf(" (68 %% interval %s, 95 %% interval %s, from the templates' uncertainties)",
				formatProbabilityRange(y.All68, y.Log10All68), formatProbabilityRange(y.All95, y.Log10All95))
		}
		all := formatProbability(y.All)
		if y.All == 0 {
			all = units.Probability(y.All, y.Log10All)
		}
		objs = append(objs, wrapLabel(fmt.Sprintf("%d windows. Every window opened as drawn with exactly one donor: %s%s.\n"+
			"Good windows expected: %.1f of %d. Expected bad: %.2g without a donor, %.2g with two or more, %.2g not opened as drawn.\nDevices to write for one perfect device: %s.",
			y.Windows, all, intervals, y.MeanGood, y.Windows, y.ExpectedEmpty, y.ExpectedMultiple, y.ExpectedMisopened, dev)))
		for i, w := range pl.Windows {
			if i == 8 {
				objs = append(objs, mutedLabel(fmt.Sprintf("… and %d more windows (all in the exported plan).", len(pl.Windows)-8)))
				break
			}
			p1 := formatProbability(w.P1)
			if w.P1SD > 0 {
				p1 += " ± " + formatProbability(w.P1SD)
			}
			open := ""
			if w.OpenS > 0 {
				open = "; open " + units.Duration(w.OpenS) + " before its dose"
			}
			objs = append(objs, mutedLabel(fmt.Sprintf("%s window of %s at (%.1f, %.1f) nm: opened as drawn %s; p0 %s, p1 %s, p≥2 %s; good %s%s",
				w.Template, w.Region, w.At.X, w.At.Y, formatProbability(w.OpenProbability), formatProbability(w.P0), p1,
				formatProbability(w.P2Plus), formatProbability(w.Probability), open)))
		}
		if len(y.Distribution) > 1 {
			objs = append(objs, NewBarChart(yieldBars(y)))
		}
	}
	objs = append(objs, widget.NewSeparator(), heading("Segments and strokes"))
	local := 0
	for _, g := range pl.Segments {
		if g.Registration == planner.RegLocal {
			local++
		}
	}
	objs = append(objs, wrapLabel(fmt.Sprintf("%d drift-safe segments (%d registered on fiducials, %d on the lattice beside the work), %d strokes, %d tip actions. Profile: %s.",
		len(pl.Segments), len(pl.Segments)-local, local, len(pl.Strokes), len(pl.Actions), pl.Profile)))
	// Why the segments register as they do, one line per reason.
	for i, r := range pl.RegistrationReasons() {
		if i == maxReasonLines {
			objs = append(objs, mutedLabel("… and more reasons (each segment's is in the exported plan)."))
			break
		}
		nums := make([]int, len(r.Segments))
		for k, g := range r.Segments {
			nums[k] = g + 1
		}
		objs = append(objs, wrapLabel(fmt.Sprintf("%s registration, %s %s: %s", r.Kind, map[bool]string{true: "segments", false: "segment"}[len(nums) > 1], units.Ranges(nums, 8), r.Reason)))
	}
	for _, c := range pl.Couplings {
		objs = append(objs, wrapLabel(fmt.Sprintf("%s %s / %s ±%.2g nm: within tolerance %s.", c.Kind, c.A, c.B, c.ToleranceNM, formatProbability(c.PInTolerance))))
	}
	c := pl.Coverage
	objs = append(objs, widget.NewSeparator(), heading("Coverage (exposure model)"))
	cov := fmt.Sprintf("Passed: no site outside the regions clears with more than %s. Expected: %.3g of %d sites left with their H, %.3g stray sites cleared outside the regions.",
		formatProbability(c.StrayLimit), c.ExpectedMissed, c.Sites, c.ExpectedStray)
	if !c.OK {
		cov = fmt.Sprintf("FAILED: %d site(s) outside every region clear with more than %s. %s", c.OverLimit, formatProbability(c.StrayLimit), strings.Join(c.Issues, "; "))
	}
	cl := wrapLabel(cov)
	if !c.OK {
		cl.Importance = widget.DangerImportance
	}
	objs = append(objs, cl)
	for _, r := range c.Regions {
		pr := formatProbability(r.Probability)
		if r.Probability < 1e-4 {
			pr = units.Probability(r.Probability, r.Log10Probability)
		}
		objs = append(objs, mutedLabel(fmt.Sprintf("%s: %d sites, %.3g expected missed, %.3g stray (%.3g spurious), P(no error) %s",
			r.Region, r.Sites, r.ExpectedMissed, r.ExpectedStray, r.ExpectedSpurious, pr)))
	}
	if len(pl.Modes) > 0 {
		objs = append(objs, widget.NewSeparator(), heading("Write modes"))
		for _, m := range pl.Modes {
			objs = append(objs, wrapLabel(fmt.Sprintf("%s — %s: %s", m.Region, m.Mode.Abbrev(), m.Reason)))
		}
	}
	objs = append(objs, widget.NewSeparator(), mutedLabel(planner.Caution))
	p.body.Objects = objs
	p.body.Refresh()
}

// maxReasonLines is how many reasons for the kinds of registration the
// plan panel lists.
const maxReasonLines = 12

// stepLine describes one process step for the plan panel.
func stepLine(i int, st planner.Step) string {
	what := st.Note
	if st.Kind == planner.StepLithography {
		what = fmt.Sprintf("%s: %s", plural(len(st.Segments), "segment"), st.Note)
	}
	sp := ""
	if st.Species != "" {
		sp = " " + st.Species
	}
	return fmt.Sprintf("%d. %s%s, from %s for %s: %s", i+1, st.Kind, sp, units.Duration(st.StartS), units.Duration(st.DurationS), what)
}

// yieldBars shows the distribution of the number of good windows around
// its mean (at most 9 bars).
func yieldBars(y planner.Yield) []Bar {
	d := y.Distribution
	mode := 0
	for k := range d {
		if d[k] > d[mode] {
			mode = k
		}
	}
	lo := max(mode-4, 0)
	hi := min(lo+9, len(d))
	var bars []Bar
	for k := lo; k < hi; k++ {
		bars = append(bars, Bar{Label: fmt.Sprintf("%d good", k), Value: d[k], Text: formatProbability(d[k]), Color: colYield})
	}
	return bars
}
