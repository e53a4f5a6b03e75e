package gui

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/storage"
	"fyne.io/fyne/v2/theme"
	"fyne.io/fyne/v2/widget"

	"dimerpath/app/editor"
	"dimerpath/internal/jsonfile"
	"dimerpath/lattice/design"
	"dimerpath/planner"
)

// The instrument-profile editor edits a copy of the session's profile.
// Apply parses every field and validates the whole profile with the
// planner; only a profile that passes both replaces the session's, so
// nothing half-valid is ever used or saved.

// profileField is one numeric field of the editor: shown = stored·scale.
type profileField struct {
	group, label string
	path         string // JSON path, as the planner's errors name it
	scale        float64
	f            func(p *planner.Profile) *float64
	i            func(p *planner.Profile) *int
}

func modeFields(group, prefix string, m func(p *planner.Profile) *planner.ModeProfile, fe bool) []profileField {
	fs := []profileField{
		{group: group, path: prefix + ".bias_v", label: "Sample bias (V)", scale: 1, f: func(p *planner.Profile) *float64 { return &m(p).BiasV }},
		{group: group, path: prefix + ".current_a", label: "Setpoint current (nA)", scale: 1e9, f: func(p *planner.Profile) *float64 { return &m(p).CurrentA }},
		{group: group, path: prefix + ".line_dose_c_per_cm", label: "Line dose (mC/cm)", scale: 1e3, f: func(p *planner.Profile) *float64 { return &m(p).LineDoseCPerCm }},
		{group: group, path: prefix + ".passes", label: "Passes", i: func(p *planner.Profile) *int { return &m(p).Passes }},
		{group: group, path: prefix + ".sigma_nm", label: "Footprint σ (nm)", scale: 1, f: func(p *planner.Profile) *float64 { return &m(p).SigmaNM }},
	}
	if fe {
		fs = append(fs, profileField{group: group, path: prefix + ".fill_completion", label: "Raster fill: P(clear) between lines", scale: 1, f: func(p *planner.Profile) *float64 { return &m(p).FillCompletion }})
	} else {
		fs = append(fs, profileField{group: group, path: prefix + ".spurious_per_100nm", label: "Spurious dangling bonds per 100 nm", scale: 1, f: func(p *planner.Profile) *float64 { return &m(p).SpuriousPer100NM }})
	}
	fs = append(fs, profileField{group: group, path: prefix + ".edge_allowance_nm", label: "Edge allowance (nm)", scale: 1, f: func(p *planner.Profile) *float64 { return &m(p).EdgeAllowanceNM }})
	return fs
}

// modeGroup names the profile group of a write mode's settings:
// "Atomic-precision mode".
func modeGroup(m design.Mode) string {
	a := m.Adjective()
	return strings.ToUpper(a[:1]) + a[1:] + " mode"
}

func profileFields() []profileField {
	fs := modeFields(modeGroup(design.ModeAP), "ap", func(p *planner.Profile) *planner.ModeProfile { return &p.AP }, false)
	fs = append(fs, modeFields(modeGroup(design.ModeFE), "fe", func(p *planner.Profile) *planner.ModeProfile { return &p.FE }, true)...)
	g := "Dwell (single points)"
	fs = append(fs,
		profileField{group: g, path: "dwell.bias_v", label: "Sample bias (V)", scale: 1, f: func(p *planner.Profile) *float64 { return &p.Dwell.BiasV }},
		profileField{group: g, path: "dwell.current_a", label: "Setpoint current (nA)", scale: 1e9, f: func(p *planner.Profile) *float64 { return &p.Dwell.CurrentA }},
		profileField{group: g, path: "dwell.sigma_nm", label: "Footprint σ (nm)", scale: 1, f: func(p *planner.Profile) *float64 { return &p.Dwell.SigmaNM }},
		profileField{group: g, path: "dwell.completion", label: "Completion probability", scale: 1, f: func(p *planner.Profile) *float64 { return &p.Dwell.Completion }},
	)
	g = "Desorption yield (Shen et al. 1995)"
	fs = append(fs, []profileField{
		{group: g, path: "exposure.vibrational.yield_per_electron", label: "Low-bias yield Y_ref (H per electron)", scale: 1, f: func(p *planner.Profile) *float64 { return &p.Exposure.Vibrational.YieldPerElectron }},
		{group: g, path: "exposure.vibrational.bias_v", label: "…at bias (V)", scale: 1, f: func(p *planner.Profile) *float64 { return &p.Exposure.Vibrational.BiasV }},
		{group: g, path: "exposure.vibrational.current_a", label: "…and current (nA)", scale: 1e9, f: func(p *planner.Profile) *float64 { return &p.Exposure.Vibrational.CurrentA }},
		{group: g, path: "exposure.vibrational.order", label: "Order n (rate ∝ Iⁿ)", scale: 1, f: func(p *planner.Profile) *float64 { return &p.Exposure.Vibrational.Order }},
		{group: g, path: "exposure.vibrational.decade_v", label: "Bias per decade of yield (V)", scale: 1, f: func(p *planner.Profile) *float64 { return &p.Exposure.Vibrational.DecadeV }},
		{group: g, path: "exposure.vibrational.max_bias_v", label: "Low-bias regime up to (V)", scale: 1, f: func(p *planner.Profile) *float64 { return &p.Exposure.Vibrational.MaxBiasV }},
		{group: g, path: "exposure.electronic.yield_per_electron", label: "Field-emission yield (H per electron)", scale: 1, f: func(p *planner.Profile) *float64 { return &p.Exposure.Electronic.YieldPerElectron }},
		{group: g, path: "exposure.electronic.threshold_v", label: "Electronic threshold (V)", scale: 1, f: func(p *planner.Profile) *float64 { return &p.Exposure.Electronic.ThresholdV }},
		{group: g, path: "stray_limit", label: "Stray limit: P(clear) outside regions", scale: 1, f: func(p *planner.Profile) *float64 { return &p.StrayLimit }},
	}...)
	g = "Motion"
	fs = append(fs,
		profileField{group: g, path: "move_speed_nm_per_s", label: "Move speed (nm/s)", scale: 1, f: func(p *planner.Profile) *float64 { return &p.MoveSpeedNMPerS }},
		profileField{group: g, path: "settle_s", label: "Settle after a move (s)", scale: 1, f: func(p *planner.Profile) *float64 { return &p.SettleS }},
		profileField{group: g, path: "mode_switch_s", label: "Mode switch (s)", scale: 1, f: func(p *planner.Profile) *float64 { return &p.ModeSwitchS }},
	)
	g = "Drift and registration"
	fs = append(fs,
		profileField{group: g, path: "drift.rate_nm_per_min", label: "Drift rate (nm/min)", scale: 1, f: func(p *planner.Profile) *float64 { return &p.Drift.RateNMPerMin }},
		profileField{group: g, path: "drift.rate_sd_nm_per_min", label: "Drift uncertainty, 1σ (nm/min)", scale: 1, f: func(p *planner.Profile) *float64 { return &p.Drift.RateSDNMPerMin }},
		profileField{group: g, path: "drift.registration_s", label: "Registration (s)", scale: 1, f: func(p *planner.Profile) *float64 { return &p.Drift.RegistrationS }},
		profileField{group: g, path: "drift.verification_s", label: "Verification image per segment (s)", scale: 1, f: func(p *planner.Profile) *float64 { return &p.Drift.VerificationS }},
		profileField{group: g, path: "tolerance_ap_nm", label: "Default AP tolerance (± nm)", scale: 1, f: func(p *planner.Profile) *float64 { return &p.ToleranceAPNM }},
		profileField{group: g, path: "tolerance_fe_nm", label: "Default FE tolerance (± nm)", scale: 1, f: func(p *planner.Profile) *float64 { return &p.ToleranceFENM }},
		profileField{group: g, path: "hybrid_band_nm", label: "Hybrid AP outline band (nm)", scale: 1, f: func(p *planner.Profile) *float64 { return &p.HybridBandNM }},
	)
	g = "Instrument limits"
	fs = append(fs,
		profileField{group: g, path: "limits.max_bias_v", label: "Largest bias (V)", scale: 1, f: func(p *planner.Profile) *float64 { return &p.Limits.MaxBiasV }},
		profileField{group: g, path: "limits.max_current_a", label: "Largest current (nA)", scale: 1e9, f: func(p *planner.Profile) *float64 { return &p.Limits.MaxCurrentA }},
		profileField{group: g, path: "limits.scan_field_nm", label: "Scan field (nm)", scale: 1, f: func(p *planner.Profile) *float64 { return &p.Limits.ScanFieldNM }},
		profileField{group: g, path: "limits.max_speed_nm_per_s", label: "Largest tip speed (nm/s, 0 = none)", scale: 1, f: func(p *planner.Profile) *float64 { return &p.Limits.MaxSpeedNMPS }},
	)
	return fs
}

// formatField prints a stored value in the field's display unit, to
// four significant digits (a threshold of 0.0067668 mC/cm shows as
// 0.006767, not 0.00676676); a field left as shown keeps the exact value
// (profileEditor.parse).
func formatField(f profileField, p *planner.Profile) string {
	if f.i != nil {
		return strconv.Itoa(*f.i(p))
	}
	return sigDigits(*f.f(p)*f.scale, 4)
}

// sigDigits prints v to n significant digits (more for numbers of more
// whole digits than n, which keep them all), in plain decimals from
// 0.001 to a million and with an exponent beyond.
func sigDigits(v float64, n int) string {
	a := math.Abs(v)
	if v == 0 || math.IsNaN(v) || math.IsInf(v, 0) || a < 1e-3 || a >= 1e6 {
		return strconv.FormatFloat(v, 'g', n, 64)
	}
	decimals := max(0, n-1-int(math.Floor(math.Log10(a))))
	return trimZeros(strconv.FormatFloat(v, 'f', decimals, 64))
}

// profileEditor is the editor's state: one entry per field over a copy
// of the profile.
type profileEditor struct {
	u       *UI
	base    planner.Profile // what the entries were filled from
	path    string
	fields  []profileField
	entries []*widget.Entry
	shown   []string // what each entry showed when filled
	name    *widget.Entry
	notes   *widget.Entry
	apOut   *widget.Check
	feOut   *widget.Check
	order   *widget.Select
	windows *widget.Select
	msg     *widget.Label
	dlg     *dialog.CustomDialog
}

func (u *UI) editProfile() { u.openProfileEditor() }

// openProfileEditor shows the editor and returns it.
func (u *UI) openProfileEditor() *profileEditor {
	e := &profileEditor{u: u, fields: profileFields(), path: u.Session.ProfilePath}
	e.name = widget.NewEntry()
	e.notes = widget.NewEntry()
	e.apOut = widget.NewCheck("extra outline pass", nil)
	e.feOut = widget.NewCheck("extra outline pass", nil)
	e.order = widget.NewSelect([]string{planner.OrderAPFirst, planner.OrderFEFirst}, nil)
	e.windows = widget.NewSelect([]string{planner.WindowStyleLine, planner.WindowStyleDwell}, nil)
	e.msg = errorLabel()
	e.entries = make([]*widget.Entry, len(e.fields))
	for i := range e.fields {
		e.entries[i] = widget.NewEntry()
	}
	e.fill(u.Session.Profile)

	var groups []fyne.CanvasObject
	groups = append(groups, widget.NewForm(widget.NewFormItem("Name", e.name), widget.NewFormItem("Notes", e.notes),
		widget.NewFormItem("Write first", e.order), widget.NewFormItem("Open windows by", e.windows)))
	var form *widget.Form
	last := ""
	for i, f := range e.fields {
		if f.group != last {
			if form != nil {
				groups = append(groups, form)
			}
			groups = append(groups, heading(f.group))
			form = widget.NewForm()
			switch f.group {
			case modeGroup(design.ModeAP):
				form.Append("Outline", e.apOut)
			case modeGroup(design.ModeFE):
				form.Append("Outline", e.feOut)
			}
			last = f.group
		}
		form.Append(f.label, e.entries[i])
	}
	groups = append(groups, form)
	// Two columns of groups so the editor fits a laptop screen.
	half := (len(groups) + 1) / 2
	cols := container.NewGridWithColumns(2, container.NewVBox(groups[:half]...), container.NewVBox(groups[half:]...))
	load := widget.NewButtonWithIcon("Load…", theme.FolderOpenIcon(), e.load)
	save := widget.NewButtonWithIcon("Save as…", theme.DocumentSaveIcon(), e.saveAs)
	preset := widget.NewSelect(planner.Presets(), func(name string) {
		if p, err := editor.PresetProfile(name); err == nil {
			e.fill(p)
		}
	})
	preset.PlaceHolder = "Start from a preset…"
	top := container.NewVBox(
		mutedLabel("Tip conditions, dose model, motion, drift and the instrument's limits used for planning. A value outside the limits, or not physical, is refused with a message naming it; nothing changes until every field is valid. Presets: rt room temperature, lt low temperature."),
		container.NewHBox(load, save, container.New(&fixedWidth{w: 220}, preset)))
	content := container.NewBorder(top, e.msg, nil, nil, container.NewVScroll(cols))
	apply := widget.NewButtonWithIcon("Apply", theme.ConfirmIcon(), e.apply)
	apply.Importance = widget.HighImportance
	cancel := widget.NewButton("Cancel", func() { e.dlg.Hide() })
	e.dlg = dialog.NewCustomWithoutButtons("Instrument profile", container.New(&fixedSize{fyne.NewSize(940, 600)}, content), u.Win)
	e.dlg.SetButtons([]fyne.CanvasObject{cancel, apply})
	e.dlg.Show()
	return e
}

// entry returns the entry of the field with the given JSON path.
func (e *profileEditor) entry(path string) *widget.Entry {
	for i, f := range e.fields {
		if f.path == path {
			return e.entries[i]
		}
	}
	return nil
}

// fill shows p in the entries.
func (e *profileEditor) fill(p planner.Profile) {
	e.base = p
	e.name.SetText(p.Name)
	e.notes.SetText(p.Notes)
	e.apOut.SetChecked(p.AP.Outline)
	e.feOut.SetChecked(p.FE.Outline)
	e.order.SetSelected(p.Order)
	e.windows.SetSelected(p.WindowStyle)
	e.shown = make([]string, len(e.fields))
	for i, f := range e.fields {
		e.shown[i] = formatField(f, &p)
		e.entries[i].SetText(e.shown[i])
	}
	e.msg.Hide()
}

// parse returns the profile the entries describe, or an error naming
// every field that does not parse.
func (e *profileEditor) parse() (planner.Profile, error) {
	p := e.base
	p.Name = strings.TrimSpace(e.name.Text)
	p.Notes = e.notes.Text
	p.AP.Outline = e.apOut.Checked
	p.FE.Outline = e.feOut.Checked
	p.Order = e.order.Selected
	p.WindowStyle = e.windows.Selected
	var bad []string
	for i, f := range e.fields {
		text := strings.TrimSpace(e.entries[i].Text)
		if text == e.shown[i] {
			// Untouched: keep the exact value, not its rounded display.
			continue
		}
		if f.i != nil {
			v, err := strconv.Atoi(text)
			if err != nil {
				bad = append(bad, fmt.Sprintf("%s / %s: %q is not a whole number", f.group, f.label, text))
				continue
			}
			*f.i(&p) = v
			continue
		}
		v, err := parseNumber(f.label, text)
		if err != nil {
			bad = append(bad, fmt.Sprintf("%s / %s: %s", f.group, f.label, notANumber(text)))
			continue
		}
		*f.f(&p) = v / f.scale
	}
	if p.Name == "" {
		bad = append(bad, "Name: give the profile a name (it is printed on every plan)")
	}
	if len(bad) > 0 {
		return p, errors.New(strings.Join(bad, "\n"))
	}
	if err := editor.ValidateProfile(p); err != nil {
		return p, e.explain(err)
	}
	return p, nil
}

// explain rewrites the planner's errors, which name JSON paths, with the
// editor's labels and units.
func (e *profileEditor) explain(err error) error {
	byPath := map[string]profileField{}
	for _, f := range e.fields {
		byPath[f.path] = f
	}
	name := func(path string) string {
		if f, ok := byPath[path]; ok {
			return f.group + " / " + f.label
		}
		return path
	}
	shown := func(path string, v float64) string {
		if f, ok := byPath[path]; ok && f.scale != 0 {
			return sigDigits(v*f.scale, 4)
		}
		return sigDigits(v, 4)
	}
	if pe, ok := errors.AsType[*jsonfile.Error](err); ok {
		var lines []string
		for _, pr := range pe.Problems {
			val := jsonfile.Quote(pr.Value)
			if x, ok := pr.Value.(float64); ok {
				val = shown(pr.Path, x)
			}
			lines = append(lines, fmt.Sprintf("%s = %s: %s", name(pr.Path), val, pr.Message))
		}
		return errors.New(strings.Join(lines, "\n"))
	}
	var le *planner.LimitError
	if errors.As(err, &le) {
		return fmt.Errorf("%s = %s is more than the instrument allows (%s = %s)", name(le.Quantity), shown(le.Quantity, le.Value), name(le.Limit), shown(le.Limit, le.Max))
	}
	return err
}

func (e *profileEditor) apply() {
	p, err := e.parse()
	if err != nil {
		showErr(e.msg, fmt.Errorf("Not applied:\n%w", err))
		return
	}
	e.u.Session.SetProfile(p, e.path)
	e.u.scheduleCheck() // the over-clearing rule depends on the profile
	e.dlg.Hide()
	e.u.hintLabel.SetText("Instrument profile " + p.Name + " applied; plan again for its figures.")
}

func (e *profileEditor) load() {
	d := dialog.NewFileOpen(func(r fyne.URIReadCloser, err error) {
		if err != nil || r == nil {
			if err != nil {
				dialog.ShowError(err, e.u.Win)
			}
			return
		}
		path := r.URI().Path()
		r.Close()
		p, err := editor.LoadProfile(path)
		if err != nil {
			dialog.ShowError(fmt.Errorf("could not load %s:\n%w", path, err), e.u.Win)
			return
		}
		e.path = path
		e.fill(p)
	}, e.u.Win)
	d.SetFilter(storage.NewExtensionFileFilter([]string{".json"}))
	d.Resize(fyne.NewSize(900, 600))
	d.Show()
}

// saveAs saves the entries' profile only if it is valid.
func (e *profileEditor) saveAs() {
	p, err := e.parse()
	if err != nil {
		showErr(e.msg, fmt.Errorf("Not saved:\n%w", err))
		return
	}
	e.u.chooseFile(safeFileName(p.Name)+".json", []string{".json"}, func(path string) {
		if err := editor.SaveProfile(path, p); err != nil {
			dialog.ShowError(fmt.Errorf("could not save %s:\n%w", path, err), e.u.Win)
			return
		}
		e.path = path
		e.msg.Hide()
		e.u.hintLabel.SetText("Saved the instrument profile to " + path)
	})
}
