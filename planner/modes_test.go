package planner

import (
	"math"
	"testing"

	"github.com/golang/geo/r2"

	"dimerpath/lattice"
)

// The narrowest part the write-mode reason names lies on the region, for
// a lead along x and one along y: before, a lead narrower than a raster
// line was placed at (its y centre, 0).
func TestMinWidthIsOnTheRegion(t *testing.T) {
	surf, err := lattice.NewSurface(2000, 2000)
	if err != nil {
		t.Fatal(err)
	}
	for _, tc := range []struct {
		name string
		box  r2.Rect
	}{
		{"lead along x", r2.RectFromPoints(r2.Point{X: 900, Y: 1000}, r2.Point{X: 1100, Y: 1008})},
		{"lead along y", r2.RectFromPoints(r2.Point{X: 1000, Y: 900}, r2.Point{X: 1008, Y: 1100})},
	} {
		t.Run(tc.name, func(t *testing.T) {
			set := lattice.NewSiteSet()
			surf.Paint(set, lattice.Rect{Rect: tc.box})
			w, at := minWidth(runSegments(surf, set), 10)
			if math.Abs(w-8) > lattice.RowSpacing {
				t.Errorf("narrowest part %.2f nm, want about 8 nm", w)
			}
			if !tc.box.ExpandedByMargin(lattice.RowSpacing).ContainsPoint(at) {
				t.Errorf("narrowest part at %v, outside the lead %v", at, tc.box)
			}
		})
	}
}
