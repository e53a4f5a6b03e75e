package gui

import (
	"context"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/container"
	"fyne.io/fyne/v2/driver/desktop"
	"fyne.io/fyne/v2/test"
	"fyne.io/fyne/v2/widget"
	"github.com/golang/geo/r2"

	"dimerpath/app/editor"
	"dimerpath/app/editor/editortest"
	"dimerpath/export"
	"dimerpath/lattice/design"
)

// Tests of what a lab user tripped over in a real session (see the GUI
// section of DEVELOPERS.md).

func TestClickOnTheLatticeTakesTheKeys(t *testing.T) {
	u, w := newTestUI(t, nil)
	u.Session.Select(0)
	c := w.Canvas()
	c.Focus(u.regions.name) // the user just renamed the island
	if c.Focused() != u.regions.name {
		t.Fatal("could not focus the region name")
	}
	test.TapCanvas(c, screenPos(u, r2.Point{X: 150, Y: 150}))
	if c.Focused() != u.View {
		t.Fatalf("after a click on the lattice the keys go to %T, want the lattice view", c.Focused())
	}
	// A tool's letter now picks the tool and leaves the name alone.
	c.Focused().(fyne.Focusable).TypedRune('r')
	if u.Session.Tool != editor.ToolRect {
		t.Errorf("typing r picked %v, want the rectangle tool", u.Session.Tool.Info().Name)
	}
	if got := u.Session.Variant().Regions[0].Name; got != "island" {
		t.Errorf("the region was renamed to %q by a key meant for the lattice", got)
	}
}

// Issue 13: Esc did nothing once a panel field had the focus. Esc,
// Delete and the tool keys act on the lattice whenever the pointer is
// over it or nothing is being typed.
func TestKeysReachTheLatticeAfterPanels(t *testing.T) {
	t.Run("Esc in a text field", func(t *testing.T) {
		u, w := newTestUI(t, nil)
		u.Session.Select(0)
		c := w.Canvas()
		c.Focus(u.regions.name)
		c.Focused().TypedKey(&fyne.KeyEvent{Name: fyne.KeyEscape})
		if len(u.Session.Selection()) != 0 {
			t.Error("Esc in the region's name field did not deselect")
		}
		if c.Focused() != u.View {
			t.Errorf("after Esc the keys go to %T, want the lattice view", c.Focused())
		}
	})
	t.Run("a list, then Delete", func(t *testing.T) {
		u, w := newTestUI(t, nil)
		c := w.Canvas()
		c.Focus(u.regions.list) // a click on the list focuses it
		u.regions.list.Select(1)
		if c.Focused() != u.View {
			t.Fatalf("after choosing a region in the list the keys go to %T, want the lattice view", c.Focused())
		}
		c.Focused().TypedKey(&fyne.KeyEvent{Name: fyne.KeyDelete})
		if n := len(u.Session.Variant().Regions); n != 1 {
			t.Errorf("Delete after choosing a region in the list left %d regions, want 1", n)
		}
	})
	t.Run("a choice, then a tool key", func(t *testing.T) {
		u, w := newTestUI(t, nil)
		u.Session.Select(0)
		c := w.Canvas()
		c.Focus(u.regions.role)
		u.regions.role.SetSelected(roleOf(design.RoleGate))
		if c.Focused() != u.View {
			t.Fatalf("after choosing a role the keys go to %T, want the lattice view", c.Focused())
		}
		c.Focused().(fyne.Focusable).TypedRune('l')
		if u.Session.Tool != editor.ToolLine {
			t.Errorf("typing l picked %v, want the line tool", u.Session.Tool.Info().Name)
		}
	})
	t.Run("the pointer over the lattice", func(t *testing.T) {
		u, w := newTestUI(t, nil)
		u.Session.Select(0)
		c := w.Canvas()
		c.Focus(u.regions.tol)
		test.MoveMouse(c, screenPos(u, r2.Point{X: 150, Y: 150}))
		if c.Focused() != u.View {
			t.Fatalf("with the pointer over the lattice the keys go to %T, want the lattice view", c.Focused())
		}
		c.Focused().(fyne.Focusable).TypedRune('w')
		if u.Session.Tool != editor.ToolWindow {
			t.Errorf("typing w picked %v, want the window tool", u.Session.Tool.Info().Name)
		}
		if u.regions.tol.Text != "" {
			t.Errorf("the tolerance field took the key: %q", u.regions.tol.Text)
		}
	})
}

// fieldAndLegend returns the field's and the legend's rectangles in
// the view's units.
func fieldAndLegend(u *UI) (field, legend r2.Rect) {
	f := u.Session.Surface().Field
	a, b := u.View.PositionOf(r2.Point{X: f.X.Lo, Y: f.Y.Hi}), u.View.PositionOf(r2.Point{X: f.X.Hi, Y: f.Y.Lo})
	field = r2.RectFromPoints(r2.Point{X: float64(a.X), Y: float64(a.Y)}, r2.Point{X: float64(b.X), Y: float64(b.Y)})
	lp, ls := u.View.legend.Position(), u.View.legend.Size()
	legend = r2.RectFromPoints(r2.Point{X: float64(lp.X), Y: float64(lp.Y)}, r2.Point{X: float64(lp.X + ls.Width), Y: float64(lp.Y + ls.Height)})
	return field, legend
}

func TestLegendNeverCoversTheFittedField(t *testing.T) {
	for _, size := range []fyne.Size{{Width: 1280, Height: 800}, {Width: 1600, Height: 1000}} {
		s := editortest.Tiny(t)
		u, w := newTestUI(t, s)
		w.Resize(size)
		w.Canvas().Capture()
		// Long names and a plan that is out of date make the legend grow
		// after the field was fitted.
		u.Session.Select(0)
		if err := u.Session.RenameRegion(0, "sensor island with a long descriptive name"); err != nil {
			t.Fatal(err)
		}
		u.Session.SetPlan(editortest.HandPlan(u.Session), "A", editor.PlanToken{})
		u.CheckSync()
		w.Canvas().Capture()
		if !strings.Contains(texts(u.legend), "route out of date") {
			t.Fatalf("%v: the legend does not show the stale route:\n%s", size, texts(u.legend))
		}
		field, legend := fieldAndLegend(u)
		if field.Intersects(legend) {
			t.Errorf("%v: legend %v covers the field %v", size, legend, field)
		}
		// Zoomed in by the user, the view is left where it is.
		u.View.ZoomBy(2)
		v := u.View.View()
		u.Session.AddRegion("another", "other")
		if u.View.View() != v {
			t.Errorf("%v: a legend change moved a view the user had zoomed", size)
		}
	}
}

func TestComparisonFitsItsDialog(t *testing.T) {
	u, w := newTestUI(t, nil)
	p := editortest.HandPlan(u.Session)
	res := []export.VariantResult{
		{Variant: "A", Plan: p},
		{Variant: "gate-written-in-FE-mode", Plan: p},
	}
	view := comparisonView(res, []string{"passes", "1 error"})
	w.SetContent(view)
	// The dialog shows it 1100 units wide (showComparison), which fits a
	// 1280-pixel laptop screen.
	if text := texts(view); !strings.Contains(text, "Design rules") || !strings.Contains(text, "1 error") {
		t.Errorf("the comparison does not say how each variant fares under the rules:\n%s", text)
	}
	if got := view.MinSize().Width; got > 1100 {
		t.Errorf("the comparison needs %.0f units, more than its 1100-unit dialog: text would be cut off", got)
	}
	table := view.(*fyne.Container).Objects[0].(*fyne.Container)
	tl := table.Layout.(*tableLayout)
	widths, _ := tl.sizes(table.Objects)
	name := widget.NewLabel("gate-written-in-FE-mode")
	if widths[0] < name.MinSize().Width-1 {
		t.Errorf("the variant column is %.0f wide, narrower than the name", widths[0])
	}
}

func TestUntitledDesignTakesItsFileName(t *testing.T) {
	s, err := editor.NewSession(editor.NewDesign(), "")
	if err != nil {
		t.Fatal(err)
	}
	u, _ := newTestUI(t, s)
	saved := false
	u.saveAsTo(filepath.Join(t.TempDir(), "set-sensor.json"), func() { saved = true })
	if !saved || u.Session.Design().Name != "set-sensor" || u.Session.Dirty() {
		t.Errorf("after Save As: saved %v, name %q, dirty %v", saved, u.Session.Design().Name, u.Session.Dirty())
	}
	// A named design keeps its name; the Design tab renames it, undoably.
	u.saveAsTo(filepath.Join(t.TempDir(), "copy.json"), nil)
	if u.Session.Design().Name != "set-sensor" {
		t.Errorf("a named design was renamed to %q by Save As", u.Session.Design().Name)
	}
	u.marks.name.CursorColumn = len(u.marks.name.Text)
	test.Type(u.marks.name, " v2")
	if u.Session.Design().Name != "set-sensor v2" || !u.Session.Dirty() {
		t.Errorf("typing in the Design tab's name: %q, dirty %v", u.Session.Design().Name, u.Session.Dirty())
	}
	u.Session.Undo()
	if u.Session.Design().Name != "set-sensor" {
		t.Errorf("one undo should revert the whole typed name, got %q", u.Session.Design().Name)
	}
	u.marks.name.SetText("  ")
	if u.marks.nameMsg.Hidden || u.Session.Design().Name != "set-sensor" {
		t.Error("an empty design name was accepted")
	}
}

func TestDecimalCommaIsExplained(t *testing.T) {
	for _, c := range []struct{ in, want string }{
		{"2,5", `"2,5" is not a number: write decimals with a point (2.5)`},
		{"abc", `"abc" is not a number`},
		{"1,000.5", `"1,000.5" is not a number`},
		{" ", "empty; type a number"},
	} {
		if got := notANumber(c.in); got != c.want {
			t.Errorf("notANumber(%q) = %q, want %q", c.in, got, c.want)
		}
	}
	u, _ := newTestUI(t, nil)
	e := u.openProfileEditor()
	e.entry("ap.current_a").SetText("2,5")
	e.apply()
	if e.msg.Hidden || !strings.Contains(e.msg.Text, "write decimals with a point (2.5)") {
		t.Errorf("profile editor says %q for 2,5", e.msg.Text)
	}
}

func TestExportWaitingForAPlanGoesOn(t *testing.T) {
	u, _ := newTestUI(t, nil)
	went := 0
	u.afterPlan = func() { went++ }
	u.planDone(u.Session, editortest.HandPlan(u.Session), "A", u.Session.Token(), nil)
	if went != 1 || u.afterPlan != nil {
		t.Errorf("after the plan: the waiting export ran %d times, still waiting %v", went, u.afterPlan != nil)
	}
	u.afterPlan = func() { went++ }
	u.planDone(u.Session, nil, "A", u.Session.Token(), context.Canceled)
	if went != 1 || u.afterPlan != nil {
		t.Error("a cancelled plan must drop the waiting export")
	}
}

func TestKeyHelpShowsEveryLine(t *testing.T) {
	u, w := newTestUI(t, nil)
	u.showKeys()
	top := w.Canvas().Overlays().Top()
	if top == nil {
		t.Fatal("no Keyboard and mouse dialog")
	}
	w.Canvas().Capture()
	var scroll *container.Scroll
	var find func(o fyne.CanvasObject)
	find = func(o fyne.CanvasObject) {
		switch x := o.(type) {
		case *container.Scroll:
			scroll = x
		case *fyne.Container:
			for _, c := range x.Objects {
				find(c)
			}
		case fyne.Widget:
			for _, c := range test.WidgetRenderer(x).Objects() {
				find(c)
			}
		}
	}
	find(top)
	if scroll == nil {
		t.Fatal("no scroll in the dialog")
	}
	// The dialog once showed one line of a 20-line list: the scroll must
	// be tall enough for several.
	if h := scroll.Size().Height; h < 300 {
		t.Errorf("the key list is %.0f units tall, want at least 300", h)
	}
	if got := texts(scroll.Content); !strings.Contains(got, "Ctrl+Return") || !strings.Contains(got, "drag it to move it") {
		t.Errorf("key list lacks entries:\n%s", got)
	}
}

func TestLegendThatStillFitsLeavesTheFieldWhereItIs(t *testing.T) {
	u, w := newTestUI(t, nil)
	u.View.Fit()
	w.Canvas().Capture()
	v := u.View.View()
	// A short new region adds a legend row no wider than the others.
	u.Session.AddRegion("x", "other")
	w.Canvas().Capture()
	if _, legend := fieldAndLegend(u); u.View.View() != v {
		t.Errorf("the field moved under the pointer although the legend %v still fits beside it", legend)
	}
}

// Issue 13: the legend covered the lattice at atomic zoom. There it folds
// into one small button, opens on demand, and is whole again zoomed out.
func TestLegendFoldsAtAtomicZoom(t *testing.T) {
	u, w := newTestUI(t, editortest.Demo(t))
	if len(u.legend.Objects) < 2 {
		t.Fatalf("the whole-field legend has %d rows", len(u.legend.Objects))
	}
	full := u.legend.MinSize()
	zoomOn(w, u, r2.Point{X: 1000, Y: 1000}, 0.03)
	if !u.View.View().Atomic() {
		t.Fatal("0.03 nm/px is not atomic zoom")
	}
	if len(u.legend.Objects) != 1 {
		t.Fatalf("at atomic zoom the legend has %d rows, want the one button", len(u.legend.Objects))
	}
	folded := u.legend.MinSize()
	if folded.Height*3 > full.Height || folded.Width > full.Width {
		t.Errorf("the folded legend is %v, the whole one %v: it still covers the sites", folded, full)
	}
	test.Tap(u.legend.Objects[0].(*widget.Button))
	if len(u.legend.Objects) < 3 {
		t.Errorf("the legend did not open on demand (%d rows)", len(u.legend.Objects))
	}
	zoomOn(w, u, r2.Point{X: 1000, Y: 1000}, 1)
	if n := len(u.legend.Objects); n < 2 {
		t.Errorf("zoomed out, the legend has %d rows", n)
	}
	if _, fold := u.legend.Objects[0].(*widget.Button); fold {
		t.Error("zoomed out, the legend still offers to fold")
	}
}

// Issue 13: the menu showed Ctrl+Return where Help and the README said
// Ctrl+Enter, and the README named a "Marks" panel the window calls
// "Design". Help and README use the window's names: the menu's shortcut
// text (Fyne writes KeyReturn as "Return"), the tabs' titles.
func TestHelpAndReadmeUseTheWindowsNames(t *testing.T) {
	u, _ := newTestUI(t, nil)
	var planKeys string
	for _, m := range u.menu.Items {
		for _, it := range m.Items {
			if it.Label == "Plan this variant" {
				sc, ok := it.Shortcut.(*desktop.CustomShortcut)
				if !ok || sc.KeyName != fyne.KeyReturn {
					t.Fatalf("Plan this variant has shortcut %#v", it.Shortcut)
				}
				planKeys = "Ctrl+Return" // as Fyne's menu writes Control with KeyReturn
			}
		}
	}
	if planKeys == "" {
		t.Fatal("no Plan this variant in the menu")
	}
	help := ""
	for _, r := range keyHelp() {
		help += r[0] + " " + r[1] + "\n"
	}
	readme, err := os.ReadFile("../../README.md")
	if err != nil {
		t.Fatal(err)
	}
	for name, text := range map[string]string{"Help": help, "README": string(readme)} {
		if !strings.Contains(text, planKeys) || strings.Contains(text, "Ctrl+Enter") {
			t.Errorf("%s does not call the plan shortcut %s as the menu does", name, planKeys)
		}
	}
	var tabs []string
	for _, it := range u.tabs.Items {
		tabs = append(tabs, it.Text)
	}
	if want := "(" + strings.Join(tabs, ", ") + ")"; !strings.Contains(string(readme), want) {
		t.Errorf("README does not list the panels as the window does, %s", want)
	}
}

// Issue 13, the menus: one Redo, disabled with nothing to redo; "Cancel
// planning" enabled only while something plans; About gives the version.
func TestMenusSayWhatCanBeDone(t *testing.T) {
	u, w := newTestUI(t, editortest.Demo(t))
	u.opts.Generator = "dimerpath 9.9.9"
	redos := 0
	for _, m := range u.menu.Items {
		for _, it := range m.Items {
			if strings.HasPrefix(it.Label, "Redo") {
				redos++
				if !it.Disabled {
					t.Errorf("%q is enabled with nothing to redo", it.Label)
				}
			}
		}
	}
	if redos != 1 {
		t.Errorf("%d Redo items in the menus, want 1", redos)
	}
	if !u.cancelItem.Disabled {
		t.Error("Cancel planning is enabled with nothing planning")
	}
	waitJob(t, u, func() {
		u.StartPlan()
		if u.cancelItem.Disabled {
			t.Error("Cancel planning is disabled while planning")
		}
	})
	if !u.cancelItem.Disabled {
		t.Error("Cancel planning is still enabled after the plan")
	}
	// The PDF from the window said "Plan seed 0" where dimerpath plan
	// plans with seed 1 by default.
	if p, _ := u.Session.Plan(); p == nil || p.Seed != 1 {
		t.Errorf("the window planned with seed %v, want 1 as the command line", p)
	}
	u.showAbout()
	if got := texts(w.Canvas().Overlays().Top()); !strings.Contains(got, "dimerpath 9.9.9") {
		t.Errorf("About does not give the version:\n%s", got)
	}
}

// Issue 13: CSV and JSON exports asked for a paper size and said "The
// printed plan carries this caution"; only the PDF has paper, and each
// says where its caution goes.
func TestExportCautionFitsTheFormat(t *testing.T) {
	for _, c := range []struct {
		kind, says string
		paper      bool
	}{
		{"pdf", "every page", true},
		{"csv", "not this caution", false},
		{"json", `"caution" field`, false},
		{"svg", "under the figure", false},
	} {
		u, w := newTestUI(t, nil)
		u.withCaution("the plan", c.kind, func(editor.ExportSettings) {})
		got := texts(w.Canvas().Overlays().Top())
		if !strings.Contains(got, c.says) || strings.Contains(got, "Paper") != c.paper || strings.Contains(got, "printed plan") != (c.kind == "pdf") {
			t.Errorf("%s export dialog:\n%s", c.kind, got)
		}
	}
}
