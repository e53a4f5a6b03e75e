package gui

import (
	"math"
	"testing"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/test"
	"github.com/golang/geo/r2"

	"dimerpath/app/editor/editortest"
	"dimerpath/app/render"
	"dimerpath/lattice"
	"dimerpath/lattice/design"
)

// tap clicks the canvas at field point p.
func tap(w fyne.Window, u *UI, p r2.Point) { test.TapCanvas(w.Canvas(), screenPos(u, p)) }

func key(w fyne.Window, k fyne.KeyName) { w.Canvas().OnTypedKey()(&fyne.KeyEvent{Name: k}) }

// The site counts of drawn shapes are checked against the H density of
// the surface, 2/a² = 6.78 nm⁻² (a from CODATA 2018, lattice.HDensity):
// a shape of area A holds about A·HDensity sites, within the lattice's
// edge effects.
func TestPolygonLineArrayByClicks(t *testing.T) {
	u, w := newTestUI(t, nil)
	zoomOn(w, u, r2.Point{X: 100, Y: 150}, 0.1) // about 74 x 70 nm in view

	test.TypeOnCanvas(w.Canvas(), "p")
	u.Session.Select()
	tri := []r2.Point{{X: 70, Y: 130}, {X: 105, Y: 130}, {X: 87.5, Y: 160}}
	for _, p := range tri {
		tap(w, u, p)
	}
	if !u.Session.Drawing() {
		t.Fatal("clicking vertices did not start a polygon")
	}
	key(w, fyne.KeyReturn)
	i := len(u.Session.Variant().Regions) - 1
	r := u.Session.Variant().Regions[i]
	if len(r.Shapes) != 1 || r.Shapes[0].Kind != design.ShapePolygon || len(r.Shapes[0].Points) != 3 {
		t.Fatalf("polygon region %+v", r)
	}
	area := 0.5 * 35 * 30 // the triangle before snapping, nm²
	if got, want := float64(u.Session.RegionSites(i).Count()), area*lattice.HDensity; math.Abs(got-want) > 0.1*want {
		t.Errorf("triangle holds %g sites, want about %g (area x H density)", got, want)
	}

	// A line dragged 20 nm along x, 2 nm wide (the default width).
	test.TypeOnCanvas(w.Canvas(), "l")
	u.Session.Select()
	drag(w, u, r2.Point{X: 110, Y: 140}, r2.Point{X: 130, Y: 140})
	i = len(u.Session.Variant().Regions) - 1
	if sh := u.Session.Variant().Regions[i].Shapes; len(sh) != 1 || sh[0].Kind != design.ShapePolyline || sh[0].WidthNM != 2 {
		t.Fatalf("line shapes %+v", sh)
	}
	// Counted by hand: the line's ends snap to dimer centres of one row,
	// and a 2 nm band centred there holds that row and the rows 0.77 nm
	// either side whole (their sites lie at most 0.95 nm off the centre
	// line), so 3 rows x 2 sites x 53 dimers, plus the round caps' few
	// sites beyond the ends (under 10 %).
	if got, want := float64(u.Session.RegionSites(i).Count()), 3*2*(20/lattice.DimerPitch+1); got < want || got > 1.1*want {
		t.Errorf("line holds %g sites, want about %g", got, want)
	}

	// An array of 4 x 4 phosphine windows: 16 windows of 3 dimers, 6
	// sites each (lattice.PhosphineWindow), 96 sites.
	test.TypeOnCanvas(w.Canvas(), "a")
	u.Session.Select()
	tap(w, u, r2.Point{X: 75, Y: 170})
	i = len(u.Session.Variant().Regions) - 1
	r = u.Session.Variant().Regions[i]
	if r.Role != design.RoleDonor || r.Species != "P" {
		t.Errorf("array region role %q species %q, want P donors", r.Role, r.Species)
	}
	if got := u.Session.RegionSites(i).Count(); got != 96 {
		t.Errorf("4 x 4 P windows hold %d sites, want 96", got)
	}

	// A fiducial where clicked.
	test.TypeOnCanvas(w.Canvas(), "f")
	tap(w, u, r2.Point{X: 120, Y: 175})
	fs := u.Session.Design().Fiducials
	if got := fs[len(fs)-1].AtNM; math.Abs(got[0]-120) > 0.2 || math.Abs(got[1]-175) > 0.2 {
		t.Errorf("fiducial at %v, want about (120, 175): a pixel is 0.1 nm", got)
	}
	if u.marks.fids.Length() != len(fs) {
		t.Errorf("marks panel lists %d fiducials, want %d", u.marks.fids.Length(), len(fs))
	}

	// Escape drops a polygon half drawn.
	test.TypeOnCanvas(w.Canvas(), "p")
	tap(w, u, tri[0])
	key(w, fyne.KeyEscape)
	if u.Session.Drawing() {
		t.Error("Escape left the polygon in progress")
	}
	// Each shape is one undo step.
	n := len(u.Session.Variant().Regions)
	shortcut(w, &fyne.ShortcutUndo{}) // the fiducial
	shortcut(w, &fyne.ShortcutUndo{}) // the array
	if got := len(u.Session.Variant().Regions); got != n-1 {
		t.Errorf("two undos left %d regions, want %d", got, n-1)
	}
}

func TestFindingsListedBoxedAndZoomed(t *testing.T) {
	u, w := newTestUI(t, editortest.TwoCloseWindows(t))
	u.CheckSync()
	f, stale := u.Session.Findings()
	if len(f) == 0 || stale {
		t.Fatalf("findings %v (stale %v): want the window-spacing error", f, stale)
	}
	var spacing = -1
	for i, x := range f {
		if x.Rule == design.RuleWindowSpacing && x.Error {
			spacing = i
		}
	}
	if spacing < 0 {
		t.Fatalf("no window-spacing error among %+v", f)
	}
	if u.findings.list.Length() != len(f) {
		t.Errorf("findings list shows %d, want %d", u.findings.list.Length(), len(f))
	}
	if u.tabFindings.Text == "Checks" {
		t.Error("the Checks tab does not count the errors")
	}
	u.findings.list.Select(spacing)
	v := u.View.View()
	at := f[spacing].At
	if c := v.Center; c.Sub(at).Norm() > 1 || v.Scale > 0.1 {
		t.Errorf("choosing the finding shows %v at %g nm/px, want about %v zoomed in", c, v.Scale, at)
	}
	img := w.Canvas().Capture()
	red := 0
	q := screenPos(u, at)
	for dx := -40; dx <= 40; dx++ {
		for dy := -40; dy <= 40; dy++ {
			c := img.At(int(q.X)+dx, int(q.Y)+dy)
			if r, g, b, _ := c.RGBA(); r>>8 == uint32(render.ColError.R) && g>>8 == uint32(render.ColError.G) && b>>8 == uint32(render.ColError.B) {
				red++
			}
		}
	}
	if red < 20 {
		t.Errorf("%d red pixels around the chosen finding, want its box", red)
	}
	// Moving a window apart clears the error.
	u.Session.Undo()
	u.CheckSync()
	after, _ := u.Session.Findings()
	for _, x := range after {
		if x.Rule == design.RuleWindowSpacing {
			t.Errorf("after undoing the second window: %+v", x)
		}
	}
}
