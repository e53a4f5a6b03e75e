package gui

import (
	"strings"
	"testing"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/test"
	"github.com/golang/geo/r2"
)

// Tests of what a lab user tripped over in a real session (see the GUI
// section of DEVELOPERS.md).

func TestClickOnTheLatticeTakesTheKeys(t *testing.T) {
	u, w := newTestUI(t, nil)
	u.S.Select(0)
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
	if u.S.Tool != ToolRect {
		t.Errorf("typing r picked %v, want the rectangle tool", u.S.Tool.Info().Name)
	}
	if got := u.S.Variant().Regions[0].Name; got != "island" {
		t.Errorf("the region was renamed to %q by a key meant for the lattice", got)
	}
}

// fieldAndLegend returns the field's and the legend's rectangles in
// the view's units.
func fieldAndLegend(u *UI) (field, legend r2.Rect) {
	f := u.S.Surface().Field
	a, b := u.View.PositionOf(r2.Point{X: f.X.Lo, Y: f.Y.Hi}), u.View.PositionOf(r2.Point{X: f.X.Hi, Y: f.Y.Lo})
	field = r2.RectFromPoints(r2.Point{X: float64(a.X), Y: float64(a.Y)}, r2.Point{X: float64(b.X), Y: float64(b.Y)})
	lp, ls := u.View.legend.Position(), u.View.legend.Size()
	legend = r2.RectFromPoints(r2.Point{X: float64(lp.X), Y: float64(lp.Y)}, r2.Point{X: float64(lp.X + ls.Width), Y: float64(lp.Y + ls.Height)})
	return field, legend
}

func TestLegendNeverCoversTheFittedField(t *testing.T) {
	for _, size := range []fyne.Size{{Width: 1280, Height: 800}, {Width: 1600, Height: 1000}} {
		s := newTestSession(t)
		u, w := newTestUI(t, s)
		w.Resize(size)
		w.Canvas().Capture()
		// Long names and a plan that is out of date make the legend grow
		// after the field was fitted.
		u.S.Select(0)
		if err := u.S.RenameRegion(0, "sensor island with a long descriptive name"); err != nil {
			t.Fatal(err)
		}
		u.S.SetPlan(handPlan(u.S), "A", PlanToken{})
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
		u.S.AddRegion("another", "other")
		if u.View.View() != v {
			t.Errorf("%v: a legend change moved a view the user had zoomed", size)
		}
	}
}
