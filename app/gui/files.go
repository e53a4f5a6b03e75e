package gui

import (
	"context"
	"dimerpath/internal/jsonfile"
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"sync"
	"sync/atomic"
	"time"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/dialog"
	"fyne.io/fyne/v2/storage"
	"fyne.io/fyne/v2/widget"
	"github.com/golang/geo/r2"

	"dimerpath/app/editor"
	"dimerpath/export"
	"dimerpath/internal/atomicfile"
	"dimerpath/lattice/design"
	"dimerpath/planner"
)

// Files: open, save, save as, recent files, the unsaved-changes prompt,
// the recovery autosave, and exports.

const (
	prefRecent       = "recent-files"
	maxRecent        = 8
	recoveryName     = editor.RecoveryName
	recoveryMetaName = editor.RecoveryMetaName
)

// recoveryInfo is stored beside the recovery copy of the design.
type recoveryInfo = editor.RecoveryInfo

func (u *UI) configDir() (string, error) {
	if u.opts.ConfigDir != "" {
		return u.opts.ConfigDir, nil
	}
	dir, err := os.UserConfigDir()
	if err != nil {
		return "", err
	}
	return filepath.Join(dir, "dimerpath"), nil
}

// confirmDiscard runs then at once when nothing is unsaved, else after
// asking whether to save, discard or cancel.
func (u *UI) confirmDiscard(action string, then func()) {
	if !u.Session.Dirty() {
		then()
		return
	}
	name := fmt.Sprintf("%q", u.Session.Design().Name)
	if p := u.Session.Path(); p != "" {
		name += " (" + filepath.Base(p) + ")"
	}
	msg := widget.NewLabel(fmt.Sprintf("The design %s has changes that are not saved. Save them before you %s?", name, action))
	msg.Wrapping = fyne.TextWrapWord
	var d *dialog.CustomDialog
	save := widget.NewButton("Save", func() { d.Hide(); u.save(then) })
	save.Importance = widget.HighImportance
	discard := widget.NewButton("Discard changes", func() { d.Hide(); then() })
	discard.Importance = widget.DangerImportance
	cancel := widget.NewButton("Cancel", func() { d.Hide() })
	d = dialog.NewCustomWithoutButtons("Unsaved changes", container.New(&fixedWidth{w: 420}, msg), u.Win)
	d.SetButtons([]fyne.CanvasObject{cancel, discard, save})
	d.Show()
}

// quit closes the window, asking first about unsaved changes.
func (u *UI) quit() {
	u.confirmDiscard("close the window", func() {
		u.cancelPlan()
		u.removeRecovery()
		u.StopAutosave()
		u.Win.Close()
	})
}

func (u *UI) openDialog() {
	u.confirmDiscard("open another design", func() {
		u.chooseOpenFile([]string{".json"}, func(path string) { u.OpenPath(path) })
	})
}

// chooseOpenFile asks for a file to read, one of exts, starting in the
// folder of the current or most recent file, and calls then with its
// path (not when the dialog is cancelled).
func (u *UI) chooseOpenFile(exts []string, then func(path string)) {
	d := dialog.NewFileOpen(func(r fyne.URIReadCloser, err error) {
		if err != nil {
			dialog.ShowError(err, u.Win)
			return
		}
		if r == nil {
			return
		}
		path := r.URI().Path()
		r.Close()
		then(path)
	}, u.Win)
	d.SetFilter(storage.NewExtensionFileFilter(exts))
	if dir := u.lastDir(); dir != nil {
		d.SetLocation(dir)
	}
	d.Resize(fyne.NewSize(900, 600))
	d.Show()
}

// lastDir is the folder of the current or most recent file, for the file
// dialogs.
func (u *UI) lastDir() fyne.ListableURI {
	p := u.Session.Path()
	if p == "" {
		if r := u.recent(); len(r) > 0 {
			p = r[0]
		}
	}
	if p == "" {
		return nil
	}
	l, err := storage.ListerForURI(storage.NewFileURI(filepath.Dir(p)))
	if err != nil {
		return nil
	}
	return l
}

// OpenPath opens the design file at path, replacing the one shown. A
// file that fails to load leaves the current design and shows why.
func (u *UI) OpenPath(path string) error {
	d, err := editor.LoadDesign(path)
	if err == nil {
		var s *editor.Session
		if s, err = editor.NewSession(d, path); err == nil {
			u.SetSession(s)
			u.addRecent(path)
			return nil
		}
	}
	dialog.ShowError(errors.New(openErrorText(path, err)), u.Win)
	return err
}

// openErrorText says why path could not be opened, naming the file once:
// in the first line, the problems after it by line and column (the
// design reader's errors name the file on every line, which the dialog
// repeated after its own "could not open PATH").
func openErrorText(path string, err error) string {
	var je *jsonfile.Error
	var pe *fs.PathError
	switch {
	case errors.As(err, &je):
		c := *je
		c.File = ""
		return fmt.Sprintf("Could not open %s:\n%s", path, c.Error())
	case errors.As(err, &pe):
		return fmt.Sprintf("Could not open %s: %v", path, pe.Err)
	}
	return fmt.Sprintf("Could not open %s:\n%s", path, strings.ReplaceAll(err.Error(), path+": ", ""))
}

func (u *UI) newDesign() {
	u.confirmDiscard("start a new design", func() {
		s, err := editor.NewSession(editor.NewDesign(), "")
		if err != nil {
			dialog.ShowError(err, u.Win)
			return
		}
		u.SetSession(s)
	})
}

func (u *UI) openDemo() {
	u.confirmDiscard("open the demo", func() {
		d, err := editor.DemoDesign()
		if err == nil {
			var s *editor.Session
			if s, err = editor.NewSession(d, ""); err == nil {
				u.SetSession(s)
				return
			}
		}
		dialog.ShowError(err, u.Win)
	})
}

// save writes the design to its file (or asks for one), then runs then
// if it succeeded.
func (u *UI) save(then func()) {
	if u.Session.Path() == "" {
		u.saveAs(then)
		return
	}
	if err := u.SaveTo(u.Session.Path()); err != nil {
		dialog.ShowError(err, u.Win)
		return
	}
	if then != nil {
		then()
	}
}

// SaveTo writes the design atomically to path and records it as saved.
func (u *UI) SaveTo(path string) error {
	if err := editor.SaveDesign(path, u.Session.Design()); err != nil {
		return fmt.Errorf("could not save %s:\n%w", path, err)
	}
	u.Session.MarkSaved(path)
	u.addRecent(path)
	u.removeRecovery()
	u.hintLabel.SetText("Saved " + path)
	return nil
}

func (u *UI) saveAs(then func()) {
	name := u.Session.Design().Name
	if p := u.Session.Path(); p != "" {
		name = strings.TrimSuffix(filepath.Base(p), filepath.Ext(p))
	}
	u.chooseFile(safeFileName(name)+".json", []string{".json"}, func(path string) { u.saveAsTo(path, then) })
}

// saveAsTo saves the design to the path chosen in Save As and runs then
// when that worked. An untitled design takes the file's name.
func (u *UI) saveAsTo(path string, then func()) {
	if n := u.Session.Design().Name; n == "" || n == editor.NewDesign().Name {
		u.Session.SetDesignName(strings.TrimSuffix(filepath.Base(path), filepath.Ext(path)))
	}
	if err := u.SaveTo(path); err != nil {
		dialog.ShowError(err, u.Win)
		return
	}
	if then != nil {
		then()
	}
}

// safeFileName turns a design or variant name into a file name.
func safeFileName(s string) string {
	var b strings.Builder
	for _, c := range s {
		switch {
		case c >= 'a' && c <= 'z', c >= 'A' && c <= 'Z', c >= '0' && c <= '9', c == '-', c == '_', c == '.':
			b.WriteRune(c)
		default:
			b.WriteRune('-')
		}
	}
	if b.Len() == 0 {
		return "design"
	}
	return b.String()
}

// --- Recent files ---

func (u *UI) recent() []string {
	return u.App.Preferences().StringList(prefRecent)
}

func (u *UI) addRecent(path string) {
	if abs, err := filepath.Abs(path); err == nil {
		path = abs
	}
	r := slices.DeleteFunc(slices.Clone(u.recent()), func(p string) bool { return p == path })
	r = append([]string{path}, r...)
	if len(r) > maxRecent {
		r = r[:maxRecent]
	}
	u.App.Preferences().SetStringList(prefRecent, r)
	u.refreshRecent()
}

func (u *UI) refreshRecent() {
	if u.recentMenu == nil {
		return
	}
	var items []*fyne.MenuItem
	for _, p := range u.recent() {
		path := p
		items = append(items, fyne.NewMenuItem(path, func() {
			u.confirmDiscard("open another design", func() { u.OpenPath(path) })
		}))
	}
	if len(items) == 0 {
		none := fyne.NewMenuItem("(none yet)", nil)
		none.Disabled = true
		items = append(items, none)
	}
	u.recentMenu.ChildMenu.Items = items
	if u.menu != nil {
		u.menu.Refresh()
	}
}

// --- Autosave and recovery ---

// StartAutosave writes the design to the recovery file every interval
// while it has unsaved changes (a fallback: scheduleAutosave writes it a
// few seconds after each change).
func (u *UI) StartAutosave() {
	every := u.opts.Autosave
	if every < 0 {
		return
	}
	if every == 0 {
		every = time.Minute
	}
	u.StopAutosave()
	u.autosaveStopped = false
	stop := make(chan struct{})
	u.stopAutosave = stop
	go func() {
		t := time.NewTicker(every)
		defer t.Stop()
		for {
			select {
			case <-stop:
				return
			case <-t.C:
				fyne.Do(func() { u.Autosave() })
			}
		}
	}()
}

// StopAutosave stops the autosave ticker and drops a pending debounced
// autosave (on quitting, a copy written after the recovery files were
// removed would be offered back next time).
func (u *UI) StopAutosave() {
	if u.stopAutosave != nil {
		close(u.stopAutosave)
		u.stopAutosave = nil
	}
	if u.autosaveTimer != nil {
		u.autosaveTimer.Stop()
		u.autosaveTimer = nil
	}
	u.autosaveStopped = true
}

// maxAutosaveWait bounds how long a change waits for its recovery copy
// while changes keep coming: a user drawing without pause for a minute
// still has a copy every 15 s.
const maxAutosaveWait = 15 * time.Second

// scheduleAutosave writes the recovery copy a few seconds after the last
// change (an edit, another variant, a new plan, a pan or zoom; the wait
// starts again with each), and at the latest maxAutosaveWait after the
// first change it waits for. Autosave writes only unsaved work.
func (u *UI) scheduleAutosave() {
	delay := u.opts.AutosaveDelay
	if u.opts.Autosave < 0 || delay < 0 || u.autosaveStopped {
		return
	}
	if delay == 0 {
		delay = 3 * time.Second
	}
	now := time.Now()
	if u.autosaveTimer == nil {
		u.autosaveFirst = now
	} else {
		u.autosaveTimer.Stop()
	}
	wait := min(delay, max(0, u.autosaveFirst.Add(maxAutosaveWait).Sub(now)))
	var t *time.Timer
	t = time.AfterFunc(wait, func() {
		fyne.Do(func() {
			if u.autosaveTimer == t {
				u.autosaveTimer = nil
				u.Autosave()
			}
		})
	})
	u.autosaveTimer = t
}

// workState is the working state the recovery copy's description
// keeps besides the design: the variant shown, the view and the last
// plan's inputs (editor.RecoveryInfo).
type workState struct {
	variant string
	view    editor.RecoveryView
	plan    editor.RecoveryPlan // zero without a plan
	profile string              // the profile's name, to notice a change
}

// workingState returns the working state now.
func (u *UI) workingState() workState {
	s := u.Session
	v := u.View.View()
	m := workState{variant: s.Variant().Name, view: editor.RecoveryView{CentreNM: [2]float64{v.Center.X, v.Center.Y}, NMPerPixel: v.Scale},
		profile: s.Profile.Name}
	// The plan shown, also one an edit since made out of date: its inputs
	// plan the recovered design again.
	if p, _ := s.Plan(); p != nil {
		m.plan = editor.RecoveryPlan{Variant: p.Variant, Seed: p.Seed}
	}
	return m
}

// info returns the description of a recovery copy with this state.
func (m workState) info(path string) recoveryInfo {
	info := recoveryInfo{Path: path, SavedAt: time.Now(), Variant: m.variant}
	if m.view.NMPerPixel > 0 {
		v := m.view
		info.View = &v
	}
	if m.plan.Variant != "" {
		p := m.plan
		info.Plan = &p
	}
	return info
}

// Autosave starts writing the recovery copy if there is unsaved work
// and it, or the working state around it (variant, view, last plan),
// changed since the last copy, and no copy is being written; it returns
// at once. On Fyne's goroutine it only takes the current undo state, an
// immutable snapshot that is already made, and the working state; the
// design is assembled from the snapshot, encoded and written in the
// background, so a design with millions of hand-painted sites never
// stalls the window. When only the working state changed, only the
// description and the profile are written. One copy is written at a
// time: a call that finds one in flight leaves its state to the next.
// The channel receives the write's result (nil when there was nothing to
// write), for tests.
func (u *UI) Autosave() <-chan error {
	done := make(chan error, 1)
	s := u.Session
	snap := s.Token()
	meta := u.workingState()
	if !s.Dirty() || (snap == u.lastAutosave && meta == u.lastMeta) || u.autosaving {
		if u.autosaving {
			u.scheduleAutosave() // try again once this write is done
		}
		done <- nil
		return done
	}
	dir, err := u.configDir()
	if err != nil {
		done <- err
		return done
	}
	u.autosaving = true
	info := meta.info(s.Path())
	metaOnly := snap == u.lastAutosave
	prof := s.Profile
	rec := u.recovery
	gen := rec.generation()
	save := u.jobs.SaveRecovery
	go func() {
		err := editor.Guard(func() error {
			return rec.write(gen, func() error {
				d := snap.Design()
				info.Design = d.Name
				if !metaOnly {
					if err := writeRecovery(save, dir, d, info); err != nil {
						return err
					}
				}
				return editor.WriteRecoveryInfo(dir, info, &prof)
			})
		})
		fyne.Do(func() {
			u.autosaving = false
			if err == nil && u.Session == s {
				u.lastAutosave, u.lastMeta = snap, meta
			}
			if _, bug := editor.BugDetails(err); bug {
				// Not again for this state: the next edit tries anew.
				u.lastAutosave, u.lastMeta = snap, meta
				u.showBugOnce("Writing the recovery copy", err)
			} else if err != nil {
				u.hintLabel.SetText("Could not write the recovery copy to " + dir + ": " + err.Error())
			}
		})
		done <- err
	}()
	return done
}

// recoveryFiles orders the writes and removals of the recovery copy: a
// removal (after a save, on quitting) waits for a write in flight and
// makes any write that started before it do nothing, so a saved design
// is never offered back as unsaved work.
type recoveryFiles struct {
	mu  sync.Mutex   // held while the files are written or removed
	gen atomic.Int64 // removals so far
}

func (r *recoveryFiles) generation() int64 { return r.gen.Load() }

// write runs f unless a removal happened since generation gen.
func (r *recoveryFiles) write(gen int64, f func() error) error {
	r.mu.Lock()
	defer r.mu.Unlock()
	if r.gen.Load() != gen {
		return nil
	}
	return f()
}

// remove runs f and makes every write started before it void.
func (r *recoveryFiles) remove(f func()) {
	r.mu.Lock()
	defer r.mu.Unlock()
	r.gen.Add(1)
	f()
}

// writeRecovery writes the recovery copy of d with save, and its
// description beside it.
func writeRecovery(save func(string, *design.Design) error, dir string, d *design.Design, info recoveryInfo) error {
	return editor.WriteRecovery(dir, d, info, save)
}

func (u *UI) removeRecovery() {
	dir, err := u.configDir()
	if err != nil {
		return
	}
	u.recovery.remove(func() { editor.RemoveRecovery(dir) })
	u.lastAutosave = editor.PlanToken{}
}

// OfferRecovery asks whether to restore a recovery file left by a
// session that did not close cleanly. It first removes the temporary
// files that a save or export killed mid-write left beside the recent
// files (the recovery copy's directory is cleaned by FindRecovery).
func (u *UI) OfferRecovery() {
	var dirs []string
	for _, f := range u.recent() {
		dirs = append(dirs, filepath.Dir(f))
	}
	editor.CleanStaleFiles(dirs...)
	dir, err := u.configDir()
	if err != nil {
		return
	}
	info, found := editor.FindRecovery(dir)
	if !found {
		return
	}
	if info.Design == "" {
		info.Design = "(its description was lost)"
	}
	what := fmt.Sprintf("dimerpath did not close cleanly last time. It kept a copy of the unsaved design %q from %s.", info.Design, info.SavedAt.Local().Format("2 Jan 2006 15:04"))
	then := "Recover opens it as unsaved work; save it where you like. Discard deletes the copy."
	if info.Path != "" {
		what = fmt.Sprintf("dimerpath did not close cleanly last time. It kept a copy of %q with the changes not yet saved to %s, from %s.", info.Design, info.Path, info.SavedAt.Local().Format("2 Jan 2006 15:04"))
		then = "Recover opens it as unsaved changes to that file (Ctrl+S writes them there). Discard deletes the copy; the file keeps its last saved state."
	}
	msg := wrapLabel(what + "\n\n" + then)
	dialog.ShowCustomConfirm("Recover unsaved work?", "Recover", "Discard", container.New(&fixedWidth{w: 440}, msg), func(ok bool) {
		if !ok {
			u.removeRecovery()
			return
		}
		if err := u.Recover(); err != nil {
			dialog.ShowError(err, u.Win)
		}
	}, u.Win)
}

// Recover opens the recovery copy as an unsaved design belonging to the
// file it was autosaved from.
func (u *UI) Recover() error {
	dir, err := u.configDir()
	if err != nil {
		return err
	}
	d, info, err := editor.LoadRecovery(dir)
	if err != nil {
		return fmt.Errorf("the recovery copy could not be read: %w", err)
	}
	s, err := editor.NewSession(d, info.Path)
	if err != nil {
		return err
	}
	s.MarkUnsaved()
	// The working state: the profile, the variant shown, the view, and
	// the last plan, made again (the same design, profile and seed give
	// the same plan).
	if p, ok := editor.LoadRecoveryProfile(dir); ok {
		s.SetProfile(p, "")
	}
	for i, n := range s.VariantNames() {
		if n == info.Variant {
			s.SetVariant(i)
		}
	}
	u.SetSession(s)
	if v := info.View; v != nil {
		view := u.View.View()
		view.Center, view.Scale = r2.Point{X: v.CentreNM[0], Y: v.CentreNM[1]}, v.NMPerPixel
		u.View.SetView(view)
	}
	if p := info.Plan; p != nil && p.Variant == s.Variant().Name {
		u.opts.Seed = p.Seed
		u.StartPlan()
	}
	return nil
}

// --- Export ---

const prefPaper = "paper"

// withCaution shows the caution before an export, with the paper size
// for printed reports, and runs then with the settings if the user goes
// on.
func (u *UI) withCaution(what, kind string, then func(editor.ExportSettings)) {
	carries := map[string]string{
		"pdf":    "The printed plan carries this caution on its first page and at the foot of every page.",
		"svg":    "The SVG carries this caution under the figure.",
		"json":   `The plan file carries this caution in its "caution" field.`,
		"csv":    "The action CSV holds the tip actions only, not this caution: keep the two together.",
		"report": "The report carries this caution at its top.",
	}[kind]
	parts := []fyne.CanvasObject{wrapLabel(planner.Caution + "\n\n" + carries)}
	// Only what is printed has a paper size.
	var paper *widget.RadioGroup
	if kind == "pdf" || kind == "report" {
		paper = widget.NewRadioGroup([]string{"A4", "US Letter"}, nil)
		paper.Horizontal = true
		if u.App.Preferences().StringWithFallback(prefPaper, string(export.A4)) == string(export.Letter) {
			paper.SetSelected("US Letter")
		} else {
			paper.SetSelected("A4")
		}
		label := "Paper"
		if kind == "report" {
			label = "Paper (PDF)"
		}
		parts = append(parts, widget.NewForm(widget.NewFormItem(label, paper)))
	}
	dialog.ShowCustomConfirm("Before you export "+what, "Continue…", "Cancel", container.New(&fixedWidth{w: 480}, container.NewVBox(parts...)), func(ok bool) {
		if !ok {
			return
		}
		es := editor.ExportSettings{Paper: export.A4, Generator: u.opts.Generator, Date: time.Now()}
		if paper != nil {
			if paper.Selected == "US Letter" {
				es.Paper = export.Letter
			}
			u.App.Preferences().SetString(prefPaper, string(es.Paper))
		} else if u.App.Preferences().StringWithFallback(prefPaper, string(export.A4)) == string(export.Letter) {
			es.Paper = export.Letter
		}
		then(es)
	}, u.Win)
}

// exportAs exports the current variant's plan as kind (pdf, svg, json
// or csv) after the caution. A missing or out-of-date plan is offered to
// be made first.
func (u *UI) exportAs(kind string) {
	p, stale := u.Session.Plan()
	if p == nil || stale {
		what := "has not been planned"
		if stale {
			what = "changed since it was planned"
		}
		dialog.ShowConfirm("Plan first", fmt.Sprintf("Variant %s %s. Plan it now? The export goes on when the plan is ready.", u.Session.Variant().Name, what), func(ok bool) {
			if ok && !u.Busy() {
				u.afterPlan = func() { u.exportAs(kind) }
				u.StartPlan()
			}
		}, u.Win)
		return
	}
	d := u.Session.DesignCopy()
	u.withCaution("the plan", kind, func(es editor.ExportSettings) {
		name := safeFileName(u.Session.Design().Name+"-"+p.Variant) + "." + kind
		u.chooseFile(name, []string{"." + kind}, func(path string) { u.exportPlanTo(path, d, p, es) })
	})
}

// exportPlanTo writes plan p of design d to path in the background.
func (u *UI) exportPlanTo(path string, d *design.Design, p *planner.Plan, es editor.ExportSettings) {
	write := u.jobs.Export
	u.runInBackground("Exporting "+filepath.Base(path)+"…", func(ctx context.Context, progress func(string, float64)) error {
		return write(ctx, path, d, p, es, progress)
	}, "Exported "+path)
}

// chooseFile asks for a file to write, suggesting name, and calls then
// with its path; a name without one of exts gets exts[0]. The file is
// not touched here: the dialog's writer is closed unwritten (see
// lazyFiles), and then writes the file through a temporary file, so a
// write that fails leaves the old file as it was. A path that cannot be
// written (atomicfile.Check) is refused at once, before any work.
func (u *UI) chooseFile(name string, exts []string, then func(path string)) {
	d := dialog.NewFileSave(func(w fyne.URIWriteCloser, err error) {
		path, err := chosenPath(w, err, exts)
		if err == nil && path != "" {
			// A read-only or full directory shows now, not after the work.
			err = atomicfile.Check(path)
		}
		switch {
		case err != nil:
			dialog.ShowError(err, u.Win)
		case path != "":
			then(path)
		}
	}, u.Win)
	d.SetFileName(name)
	d.SetFilter(storage.NewExtensionFileFilter(exts))
	if dir := u.lastDir(); dir != nil {
		d.SetLocation(dir)
	}
	d.Resize(fyne.NewSize(900, 600))
	d.Show()
}

// chosenPath returns the path a save dialog chose ("" when it was
// cancelled), closing its writer without writing, and adds exts[0] to a
// name that has none of exts.
func chosenPath(w fyne.URIWriteCloser, err error, exts []string) (string, error) {
	if err != nil || w == nil {
		return "", err
	}
	path := w.URI().Path()
	if err := w.Close(); err != nil {
		return "", fmt.Errorf("%s: %w", path, err)
	}
	ext := strings.ToLower(filepath.Ext(path))
	if len(exts) > 0 && !slices.Contains(exts, ext) {
		path += exts[0]
	}
	return path, nil
}

// runInBackground runs job with the progress bar and its Cancel button,
// then reports done or the error.
func (u *UI) runInBackground(msg string, job func(ctx context.Context, progress func(string, float64)) error, done string) {
	if u.Busy() {
		dialog.ShowInformation("Busy", "Wait for the running job to finish, or cancel it.", u.Win)
		return
	}
	ctx, cancel := context.WithCancel(context.Background())
	u.planCancel = cancel
	u.showProgress(msg, 0)
	progress := u.progressFunc("", 1, 0)
	go func() {
		err := editor.Guard(func() error { return job(ctx, progress) })
		fyne.Do(func() {
			if u.jobDone != nil {
				defer u.jobDone()
			}
			u.planCancel = nil
			u.hideProgress()
			switch {
			case errors.Is(err, context.Canceled):
				u.hintLabel.SetText("Cancelled; nothing was written.")
			case err != nil:
				u.showJobError(strings.TrimSuffix(msg, "…"), err)
			default:
				u.hintLabel.SetText(done)
			}
		})
	}()
}
