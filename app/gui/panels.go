package gui

import (
	"fmt"
	"image/color"
	"math"
	"strconv"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/canvas"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/theme"
	"fyne.io/fyne/v2/widget"
	"github.com/golang/geo/r2"

	"dimerpath/app/editor"
	"dimerpath/app/render"
	"dimerpath/lattice/design"
	"dimerpath/planner"
)

// The side panels. Each is a view of the session rebuilt by refresh;
// every change it offers is a Session method, so it can be undone.

// roleOf and modeOf name a role and a write mode as design's tables do;
// a role with its file spelling where that differs ("contact pad
// (pad)"), as the choice shows it next to what the design file says.
func roleOf(r design.Role) string { return r.Label() }

func modeOf(m design.Mode) string {
	if m == "" {
		m = design.ModeAuto
	}
	return m.Label()
}

// parseNumber parses a decimal number typed into field label.
func parseNumber(label, s string) (float64, error) {
	v, err := strconv.ParseFloat(strings.TrimSpace(s), 64)
	if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
		return 0, fmt.Errorf("%s: %s", label, notANumber(s))
	}
	return v, nil
}

// notANumber says why s is not a number, suggesting the decimal point
// when a comma was typed for it.
func notANumber(s string) string {
	t := strings.TrimSpace(s)
	if t == "" {
		return "empty; type a number"
	}
	if strings.Count(t, ",") == 1 && !strings.Contains(t, ".") {
		if _, err := strconv.ParseFloat(strings.Replace(t, ",", ".", 1), 64); err == nil {
			return fmt.Sprintf("%q is not a number: write decimals with a point (%s)", s, strings.Replace(t, ",", ".", 1))
		}
	}
	return fmt.Sprintf("%q is not a number", s)
}

// parseInt parses a whole number typed into field label.
func parseInt(label, s string) (int, error) {
	v, err := strconv.Atoi(strings.TrimSpace(s))
	if err != nil {
		return 0, fmt.Errorf("%s: %q is not a whole number", label, s)
	}
	return v, nil
}

// shortCount prints a count in at most five characters: 1234, 98.8 k,
// 3.32 M.
func shortCount(n int) string {
	switch {
	case n < 10000:
		return strconv.Itoa(n)
	case n < 999_500:
		return trimZeros(fmt.Sprintf("%.3g", float64(n)/1e3)) + " k"
	default:
		return trimZeros(fmt.Sprintf("%.3g", float64(n)/1e6)) + " M"
	}
}

// groupDigits prints n with thin spaces between thousands.
func groupDigits(n int) string {
	s := strconv.Itoa(n)
	neg := strings.HasPrefix(s, "-")
	s = strings.TrimPrefix(s, "-")
	var b strings.Builder
	for i, c := range s {
		if i > 0 && (len(s)-i)%3 == 0 {
			b.WriteRune(' ')
		}
		b.WriteRune(c)
	}
	if neg {
		return "-" + b.String()
	}
	return b.String()
}

// plural returns "1 shape", "2 shapes".
func plural(n int, noun string) string {
	if n == 1 {
		return "1 " + noun
	}
	return fmt.Sprintf("%d %ss", n, noun)
}

func mutedLabel(s string) *widget.Label {
	l := widget.NewLabel(s)
	l.Wrapping = fyne.TextWrapWord
	l.Importance = widget.LowImportance
	return l
}

func wrapLabel(s string) *widget.Label {
	l := widget.NewLabel(s)
	l.Wrapping = fyne.TextWrapWord
	return l
}

func errorLabel() *widget.Label {
	l := widget.NewLabel("")
	l.Wrapping = fyne.TextWrapWord
	l.Importance = widget.DangerImportance
	l.Hide()
	return l
}

func showErr(l *widget.Label, err error) {
	if err == nil {
		l.Hide()
		return
	}
	l.SetText(err.Error())
	l.Show()
}

// --- Regions ---

type regionsPanel struct {
	u       *UI
	content fyne.CanvasObject
	list    *widget.List
	empty   *widget.Label
	form    *fyne.Container
	split   *container.Split
	// formScroll holds form under the list, shown while a region is.
	formScroll *container.Scroll
	name       *keyEntry
	role       *widget.Select
	mode       *widget.Select
	species    *widget.Select
	dopants    []string // the species value of each species option
	step       *widget.Select
	steps      []string // the lithography step of each step option
	tol        *keyEntry
	colour     *canvas.Rectangle // the selected region's swatch
	info       *widget.Label
	msg        *widget.Label
	shape      *shapeEditor
	gaps       *fyne.Container
	gapRows    *linkRows
	addGap     *widget.Select
	couplings  *linkRows
	addCouple  *widget.Select
	shown      int // region the form shows
	updating   bool
}

func newRegionsPanel(u *UI) *regionsPanel {
	p := &regionsPanel{u: u, shown: -1}
	p.list = widget.NewList(
		func() int { return len(p.u.Session.Variant().Regions) },
		func() fyne.CanvasObject {
			sw := canvas.NewRectangle(color.White)
			sw.SetMinSize(fyne.NewSize(14, 14))
			name := widget.NewLabel("region name")
			name.Truncation = fyne.TextTruncateEllipsis
			info := widget.NewLabel("000 000 sites")
			info.Importance = widget.LowImportance
			return container.NewBorder(nil, nil, container.NewCenter(sw), info, name)
		},
		func(i widget.ListItemID, o fyne.CanvasObject) {
			v := p.u.Session.Variant()
			if i >= len(v.Regions) {
				return
			}
			c := o.(*fyne.Container)
			c.Objects[0].(*widget.Label).SetText(v.Regions[i].Name)
			c.Objects[1].(*fyne.Container).Objects[0].(*canvas.Rectangle).FillColor = p.u.Session.RegionColour(i)
			c.Objects[1].(*fyne.Container).Objects[0].Refresh()
			c.Objects[2].(*widget.Label).SetText(shortCount(p.u.Session.RegionSites(i).Count()) + " sites")
		})
	p.list.OnSelected = func(i widget.ListItemID) {
		if !p.updating {
			p.u.Session.Select(i)
		}
	}
	p.empty = mutedLabel("No regions yet. Pick a painting tool on the left (Site S, Dimer D, Window W, Rectangle R, …) and draw on the lattice: the first stroke makes a region. Or press Add.")

	p.name = u.newEntry()
	p.name.OnChanged = func(s string) {
		if !p.updating && p.shown >= 0 {
			showErr(p.msg, p.u.Session.RenameRegion(p.shown, s))
		}
	}
	var roles []string
	for _, r := range design.Roles {
		roles = append(roles, roleOf(r))
	}
	p.role = widget.NewSelect(roles, func(s string) {
		for _, r := range design.Roles {
			if roleOf(r) == s && !p.updating && p.shown >= 0 {
				showErr(p.msg, p.u.Session.SetRegionRole(p.shown, r))
			}
		}
	})
	var modes []string
	for _, m := range design.Modes {
		modes = append(modes, modeOf(m))
	}
	p.mode = widget.NewSelect(modes, func(s string) {
		for _, m := range design.Modes {
			if modeOf(m) == s && !p.updating && p.shown >= 0 {
				showErr(p.msg, p.u.Session.SetRegionMode(p.shown, m))
			}
		}
	})
	p.species = widget.NewSelect(nil, func(string) {
		if p.updating || p.shown < 0 || p.species.SelectedIndex() < 0 {
			return
		}
		showErr(p.msg, p.u.Session.SetRegionSpecies(p.shown, p.dopants[p.species.SelectedIndex()]))
	})
	p.step = widget.NewSelect(nil, func(string) {
		if p.updating || p.shown < 0 || p.step.SelectedIndex() < 0 {
			return
		}
		showErr(p.msg, p.u.Session.SetRegionLithographyStep(p.shown, p.steps[p.step.SelectedIndex()]))
	})
	p.tol = u.newEntry()
	p.tol.OnChanged = func(s string) {
		if p.updating || p.shown < 0 {
			return
		}
		if strings.TrimSpace(s) == "" {
			showErr(p.msg, p.u.Session.SetRegionTolerance(p.shown, 0))
			return
		}
		v, err := parseNumber("tolerance", s)
		if err == nil {
			err = p.u.Session.SetRegionTolerance(p.shown, v)
		}
		showErr(p.msg, err)
	}
	p.info = mutedLabel("")
	p.msg = errorLabel()
	p.shape = newShapeEditor(u)
	p.gaps = container.NewVBox()
	p.gapRows = &linkRows{u: u, box: container.NewVBox(), field: "width ±",
		set: func(i int, typed string) error {
			nm, err := parseTolerance(typed)
			if err != nil {
				return err
			}
			return p.u.Session.SetTunnelGapTolerance(i, nm)
		},
		remove: func(i int) { p.u.Session.RemoveTunnelGap(i) },
		msg:    func(err error) { showErr(p.msg, err) }}
	p.gaps.Add(p.gapRows.box)
	p.couplings = &linkRows{u: u, box: container.NewVBox(), field: "relative ±",
		set: func(i int, typed string) error {
			nm, err := parseTolerance(typed)
			if err != nil {
				return err
			}
			return p.u.Session.SetCouplingTolerance(i, nm)
		},
		remove: func(i int) { p.u.Session.RemoveCoupling(i) },
		msg:    func(err error) { showErr(p.msg, err) }}
	p.addCouple = widget.NewSelect(nil, func(other string) {
		if p.updating || p.shown < 0 || other == "" {
			return
		}
		showErr(p.msg, p.u.Session.AddCoupling(p.u.Session.Variant().Regions[p.shown].Name, other))
		p.addCouple.ClearSelected()
	})
	p.addCouple.PlaceHolder = "Couple placement to…"
	p.addGap = widget.NewSelect(nil, func(other string) {
		if p.updating || p.shown < 0 || other == "" {
			return
		}
		err := p.u.Session.AddTunnelGap(p.u.Session.Variant().Regions[p.shown].Name, other)
		showErr(p.msg, err)
		p.addGap.ClearSelected()
	})
	p.addGap.PlaceHolder = "Declare a tunnel gap to…"
	p.colour = canvas.NewRectangle(color.Black)
	p.colour.SetMinSize(fyne.NewSize(40, 20))
	p.colour.CornerRadius = 3
	pick := widget.NewButton("Change…", p.pickColour)
	form := widget.NewForm(
		widget.NewFormItem("Name", p.name),
		widget.NewFormItem("Colour", container.NewHBox(container.NewCenter(p.colour), pick)),
		widget.NewFormItem("Role", p.role),
		widget.NewFormItem("Write mode", p.mode),
		widget.NewFormItem("Dopant", p.species),
		widget.NewFormItem("Written in", p.step),
		widget.NewFormItem("Tolerance ± nm", p.tol),
	)
	p.form = container.NewVBox(widget.NewSeparator(), heading("Selected region"), form, p.msg, p.info, p.shape.box,
		p.gaps, p.addGap, p.couplings.box, p.addCouple,
		container.NewGridWithColumns(2,
			widget.NewButtonWithIcon("Zoom to", theme.ZoomFitIcon(), u.zoomToSelection),
			widget.NewButtonWithIcon("Delete", theme.DeleteIcon(), func() {
				if p.shown >= 0 {
					p.u.Session.DeleteRegions(p.u.Session.Selection()...)
				}
			})))
	add := widget.NewButtonWithIcon("Add region", theme.ContentAddIcon(), p.askNewRegion)
	top := container.NewVBox(container.NewBorder(nil, nil, heading("Regions of this variant"), add), p.empty)
	// The selected region's card scrolls under the list: with a shape's
	// fields it is taller than a laptop's panel.
	p.formScroll = container.NewVScroll(p.form)
	p.formScroll.Hide()
	p.split = container.NewVSplit(p.list, p.formScroll)
	p.split.Offset = 1
	p.content = container.NewBorder(top, nil, nil, nil, p.split)
	return p
}

// dopantChoices returns the Dopant choices of a region and the species
// each stands for: the design's dopant (the region names none, so its
// δ-layer takes the design's), each species the design's templates
// deliver, and no dopant (a region opened for another reason).
func dopantChoices(s *editor.Session) (labels, species []string) {
	labels = append(labels, "design default ("+s.DesignDopant()+")")
	species = append(species, "")
	for _, sp := range append(s.Species(), design.NoDopant) {
		labels = append(labels, design.DopantLabel(sp))
		species = append(species, sp)
	}
	return labels, species
}

// stepChoices returns the choices of the lithography step a region
// without dopant is written in, and the step each stands for.
func stepChoices(s *editor.Session) (labels, steps []string) {
	labels, steps = []string{"first step"}, []string{""}
	for _, sp := range s.Species() {
		labels = append(labels, sp+" step")
		steps = append(steps, sp)
	}
	return labels, steps
}

// defaultToleranceHint says, in an empty tolerance field, the tolerance
// the region takes without its own: that of the mode it is written in,
// both where the planner chooses the mode and they differ.
func defaultToleranceHint(m design.Mode, t planner.Tolerances) string {
	switch {
	case m == design.ModeAP || t.AP == t.FE:
		return "default " + trimZeros(fmt.Sprintf("%.3f", t.AP))
	case m == design.ModeFE:
		return "default " + trimZeros(fmt.Sprintf("%.3f", t.FE))
	}
	return fmt.Sprintf("default %s AP, %s FE", trimZeros(fmt.Sprintf("%.3f", t.AP)), trimZeros(fmt.Sprintf("%.3f", t.FE)))
}

// selectValue selects in sel the option whose value (in values) is v.
func selectValue(sel *widget.Select, values []string, v string) {
	for i, x := range values {
		if x == v {
			sel.SetSelectedIndex(i)
			return
		}
	}
	sel.ClearSelected()
}

// pickColour offers a colour for the selected region; the region keeps
// it (it is saved with the design), whatever happens to the others.
func (p *regionsPanel) pickColour() {
	s, i := p.u.Session, p.shown
	if i < 0 {
		return
	}
	name := s.Variant().Regions[i].Name
	d := dialog.NewColorPicker("Colour of "+name, "The region is drawn in this colour; it is saved with the design.", func(c color.Color) {
		showErr(p.msg, s.SetRegionColour(i, render.ColourHex(color.NRGBAModel.Convert(c).(color.NRGBA))))
	}, p.u.Win)
	d.Advanced = true
	d.SetColor(s.RegionColour(i))
	d.Show()
}

// askNewRegion asks for a new region's role and name (offering a
// unique name for the role chosen) and adds it, selected.
func (p *regionsPanel) askNewRegion() {
	s := p.u.Session
	name := widget.NewEntry()
	var roles []string
	for _, r := range design.Roles {
		roles = append(roles, roleOf(r))
	}
	roleOfName := func(n string) design.Role {
		for _, r := range design.Roles {
			if roleOf(r) == n {
				return r
			}
		}
		return design.RoleDevice
	}
	typed := false
	name.OnChanged = func(string) { typed = true }
	role := widget.NewSelect(roles, func(n string) {
		if !typed || strings.TrimSpace(name.Text) == "" {
			name.SetText(s.NewRegionName(roleOfName(n)))
			typed = false
		}
	})
	role.SetSelected(roleOf(design.RoleDevice))
	items := []*widget.FormItem{widget.NewFormItem("Role", role), widget.NewFormItem("Name", name)}
	d := dialog.NewForm("Add a region", "Add", "Cancel", items, func(ok bool) {
		if ok {
			s.AddRegion(strings.TrimSpace(name.Text), roleOfName(role.Selected))
		}
	}, p.u.Win)
	d.Resize(fyne.NewSize(420, 220))
	d.Show()
	p.u.Win.Canvas().Focus(name)
}

func (p *regionsPanel) refresh() {
	s := p.u.Session
	v := s.Variant()
	p.updating = true
	defer func() { p.updating = false }()
	p.list.Refresh()
	if len(v.Regions) == 0 {
		p.empty.Show()
	} else {
		p.empty.Hide()
	}
	a := s.Active()
	if a < 0 {
		p.list.UnselectAll()
		p.formScroll.Hide()
		p.split.SetOffset(1) // the list alone
		p.shown = -1
		return
	}
	p.list.Select(a)
	p.list.ScrollTo(a)
	if !p.formScroll.Visible() {
		p.formScroll.Show()
		p.split.SetOffset(0.3)
		p.split.Refresh()
	}
	r := v.Regions[a]
	if p.shown != a || p.name.Text != r.Name {
		// Rewriting the entry while the user types in it would move the
		// cursor; only do it for another region or an undone rename.
		p.name.SetText(r.Name)
	}
	p.colour.FillColor = s.RegionColour(a)
	p.colour.Refresh()
	p.role.SetSelected(roleOf(r.Role))
	p.mode.SetSelected(modeOf(r.Mode))
	var labels []string
	labels, p.dopants = dopantChoices(s)
	p.species.SetOptions(labels)
	selectValue(p.species, p.dopants, r.Species)
	// A region without dopant names its step; the others are written in
	// their dopant's, which the choice shows, disabled.
	if r.Species == design.NoDopant {
		labels, p.steps = stepChoices(s)
		p.step.Enable()
	} else {
		dopant := s.Design().DopantOf(&r)
		labels, p.steps = []string{dopant + " step (its dopant's)"}, []string{dopant}
		p.step.Disable()
	}
	p.step.SetOptions(labels)
	selectValue(p.step, p.steps, r.LithographyStep)
	if r.Species != design.NoDopant {
		p.step.SetSelectedIndex(0)
	}
	p.tol.SetPlaceHolder(defaultToleranceHint(r.EffectiveMode(), s.DefaultTolerances(a)))
	tol := ""
	if r.ToleranceNM > 0 {
		tol = trimZeros(fmt.Sprintf("%.3f", r.ToleranceNM))
	}
	if cur, err := strconv.ParseFloat(strings.TrimSpace(p.tol.Text), 64); p.shown != a || err != nil && tol != "" || err == nil && cur != r.ToleranceNM {
		p.tol.SetText(tol)
	}
	p.shown = a
	n := s.RegionSites(a).Count()
	info := fmt.Sprintf("%s H sites in %s", groupDigits(n), plural(len(r.Shapes), "shape"))
	if r.Painted != nil && !r.Painted.IsEmpty() {
		info += fmt.Sprintf(", %s painted by hand", groupDigits(r.Painted.Count()))
	}
	if r.Erased != nil && !r.Erased.IsEmpty() {
		info += fmt.Sprintf(", %s erased", groupDigits(r.Erased.Count()))
	}
	if b := s.RegionBounds(a); !b.IsEmpty() {
		info += fmt.Sprintf("; writes %s × %s", formatLength(b.Size().X), formatLength(b.Size().Y))
	}
	if len(s.Selection()) > 1 {
		info += fmt.Sprintf(". %d regions selected.", len(s.Selection()))
	}
	p.info.SetText(info)
	p.refreshGaps()
	p.shape.refresh(a)
	// The card may have been shown, hidden or rebuilt for another kind
	// of shape: lay the form out again (a container shown later keeps
	// the zero size it was laid out with while hidden).
	p.form.Refresh()
}

// refreshGaps lists the selected region's tunnel gaps with their
// measured widths, and offers the other regions for a new one.
func (p *regionsPanel) refreshGaps() {
	s := p.u.Session
	a := s.Active()
	if a < 0 {
		return
	}
	v := s.Variant()
	name := v.Regions[a].Name
	otherOf := func(a, b string) string {
		if a == name {
			return b
		}
		return a
	}
	var gaps []link
	gapped := map[string]bool{name: true}
	for gi, g := range v.TunnelGaps {
		if g.A != name && g.B != name {
			continue
		}
		other := otherOf(g.A, g.B)
		gapped[other] = true
		width := "measuring…"
		if w, ok := s.GapWidth(g.A, g.B); ok {
			width = w.Text
		}
		rule := s.Design().EffectiveRules().TunnelGapToleranceNM
		gaps = append(gaps, link{index: gi, a: g.A, b: g.B, text: "Tunnel gap to " + other + ": " + width,
			tolNM: g.ToleranceNM, placeholder: "rule's " + trimZeros(fmt.Sprintf("%.3f", rule))})
	}
	p.gapRows.show(gaps)
	var couplings []link
	coupled := map[string]bool{name: true}
	for ci, c := range v.Couplings {
		if c.A != name && c.B != name {
			continue
		}
		other := otherOf(c.A, c.B)
		coupled[other] = true
		couplings = append(couplings, link{index: ci, a: c.A, b: c.B, text: "Placement coupled to " + other,
			tolNM: c.ToleranceNM, placeholder: "required"})
	}
	p.couplings.show(couplings)
	p.addGap.SetOptions(others(v, gapped))
	p.addGap.ClearSelected()
	p.addCouple.SetOptions(others(v, coupled))
	p.addCouple.ClearSelected()
}

// others returns the names of the variant's regions not in taken.
func others(v *design.Variant, taken map[string]bool) []string {
	var out []string
	for _, r := range v.Regions {
		if !taken[r.Name] {
			out = append(out, r.Name)
		}
	}
	return out
}

// --- Findings ---

type findingsPanel struct {
	u       *UI
	content fyne.CanvasObject
	summary *widget.Label
	list    *widget.List
}

func newFindingsPanel(u *UI) *findingsPanel {
	p := &findingsPanel{u: u}
	p.summary = wrapLabel("")
	p.list = widget.NewList(
		func() int { f, _ := p.u.Session.Findings(); return len(f) },
		func() fyne.CanvasObject {
			sw := canvas.NewRectangle(render.ColError)
			sw.SetMinSize(fyne.NewSize(10, 10))
			l := widget.NewLabel("rule: message")
			l.Wrapping = fyne.TextWrapWord
			return container.NewBorder(nil, nil, container.NewCenter(sw), nil, l)
		},
		func(i widget.ListItemID, o fyne.CanvasObject) {
			f, _ := p.u.Session.Findings()
			if i >= len(f) {
				return
			}
			c := o.(*fyne.Container)
			sw := c.Objects[1].(*fyne.Container).Objects[0].(*canvas.Rectangle)
			if f[i].Error {
				sw.FillColor = render.ColError
			} else {
				sw.FillColor = render.ColWarning
			}
			sw.Refresh()
			text := f[i].Rule + ": " + f[i].Message
			if len(f[i].Regions) > 0 {
				text += " (" + strings.Join(f[i].Regions, ", ") + ")"
			}
			if h := findingHint(f[i].Rule); h != "" {
				text += "\nWhat to do: " + h
			}
			c.Objects[0].(*widget.Label).SetText(text)
			p.list.SetItemHeight(i, c.Objects[0].MinSize().Height)
		})
	p.list.OnSelected = func(i widget.ListItemID) {
		u.Session.ChooseFinding(i)
		u.View.ZoomTo(r2.RectFromPoints(u.Session.FindingAt(i)))
	}
	recheck := widget.NewButtonWithIcon("Check now", theme.ViewRefreshIcon(), u.CheckNow)
	top := container.NewVBox(container.NewBorder(nil, nil, heading("Design-rule checks"), recheck), p.summary)
	p.content = container.NewBorder(top, mutedLabel("Choose a finding to zoom to it. Checks run again a moment after each edit."), nil, nil, p.list)
	return p
}

func (p *findingsPanel) refresh() {
	f, stale := p.u.Session.Findings()
	p.list.UnselectAll()
	p.list.Refresh()
	errs, warns := countFindings(f)
	var text string
	switch {
	case !p.u.Session.Checked():
		text = "Not checked yet."
	case len(f) == 0:
		text = "No findings: variant " + p.u.Session.Variant().Name + " passes every design rule."
	default:
		text = fmt.Sprintf("%s and %s in variant %s.", plural(errs, "error"), plural(warns, "warning"), p.u.Session.Variant().Name)
	}
	if stale && p.u.Session.Checked() {
		text += " (The design changed since; checking again…)"
	}
	p.summary.SetText(text)
	p.u.tabFindings.Text = "Checks"
	if errs > 0 {
		p.u.tabFindings.Text = fmt.Sprintf("Checks (%d)", errs)
	}
	p.u.tabs.Refresh()
}

// findingHint says, for a rule, what to do in the window about one of
// its findings.
func findingHint(rule string) string {
	switch rule {
	case design.RuleFloating:
		return "connect the region to a contact pad through touching regions; if it is meant to be tunnel-coupled (an SET island to its leads), select it in Regions and declare the tunnel gap."
	case design.RuleTunnelGap:
		return "drag the lead or the island with the Select tool (it moves by whole dimers and rows) until the gap is in range."
	case design.RuleWindowSpacing:
		return "drag the window with the Select tool, or delete it (Delete), to leave the intact dimers the rule asks for."
	case design.RuleWindow:
		return "move the window onto whole, intact dimers of one terrace, or put the erased sites back."
	case design.RuleFEKeepOut:
		return "move the field-emission region away from the atomic-precision features, or change a region's write mode."
	case design.RuleScanField:
		return "move the shape inside the field and the scan field."
	case design.RuleStepRegistry:
		return "select the terrace in the Design tab and say whether the step goes up or down (compare with your survey image)."
	case planner.RuleOverclearing:
		return "the strokes that would write the region clear sites outside every region above the profile's stray limit: end the region on whole dimers and rows, move it away from its neighbours, change its write mode, or lower the dose in the instrument profile."
	}
	return ""
}

// --- Variants ---

type variantsPanel struct {
	u       *UI
	content fyne.CanvasObject
	list    *widget.List
	sweep   *sweepForm
}

func newVariantsPanel(u *UI) *variantsPanel {
	p := &variantsPanel{u: u}
	p.list = widget.NewList(
		func() int { return len(p.u.Session.Design().Variants) },
		func() fyne.CanvasObject {
			name := widget.NewLabel("variant")
			info := widget.NewLabel("00 regions")
			info.Importance = widget.LowImportance
			return container.NewBorder(nil, nil, nil, info, name)
		},
		func(i widget.ListItemID, o fyne.CanvasObject) {
			vs := p.u.Session.Design().Variants
			if i >= len(vs) {
				return
			}
			c := o.(*fyne.Container)
			name := c.Objects[0].(*widget.Label)
			name.SetText(vs[i].Name)
			name.TextStyle.Bold = i == p.u.Session.VariantIndex()
			name.Refresh()
			c.Objects[1].(*widget.Label).SetText(fmt.Sprintf("%d regions", len(vs[i].Regions)))
		})
	p.list.OnSelected = func(i widget.ListItemID) { u.Session.SetVariant(i) }
	rename := widget.NewButtonWithIcon("Rename", theme.DocumentCreateIcon(), func() { u.renameVariant(u.Session.VariantIndex()) })
	dup := widget.NewButtonWithIcon("Duplicate", theme.ContentCopyIcon(), func() { u.Session.DuplicateVariant(u.Session.VariantIndex()) })
	del := widget.NewButtonWithIcon("Delete", theme.DeleteIcon(), func() { u.deleteVariant(u.Session.VariantIndex()) })
	cmp := widget.NewButtonWithIcon("Compare all variants…", theme.ListIcon(), u.compareVariants)
	cmp.Importance = widget.HighImportance
	help := mutedLabel("A variant is one layout alternative: duplicate one, change a gap or a window, then compare their write time and yield.")
	p.sweep = newSweepForm(u)
	p.content = container.NewBorder(
		container.NewVBox(heading("Layout variants"), help),
		container.NewVBox(container.NewGridWithColumns(3, dup, rename, del), cmp, p.sweep.box),
		nil, nil, p.list)
	return p
}

func (p *variantsPanel) refresh() {
	p.list.Refresh()
	p.list.Select(p.u.Session.VariantIndex())
	p.sweep.refresh()
}

func (u *UI) renameVariant(i int) {
	e := widget.NewEntry()
	e.SetText(u.Session.Design().Variants[i].Name)
	e.Validator = func(s string) error {
		return u.Session.CheckVariantName(i, s)
	}
	d := dialog.NewForm("Rename variant", "Rename", "Cancel", []*widget.FormItem{widget.NewFormItem("Name", e)}, func(ok bool) {
		if ok {
			if err := u.Session.RenameVariant(i, e.Text); err != nil {
				dialog.ShowError(err, u.Win)
			}
		}
	}, u.Win)
	// Wide enough for a descriptive name ("gap-12-source-As-donors").
	d.Resize(fyne.NewSize(460, 1))
	d.Show()
	u.Win.Canvas().Focus(e)
}

func (u *UI) deleteVariant(i int) {
	if len(u.Session.Design().Variants) == 1 {
		dialog.ShowInformation("Delete variant", "A design keeps at least one variant.", u.Win)
		return
	}
	name := u.Session.Design().Variants[i].Name
	dialog.ShowConfirm("Delete variant", fmt.Sprintf("Delete variant %q and its %d regions? (Undo brings it back.)", name, len(u.Session.Design().Variants[i].Regions)), func(ok bool) {
		if ok {
			u.Session.DeleteVariant(i)
		}
	}, u.Win)
}

// --- Marks: fiducials and terraces ---

type marksPanel struct {
	u        *UI
	content  fyne.CanvasObject
	fids     *widget.List
	fidSel   int
	fidName  *keyEntry
	fidX     *keyEntry
	fidY     *keyEntry
	fidMsg   *widget.Label
	fidForm  *fyne.Container
	terrs    *widget.List
	terrSel  int
	terrName *keyEntry
	terrRows *widget.RadioGroup
	// terrStep asks which way the step from the terrace this one steps
	// from goes (up or down); hidden for a terrace that steps from none.
	terrStep     *widget.RadioGroup
	terrStepItem *widget.FormItem
	terrStepForm *widget.Form
	terrX        *keyEntry
	terrY        *keyEntry
	terrMsg      *widget.Label
	terrForm     *fyne.Container
	fidEmpty     *widget.Label
	name         *keyEntry
	nameMsg      *widget.Label
	dopant       *widget.Select
	dopants      []string // the species of each dopant option
	field        *widget.Label
	fieldW       *keyEntry
	fieldH       *keyEntry
	fieldMsg     *widget.Label
	shownW       float64 // the field size the entries were last filled with
	shownH       float64
	updating     bool
}

func newMarksPanel(u *UI) *marksPanel {
	p := &marksPanel{u: u, fidSel: -1, terrSel: -1}
	p.fids = widget.NewList(
		func() int { return len(p.u.Session.Design().Fiducials) },
		func() fyne.CanvasObject { return listLabel("F1 at (0000.00, 0000.00) nm") },
		func(i widget.ListItemID, o fyne.CanvasObject) {
			fs := p.u.Session.Design().Fiducials
			if i < len(fs) {
				o.(*widget.Label).SetText(fmt.Sprintf("%s at (%.2f, %.2f) nm", fs[i].Name, fs[i].AtNM[0], fs[i].AtNM[1]))
			}
		})
	p.fids.OnSelected = func(i widget.ListItemID) { p.fidSel = i; p.showFiducial() }
	p.fidName, p.fidX, p.fidY = u.newEntry(), u.newEntry(), u.newEntry()
	p.fidMsg = errorLabel()
	p.fidForm = container.NewVBox(
		widget.NewForm(widget.NewFormItem("Name", p.fidName), widget.NewFormItem("x (nm)", p.fidX), widget.NewFormItem("y (nm)", p.fidY)),
		p.fidMsg,
		container.NewGridWithColumns(2,
			widget.NewButtonWithIcon("Apply", theme.ConfirmIcon(), p.applyFiducial),
			widget.NewButtonWithIcon("Delete", theme.DeleteIcon(), func() {
				if p.fidSel >= 0 {
					p.u.Session.DeleteFiducial(p.fidSel)
					p.fidSel = -1
				}
			})))
	p.fidEmpty = mutedLabel("No fiducials. Place them with the Fiducial tool (F): segments re-register on the nearest one.")

	p.terrs = widget.NewList(
		func() int { return len(p.u.Session.Design().Terraces) },
		func() fyne.CanvasObject { return listLabel("T0: rows along x, outline of 00 points") },
		func(i widget.ListItemID, o fyne.CanvasObject) {
			ts := p.u.Session.Design().Terraces
			if i < len(ts) {
				t := ts[i]
				where := "the rest of the field"
				if len(t.Boundary) >= 3 {
					where = fmt.Sprintf("outline of %d points", len(t.Boundary))
				}
				rows := t.Rows
				if surf := p.u.Session.Surface(); i < len(surf.Terraces) {
					rows = surf.Terraces[i].Rows.String()
				}
				step := ""
				switch {
				case t.StepFrom != "" && t.Step != "":
					step = ", a step " + t.Step + " from " + t.StepFrom
				case t.StepFrom != "":
					step = ", a step from " + t.StepFrom + " (up or down? not said)"
				}
				o.(*widget.Label).SetText(fmt.Sprintf("%s: rows along %s, %s%s", t.Name, rows, where, step))
			}
		})
	p.terrs.OnSelected = func(i widget.ListItemID) { p.terrSel = i; p.showTerrace() }
	p.terrName, p.terrX, p.terrY = u.newEntry(), u.newEntry(), u.newEntry()
	p.terrRows = widget.NewRadioGroup([]string{"x", "y"}, nil)
	p.terrRows.Horizontal = true
	p.terrMsg = errorLabel()
	p.terrStep = widget.NewRadioGroup([]string{"up", "down"}, func(step string) {
		if p.updating || p.terrSel < 0 || step == "" {
			return
		}
		showErr(p.terrMsg, p.u.Session.SetTerraceStep(p.terrSel, step))
	})
	p.terrStep.Horizontal = true
	p.terrStepItem = widget.NewFormItem("Step", p.terrStep)
	p.terrStepItem.HintText = "which way from the terrace it steps from: the lattices lie 0.27 nm apart"
	p.terrStepForm = widget.NewForm(p.terrStepItem)
	p.terrForm = container.NewVBox(
		widget.NewForm(widget.NewFormItem("Name", p.terrName), widget.NewFormItem("Rows along", p.terrRows),
			widget.NewFormItem("Offset x (nm)", p.terrX), widget.NewFormItem("Offset y (nm)", p.terrY)),
		p.terrStepForm,
		p.terrMsg,
		container.NewGridWithColumns(2,
			widget.NewButtonWithIcon("Apply", theme.ConfirmIcon(), p.applyTerrace),
			widget.NewButtonWithIcon("Delete", theme.DeleteIcon(), func() {
				if p.terrSel >= 0 {
					if err := p.u.Session.DeleteTerrace(p.terrSel); err != nil {
						showErr(p.terrMsg, err)
						return
					}
					p.terrSel = -1
				}
			})))
	fidBox := container.NewBorder(container.NewVBox(heading("Fiducial marks"), p.fidEmpty), p.fidForm, nil, nil, p.fids)
	terrBox := container.NewBorder(container.NewVBox(heading("Terraces"), mutedLabel("Across a single-height step the dimer rows turn by 90°. Outline a terrace with the Terrace tool (T).")), p.terrForm, nil, nil, p.terrs)
	split := container.NewVSplit(fidBox, terrBox)
	split.Offset = 0.45
	p.name = u.newEntry()
	p.name.OnChanged = func(s string) {
		if !p.updating {
			showErr(p.nameMsg, p.u.Session.SetDesignName(s))
		}
	}
	p.nameMsg = errorLabel()
	p.dopant = widget.NewSelect(nil, func(string) {
		if !p.updating && p.dopant.SelectedIndex() >= 0 {
			showErr(p.nameMsg, p.u.Session.SetDesignDopant(p.dopants[p.dopant.SelectedIndex()]))
		}
	})
	p.field = mutedLabel("")
	p.fieldW, p.fieldH = u.newEntry(), u.newEntry()
	p.fieldMsg = errorLabel()
	p.fieldW.OnSubmitted = func(string) { p.applyField() }
	p.fieldH.OnSubmitted = func(string) { p.applyField() }
	applyField := widget.NewButtonWithIcon("Apply", theme.ConfirmIcon(), p.applyField)
	dopantItem := widget.NewFormItem("Dopant", p.dopant)
	dopantItem.HintText = "of regions that name none"
	// One form, so the labels line up and the size fields keep their
	// width (two forms side by side squeezed the numbers under the labels).
	form := widget.NewForm(widget.NewFormItem("Name", p.name), dopantItem,
		widget.NewFormItem("Field width (nm)", p.fieldW), widget.NewFormItem("Field height (nm)", p.fieldH))
	top := container.NewVBox(heading("Design"), form, p.nameMsg, container.NewBorder(nil, nil, nil, applyField, p.fieldMsg),
		p.field, widget.NewSeparator())
	p.content = container.NewBorder(top, nil, nil, nil, split)
	return p
}

func (p *marksPanel) refresh() {
	d := p.u.Session.Design()
	p.updating = true
	if p.name.Text != d.Name && strings.TrimSpace(p.name.Text) != d.Name {
		p.name.SetText(d.Name)
	}
	p.dopants = p.u.Session.Species()
	labels := make([]string, len(p.dopants))
	for i, sp := range p.dopants {
		labels[i] = design.DopantLabel(sp)
	}
	p.dopant.SetOptions(labels)
	selectValue(p.dopant, p.dopants, p.u.Session.DesignDopant())
	p.updating = false
	p.field.SetText(fmt.Sprintf("Field %s x %s, %s, %s. The name is printed on every plan and report.",
		formatLength(d.Field.WidthNM), formatLength(d.Field.HeightNM), plural(len(d.Terraces), "terrace"), plural(len(d.Variants), "variant")))
	if d.Field.WidthNM != p.shownW || d.Field.HeightNM != p.shownH {
		// Only when the field changed (an edit, undo, another design), so
		// a size being typed is not overwritten.
		p.shownW, p.shownH = d.Field.WidthNM, d.Field.HeightNM
		p.fieldW.SetText(trimZeros(fmt.Sprintf("%.3f", d.Field.WidthNM)))
		p.fieldH.SetText(trimZeros(fmt.Sprintf("%.3f", d.Field.HeightNM)))
		p.fieldMsg.Hide()
	}
	p.fids.Refresh()
	p.terrs.Refresh()
	if len(p.u.Session.Design().Fiducials) == 0 {
		p.fidEmpty.Show()
	} else {
		p.fidEmpty.Hide()
	}
	if p.fidSel >= len(p.u.Session.Design().Fiducials) {
		p.fidSel = -1
		p.fids.UnselectAll()
	}
	if p.terrSel >= len(p.u.Session.Design().Terraces) {
		p.terrSel = -1
		p.terrs.UnselectAll()
	}
	p.showFiducial()
	p.showTerrace()
}

// applyField sets the field size typed, if both values are numbers the
// design accepts.
func (p *marksPanel) applyField() {
	w, err := parseNumber("field width", p.fieldW.Text)
	if err != nil {
		showErr(p.fieldMsg, err)
		return
	}
	h, err := parseNumber("field height", p.fieldH.Text)
	if err != nil {
		showErr(p.fieldMsg, err)
		return
	}
	showErr(p.fieldMsg, p.u.Session.SetFieldSize(w, h))
}

func (p *marksPanel) showFiducial() {
	fs := p.u.Session.Design().Fiducials
	if p.fidSel < 0 || p.fidSel >= len(fs) {
		p.fidForm.Hide()
		return
	}
	f := fs[p.fidSel]
	p.fidName.SetText(f.Name)
	p.fidX.SetText(trimZeros(fmt.Sprintf("%.3f", f.AtNM[0])))
	p.fidY.SetText(trimZeros(fmt.Sprintf("%.3f", f.AtNM[1])))
	p.fidMsg.Hide()
	p.fidForm.Show()
}

// applyFiducial changes the fiducial only if every field is valid.
func (p *marksPanel) applyFiducial() {
	x, err := parseNumber("x", p.fidX.Text)
	if err != nil {
		showErr(p.fidMsg, err)
		return
	}
	y, err := parseNumber("y", p.fidY.Text)
	if err != nil {
		showErr(p.fidMsg, err)
		return
	}
	showErr(p.fidMsg, p.u.Session.SetFiducial(p.fidSel, p.fidName.Text, r2.Point{X: x, Y: y}))
}

func (p *marksPanel) showTerrace() {
	ts := p.u.Session.Design().Terraces
	if p.terrSel < 0 || p.terrSel >= len(ts) {
		p.terrForm.Hide()
		return
	}
	t := ts[p.terrSel]
	p.terrName.SetText(t.Name)
	p.terrRows.SetSelected(p.u.Session.Surface().Terraces[p.terrSel].Rows.String())
	p.terrX.SetText(trimZeros(fmt.Sprintf("%.4f", t.OffsetNM[0])))
	p.terrY.SetText(trimZeros(fmt.Sprintf("%.4f", t.OffsetNM[1])))
	if t.StepFrom != "" {
		p.terrStepItem.Text = "Step from " + t.StepFrom
		p.updating = true
		p.terrStep.SetSelected(t.Step)
		p.updating = false
		p.terrStepForm.Refresh()
		p.terrStepForm.Show()
	} else {
		p.terrStepForm.Hide()
	}
	p.terrMsg.Hide()
	p.terrForm.Show()
}

func (p *marksPanel) applyTerrace() {
	x, err := parseNumber("offset x", p.terrX.Text)
	if err != nil {
		showErr(p.terrMsg, err)
		return
	}
	y, err := parseNumber("offset y", p.terrY.Text)
	if err != nil {
		showErr(p.terrMsg, err)
		return
	}
	showErr(p.terrMsg, p.u.Session.SetTerrace(p.terrSel, p.terrName.Text, p.terrRows.Selected, r2.Point{X: x, Y: y}))
}

// listLabel is a list row's label: template sets the row's size, and a
// text too long for the list ends in an ellipsis.
func listLabel(template string) fyne.CanvasObject {
	l := widget.NewLabel(template)
	l.Truncation = fyne.TextTruncateEllipsis
	return l
}
