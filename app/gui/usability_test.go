package gui

import (
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
