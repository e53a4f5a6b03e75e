package gui

import (
	"errors"
	"fmt"
	"strconv"
	"strings"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/storage"
	"fyne.io/fyne/v2/theme"
	"fyne.io/fyne/v2/widget"

	"dimerpath/planner"
)

// The instrument-profile editor edits a copy of the session's profile.
// Apply parses every field and validates the whole profile with the
// planner; only a profile that passes both replaces the session's, so
// nothing half-valid is ever used or saved.

// profileField is one numeric field of the editor: shown = stored·scale.
type profileField struct {
	group, label string
	scale        float64
	f            func(p *planner.Profile) *float64
	i            func(p *planner.Profile) *int
}

func modeFields(group string, m func(p *planner.Profile) *planner.ModeProfile, fe bool) []profileField {
	fs := []profileField{
		{group: group, label: "Sample bias (V)", scale: 1, f: func(p *planner.Profile) *float64 { return &m(p).BiasV }},
		{group: group, label: "Setpoint current (nA)", scale: 1e9, f: func(p *planner.Profile) *float64 { return &m(p).CurrentA }},
		{group: group, label: "Line dose (mC/cm)", scale: 1e3, f: func(p *planner.Profile) *float64 { return &m(p).LineDoseCPerCm }},
		{group: group, label: "Passes", i: func(p *planner.Profile) *int { return &m(p).Passes }},
		{group: group, label: "Beam σ of the width model (nm)", scale: 1, f: func(p *planner.Profile) *float64 { return &m(p).Width.SigmaNM }},
		{group: group, label: "Threshold dose (mC/cm)", scale: 1e3, f: func(p *planner.Profile) *float64 { return &m(p).Width.ThresholdDoseCPerCm }},
	}
	if fe {
		fs = append(fs, profileField{group: group, label: "Raster overlap (fraction of the width)", scale: 1, f: func(p *planner.Profile) *float64 { return &m(p).Overlap }})
	}
	return fs
}

func profileFields() []profileField {
	fs := modeFields("Atomic-precision mode", func(p *planner.Profile) *planner.ModeProfile { return &p.AP }, false)
	fs = append(fs, modeFields("Field-emission mode", func(p *planner.Profile) *planner.ModeProfile { return &p.FE }, true)...)
	g := "Dwell (single points)"
	fs = append(fs,
		profileField{group: g, label: "Sample bias (V)", scale: 1, f: func(p *planner.Profile) *float64 { return &p.Dwell.BiasV }},
		profileField{group: g, label: "Setpoint current (nA)", scale: 1e9, f: func(p *planner.Profile) *float64 { return &p.Dwell.CurrentA }},
		profileField{group: g, label: "Desorption yield (H per electron)", scale: 1, f: func(p *planner.Profile) *float64 { return &p.Dwell.YieldPerElectron }},
		profileField{group: g, label: "Completion probability", scale: 1, f: func(p *planner.Profile) *float64 { return &p.Dwell.Completion }},
	)
	g = "Motion"
	fs = append(fs,
		profileField{group: g, label: "Move speed (nm/s)", scale: 1, f: func(p *planner.Profile) *float64 { return &p.MoveSpeedNMPerS }},
		profileField{group: g, label: "Settle after a move (s)", scale: 1, f: func(p *planner.Profile) *float64 { return &p.SettleS }},
		profileField{group: g, label: "Mode switch (s)", scale: 1, f: func(p *planner.Profile) *float64 { return &p.ModeSwitchS }},
	)
	g = "Drift and registration"
	fs = append(fs,
		profileField{group: g, label: "Drift rate (nm/min)", scale: 1, f: func(p *planner.Profile) *float64 { return &p.Drift.RateNMPerMin }},
		profileField{group: g, label: "Drift uncertainty, 1σ (nm/min)", scale: 1, f: func(p *planner.Profile) *float64 { return &p.Drift.RateSDNMPerMin }},
		profileField{group: g, label: "Registration (s)", scale: 1, f: func(p *planner.Profile) *float64 { return &p.Drift.RegistrationS }},
		profileField{group: g, label: "Verification image per segment (s)", scale: 1, f: func(p *planner.Profile) *float64 { return &p.Drift.VerificationS }},
		profileField{group: g, label: "Default AP tolerance (± nm)", scale: 1, f: func(p *planner.Profile) *float64 { return &p.ToleranceAPNM }},
		profileField{group: g, label: "Default FE tolerance (± nm)", scale: 1, f: func(p *planner.Profile) *float64 { return &p.ToleranceFENM }},
	)
	g = "Instrument limits"
	fs = append(fs,
		profileField{group: g, label: "Largest bias (V)", scale: 1, f: func(p *planner.Profile) *float64 { return &p.Limits.MaxBiasV }},
		profileField{group: g, label: "Largest current (nA)", scale: 1e9, f: func(p *planner.Profile) *float64 { return &p.Limits.MaxCurrentA }},
		profileField{group: g, label: "Scan field (nm)", scale: 1, f: func(p *planner.Profile) *float64 { return &p.Limits.ScanFieldNM }},
		profileField{group: g, label: "Largest tip speed (nm/s, 0 = none)", scale: 1, f: func(p *planner.Profile) *float64 { return &p.Limits.MaxSpeedNMPS }},
	)
	return fs
}

// formatField prints a stored value in the field's display unit.
func formatField(f profileField, p *planner.Profile) string {
	if f.i != nil {
		return strconv.Itoa(*f.i(p))
	}
	return strconv.FormatFloat(*f.f(p)*f.scale, 'g', 6, 64)
}

// profileEditor is the editor's state: one entry per field over a copy
// of the profile.
type profileEditor struct {
	u       *UI
	base    planner.Profile // what the entries were filled from
	path    string
	fields  []profileField
	entries []*widget.Entry
	name    *widget.Entry
	notes   *widget.Entry
	apOut   *widget.Check
	feOut   *widget.Check
	order   *widget.Select
	msg     *widget.Label
	dlg     *dialog.CustomDialog
}

func (u *UI) editProfile() {
	e := &profileEditor{u: u, fields: profileFields(), path: u.S.ProfilePath}
	e.name = widget.NewEntry()
	e.notes = widget.NewEntry()
	e.apOut = widget.NewCheck("extra outline pass", nil)
	e.feOut = widget.NewCheck("extra outline pass", nil)
	e.order = widget.NewSelect([]string{"ap-first", "fe-first"}, nil)
	e.msg = errorLabel()
	e.entries = make([]*widget.Entry, len(e.fields))
	for i := range e.fields {
		e.entries[i] = widget.NewEntry()
	}
	e.fill(u.S.Profile)

	var groups []fyne.CanvasObject
	groups = append(groups, widget.NewForm(widget.NewFormItem("Name", e.name), widget.NewFormItem("Notes", e.notes),
		widget.NewFormItem("Write first", e.order)))
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
			case "Atomic-precision mode":
				form.Append("Outline", e.apOut)
			case "Field-emission mode":
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
	reset := widget.NewButtonWithIcon("Defaults", theme.ViewRefreshIcon(), func() { e.fill(defaultProfile()) })
	top := container.NewVBox(
		mutedLabel("Tip conditions, dose model, motion, drift and the instrument's limits used for planning. A value outside the limits, or not physical, is refused with a message; nothing is changed until every field is valid."),
		container.NewHBox(load, save, reset))
	content := container.NewBorder(top, e.msg, nil, nil, container.NewVScroll(cols))
	apply := widget.NewButtonWithIcon("Apply", theme.ConfirmIcon(), e.apply)
	apply.Importance = widget.HighImportance
	cancel := widget.NewButton("Cancel", func() { e.dlg.Hide() })
	e.dlg = dialog.NewCustomWithoutButtons("Instrument profile", container.New(&fixedSize{fyne.NewSize(940, 600)}, content), u.Win)
	e.dlg.SetButtons([]fyne.CanvasObject{cancel, apply})
	e.dlg.Show()
}

// fill shows p in the entries.
func (e *profileEditor) fill(p planner.Profile) {
	e.base = p
	e.name.SetText(p.Name)
	e.notes.SetText(p.Notes)
	e.apOut.SetChecked(p.AP.Outline)
	e.feOut.SetChecked(p.FE.Outline)
	e.order.SetSelected(p.Order)
	for i, f := range e.fields {
		e.entries[i].SetText(formatField(f, &p))
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
	var bad []string
	for i, f := range e.fields {
		text := strings.TrimSpace(e.entries[i].Text)
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
			bad = append(bad, fmt.Sprintf("%s / %s: %q is not a number", f.group, f.label, text))
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
	if err := validateProfile(p); err != nil {
		return p, err
	}
	return p, nil
}

func (e *profileEditor) apply() {
	p, err := e.parse()
	if err != nil {
		showErr(e.msg, fmt.Errorf("Not applied:\n%w", err))
		return
	}
	e.u.S.SetProfile(p, e.path)
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
		p, err := loadProfile(path)
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
	d := dialog.NewFileSave(func(w fyne.URIWriteCloser, err error) {
		if err != nil || w == nil {
			if err != nil {
				dialog.ShowError(err, e.u.Win)
			}
			return
		}
		path := w.URI().Path()
		w.Close()
		if err := saveProfile(path, p); err != nil {
			dialog.ShowError(fmt.Errorf("could not save %s:\n%w", path, err), e.u.Win)
			return
		}
		e.path = path
		e.msg.Hide()
	}, e.u.Win)
	d.SetFileName(safeFileName(p.Name) + ".json")
	d.SetFilter(storage.NewExtensionFileFilter([]string{".json"}))
	d.Resize(fyne.NewSize(900, 600))
	d.Show()
}
