package gui

import (
	"image"
	"image/color"
	"math"
	"testing"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/test"
	"fyne.io/fyne/v2/widget"
	"github.com/golang/geo/r2"

	"dimerpath/app/editor"
	"dimerpath/app/editor/editortest"
	"dimerpath/app/render"
	"dimerpath/lattice"
	"dimerpath/lattice/design"
)

// Interaction tests drive the real widgets with Fyne's test driver (an
// in-memory window drawn by the software painter) and check both the
// model and the rendered image.

func newTestUI(t *testing.T, s *editor.Session) (*UI, fyne.Window) {
	t.Helper()
	a := test.NewTempApp(t)
	if s == nil {
		s = editortest.Tiny(t)
	}
	w := test.NewTempWindow(t, widget.NewLabel(""))
	u := New(a, w, s, Options{ConfigDir: t.TempDir(), CheckDelay: -1, Autosave: -1})
	w.Resize(fyne.NewSize(1280, 800))
	w.Canvas().Capture() // lays out and draws the lattice once
	return u, w
}

// screenPos returns the canvas position of field point p, as events
// and captured images count it. The test driver's AbsolutePositionForObject
// is relative to the canvas's interactive area, which is inset from the
// canvas, so the inset is added back.
func screenPos(u *UI, p r2.Point) fyne.Position {
	abs := fyne.CurrentApp().Driver().AbsolutePositionForObject(u.View)
	inset, _ := u.Win.Canvas().InteractiveArea()
	return abs.Add(inset).Add(u.View.PositionOf(p))
}

// drag drags the pointer from field point a to field point b. Fyne's
// test.Drag sends one event at the end point carrying the whole delta,
// as the real driver's last event does.
func drag(w fyne.Window, u *UI, a, b r2.Point) {
	pa, pb := screenPos(u, a), screenPos(u, b)
	test.Drag(w.Canvas(), pb, pb.X-pa.X, pb.Y-pa.Y)
}

// pixelAt returns the colour of the captured canvas at field point p.
func pixelAt(img image.Image, u *UI, p r2.Point) color.NRGBA {
	q := screenPos(u, p)
	return color.NRGBAModel.Convert(img.At(int(q.X), int(q.Y))).(color.NRGBA)
}

func shortcut(w fyne.Window, s fyne.Shortcut) {
	w.Canvas().(fyne.Shortcutable).TypedShortcut(s)
}

// zoomOn centres the view on p at scale nm per pixel and redraws.
func zoomOn(w fyne.Window, u *UI, p r2.Point, scale float64) image.Image {
	v := u.View.View()
	v.Center, v.Scale = p, scale
	u.View.SetView(v)
	return w.Canvas().Capture()
}

func TestDragPaintsAndUndoRedo(t *testing.T) {
	u, w := newTestUI(t, nil)
	surf := u.Session.Surface()
	a := lattice.Site{Row: 50, Dimer: 10}
	b := lattice.Site{Row: 50, Dimer: 19}
	mid := surf.Position(lattice.Site{Row: 50, Dimer: 15})
	before := zoomOn(w, u, mid, 0.03)
	if !u.View.rend.Stats().Atomic {
		t.Fatal("0.03 nm/px should draw single sites")
	}
	if got := pixelAt(before, u, surf.Position(a)); got != render.ColCleanH {
		t.Fatalf("site before painting is %v, want the clean-H colour %v", got, render.ColCleanH)
	}
	test.Tap(u.toolButtons[editor.ToolSite])
	if u.Session.Tool != editor.ToolSite {
		t.Fatalf("tapping the Site button chose %v", u.Session.Tool)
	}
	u.regions.list.Select(1) // the lead
	if u.Session.Active() != 1 {
		t.Fatalf("selecting the lead in the list made region %d active", u.Session.Active())
	}
	n0 := u.Session.RegionSites(1).Count()
	drag(w, u, surf.Position(a), surf.Position(b))
	if got := u.Session.RegionSites(1).Count() - n0; got != 10 {
		t.Fatalf("drag painted %d sites, want 10", got)
	}
	after := w.Canvas().Capture()
	painted := pixelAt(after, u, surf.Position(a))
	if painted == render.ColCleanH {
		t.Fatal("painted site still drawn as clean H")
	}
	// The lead is selected, so it is drawn in its colour lightened.
	if want := render.Mix(render.RegionColor(1), render.RGB(0xff, 0xff, 0xff), 0.3); painted != want {
		t.Errorf("painted site drawn %v, want the lead's selected colour %v", painted, want)
	}
	// The other side of the row was not painted.
	other := lattice.Site{Row: 50, Dimer: 12, Side: 1}
	if got := pixelAt(after, u, surf.Position(other)); got != render.ColCleanH {
		t.Errorf("site on the other side drawn %v, want clean H", got)
	}

	shortcut(w, &fyne.ShortcutUndo{})
	if got := u.Session.RegionSites(1).Count(); got != n0 {
		t.Fatalf("after Ctrl+Z %d sites, want %d", got, n0)
	}
	if got := pixelAt(w.Canvas().Capture(), u, surf.Position(a)); got != render.ColCleanH {
		t.Errorf("after undo the site is drawn %v, want clean H", got)
	}
	shortcut(w, ctrlShift(fyne.KeyZ))
	if got := u.Session.RegionSites(1).Count(); got != n0+10 {
		t.Fatalf("after Ctrl+Shift+Z %d sites, want %d", got, n0+10)
	}
	shortcut(w, &fyne.ShortcutUndo{})
	shortcut(w, &fyne.ShortcutRedo{}) // Ctrl+Y
	if got := u.Session.RegionSites(1).Count(); got != n0+10 {
		t.Fatalf("after Ctrl+Y %d sites, want %d", got, n0+10)
	}
	if w.Title() == "" || w.Title()[0] != '*' {
		t.Errorf("title %q should mark unsaved changes", w.Title())
	}
}

func TestKeysChooseToolsAndRectangle(t *testing.T) {
	u, w := newTestUI(t, nil)
	test.TypeOnCanvas(w.Canvas(), "r")
	if u.Session.Tool != editor.ToolRect {
		t.Fatalf("typing r chose %v, want the rectangle tool", u.Session.Tool)
	}
	if u.toolButtons[editor.ToolRect].Importance != widget.HighImportance {
		t.Error("the rectangle button is not marked as the current tool")
	}
	u.Session.Select()
	surf := u.Session.Surface()
	// From the lower left corner of the cell of row 30, dimer 100 to the
	// upper right corner of row 39, dimer 149: each corner snaps to the
	// nearest cell edge.
	half := r2.Point{X: lattice.DimerPitch / 2, Y: lattice.RowSpacing / 2}
	a, b := surf.DimerCentre(0, 30, 100).Sub(half), surf.DimerCentre(0, 39, 149).Add(half)
	zoomOn(w, u, a.Add(b).Mul(0.5), 0.1)
	n := len(u.Session.Variant().Regions)
	drag(w, u, a, b)
	if len(u.Session.Variant().Regions) != n+1 {
		t.Fatalf("a rectangle drag with nothing selected made %d regions, want %d", len(u.Session.Variant().Regions), n+1)
	}
	// 10 rows x 50 dimers x 2 sites, by hand.
	if got := u.Session.RegionSites(n).Count(); got != 1000 {
		t.Errorf("rectangle holds %d sites, want 1000", got)
	}
	img := w.Canvas().Capture()
	if got := pixelAt(img, u, surf.DimerCentre(0, 35, 120)); got == render.ColTerrace[0] {
		t.Error("inside of the rectangle drawn as bare terrace")
	}
	test.TypeOnCanvas(w.Canvas(), "s")
	if u.Session.Tool != editor.ToolSite {
		t.Errorf("typing s chose %v", u.Session.Tool)
	}
}

func TestWheelZoomsAroundPointer(t *testing.T) {
	u, w := newTestUI(t, nil)
	v0 := u.View.View()
	pos := screenPos(u, r2.Point{X: 50, Y: 150})
	test.Scroll(w.Canvas(), pos, 0, 25) // one notch
	v1 := u.View.View()
	if math.Abs(v0.Scale/v1.Scale-1.25) > 1e-9 {
		t.Errorf("one wheel notch zoomed by %g, want 1.25", v0.Scale/v1.Scale)
	}
	// test.Scroll sends no pointer position, so the zoom is about the
	// view's corner: the field point there stays put.
	if p0, p1 := v0.ToField(0, 0), v1.ToField(0, 0); p0.Sub(p1).Norm() > 1e-9 {
		t.Errorf("point under the pointer moved from %v to %v", p0, p1)
	}
	u.typedRune('0')
	if got := u.View.View().Scale; math.Abs(got-v0.Scale) > 1e-12 {
		t.Errorf("0 (fit) gave scale %g, want %g", got, v0.Scale)
	}
}

func TestVariantSwitchShowsItsRegions(t *testing.T) {
	u, w := newTestUI(t, nil)
	surf := u.Session.Surface()
	leadAt := surf.Position(lattice.Site{Row: 100, Dimer: 110})
	img := zoomOn(w, u, leadAt, 0.05)
	if got := pixelAt(img, u, leadAt); got == render.ColCleanH {
		t.Fatal("variant A's lead not drawn")
	}
	u.variantSelect.SetSelected("B")
	if u.Session.Variant().Name != "B" {
		t.Fatalf("variant %q shown, want B", u.Session.Variant().Name)
	}
	if got := u.regions.list.Length(); got != 1 {
		t.Errorf("region list shows %d rows, want variant B's 1", got)
	}
	if got := pixelAt(w.Canvas().Capture(), u, leadAt); got != render.ColCleanH {
		t.Errorf("variant B has no lead, but the site is drawn %v", got)
	}
	test.Tap(u.toolButtons[editor.ToolEraser])
	test.Tap(u.toolButtons[editor.ToolSelect])
	u.Session.DuplicateVariant(u.Session.VariantIndex())
	if got := u.variantSelect.Selected; got != "B copy" {
		t.Errorf("after duplicating, the variant box shows %q", got)
	}
}

func TestRegionsPanelEdits(t *testing.T) {
	u, _ := newTestUI(t, nil)
	u.regions.list.Select(0)
	u.regions.name.SetText("sensor island")
	if got := u.Session.Variant().Regions[0].Name; got != "sensor island" {
		t.Errorf("typing a name renamed the region to %q", got)
	}
	u.regions.name.SetText("lead")
	if u.regions.msg.Hidden {
		t.Error("a duplicate name showed no message")
	}
	if got := u.Session.Variant().Regions[0].Name; got != "sensor island" {
		t.Errorf("a duplicate name was applied: %q", got)
	}
	u.regions.mode.SetSelected(modeOf(design.ModeHybrid))
	u.regions.role.SetSelected(roleOf(design.RoleGate))
	u.regions.tol.SetText("-3")
	r := u.Session.Variant().Regions[0]
	if r.Mode != design.ModeHybrid || r.Role != design.RoleGate || r.ToleranceNM != 0 {
		t.Errorf("region %+v: want hybrid gate with the default tolerance (a negative one refused)", r)
	}
	u.regions.tol.SetText("0.5")
	if got := u.Session.Variant().Regions[0].ToleranceNM; got != 0.5 {
		t.Errorf("tolerance %g, want 0.5", got)
	}
}

func TestCloseAsksAboutUnsavedChanges(t *testing.T) {
	u, w := newTestUI(t, nil)
	u.Session.AddRegion("extra", design.RoleOther)
	u.quit()
	if w.Canvas().Overlays().Top() == nil {
		t.Fatal("closing with unsaved changes showed no prompt")
	}
}
