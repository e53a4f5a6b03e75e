package gui

import (
	"context"
	"fmt"
	"image/color"
	"strings"
	"time"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/canvas"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/driver/desktop"
	"fyne.io/fyne/v2/layout"
	"fyne.io/fyne/v2/theme"
	"fyne.io/fyne/v2/widget"
	"github.com/golang/geo/r2"

	"dimerpath/app/editor"
	"dimerpath/app/render"
	"dimerpath/lattice/design"
	"dimerpath/planner"
)

// Options configure a UI.
type Options struct {
	// ConfigDir holds the recovery file; "" uses the user's config
	// directory (os.UserConfigDir()/dimerpath).
	ConfigDir string
	// Seed is the planning seed; the same design, profile and seed give
	// the same plan. 0 takes 1, the command line's default.
	Seed int64
	// Autosave is the interval of the recovery autosave's fallback
	// ticker; 0 takes one minute, a negative value turns autosaving off
	// altogether.
	Autosave time.Duration
	// AutosaveDelay is how long after an edit (or a change of variant,
	// view or plan) the recovery copy is written, the wait starting again
	// with each change but never beyond maxAutosaveWait; 0 takes 3 s, a
	// negative value leaves it to the ticker.
	AutosaveDelay time.Duration
	// CheckDelay is how long after an edit the design rules are checked
	// again; 0 takes 400 ms, a negative value checks only on request.
	CheckDelay time.Duration
	// Generator is the program name and version printed on exported
	// reports, e.g. "dimerpath 0.1.0".
	Generator string
}

// UI is the main window: the views of one Session and the actions that
// call into it. Widgets hold no design state of their own.
type UI struct {
	App     fyne.App
	Win     fyne.Window
	Session *editor.Session
	View    *LatticeView
	opts    Options

	cursorLabel *widget.Label
	hintLabel   *widget.Label
	progress    *widget.ProgressBar
	progressMsg *widget.Label
	progressBox *fyne.Container

	tabs        *container.AppTabs
	tabRegions  *container.TabItem
	tabFindings *container.TabItem
	tabPlan     *container.TabItem
	tabVariants *container.TabItem
	tabMarks    *container.TabItem
	tabSurvey   *container.TabItem

	toolButtons   map[editor.Tool]*widget.Button
	toolOptions   *fyne.Container
	toolShown     editor.Tool // the tool whose options are shown
	variantSelect *widget.Select
	undoButton    *widget.Button
	redoButton    *widget.Button
	planButton    *widget.Button
	routeCheck    *widget.Check
	findingsCheck *widget.Check

	regions  *regionsPanel
	findings *findingsPanel
	planView *planPanel
	variants *variantsPanel
	marks    *marksPanel
	survey   *surveyPanel
	legend   *fyne.Container

	menu     *fyne.MainMenu
	undoItem *fyne.MenuItem
	redoItem *fyne.MenuItem
	// legendAtomic says the view is at atomic zoom, where the legend is
	// folded unless legendOpen.
	legendAtomic, legendOpen bool
	cancelItem               *fyne.MenuItem // "Cancel planning", enabled while a job runs
	recentMenu               *fyne.MenuItem
	exportMenu               []*fyne.MenuItem

	planCancel   context.CancelFunc
	planStarted  time.Time
	afterPlan    func() // runs once the running plan is ready (an export waiting for it)
	checkCancel  context.CancelFunc
	checkTimer   *time.Timer
	stopAutosave chan struct{}
	lastAutosave editor.PlanToken // the undo state the recovery copy holds
	lastMeta     workState        // the working state its description holds
	autosaving   bool             // a recovery copy is being written
	// autosaveTimer is the pending debounced autosave, first when the
	// first change it waits for was made.
	autosaveTimer   *time.Timer
	autosaveFirst   time.Time
	autosaveStopped bool // StopAutosave was called: no more copies
	recovery        *recoveryFiles

	// jobs is the background work; tests put in their own.
	jobs editor.Jobs
	// bugsShown holds the bug reports already shown for the automatic
	// jobs (checks, autosave), so one bug is not reported after every
	// edit.
	bugsShown map[string]bool

	// jobDone, when set (by tests), is called after a background plan,
	// check, export or comparison has reported back.
	jobDone func()
}

// New builds the main window's content in w for session s and wires the
// menus, shortcuts and close prompt. It does not show the window.
func New(a fyne.App, w fyne.Window, s *editor.Session, o Options) *UI {
	if o.CheckDelay == 0 {
		o.CheckDelay = 400 * time.Millisecond
	}
	if o.Seed == 0 {
		// The command line's default: the same design and profile plan
		// the same in the window as with dimerpath plan.
		o.Seed = 1
	}
	// Before any file dialog: saving must never empty a file first.
	installLazyFiles()
	u := &UI{App: a, Win: w, Session: s, opts: o, toolButtons: map[editor.Tool]*widget.Button{}, recovery: &recoveryFiles{}, jobs: editor.DefaultJobs(), bugsShown: map[string]bool{}}
	u.View = NewLatticeView(s)
	u.View.OnCursor = u.showCursor
	u.View.OnViewChanged = u.viewChanged
	u.View.OnRune = u.typedRune
	u.View.OnKey = u.typedKey
	u.build()
	u.attach(s)
	w.SetContent(u.content())
	u.buildMenu()
	u.addShortcuts()
	w.Canvas().SetOnTypedRune(u.typedRune)
	w.Canvas().SetOnTypedKey(u.typedKey)
	w.SetCloseIntercept(u.quit)
	u.refreshAll()
	return u
}

// attach makes s the session the window shows.
func (u *UI) attach(s *editor.Session) {
	if u.Session != nil && u.Session != s {
		u.Session.OnChange = nil
	}
	u.Session = s
	u.View.s = s
	u.View.fitted = false
	u.View.scene = nil
	s.OnChange = u.changed
}

// SetSession replaces the design shown (after File > Open or New).
func (u *UI) SetSession(s *editor.Session) {
	u.cancelPlan()
	u.attach(s)
	u.lastAutosave = editor.PlanToken{}
	u.refreshAll()
	u.View.Refresh()
	u.scheduleCheck()
}

func (u *UI) refreshAll() {
	u.changed(editor.ChangeAll)
}

// changed updates the views that show what changed.
func (u *UI) changed(c editor.Change) {
	if c&(editor.ChangeSites|editor.ChangeSelection|editor.ChangePlan|editor.ChangeFindings|editor.ChangePreview|editor.ChangeTerraces|editor.ChangeFiducials|editor.ChangeVariants|editor.ChangeRegions|editor.ChangeSurvey) != 0 {
		u.View.Invalidate()
	}
	if c&(editor.ChangeSurvey|editor.ChangeHistory|editor.ChangeFile|editor.ChangeVariants) != 0 {
		u.survey.refresh()
	}
	if c&(editor.ChangeRegions|editor.ChangeSelection|editor.ChangeVariants) != 0 {
		u.regions.refresh()
	}
	if c&(editor.ChangeFindings|editor.ChangeVariants|editor.ChangeHistory) != 0 {
		u.findings.refresh()
	}
	if c&editor.ChangeFindings != 0 && c&(editor.ChangeRegions|editor.ChangeSelection|editor.ChangeVariants) == 0 {
		u.regions.refreshGaps() // the widths measured by the check
	}
	if c&(editor.ChangePlan|editor.ChangeVariants|editor.ChangeHistory) != 0 {
		u.planView.refresh()
	}
	if c&(editor.ChangeVariants|editor.ChangeHistory) != 0 {
		u.variants.refresh()
		u.variantSelect.Options = u.Session.VariantNames()
		u.variantSelect.Selected = u.Session.Variant().Name
		u.variantSelect.Refresh()
	}
	if c&(editor.ChangeFiducials|editor.ChangeTerraces|editor.ChangeFile|editor.ChangeVariants) != 0 {
		u.marks.refresh()
	}
	if c&editor.ChangeTool != 0 {
		u.refreshTools()
	}
	if c&(editor.ChangeTool|editor.ChangeSelection|editor.ChangeRegions|editor.ChangeVariants) != 0 ||
		(c&editor.ChangeSurvey != 0 && u.Session.Tool == editor.ToolDefect) {
		u.refreshHint()
	}
	if c&(editor.ChangeRegions|editor.ChangePlan|editor.ChangeFindings|editor.ChangeVariants|editor.ChangeHistory|editor.ChangeTerraces|editor.ChangeFiducials) != 0 {
		u.refreshLegend()
	}
	if c&(editor.ChangeFile|editor.ChangeHistory) != 0 {
		u.Win.SetTitle(u.Session.Title())
		u.refreshHistory()
	}
	if c&editor.ChangeHistory != 0 {
		u.scheduleCheck()
	}
	if c&(editor.ChangeHistory|editor.ChangeVariants|editor.ChangePlan) != 0 {
		u.scheduleAutosave()
	}
	u.reclaimFocus()
	if u.Session.Notice != "" {
		u.hintLabel.SetText(u.Session.Notice)
		u.Session.Notice = ""
	}
	if u.Session.Err != nil {
		u.hintLabel.SetText("Problem: " + u.Session.Err.Error())
		u.Session.Err = nil
	}
}

// --- Layout ---

func (u *UI) build() {
	u.cursorLabel = widget.NewLabel("")
	u.cursorLabel.Truncation = fyne.TextTruncateEllipsis
	u.hintLabel = widget.NewLabel("")
	u.hintLabel.Truncation = fyne.TextTruncateEllipsis
	u.progress = widget.NewProgressBar()
	u.progressMsg = widget.NewLabel("")
	cancel := widget.NewButtonWithIcon("Cancel", theme.CancelIcon(), u.cancelPlan)
	u.progressBox = container.NewHBox(u.progressMsg, container.New(&fixedWidth{w: 180}, u.progress), cancel)
	u.progressBox.Hide()

	u.regions = newRegionsPanel(u)
	u.findings = newFindingsPanel(u)
	u.planView = newPlanPanel(u)
	u.variants = newVariantsPanel(u)
	u.marks = newMarksPanel(u)
	u.survey = newSurveyPanel(u)
	u.tabRegions = container.NewTabItem("Regions", u.regions.content)
	u.tabFindings = container.NewTabItem("Checks", u.findings.content)
	u.tabPlan = container.NewTabItem("Plan", u.planView.content)
	u.tabVariants = container.NewTabItem("Variants", u.variants.content)
	u.tabMarks = container.NewTabItem("Design", u.marks.content)
	u.tabSurvey = container.NewTabItem("Survey", u.survey.content)
	u.tabs = container.NewAppTabs(u.tabRegions, u.tabFindings, u.tabPlan, u.tabVariants, u.tabMarks, u.tabSurvey)

	u.variantSelect = widget.NewSelect(nil, func(name string) {
		for i, n := range u.Session.VariantNames() {
			if n == name {
				u.Session.SetVariant(i)
			}
		}
	})
	u.legend = container.NewVBox()
	u.View.SetLegend(u.legendBox())
}

// content lays the window out: toolbar on top, tools on the left, the
// lattice in the middle, panels on the right, status at the bottom.
func (u *UI) content() fyne.CanvasObject {
	u.undoButton = widget.NewButtonWithIcon("", theme.ContentUndoIcon(), func() { u.Session.Undo() })
	u.redoButton = widget.NewButtonWithIcon("", theme.ContentRedoIcon(), func() { u.Session.Redo() })
	u.planButton = widget.NewButtonWithIcon("Plan", theme.MediaPlayIcon(), u.StartPlan)
	u.planButton.Importance = widget.HighImportance
	toolbar := container.NewHBox(
		widget.NewButtonWithIcon("", theme.FolderOpenIcon(), u.openDialog),
		widget.NewButtonWithIcon("", theme.DocumentSaveIcon(), func() { u.save(nil) }),
		widget.NewSeparator(),
		u.undoButton, u.redoButton,
		widget.NewSeparator(),
		widget.NewLabel("Variant"), container.New(&fixedWidth{w: 200}, u.variantSelect),
		widget.NewButtonWithIcon("", theme.ContentCopyIcon(), func() { u.Session.DuplicateVariant(u.Session.VariantIndex()) }),
		widget.NewSeparator(),
		widget.NewButtonWithIcon("Check", theme.ConfirmIcon(), u.CheckNow),
		u.planButton,
		widget.NewButtonWithIcon("Export PDF", theme.DocumentPrintIcon(), func() { u.exportAs("pdf") }),
		layout.NewSpacer(),
		widget.NewButtonWithIcon("", theme.ZoomOutIcon(), func() { u.View.ZoomBy(1 / 1.5) }),
		widget.NewButtonWithIcon("Fit", theme.ZoomFitIcon(), u.View.Fit),
		widget.NewButtonWithIcon("", theme.ZoomInIcon(), func() { u.View.ZoomBy(1.5) }),
	)
	left := container.NewVScroll(container.NewThemeOverride(u.toolPalette(), compactTheme()))
	right := container.New(&fixedWidth{w: 350}, container.New(layout.NewCustomPaddedLayout(0, 0, 0, 6), u.tabs))
	status := container.NewBorder(nil, nil, container.New(&fixedWidth{w: 520}, u.cursorLabel), u.progressBox, u.hintLabel)
	viewFrame := container.NewStack(canvas.NewRectangle(render.ColOutside), u.View)
	return container.NewBorder(
		container.NewVBox(toolbar, widget.NewSeparator()),
		container.NewVBox(widget.NewSeparator(), status),
		container.New(&fixedWidth{w: 178}, left), right, viewFrame)
}

// fixedWidth lays out its single child at a fixed minimum width.
type fixedWidth struct{ w float32 }

func (f *fixedWidth) Layout(objs []fyne.CanvasObject, size fyne.Size) {
	for _, o := range objs {
		o.Move(fyne.NewPos(0, 0))
		o.Resize(size)
	}
}

func (f *fixedWidth) MinSize(objs []fyne.CanvasObject) fyne.Size {
	h := float32(0)
	for _, o := range objs {
		h = max(h, o.MinSize().Height)
	}
	return fyne.NewSize(f.w, h)
}

func heading(s string) *widget.Label {
	return widget.NewLabelWithStyle(s, fyne.TextAlignLeading, fyne.TextStyle{Bold: true})
}

// toolPalette is the left column: the tools, the current tool's
// options, and what the view overlays.
func (u *UI) toolPalette() fyne.CanvasObject {
	var buttons []fyne.CanvasObject
	for _, ti := range editor.Tools {
		t := ti.Tool
		b := widget.NewButton(fmt.Sprintf("%s  %c", ti.Name, ti.Key-'a'+'A'), func() { u.Session.SetTool(t) })
		b.Alignment = widget.ButtonAlignLeading
		u.toolButtons[t] = b
		buttons = append(buttons, b)
	}
	u.toolOptions = container.NewVBox()
	u.routeCheck = widget.NewCheck("Route of the plan", func(on bool) {
		u.View.Opts.Route = on
		u.View.Invalidate()
		u.refreshLegend()
	})
	u.routeCheck.SetChecked(true)
	u.findingsCheck = widget.NewCheck("Design-rule findings", func(on bool) {
		u.View.Opts.Findings = on
		u.View.Invalidate()
		u.refreshLegend()
	})
	u.findingsCheck.SetChecked(true)
	legend := widget.NewCheck("Legend", func(on bool) {
		if on {
			u.View.legend.Show()
		} else {
			u.View.legend.Hide()
		}
		u.View.LegendChanged()
	})
	legend.SetChecked(true)
	return container.NewVBox(
		heading("Tools"),
		container.NewGridWithColumns(1, buttons...),
		widget.NewSeparator(),
		heading("Options"),
		u.toolOptions,
		widget.NewSeparator(),
		heading("Show"),
		u.routeCheck, u.findingsCheck, legend,
	)
}

// refreshTools marks the current tool and shows its options.
func (u *UI) refreshTools() {
	for t, b := range u.toolButtons {
		imp := widget.LowImportance
		if t == u.Session.Tool {
			imp = widget.HighImportance
		}
		if b.Importance != imp {
			b.Importance = imp
			b.Refresh()
		}
	}
	u.toolOptions.Objects = u.optionsFor(u.Session.Tool)
	u.toolOptions.Refresh()
	if t := u.Session.Tool; t != u.toolShown {
		u.toolShown = t
		if t == editor.ToolDefect {
			// The defects it edits: on the view and in the Survey tab's list.
			u.tabs.Select(u.tabSurvey)
			u.survey.show.SetChecked(true)
		}
	}
}

// refreshHint shows what the tool does and, for the painting tools,
// which region the next stroke goes into.
func (u *UI) refreshHint() {
	s := u.Session
	hint := s.Tool.Info().Hint
	switch s.Tool {
	case editor.ToolSite, editor.ToolDimer, editor.ToolRect, editor.ToolPolygon, editor.ToolLine:
		if a := s.Active(); a >= 0 {
			hint = fmt.Sprintf("Adds to %s (Esc for a new region). %s", s.Variant().Regions[a].Name, hint)
		} else {
			hint = newRegionHint(s.Tool) + hint
		}
	case editor.ToolDefect:
		hint = defectHint(s)
	case editor.ToolSelect:
		if i, k := s.SelectedShape(); i >= 0 {
			r := s.Variant().Regions[i]
			hint = fmt.Sprintf("Selected %s %d of %d in %s: drag to move, Delete removes, Esc deselects.", editor.ShapeName(r.Shapes[k]), k+1, len(r.Shapes), r.Name)
		}
	}
	u.hintLabel.SetText(hint)
}

// defectHint says what the Defect tool will do: nothing without a
// survey; else what is selected and what a click adds.
func defectHint(s *editor.Session) string {
	sv := s.Design().Survey
	if sv == nil {
		return "Defect tool: " + editor.ErrNoSurvey.Error() + "."
	}
	adds := fmt.Sprintf("A click on the survey image adds a %s defect %s nm wide (Options).", s.Opts.DefectKind, trimZeros(fmt.Sprintf("%.2f", s.Opts.DefectSizeNM)))
	if i := s.SelectedDefect(); i >= 0 {
		d := sv.FieldDefects()[i]
		return fmt.Sprintf("Selected defect %d, %s %s at (%.2f, %.2f) nm: drag to move it, Delete removes it, Esc deselects.", i+1, d.Kind, d.Class, d.At.X, d.At.Y)
	}
	return adds + " Click a defect to select it, drag one to move it."
}

// newRegionHint says what region a tool's next stroke makes when none
// is selected: its role comes from the tool (editor.Session's guess).
func newRegionHint(t editor.Tool) string {
	switch t {
	case editor.ToolLine:
		return "Starts a new lead. "
	case editor.ToolRect, editor.ToolPolygon:
		return fmt.Sprintf("Starts a new region: a contact pad when %d nm or more a side, else a device. ", editor.PadMinNM)
	}
	return "Starts a new device region. "
}

// deleteSelection removes the selected defect with the Defect tool;
// else the selected shape, or else the selected regions.
func (u *UI) deleteSelection() {
	if u.Session.Tool == editor.ToolDefect {
		if _, err := u.Session.DeleteSelectedDefect(); err != nil {
			u.hintLabel.SetText("Problem: " + err.Error())
		}
		return
	}
	if !u.Session.DeleteSelectedShape() {
		if sel := u.Session.Selection(); len(sel) > 0 {
			u.Session.DeleteRegions(sel...)
		}
	}
}

// optionEntry is a numeric option field: it applies the value when it
// parses and the session accepts it, and says why not otherwise.
func (u *UI) optionEntry(label string, value string, apply func(string) error) fyne.CanvasObject {
	e := u.newEntry()
	e.SetText(value)
	msg := widget.NewLabel("")
	msg.Wrapping = fyne.TextWrapWord
	msg.Importance = widget.DangerImportance
	msg.Hide()
	e.OnChanged = func(s string) {
		if err := apply(s); err != nil {
			msg.SetText(err.Error())
			msg.Show()
		} else {
			msg.Hide()
		}
	}
	l := widget.NewLabel(label)
	l.Wrapping = fyne.TextWrapWord
	return container.NewVBox(l, e, msg)
}

func (u *UI) setOpt(f func(o *editor.ToolOptions) error) error {
	o := u.Session.Opts
	if err := f(&o); err != nil {
		return err
	}
	return u.Session.SetOptions(o)
}

func (u *UI) optionsFor(t editor.Tool) []fyne.CanvasObject {
	o := u.Session.Opts
	num := func(label string, v float64, set func(o *editor.ToolOptions, v float64)) fyne.CanvasObject {
		return u.optionEntry(label, trimZeros(fmt.Sprintf("%.3f", v)), func(s string) error {
			x, err := parseNumber(label, s)
			if err != nil {
				return err
			}
			return u.setOpt(func(o *editor.ToolOptions) error { set(o, x); return nil })
		})
	}
	template := func() fyne.CanvasObject {
		sel := widget.NewSelect(u.templateNames(), func(name string) {
			u.setOpt(func(o *editor.ToolOptions) error { o.Template = name; return nil })
		})
		sel.Selected = o.Template
		return container.NewVBox(widget.NewLabel("Window template"), sel, u.templateInfo(o.Template))
	}
	switch t {
	case editor.ToolSite, editor.ToolDimer, editor.ToolEraser:
		return []fyne.CanvasObject{num("Brush radius, nm (0: one at a time)", o.BrushNM, func(o *editor.ToolOptions, v float64) { o.BrushNM = v })}
	case editor.ToolLine:
		return []fyne.CanvasObject{num("Line width (nm)", o.LineWidthNM, func(o *editor.ToolOptions, v float64) { o.LineWidthNM = v })}
	case editor.ToolTerrace:
		// The tool asks before it finishes an outline (editor.ErrTerraceStep).
		step := widget.NewRadioGroup([]string{"up", "down"}, func(s string) {
			u.setOpt(func(o *editor.ToolOptions) error { o.TerraceStep = s; return nil })
		})
		step.Horizontal = true
		step.Selected = o.TerraceStep
		return []fyne.CanvasObject{
			wrapLabel("The step from the terrace under the first point to the new terrace goes"), step,
			mutedLabel("Up and down put the new lattice 0.27 nm apart: check it on your survey image. Enter finishes the outline."),
		}
	case editor.ToolDefect:
		kind := widget.NewRadioGroup([]string{design.DefectBright, design.DefectDark}, func(k string) {
			if k != "" {
				u.setOpt(func(o *editor.ToolOptions) error { o.DefectKind = k; return nil })
			}
		})
		kind.Horizontal = true
		kind.Required = true
		kind.Selected = o.DefectKind
		return []fyne.CanvasObject{
			widget.NewLabel("A click adds a defect"), kind,
			num("Apparent width (nm)", o.DefectSizeNM, func(o *editor.ToolOptions, v float64) { o.DefectSizeNM = v }),
			mutedLabel("Bright: dangling bonds, adsorbates, clusters; dark: vacancies, missing dimers. Its class follows from the kind and the width, by appearance."),
		}
	case editor.ToolWindow:
		return []fyne.CanvasObject{template()}
	case editor.ToolArray:
		of := widget.NewSelect([]string{"window", "dimer", "site"}, func(s string) {
			u.setOpt(func(o *editor.ToolOptions) error { o.ArrayOf = s; return nil })
		})
		of.Selected = o.ArrayOf
		// Label and field side by side: the four numbers then fit the
		// column of a laptop screen without scrolling.
		msg := errorLabel()
		form := widget.NewForm()
		field := func(label string, v int, set func(o *editor.ToolOptions, v int)) {
			e := u.newEntry()
			e.SetText(fmt.Sprint(v))
			e.OnChanged = func(s string) {
				x, err := parseInt(label, s)
				if err == nil {
					err = u.setOpt(func(o *editor.ToolOptions) error { set(o, x); return nil })
				}
				showErr(msg, err)
			}
			form.Append(label, e)
		}
		field("Columns", o.ArrayCols, func(o *editor.ToolOptions, v int) { o.ArrayCols = v })
		field("Rows", o.ArrayRows, func(o *editor.ToolOptions, v int) { o.ArrayRows = v })
		field("Dimer pitch", o.ArrayPitchDimers, func(o *editor.ToolOptions, v int) { o.ArrayPitchDimers = v })
		field("Row pitch", o.ArrayPitchRows, func(o *editor.ToolOptions, v int) { o.ArrayPitchRows = v })
		return []fyne.CanvasObject{
			container.NewBorder(nil, nil, widget.NewLabel("Repeat"), nil, of), template(), form, msg,
			mutedLabel("Pitches count dimers along the row and rows across it."),
		}
	}
	l := widget.NewLabel("No options.")
	l.Importance = widget.LowImportance
	return []fyne.CanvasObject{l}
}

func (u *UI) templateNames() []string {
	return u.Session.Design().Templates().Names()
}

func (u *UI) templateInfo(name string) fyne.CanvasObject {
	t, ok := editor.TemplateOf(u.Session.Design(), name)
	if !ok {
		return widget.NewLabel("")
	}
	p1 := fmt.Sprintf("%.0f %%", 100*t.P1)
	if t.P1SD > 0 {
		p1 = fmt.Sprintf("%.0f ± %.0f %%", 100*t.P1, 100*t.P1SD)
	}
	l := widget.NewLabel(fmt.Sprintf("%d dimers on one row, %d sites; one donor %s, none %.0f %%, two or more %.0f %%",
		t.Dimers, t.Sites(), p1, 100*t.P0, 100*t.P2Plus))
	l.Wrapping = fyne.TextWrapWord
	l.Importance = widget.LowImportance
	return l
}

// --- Legend ---

func (u *UI) legendBox() fyne.CanvasObject {
	bg := canvas.NewRectangle(color.NRGBA{0x10, 0x12, 0x16, 0xd8})
	bg.CornerRadius = 6
	bg.StrokeColor = color.NRGBA{0x50, 0x58, 0x66, 0xff}
	bg.StrokeWidth = 1
	return container.NewStack(bg, container.NewPadded(u.legend))
}

func swatch(c color.Color, w, h float32) fyne.CanvasObject {
	r := canvas.NewRectangle(c)
	r.SetMinSize(fyne.NewSize(w, h))
	return container.NewCenter(r)
}

func legendText(s string) *canvas.Text {
	t := canvas.NewText(s, color.NRGBA{0xe0, 0xe0, 0xe0, 0xff})
	t.TextSize = theme.TextSize() * 0.85
	return t
}

func legendRow(sw fyne.CanvasObject, text string) fyne.CanvasObject {
	return container.NewHBox(container.New(&fixedWidth{w: 22}, sw), legendText(text))
}

// legendName shortens a region name for the legend, which sits on the
// lattice and must stay narrow; the Regions panel shows it whole.
func legendName(s string) string {
	const most = 24
	if r := []rune(s); len(r) > most {
		return string(r[:most-1]) + "…"
	}
	return s
}

// refreshLegend lists what the view's colours mean right now.
// viewChanged follows a pan or zoom: the recovery copy keeps the view,
// and the legend folds away at atomic zoom (and opens again beyond it).
func (u *UI) viewChanged() {
	u.scheduleAutosave()
	if atomic := u.View.View().Atomic(); atomic != u.legendAtomic {
		u.legendAtomic = atomic
		u.legendOpen = false
		u.refreshLegend()
	}
}

func (u *UI) refreshLegend() {
	// At atomic zoom the legend would hide the very sites being drawn:
	// it folds into one button, which opens it on demand.
	if u.legendAtomic && !u.legendOpen {
		open := widget.NewButton("Legend ▾", func() { u.legendOpen = true; u.refreshLegend() })
		open.Importance = widget.LowImportance
		u.legend.Objects = []fyne.CanvasObject{open}
		u.legend.Refresh()
		u.View.Refresh()
		return
	}
	var rows []fyne.CanvasObject
	if u.legendAtomic {
		fold := widget.NewButton("Fold the legend ▴", func() { u.legendOpen = false; u.refreshLegend() })
		fold.Importance = widget.LowImportance
		rows = append(rows, fold)
	}
	v := u.Session.Variant()
	const maxRegions = 8
	for i, r := range v.Regions {
		if i == maxRegions {
			rows = append(rows, legendRow(swatch(color.Transparent, 12, 12), fmt.Sprintf("… %d more in Regions", len(v.Regions)-maxRegions)))
			break
		}
		rows = append(rows, legendRow(swatch(u.Session.RegionColour(i), 12, 12), fmt.Sprintf("%s (%s)", legendName(r.Name), r.Role.Name())))
	}
	if len(v.Regions) == 0 {
		rows = append(rows, legendRow(swatch(render.ColCleanH, 12, 12), "clean H-terminated surface"))
	}
	if p, stale := u.Session.Plan(); p != nil && u.View.Opts.Route {
		rows = append(rows, widget.NewSeparator())
		segs := container.NewHBox()
		for i := 0; i < min(len(p.Segments), 6); i++ {
			segs.Add(swatch(render.SegmentColor(i), 8, 12))
		}
		rows = append(rows, container.NewHBox(segs, legendText(fmt.Sprintf("strokes by segment (%d)", len(p.Segments)))))
		if stale {
			rows = append(rows, legendRow(swatch(color.Transparent, 12, 12), "route out of date: plan again"))
		}
		rows = append(rows, legendRow(swatch(render.ColMove, 14, 1), "tip moves"))
		rows = append(rows, legendRow(legendText("◇"), "registration on a fiducial"))
		rows = append(rows, legendRow(legendText("□"), "local registration (lattice beside the work)"))
	}
	if len(u.Session.Design().Fiducials) > 0 {
		rows = append(rows, legendRow(legendText("⊕"), "fiducial mark"))
	}
	if refs := u.Session.References(); len(refs) > 0 {
		rows = append(rows, legendRow(swatch(render.ColReference, 14, 2), "layout overlay (not written): "+legendName(strings.Join(refs, ", "))))
	}
	if surf := u.Session.Surface(); surf != nil && len(surf.Terraces) > 1 {
		rows = append(rows, widget.NewSeparator())
		for i, t := range surf.Terraces {
			rows = append(rows, legendRow(swatch(render.ColTerrace[i%len(render.ColTerrace)], 12, 12), fmt.Sprintf("terrace %s: rows along %s", legendName(t.Name), t.Rows)))
		}
		rows = append(rows, legendRow(swatch(render.ColStep, 14, 2), "step edge"))
	}
	if f, _ := u.Session.Findings(); len(f) > 0 && u.View.Opts.Findings {
		errs, warns := countFindings(f)
		if errs > 0 {
			rows = append(rows, legendRow(swatch(render.ColError, 12, 12), "design-rule error"))
		}
		if warns > 0 {
			rows = append(rows, legendRow(swatch(render.ColWarning, 12, 12), "design-rule warning"))
		}
	}
	u.legend.Objects = rows
	u.legend.Refresh()
	u.View.Refresh()
	u.View.LegendChanged()
}

// countFindings returns the numbers of errors and of warnings.
func countFindings(f []editor.Finding) (errs, warns int) {
	for _, x := range f {
		if x.Error {
			errs++
		} else {
			warns++
		}
	}
	return errs, warns
}

// --- Status ---

// showCursor prints the pointer's field position and lattice address.
func (u *UI) showCursor(p r2.Point, ok bool) {
	if !ok {
		u.cursorLabel.SetText("")
		return
	}
	text := fmt.Sprintf("(%.3f, %.3f) nm", p.X, p.Y)
	surf := u.Session.Surface()
	if site, _, on := surf.Snap(p); on && surf.Field.ContainsPoint(p) {
		text += fmt.Sprintf("  %s row %d dimer %d side %d", surf.Terraces[site.Terrace].Name, site.Row, site.Dimer, site.Side)
		if i := u.Session.RegionAt(p); i >= 0 {
			text += " · " + u.Session.Variant().Regions[i].Name
		}
	} else {
		text += "  outside the field"
	}
	u.cursorLabel.SetText(text)
}

func (u *UI) refreshHistory() {
	setEnabled(u.undoButton, u.Session.CanUndo())
	setEnabled(u.redoButton, u.Session.CanRedo())
	if u.undoItem != nil {
		u.undoItem.Label = "Undo " + u.Session.UndoLabel()
		u.undoItem.Disabled = !u.Session.CanUndo()
		u.redoItem.Label = "Redo " + u.Session.RedoLabel()
		u.redoItem.Disabled = !u.Session.CanRedo()
		u.menu.Refresh()
	}
}

type enabler interface {
	Enable()
	Disable()
}

func setEnabled(w enabler, on bool) {
	if on {
		w.Enable()
	} else {
		w.Disable()
	}
}

// --- Keys ---

// typedRune picks tools by their letter and zooms with + and -.
func (u *UI) typedRune(r rune) {
	switch r {
	case '+', '=':
		u.View.ZoomBy(1.5)
		return
	case '-', '_':
		u.View.ZoomBy(1 / 1.5)
		return
	case '0':
		u.View.Fit()
		return
	}
	for _, ti := range editor.Tools {
		if r == ti.Key || r == ti.Key-'a'+'A' {
			u.Session.SetTool(ti.Tool)
			return
		}
	}
}

// typedKey finishes or cancels paths, deletes the selection and pans
// with the arrow keys.
func (u *UI) typedKey(k *fyne.KeyEvent) {
	step := float64(u.View.view.W) / 8
	switch k.Name {
	case fyne.KeyReturn, fyne.KeyEnter:
		if err := u.Session.FinishPath(); err != nil {
			u.hintLabel.SetText(err.Error())
		}
	case fyne.KeyEscape:
		if u.Session.Drawing() {
			u.Session.CancelPath()
		} else if u.Session.Tool == editor.ToolDefect && u.Session.SelectedDefect() >= 0 {
			u.Session.SelectDefect(-1)
		} else if len(u.Session.Selection()) > 0 {
			// Nothing selected: the next stroke starts a new region.
			u.Session.Select()
		}
	case fyne.KeyDelete, fyne.KeyBackspace:
		u.deleteSelection()
	case fyne.KeyLeft:
		u.View.SetView(u.View.view.Pan(step, 0))
	case fyne.KeyRight:
		u.View.SetView(u.View.view.Pan(-step, 0))
	case fyne.KeyUp:
		u.View.SetView(u.View.view.Pan(0, step))
	case fyne.KeyDown:
		u.View.SetView(u.View.view.Pan(0, -step))
	case fyne.KeyHome:
		u.View.Fit()
	case fyne.KeyF5:
		u.CheckNow()
	}
}

func ctrl(k fyne.KeyName) *desktop.CustomShortcut {
	return &desktop.CustomShortcut{KeyName: k, Modifier: fyne.KeyModifierShortcutDefault}
}

func ctrlShift(k fyne.KeyName) *desktop.CustomShortcut {
	return &desktop.CustomShortcut{KeyName: k, Modifier: fyne.KeyModifierShortcutDefault | fyne.KeyModifierShift}
}

// addShortcuts registers the shortcuts on the canvas too, so they work
// where a main menu does not route them (and in tests).
func (u *UI) addShortcuts() {
	c := u.Win.Canvas()
	c.AddShortcut(&fyne.ShortcutUndo{}, func(fyne.Shortcut) { u.Session.Undo() })
	c.AddShortcut(&fyne.ShortcutRedo{}, func(fyne.Shortcut) { u.Session.Redo() })
	c.AddShortcut(ctrlShift(fyne.KeyZ), func(fyne.Shortcut) { u.Session.Redo() })
	c.AddShortcut(ctrl(fyne.KeyS), func(fyne.Shortcut) { u.save(nil) })
	c.AddShortcut(ctrlShift(fyne.KeyS), func(fyne.Shortcut) { u.saveAs(nil) })
	c.AddShortcut(ctrl(fyne.KeyO), func(fyne.Shortcut) { u.openDialog() })
	c.AddShortcut(ctrl(fyne.KeyN), func(fyne.Shortcut) { u.newDesign() })
	c.AddShortcut(ctrl(fyne.KeyReturn), func(fyne.Shortcut) { u.StartPlan() })
	c.AddShortcut(ctrl(fyne.KeyE), func(fyne.Shortcut) { u.exportAs("pdf") })
	c.AddShortcut(ctrl(fyne.KeyQ), func(fyne.Shortcut) { u.quit() })
}

// --- Menu ---

func (u *UI) buildMenu() {
	item := func(label string, sc fyne.Shortcut, f func()) *fyne.MenuItem {
		it := fyne.NewMenuItem(label, f)
		it.Shortcut = sc
		return it
	}
	u.recentMenu = fyne.NewMenuItem("Open recent", nil)
	u.recentMenu.ChildMenu = fyne.NewMenu("")
	u.refreshRecent()
	u.exportMenu = []*fyne.MenuItem{
		item("Export operator's plan (PDF)…", ctrl(fyne.KeyE), func() { u.exportAs("pdf") }),
		item("Export pattern and route (SVG)…", nil, func() { u.exportAs("svg") }),
		item("Export plan (JSON)…", nil, func() { u.exportAs("json") }),
		item("Export tip actions (CSV)…", nil, func() { u.exportAs("csv") }),
	}
	quit := item("Quit", ctrl(fyne.KeyQ), u.quit)
	quit.IsQuit = true
	file := fyne.NewMenu("File",
		item("New design", ctrl(fyne.KeyN), u.newDesign),
		item("Open…", ctrl(fyne.KeyO), u.openDialog),
		u.recentMenu,
		item("Open the demo design", nil, u.openDemo),
		fyne.NewMenuItemSeparator(),
		item("Save", ctrl(fyne.KeyS), func() { u.save(nil) }),
		item("Save as…", ctrlShift(fyne.KeyS), func() { u.saveAs(nil) }),
		fyne.NewMenuItemSeparator(),
		item("Import layout (GDSII)…", nil, u.importLayoutDialog),
		item("Remove layout overlays…", nil, u.removeReferences),
		item("Add survey image…", nil, func() { u.tabs.Select(u.tabSurvey); u.survey.addDialog() }),
		fyne.NewMenuItemSeparator(),
	)
	file.Items = append(file.Items, u.exportMenu...)
	file.Items = append(file.Items, fyne.NewMenuItemSeparator(), quit)

	u.cancelItem = fyne.NewMenuItem("Cancel planning", u.cancelPlan)
	u.cancelItem.Disabled = !u.Busy()
	u.undoItem = item("Undo", &fyne.ShortcutUndo{}, func() { u.Session.Undo() })
	// One Redo: Ctrl+Shift+Z in the menu, Ctrl+Y as well (a canvas
	// shortcut, see addShortcuts; the Help lists both). A second menu
	// item for Ctrl+Y was never disabled with nothing to redo.
	u.redoItem = item("Redo", ctrlShift(fyne.KeyZ), func() { u.Session.Redo() })
	edit := fyne.NewMenu("Edit", u.undoItem, u.redoItem,
		fyne.NewMenuItemSeparator(),
		fyne.NewMenuItem("Delete selected shape (Delete)", func() { u.Session.DeleteSelectedShape() }),
		fyne.NewMenuItem("Delete selected regions", func() { u.Session.DeleteRegions(u.Session.Selection()...) }),
		fyne.NewMenuItem("Select nothing (Esc)", func() { u.Session.Select() }),
	)
	var toolItems []*fyne.MenuItem
	for _, ti := range editor.Tools {
		t := ti.Tool
		toolItems = append(toolItems, fyne.NewMenuItem(fmt.Sprintf("%s (%c)", ti.Name, ti.Key-'a'+'A'), func() { u.Session.SetTool(t) }))
	}
	tools := fyne.NewMenu("Tools", toolItems...)
	view := fyne.NewMenu("View",
		fyne.NewMenuItem("Zoom in (+)", func() { u.View.ZoomBy(1.5) }),
		fyne.NewMenuItem("Zoom out (−)", func() { u.View.ZoomBy(1 / 1.5) }),
		fyne.NewMenuItem("Whole field (0)", u.View.Fit),
		fyne.NewMenuItem("Selected region", u.zoomToSelection),
	)
	plan := fyne.NewMenu("Plan",
		item("Check design rules (F5)", nil, u.CheckNow),
		item("Plan this variant", ctrl(fyne.KeyReturn), u.StartPlan),
		u.cancelItem,
		fyne.NewMenuItemSeparator(),
		fyne.NewMenuItem("Compare variants…", u.compareVariants),
		fyne.NewMenuItem("Instrument profile…", u.editProfile),
	)
	help := fyne.NewMenu("Help",
		fyne.NewMenuItem("Caution", u.showCaution),
		fyne.NewMenuItem("Keyboard and mouse", u.showKeys),
		fyne.NewMenuItem("About dimerpath", u.showAbout),
	)
	u.menu = fyne.NewMainMenu(file, edit, tools, view, plan, help)
	u.Win.SetMainMenu(u.menu)
}

func (u *UI) zoomToSelection() {
	b := r2.EmptyRect()
	for _, i := range u.Session.Selection() {
		b = b.Union(u.Session.RegionBounds(i))
	}
	if !b.IsEmpty() {
		u.View.ZoomTo(b)
	}
}

// --- Help ---

func (u *UI) showCaution() {
	l := widget.NewLabel(planner.Caution + "\n\ndimerpath refuses parameters outside the limits configured in the instrument profile, but those limits are only as good as the profile.")
	l.Wrapping = fyne.TextWrapWord
	d := dialog.NewCustom("Caution", "I understand", container.New(&fixedWidth{w: 460}, l), u.Win)
	d.Show()
}

// keyHelp lists the keys and mouse gestures: what is pressed, and what
// it does.
func keyHelp() [][2]string {
	var rows [][2]string
	for _, ti := range editor.Tools {
		rows = append(rows, [2]string{string(ti.Key - 'a' + 'A'), ti.Name + ": " + ti.Hint})
	}
	return append(rows,
		[2]string{"Wheel", "zoom around the pointer; + and − zoom, 0 or Home shows the whole field"},
		[2]string{"Drag", "with the Pan tool, the middle or the right button: move the view; the arrow keys pan"},
		[2]string{"Enter / Esc", "finish / cancel a polygon, line or terrace outline; Esc otherwise selects nothing, so the next stroke starts a new region"},
		[2]string{"Select tool", "click a shape to select it, drag it to move it by whole dimers and rows"},
		[2]string{"Delete", "remove the selected shape, or the selected regions; with the Defect tool, the selected defect"},
		[2]string{"Ctrl+Z", "undo; Ctrl+Shift+Z or Ctrl+Y redo"},
		[2]string{"Ctrl+S", "save; Ctrl+Shift+S save as; Ctrl+O open; Ctrl+N new"},
		[2]string{"Ctrl+Return", "plan the variant (the Return or Enter key); F5 checks the design rules; Ctrl+E exports the operator's PDF"},
	)
}

func (u *UI) showKeys() {
	form := widget.NewForm()
	for _, r := range keyHelp() {
		form.Append(r[0], wrapLabel(r[1]))
	}
	body := container.New(&fixedSize{fyne.NewSize(720, min(520, u.Win.Canvas().Size().Height-160))}, container.NewVScroll(form))
	dialog.NewCustom("Keyboard and mouse", "Close", body, u.Win).Show()
}

func (u *UI) showAbout() {
	version := u.opts.Generator
	if version == "" {
		version = "dimerpath (version not recorded)"
	}
	l := widget.NewLabel(version + "\n\ndimerpath plans STM hydrogen-depassivation lithography on Si(100)-2x1:H: paint a device on the real lattice, check its design rules, plan the write in atomic-precision and field-emission modes, split it into drift-safe segments and estimate the time and the dopant yield.\n\n" + planner.Caution)
	l.Wrapping = fyne.TextWrapWord
	dialog.NewCustom("About dimerpath", "Close", container.New(&fixedWidth{w: 460}, l), u.Win).Show()
}
