package export

import (
	"context"
	"fmt"
	"io"
	"maps"
	"math"
	"slices"
	"strconv"
	"strings"

	"github.com/golang/geo/r2"

	"dimerpath/lattice/design"
	"dimerpath/planner"
)

// WritePDF writes the operator's printed plan of p to w on opt.Paper: a
// cover with the design, variant, date, instrument profile, conditions
// and the caution; the pattern with the route, numbered segments,
// fiducials and a scale bar; the segment table with a tick box per
// segment (its header repeated on every page); the time breakdown, its
// P10/P50/P90 spread and the dopant yield; and a zoomed figure of every
// atomic-precision area (up to maxZoomAreas), with the lattice drawn
// when opt.Pattern is set. Every page carries the caution and its page
// number. Only grey levels, hatching and line styles tell things apart,
// so the plan prints in black and white. It returns ctx.Err() when
// cancelled. O(strokes + actions + region runs).
func WritePDF(ctx context.Context, w io.Writer, p *planner.Plan, opt Options) error {
	if err := checkPlan(p); err != nil {
		return err
	}
	sc := newScene(p, opt.Pattern)
	sc.summary = true // on paper, a huge plan is summarised (bigplan.go)
	header := fmt.Sprintf("dimerpath write plan · variant %s · %s", p.Variant, p.Design)
	d := newPDFDoc(opt.Paper, header, opt, fmt.Sprintf("Write plan: %s, variant %s", p.Design, p.Variant))

	steps := []struct {
		name string
		fn   func() error
	}{
		{"cover", func() error { pdfCover(d, p, opt); return nil }},
		{"overview", func() error {
			pdfOverview(d, sc, sc.field(), "Pattern and route")
			if win, ok := deviceArea(sc); ok {
				pdfOverview(d, sc, win, "Device area: the atomic-precision part")
			}
			return nil
		}},
		{"steps", func() error { pdfSteps(d, p); return nil }},
		{"segments", func() error {
			if err := pdfSegments(ctx, d, p, sc.number); err != nil {
				return err
			}
			return pdfStrokeList(ctx, d, p, sc.number)
		}},
		{"estimates", func() error { pdfEstimates(d, p); pdfCoverage(d, p); return nil }},
		{"atomic-precision areas", func() error {
			return pdfZooms(ctx, d, sc, func(f float64) { opt.progress("pdf: atomic-precision areas", (5+f)/6) })
		}},
	}
	for i, s := range steps {
		if err := ctx.Err(); err != nil {
			return err
		}
		opt.progress("pdf: "+s.name, float64(i)/float64(len(steps)))
		if err := s.fn(); err != nil {
			return err
		}
	}
	opt.progress("pdf: writing", 1)
	return d.output(w)
}

func pdfCover(d *pdfDoc, p *planner.Plan, opt Options) {
	d.page()
	c := d.c
	c.text(vec{d.left(), d.y + 8}, "Write plan", font{size: 24, bold: true}, anchorStart, tag{})
	d.y += 14
	for _, l := range wrapText(c, p.Design, font{size: 16, bold: true}, d.width()) {
		c.text(vec{d.left(), d.y + 6}, l, font{size: 16, bold: true}, anchorStart, tag{})
		d.y += 7.5
	}
	d.y += 3
	date := "(not given)"
	if !opt.Date.IsZero() {
		date = opt.Date.Format("Monday 2 January 2006")
	}
	rows := [][2]string{
		{"Variant", p.Variant},
		{"Date", date},
		{"Instrument profile", p.Profile},
		{"Field", fmt.Sprintf("%s × %s nm", sig(p.FieldWidthNM, 6), sig(p.FieldHeightNM, 6))},
		{"Plan seed", strconv.FormatInt(p.Seed, 10)},
	}
	if opt.Generator != "" {
		rows = append(rows, [2]string{"Planned with", opt.Generator})
	}
	d.keyValues(rows, 0.28)
	d.cautionBox()
	if !p.Coverage.OK {
		d.errorBox("COVERAGE ERROR: do not write this plan as it stands", coverageErrorLines(p))
	}

	d.heading("At a glance", 30)
	fids := map[string]bool{}
	var fidNames []string
	local := 0
	for _, s := range p.Segments {
		if s.Registration == planner.RegLocal {
			local++
			continue
		}
		if !fids[s.Fiducial] {
			fids[s.Fiducial] = true
			fidNames = append(fidNames, s.Fiducial)
		}
	}
	species := map[string]int{}
	for _, w := range p.Windows {
		species[w.Species]++
	}
	var sp []string
	for _, k := range slices.Sorted(maps.Keys(species)) {
		sp = append(sp, fmt.Sprintf("%s: %s", k, thousands(species[k])))
	}
	windows := thousands(len(p.Windows))
	if len(sp) > 0 {
		windows += " (" + strings.Join(sp, ", ") + ")"
	}
	cov := coverageLine(p.Coverage)
	glance := [][2]string{
		{"Session time", fmt.Sprintf("%s (%s) on average over the Monte Carlo samples of this plan; the schedule below runs %s", clock(p.TotalS), duration(p.TotalS), clock(p.ScheduleS))},
		{"Process", processLine(p)},
		{"Against the floor and by hand", floorLine(p)},
		{"Spread", fmt.Sprintf("P10 %s · P50 %s · P90 %s", clock(p.P10S), clock(p.P50S), clock(p.P90S))},
		{"Within tolerance", withinLine(p)},
		{"Segments", segmentsLine(len(p.Segments), fidNames, local)},
		{"Strokes", fmt.Sprintf("%s: %s", thousands(len(p.Strokes)), strokeSummary(p))},
		{"Tip actions", thousands(len(p.Actions))},
		{"Dopant windows", windows},
	}
	if len(p.Windows) > 0 {
		glance = append(glance,
			[2]string{"All windows good", fmt.Sprintf("%s (opened as drawn and holding exactly one donor; %s)", allGood(p.Yield), intervals(p.Yield))},
			[2]string{"Good windows", meanGood(p.Yield)},
			[2]string{"Bad windows expected", badWindows(p.Yield)},
			[2]string{"Devices per perfect one", devicesPerPerfect(p.Yield)},
		)
	}
	glance = append(glance, [2]string{"Coverage check", cov})
	d.keyValues(glance, 0.28)

	d.heading("Tip conditions", 25)
	t := newTable(d, fontBody,
		tableColumn{title: "Mode", share: 25},
		tableColumn{title: "Bias (V)", share: 8, right: true},
		tableColumn{title: "Setpoint (nA)", share: 10, right: true},
		tableColumn{title: "Line dose (mC/cm)", share: 10, right: true},
		tableColumn{title: "Speed (nm/s) or dwell per point", share: 14, right: true},
		tableColumn{title: "Line width (nm)", share: 10, right: true},
		tableColumn{title: "Passes", share: 7, right: true},
		tableColumn{title: "Pitch (nm)", share: 8, right: true},
	)
	t.start()
	hasDwell := false
	for _, cd := range p.Conditions {
		if cd.Kind == planner.StrokeDwell || (cd.SpeedNMPerS == 0 && cd.DwellS > 0) {
			// Parking on single sites: no speed, dose or width, a dwell time.
			hasDwell = true
			dwell := "dwell " + duration(cd.DwellS)
			if cd.DwellCapS > 0 {
				dwell += "\nat most " + duration(cd.DwellCapS)
			}
			t.row(cd.Mode.Label()+", dwell points", signedV(cd.BiasV), nanoAmps(cd.CurrentA), "–", dwell, "–", "–", "–")
			continue
		}
		pitch := "–"
		if cd.PitchNM > 0 {
			pitch = nm2(cd.PitchNM)
		}
		name := cd.Mode.Label()
		if cd.Kind != "" {
			name += ", " + plural(kindNoun(cd.Kind), 2)
		}
		t.row(name, signedV(cd.BiasV), nanoAmps(cd.CurrentA), milliCoulombPerCm(cd.LineDoseCPerCm),
			sig(cd.SpeedNMPerS, 4), nm2(cd.LineWidthNM), strconv.Itoa(cd.Passes), pitch)
	}
	if !hasDwell {
		// An older plan without dwell conditions: take them from the actions.
		for _, g := range dwellConditions(p) {
			t.row(g.mode.Label()+", dwell points", signedV(g.bias), nanoAmps(g.current), "–", "dwell "+duration(g.dwell), "–", "–", "–")
		}
	}
	t.end()

	d.heading("Regions and write modes", 25)
	t = newTable(d, fontBody,
		tableColumn{title: "Region", share: 16},
		tableColumn{title: "Role", share: 9},
		tableColumn{title: "Drawn as", share: 9},
		tableColumn{title: "Planned", share: 9},
		tableColumn{title: "Sites", share: 9, right: true},
		tableColumn{title: "Why", share: 48},
	)
	t.start()
	for _, m := range p.Modes {
		t.row(m.Region, m.Role.Name(), m.Requested.Abbrev(), m.Mode.Abbrev(), thousands(m.Sites), m.Reason)
	}
	t.end()

	if len(p.Warnings) > 0 || len(p.Coverage.Issues) > 0 {
		d.heading("Warnings", 12)
		for _, s := range p.Warnings {
			d.para("• "+s, fontBody)
		}
		for _, s := range p.Coverage.Issues {
			d.para("• coverage: "+s, fontBody)
		}
	}
	d.y += 2
	d.para("Segments are numbered from 1 on paper (from 0 in the JSON and CSV exports). Strokes are numbered from 1 in the order "+
		"they are written; the JSON and CSV exports give that number beside each stroke's id, which counts from 0 in the order the planner made them. "+
		"Positions are field coordinates in nm, origin at the lower-left corner of the scan field. "+
		"Times are on the plan clock, from the start of the session.", font{size: 7.5, grey: 0.25})
}

// coverageLine says in one line what the coverage expectation found.
func coverageLine(c planner.Coverage) string {
	s := fmt.Sprintf("%s of %s sites expected to keep their H, %s stray sites expected outside the regions",
		sig(c.ExpectedMissed, 3), thousands(c.Sites), sig(c.ExpectedStray, 3))
	if !c.OK {
		return fmt.Sprintf("FAILED: %s site(s) outside every region clear with more than %s (see the box above); %s", thousands(c.OverLimit), percent(c.StrayLimit), s)
	}
	return fmt.Sprintf("passed: no site outside the regions clears with more than %s; %s (exposure model)", percent(c.StrayLimit), s)
}

// coverageErrorLines lists what the coverage check found wrong, for the
// first page.
func coverageErrorLines(p *planner.Plan) []string {
	c := p.Coverage
	numbers := StrokeNumbers(p)
	lines := []string{fmt.Sprintf("%s site(s) outside every region, beyond the edge allowance, clear with a probability above the %s limit. "+
		"The strokes that reach them are named below; change the design or the profile and plan again.", thousands(c.OverLimit), percent(c.StrayLimit))}
	for i, s := range c.StraySites {
		if i == 8 {
			lines = append(lines, fmt.Sprintf("… and %s more (all of them in the plan file's coverage.stray_sites)", thousands(c.OverLimit-8)))
			break
		}
		who := "no stroke known"
		if s.Stroke >= 0 && s.Stroke < len(numbers) {
			who = fmt.Sprintf("stroke %d (writing order) of region %s", numbers[s.Stroke], s.Region)
		}
		lines = append(lines, fmt.Sprintf("• site %v at (%s, %s) nm: %s, from %s", s.Site, sig(s.At.X, 6), sig(s.At.Y, 6), percent(s.Probability), who))
	}
	if len(c.Issues) > 0 {
		lines = append(lines, "What to do: "+c.Issues[0][strings.Index(c.Issues[0], ": ")+2:])
	}
	return lines
}

// intervals formats the 68 % and 95 % intervals of P(all good).
func intervals(y planner.Yield) string {
	return fmt.Sprintf("68 %%: %s, 95 %%: %s from the templates' uncertainties", probabilityRange(y.All68, y.Log10All68), probabilityRange(y.All95, y.Log10All95))
}

// probabilityRange formats an interval of P(all good), "0.361–0.694",
// by its log10 where the probabilities underflow.
func probabilityRange(iv, log10 [2]float64) string {
	if iv[1] == 0 && !math.IsInf(log10[1], -1) {
		return pow10(log10[0]) + "–" + pow10(log10[1])
	}
	return probability(iv[0]) + "–" + probability(iv[1])
}

// badWindows formats the expected numbers of windows that go wrong.
func badWindows(y planner.Yield) string {
	return fmt.Sprintf("%s without a donor, %s with two or more, %s not opened as drawn", sig(y.ExpectedEmpty, 3), sig(y.ExpectedMultiple, 3), sig(y.ExpectedMisopened, 3))
}

func segmentsLine(n int, fiducials []string, local int) string {
	var parts []string
	if len(fiducials) > 0 {
		parts = append(parts, fmt.Sprintf("%s on fiducials (%s)", thousands(n-local), listShort(fiducials, 8)))
	}
	if local > 0 {
		parts = append(parts, fmt.Sprintf("%s on the lattice and written features beside the work", thousands(local)))
	}
	if len(parts) == 0 {
		return thousands(n)
	}
	return fmt.Sprintf("%s: %s", thousands(n), strings.Join(parts, ", "))
}

// withinLine states the probability of staying within tolerance.
func withinLine(p *planner.Plan) string {
	if len(p.Steps) == 0 {
		return "not estimated (a plan file of version 1, before the session model)"
	}
	return fmt.Sprintf("%s: the probability that every stroke and coupled pair stays within its tolerance, sampled on this plan", probability(p.PInTolerance))
}

// processLine names the lithography steps in order.
func processLine(p *planner.Plan) string {
	var species []string
	for _, st := range p.Steps {
		if st.Kind == planner.StepLithography && st.Species != "" {
			species = append(species, st.Species)
		}
	}
	if len(p.Steps) == 0 {
		return "not planned (a plan file of version 1, before the process steps)"
	}
	if len(species) == 0 {
		return "one lithography step, no dose"
	}
	return fmt.Sprintf("%s: %s, each followed by its dose and incorporation anneal (an open window takes any precursor)",
		plural("lithography step", len(species)), strings.Join(species, ", then "))
}

// pdfSteps prints the process steps on a page of their own, before the
// segment tables: what the operator does, in order, with a tick box.
func pdfSteps(d *pdfDoc, p *planner.Plan) {
	if len(p.Steps) == 0 {
		return
	}
	d.page()
	d.heading("Process steps", 0)
	d.para("An open dangling-bond window takes whichever precursor reaches it first, so each dopant species is written in a "+
		"lithography step of its own, dosed, and incorporated by an anneal before the next is written. Within a step the "+
		"dopant windows are written last, to stay open as short a time as possible before the dose. Tick each step when done; "+
		"the segment tables that follow list each lithography step's segments.", fontBody)
	t := newTable(d, fontBody,
		tableColumn{title: "Done", share: 6},
		tableColumn{title: "Step", share: 5, right: true},
		tableColumn{title: "Kind", share: 12},
		tableColumn{title: "Species", share: 8},
		tableColumn{title: "Starts at (h:mm:ss)", share: 11, right: true},
		tableColumn{title: "Takes (h:mm:ss)", share: 11, right: true},
		tableColumn{title: "What", share: 47},
	)
	t.start()
	for i, st := range p.Steps {
		what := st.Note
		if st.Kind == planner.StepLithography {
			first, last := 0, 0
			if len(st.Segments) > 0 {
				first, last = st.Segments[0]+1, st.Segments[len(st.Segments)-1]+1
			}
			what = fmt.Sprintf("segments %d–%d: %s", first, last, st.Note)
			if first == last {
				what = fmt.Sprintf("segment %d: %s", first, st.Note)
			}
		}
		top, _ := t.row("", strconv.Itoa(i+1), string(st.Kind), st.Species, clock(st.StartS), clock(st.DurationS), what)
		d.tickBox(t.colX(0)+1.6, top+1.2, 3.6)
	}
	t.end()
	if len(p.Windows) > 0 {
		longest := 0.0
		for _, w := range p.Windows {
			longest = math.Max(longest, w.OpenS)
		}
		d.para(fmt.Sprintf("The dopant windows stay open at most %s between the end of their write and the start of their dose.", duration(longest)), fontBody)
	}
}

// dwellGroup is one set of dwell conditions used by the plan.
type dwellGroup struct {
	mode    design.Mode
	bias    float64
	current float64
	dwell   float64 // mean dwell time per point, s
	n       int
}

func dwellConditions(p *planner.Plan) []dwellGroup {
	var out []dwellGroup
	for _, a := range p.Actions {
		if a.Kind != planner.ActDwell {
			continue
		}
		found := false
		for i := range out {
			g := &out[i]
			if g.mode == a.Mode && g.bias == a.BiasV && g.current == a.CurrentA {
				g.dwell += a.DurationS
				g.n++
				found = true
				break
			}
		}
		if !found {
			out = append(out, dwellGroup{mode: a.Mode, bias: a.BiasV, current: a.CurrentA, dwell: a.DurationS, n: 1})
		}
	}
	for i := range out {
		out[i].dwell /= float64(out[i].n)
	}
	return out
}

// pdfOverview draws the field window win on a page of its own: the
// whole field, or the device area.
func pdfOverview(d *pdfDoc, sc *scene, win r2.Rect, title string) {
	p := sc.plan
	d.page()
	d.heading(title, 0)
	m := &measureCanvas{unit: 1, metrics: sansMetrics()}
	legend := overviewLegend(m, sc, 1)
	legendH := drawLegend(m, legend, vec{}, d.width())
	// room below the field: axis labels, scale bar, legend, caption
	below := 12 + 7 + legendH + 12
	d.y += 5 // room for the y axis title
	dev := box{d.left() + 12, d.y, d.width() - 12, d.remains() - below}
	if win != sc.field() {
		win = insideField(withAspect(win, dev), sc.field())
	}
	v := fitView(win, dev)
	// Centre the field on the page width, keeping room for the y labels.
	fr := v.frame()
	v.origin.y = d.y
	v.origin.x = d.left() + 12 + (d.width()-12-fr.w)/2
	res := drawOverview(d.c, sc, v)
	fr = v.frame()
	if dev, ok := deviceArea(sc); ok && win == sc.field() {
		// Mark the device area shown on the next page.
		b := v.box(dev)
		d.c.rect(b, pen{width: 0.3, dash: []float64{1, 1}}, noPaint, tag{})
		d.c.text(vec{b.right() + 1.5, b.y + 2.5}, "device area,", fontSmall, anchorStart, tag{})
		d.c.text(vec{b.right() + 1.5, b.y + 5.5}, "next page", fontSmall, anchorStart, tag{})
	}
	y := fr.bottom() + 12
	drawScaleBar(d.c, v, vec{d.left(), y}, fr.w/4)
	if res.unlabelled > 0 {
		d.c.text(vec{d.left() + d.width(), y + 1.2}, fmt.Sprintf("%d segment numbers left out for lack of room (all are in the table)", res.unlabelled),
			fontSmall, anchorEnd, tag{})
	}
	y += 7
	y += drawLegend(d.c, legend, vec{d.left(), y}, d.width())
	d.y = y + 2
	what := fmt.Sprintf("Field %s × %s nm.", sig(p.FieldWidthNM, 6), sig(p.FieldHeightNM, 6))
	if win != sc.field() {
		what = fmt.Sprintf("x %s to %s nm, y %s to %s nm of the %s × %s nm field.", nm1(win.X.Lo), nm1(win.X.Hi), nm1(win.Y.Lo), nm1(win.Y.Hi),
			sig(p.FieldWidthNM, 6), sig(p.FieldHeightNM, 6))
	}
	moves := " Moves are drawn straight from point to point."
	marks := "the number at each segment marks where its first stroke starts."
	if sc.summarised() {
		moves = summaryNote(sc)
		marks = fmt.Sprintf("segments 1, %d, %d, … (every %s) are numbered where their first stroke starts.", sc.segmentLabelStep()+1, 2*sc.segmentLabelStep()+1, ordinal(sc.segmentLabelStep()))
	}
	d.para(what+fmt.Sprintf(" %s strokes in %s segments; %s%s", thousands(len(p.Strokes)), thousands(len(p.Segments)), marks, moves), font{size: 7.5, grey: 0.25})
}

// insideField shifts win, where it is smaller than the field, so that it
// lies inside the field.
func insideField(win, field r2.Rect) r2.Rect {
	shift := func(lo, hi, flo, fhi float64) float64 {
		switch {
		case hi-lo > fhi-flo:
			return 0
		case lo < flo:
			return flo - lo
		case hi > fhi:
			return fhi - hi
		}
		return 0
	}
	d := r2.Point{X: shift(win.X.Lo, win.X.Hi, field.X.Lo, field.X.Hi), Y: shift(win.Y.Lo, win.Y.Hi, field.Y.Lo, field.Y.Hi)}
	return r2.RectFromPoints(win.Lo().Add(d), win.Hi().Add(d))
}

// condGroup is one line of a segment's table row: the strokes written
// with one set of tip conditions.
type condGroup struct {
	mode    design.Mode
	dwell   bool
	bias    float64
	current float64
	speed   float64
	time    float64 // s, all its strokes
	kinds   []planner.StrokeKind
}

// segmentGroups returns the condition sets of segment seg, in order of
// first use, from its actions p.Actions[first:last]. Their number is the
// number of distinct tip conditions, however many strokes alternate.
func segmentGroups(p *planner.Plan, seg int, first, last int) []condGroup {
	var out []condGroup
	for _, a := range p.Actions[first:last] {
		if a.Segment != seg || (a.Kind != planner.ActWrite && a.Kind != planner.ActDwell) {
			continue
		}
		dwell := a.Kind == planner.ActDwell
		speed := a.SpeedNMPS
		if dwell {
			speed = 0
		}
		k := slices.IndexFunc(out, func(g condGroup) bool {
			return g.mode == a.Mode && g.dwell == dwell && g.bias == a.BiasV && g.current == a.CurrentA && g.speed == speed
		})
		if k < 0 {
			out = append(out, condGroup{mode: a.Mode, dwell: dwell, bias: a.BiasV, current: a.CurrentA, speed: speed})
			k = len(out) - 1
		}
		g := &out[k]
		g.kinds = append(g.kinds, p.Strokes[a.Stroke].Kind)
		g.time += a.DurationS
	}
	return out
}

// kindCounts formats a group's strokes as "12 line, 2 outline".
func (g condGroup) kindCounts() string {
	var parts []string
	for _, k := range []planner.StrokeKind{planner.StrokeLine, planner.StrokeDwell, planner.StrokeRaster, planner.StrokeOutline} {
		if n := countOf(g.kinds, k); n > 0 {
			parts = append(parts, fmt.Sprintf("%d %s", n, k))
		}
	}
	return strings.Join(parts, ", ")
}

// segmentNumbers returns the paper numbers of a segment's strokes.
func segmentNumbers(s *planner.Segment, numbers []int) []int {
	out := make([]int, len(s.Strokes))
	for k, id := range s.Strokes {
		out[k] = numbers[id]
	}
	return out
}

// segmentTable is the segments of one lithography step, printed as one
// table under its title.
type segmentTable struct {
	title string
	segs  []int
}

// segmentTables returns one table per lithography step (a plan without
// steps: one table of every segment, untitled).
func segmentTables(p *planner.Plan) []segmentTable {
	var groups []segmentTable
	for i, st := range p.Steps {
		if st.Kind == planner.StepLithography && len(st.Segments) > 0 {
			title := fmt.Sprintf("Step %d: lithography %s", i+1, st.Species)
			if st.Species == "" {
				title = fmt.Sprintf("Step %d: lithography", i+1)
			}
			groups = append(groups, segmentTable{title, st.Segments})
		}
	}
	if len(groups) == 0 {
		all := make([]int, len(p.Segments))
		for i := range all {
			all[i] = i
		}
		groups = []segmentTable{{"", all}}
	}
	return groups
}

func pdfSegments(ctx context.Context, d *pdfDoc, p *planner.Plan, numbers []int) error {
	if len(p.Segments) > maxSegmentRows {
		return pdfSegmentRanges(ctx, d, p, numbers)
	}
	d.page()
	d.heading("Segments", 0)
	d.para("Write the segments in order, one table per lithography step. For each: register (coarse: move to the fiducial, image it "+
		"and correct the offset; local: image the lattice and the features already written beside the first stroke and correct the offset), "+
		"then write its strokes in order of their numbers from the start position (the stroke list below gives each one; "+
		"the figures show each number at its stroke's start), and tick the box. Each line within a row is one set of tip conditions "+
		"and the strokes written with it. P is the sampled probability that every stroke of the segment stays within its tolerance. "+
		"Duration runs from the start of the segment to its end; \"ends at\" is on the plan clock.", fontBody)
	// Actions of each segment, found in one pass.
	bounds := segmentActionBounds(p)
	f := font{size: 7.5}
	for _, g := range segmentTables(p) {
		if g.title != "" {
			d.heading(g.title, 30)
		}
		t := newTable(d, f,
			tableColumn{title: "Done", share: 6},
			tableColumn{title: "Seg", share: 5, right: true},
			tableColumn{title: "Register", share: 15},
			tableColumn{title: "Start at x, y (nm); strokes", share: 17},
			tableColumn{title: "Strokes", share: 14},
			tableColumn{title: "Mode", share: 6},
			tableColumn{title: "Bias (V)", share: 7, right: true},
			tableColumn{title: "Setpoint (nA)", share: 9, right: true},
			tableColumn{title: "Speed (nm/s)", share: 10, right: true},
			tableColumn{title: "Duration (h:mm:ss)", share: 10, right: true},
			tableColumn{title: "Ends at (h:mm:ss)", share: 10, right: true},
		)
		t.start()
		last := 0.0
		for n, i := range g.segs {
			if n%200 == 0 {
				if err := ctx.Err(); err != nil {
					return err
				}
			}
			s := p.Segments[i]
			groups := segmentGroups(p, i, min(bounds[i][0], bounds[i][1]), bounds[i][1])
			var strokes, modes, bias, cur, speed []string
			for _, g := range groups {
				strokes = append(strokes, g.kindCounts())
				modes = append(modes, g.mode.Abbrev())
				bias = append(bias, signedV(g.bias))
				cur = append(cur, nanoAmps(g.current))
				if g.dwell {
					speed = append(speed, sig(g.time/float64(len(g.kinds)), 3)+" s/pt")
				} else {
					speed = append(speed, sig(g.speed, 4))
				}
			}
			start := ""
			if len(s.Strokes) > 0 {
				q := p.Strokes[s.Strokes[0]].Path[0]
				start = nm1(q.X) + ", " + nm1(q.Y) + "\n" + plural("stroke", len(s.Strokes)) + " " + numberRanges(segmentNumbers(&s, numbers))
			}
			reg := s.Fiducial + "\n(" + nm1(s.FiducialAt.X) + ", " + nm1(s.FiducialAt.Y) + ")"
			if s.Registration == planner.RegLocal {
				reg = "local\n(" + nm1(s.FiducialAt.X) + ", " + nm1(s.FiducialAt.Y) + ")"
			}
			reg += "\nP " + probability(s.PInTolerance)
			top, _ := t.row("", strconv.Itoa(i+1), reg, start, strings.Join(strokes, "\n"), strings.Join(modes, "\n"),
				strings.Join(bias, "\n"), strings.Join(cur, "\n"), strings.Join(speed, "\n"), clock(s.EndS-s.StartS), clock(s.EndS))
			d.tickBox(t.colX(0)+1.6, top+1.2, 3.6)
			last = s.EndS
		}
		t.row("", "", "Step ends", "", "", "", "", "", "", "", clock(last))
		t.end()
	}
	pdfRegistrationReasons(d, p)
	return nil
}

// maxReasonRows is how many reasons for the kinds of registration the
// printed plan lists; the plan JSON gives each segment's.
const maxReasonRows = 20

// pdfRegistrationReasons says why the segments register as they do:
// each kind of registration with its reason and the segments it is
// given for (planner.Plan.RegistrationReasons).
func pdfRegistrationReasons(d *pdfDoc, p *planner.Plan) {
	rs := p.RegistrationReasons()
	if len(rs) == 0 {
		return
	}
	d.heading("Why each segment registers as it does", 30)
	t := newTable(d, font{size: 7.5},
		tableColumn{title: "Registration", share: 12},
		tableColumn{title: "Segments", share: 18},
		tableColumn{title: "Why", share: 70},
	)
	t.start()
	for i, r := range rs {
		if i == maxReasonRows {
			t.row("", "", fmt.Sprintf("%d more reasons: each segment's is in the plan JSON (dimerpath export DESIGN.json -o PLAN.json)", len(rs)-maxReasonRows))
			break
		}
		nums := make([]int, len(r.Segments))
		for k, g := range r.Segments {
			nums[k] = g + 1
		}
		t.row(string(r.Kind), numberRanges(nums), r.Reason)
	}
	t.end()
}

func pdfEstimates(d *pdfDoc, p *planner.Plan) {
	d.page()
	d.heading("Session time", 60)
	d.para(fmt.Sprintf("Mean %s (%s) over the Monte Carlo samples of this plan, the sum of the parts below (tip changes are random: "+
		"their part is their mean). Writing alone (AP, FE and dwell) is %s of it. %s.",
		clock(p.TotalS), duration(p.TotalS), percent(safeDiv(p.Breakdown.APWriteS+p.Breakdown.FEWriteS+p.Breakdown.DwellS, p.TotalS)),
		capitalise(floorLine(p))), fontBody)
	h := drawBreakdownBars(d.c, p.Breakdown, box{d.left(), d.y, d.width(), 50})
	d.y += h + 6
	d.heading("Spread of the session time", 30)
	h = drawSpread(d.c, p.P10S, p.P50S, p.P90S, p.TotalS, box{d.left() + 10, d.y, d.width() - 20, 25})
	d.y += h + 2
	d.y += spreadLegend(d.c, vec{d.left() + 10, d.y}, p.P50S, p.TotalS) + 4

	d.heading("Staying within tolerance", 30)
	dp := p.Drift
	d.para(fmt.Sprintf("The probability that every stroke and every coupled pair stays within its tolerance is %s, sampled on this plan "+
		"(drift rate, creep, registration errors). The segments were planned for %s nm/min of drift, %s of creep and registration errors of %s σ, "+
		"with a margin of ×%s.", probability(p.PInTolerance), sig(dp.RateNMPerMin, 3), sig(dp.CreepFraction, 3), sig(dp.ErrorZ, 3), sig(dp.Margin, 3)), fontBody)
	if len(p.Couplings) > 0 {
		t := newTable(d, fontBody,
			tableColumn{title: "Coupled", share: 14},
			tableColumn{title: "Regions", share: 36},
			tableColumn{title: "Tolerance (nm)", share: 14, right: true},
			tableColumn{title: "Held by", share: 24},
			tableColumn{title: "P(within)", share: 12, right: true},
		)
		t.start()
		for _, c := range p.Couplings {
			how := "one drift window"
			if !c.SameStep {
				how = "local registration on the earlier step"
			}
			t.row(string(c.Kind), c.A+" / "+c.B, "±"+sig(c.ToleranceNM, 3), how, probability(c.PInTolerance))
		}
		t.end()
	}

	d.heading("Dopant yield", 40)
	if len(p.Windows) == 0 {
		d.para("The plan has no dopant windows.", fontBody)
		return
	}
	y := p.Yield
	d.keyValues([][2]string{
		{"Windows", thousands(y.Windows)},
		{"All windows good", fmt.Sprintf("%s: the probability that every window is opened as drawn and takes exactly one donor; %s", allGood(y), intervals(y))},
		{"Good windows", meanGood(y)},
		{"Bad windows expected", badWindows(y)},
		{"Devices per perfect one", devicesPerPerfect(y)},
	}, 0.28)
	d.para("A window is good when it is opened as drawn (every site cleared and none of its neighbours, from the exposure model) and then "+
		"takes exactly one donor (the template's p1). p0, p1 and p≥2 are the template's probabilities of 0, 1 and 2 or more donors in a window opened as drawn.", font{size: 7.5, grey: 0.25})
	t := newTable(d, fontBody,
		tableColumn{title: "Species", share: 8},
		tableColumn{title: "Template", share: 9},
		tableColumn{title: "Windows", share: 8, right: true},
		tableColumn{title: "P(opened as drawn)", share: 12, right: true},
		tableColumn{title: "p0", share: 7, right: true},
		tableColumn{title: "p1", share: 11, right: true},
		tableColumn{title: "p≥2", share: 7, right: true},
		tableColumn{title: "P(good)", share: 9, right: true},
		tableColumn{title: "Regions", share: 29},
	)
	type key struct {
		species, template   string
		open, p0, p1, p2, p float64
		sd                  float64
	}
	groups := map[key][]string{}
	counts := map[key]int{}
	var order []key
	for _, w := range p.Windows {
		k := key{w.Species, w.Template, w.OpenProbability, w.P0, w.P1, w.P2Plus, w.Probability, w.P1SD}
		if counts[k] == 0 {
			order = append(order, k)
		}
		counts[k]++
		if !slices.Contains(groups[k], w.Region) {
			groups[k] = append(groups[k], w.Region)
		}
	}
	t.start()
	for _, k := range order {
		open := "–"
		if k.open > 0 {
			open = probability(k.open)
		}
		p1 := probability(k.p1)
		if k.sd > 0 {
			p1 += " ± " + sig(k.sd, 2)
		}
		t.row(k.species, k.template, thousands(counts[k]), open, probability(k.p0), p1, probability(k.p2), probability(k.p), listShort(groups[k], 6))
	}
	t.end()
	d.need(62)
	d.c.text(vec{d.left(), d.y + 3}, "Probability of k good windows (Poisson-binomial)", fontBold, anchorStart, tag{})
	d.y += 5
	h = drawDistribution(d.c, y.Distribution, box{d.left(), d.y, d.width(), 55})
	d.y += h + 2
}

// pdfCoverage prints the coverage expectation region by region.
func pdfCoverage(d *pdfDoc, p *planner.Plan) {
	c := p.Coverage
	if len(c.Regions) == 0 {
		return
	}
	d.heading("Coverage: what the strokes are expected to clear", 40)
	d.para(fmt.Sprintf("Each H site clears with probability 1 − exp(−Y·N), N the electrons its strokes' footprints deliver to it and Y the "+
		"desorption yield per electron at their bias and current (Shen et al., Science 268, 1590 (1995)). Missed: a region's sites expected to keep "+
		"their H. Stray: sites outside every region expected to clear beyond the edge allowance, with the background of spurious dangling bonds along "+
		"AP lines. P(no error): the probability that the region is written exactly. %s.", capitalise(coverageLine(c))), font{size: 7.5, grey: 0.25})
	t := newTable(d, fontBody,
		tableColumn{title: "Region", share: 22},
		tableColumn{title: "Sites", share: 14, right: true},
		tableColumn{title: "Missed", share: 14, right: true},
		tableColumn{title: "Stray", share: 14, right: true},
		tableColumn{title: "of them spurious", share: 16, right: true},
		tableColumn{title: "P(no error)", share: 20, right: true},
	)
	t.start()
	for _, r := range c.Regions {
		pr := probability(r.Probability)
		if r.Probability == 0 && !math.IsInf(r.Log10Probability, -1) {
			pr = pow10(r.Log10Probability)
		}
		t.row(r.Region, thousands(r.Sites), sig(r.ExpectedMissed, 3), sig(r.ExpectedStray, 3), sig(r.ExpectedSpurious, 3), pr)
	}
	t.end()
}

// zoomLegend returns the key of the zoomed figures.
func zoomLegend(sc *scene) []legendEntry {
	var out []legendEntry
	if sc.surf != nil {
		out = append(out,
			legendEntry{"H site of the lattice", func(c canvas, b box) {
				c.dots([]vec{b.centre().sub(vec{1.2, 0}), b.centre().add(vec{1.2, 0})}, 0.35, greyLattice, tag{})
			}},
			legendEntry{"site to clear", func(c canvas, b box) {
				c.dots([]vec{b.centre().sub(vec{1.2, 0}), b.centre().add(vec{1.2, 0})}, 0.5, greyToClear, tag{})
			}})
	}
	out = append(out,
		legendEntry{fmt.Sprintf("AP footprint (%s nm line)", sig(sc.apWidth, 2)), func(c canvas, b box) {
			y := b.y + b.h/2
			c.polyline([]vec{{b.x + 1, y}, {b.right() - 1, y}}, false, pen{width: 2.2, grey: greyFootprint, round: true}, noPaint, tag{})
		}},
		legendEntry{"tip path and direction", func(c canvas, b box) {
			y := b.y + b.h/2
			c.polyline([]vec{{b.x + 0.5, y}, {b.right() - 0.5, y}}, false, penCentre, noPaint, tag{})
			drawArrowHead(c, vec{b.x, y}, vec{b.right() - 0.5, y}, 1.2)
		}},
		legendEntry{"dwell point", func(c canvas, b box) {
			q, d := b.centre(), 1.4
			c.polyline([]vec{{q.x - d, q.y}, {q.x + d, q.y}}, false, pen{width: 0.35}, noPaint, tag{})
			c.polyline([]vec{{q.x, q.y - d}, {q.x, q.y + d}}, false, pen{width: 0.35}, noPaint, tag{})
			c.circle(q, d*0.65, pen{width: 0.3}, noPaint, tag{})
		}},
		legendEntry{"FE stroke nearby", func(c canvas, b box) {
			y := b.y + b.h/2
			c.polyline([]vec{{b.x + 0.5, y}, {b.right() - 0.5, y}}, false, pen{width: 0.2, grey: 0.5, dash: []float64{1, 0.7}}, noPaint, tag{})
		}},
		legendEntry{"12  stroke number (at its start)", func(c canvas, b box) {}},
	)
	return out
}

func pdfZooms(ctx context.Context, d *pdfDoc, sc *scene, progress func(float64)) error {
	p := sc.plan
	areas, omitted := apAreas(p, sc.number)
	if len(areas) == 0 {
		return nil
	}
	d.page()
	d.heading("Atomic-precision areas", 0)
	intro := "Every area written in atomic-precision mode, zoomed so that the dimer rows show. "
	if sc.surf == nil {
		intro += "(The lattice is not drawn: the export was given no lattice.) "
	}
	d.para(intro+"Check each stroke against the rows before writing.", fontBody)
	d.y += drawLegend(d.c, zoomLegend(sc), vec{d.left(), d.y}, d.width()) + 2
	figH := (d.bottom() - marginTop - 2*16) / 2
	for i, a := range areas {
		if err := ctx.Err(); err != nil {
			return err
		}
		progress(float64(i) / float64(len(areas)))
		if d.remains() < figH*0.75+16 {
			d.page()
		}
		h := math.Min(figH, d.remains()-16)
		regions, strokes := areaCaption(p, a, sc.number)
		win := a.win
		cap := fmt.Sprintf("AP area %d of %d: %s", i+1, len(areas)+omitted, regions)
		for _, l := range wrapText(d.c, cap, fontBold, d.width()) {
			d.c.text(vec{d.left(), d.y + 3.2}, l, fontBold, anchorStart, tag{})
			d.y += 4
		}
		d.c.text(vec{d.left(), d.y + 3}, fmt.Sprintf("%s · x %s to %s nm, y %s to %s nm%s", strokes, nm1(win.X.Lo), nm1(win.X.Hi),
			nm1(win.Y.Lo), nm1(win.Y.Hi), rowsNote(sc, win)), fontSmall, anchorStart, tag{})
		d.y += 5
		dev := box{d.left(), d.y, d.width(), h}
		drawZoom(d.c, sc, a, dev, i)
		v := fitView(withAspect(a.win, dev), dev)
		d.y = v.frame().bottom() + 2
		drawScaleBar(d.c, v, vec{d.left(), d.y}, 40)
		d.y += 7
	}
	if omitted > 0 {
		d.para(fmt.Sprintf("%d further atomic-precision areas are not drawn: a printed plan shows at most %d. "+
			"Every stroke is in the JSON and CSV exports.", omitted, maxZoomAreas), fontBold)
	}
	return nil
}

// rowsNote names the terraces in win and their row directions.
func rowsNote(sc *scene, win r2.Rect) string {
	if sc.surf == nil {
		return ""
	}
	var parts []string
	seen := map[int]bool{}
	for gx := 0; gx <= 4; gx++ {
		for gy := 0; gy <= 4; gy++ {
			q := r2.Point{X: win.X.Lo + win.Size().X*float64(gx)/4, Y: win.Y.Lo + win.Size().Y*float64(gy)/4}
			t := sc.surf.TerraceAt(q)
			if t < 0 || seen[t] {
				continue
			}
			seen[t] = true
			parts = append(parts, fmt.Sprintf("%s rows along %s", sc.surf.Terraces[t].Name, sc.surf.Terraces[t].Rows))
		}
	}
	slices.Sort(parts)
	if len(parts) == 0 {
		return ""
	}
	return " · " + strings.Join(parts, ", ")
}
