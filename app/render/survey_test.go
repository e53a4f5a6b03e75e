package render_test

import (
	"testing"

	"github.com/golang/geo/r2"

	"dimerpath/app/render"
	"dimerpath/lattice"
)

// A click anywhere on a defect's drawn marker takes that defect: every
// pixel the frame draws in a marker's colour (its ring, the by-hand
// ring, the selection ring), clicked with the view's tolerance, hits the
// marker it belongs to; a click well clear of every marker hits none.
// Markers small enough to be drawn at the 5 px minimum and one drawn at
// its apparent width are both covered.
func TestDefectMarkAtCoversTheDrawnMarker(t *testing.T) {
	surf, err := lattice.NewSurface(100, 100, lattice.Terrace{Name: "T0", Rows: lattice.RowsAlongX})
	if err != nil {
		t.Fatal(err)
	}
	marks := []render.DefectMark{
		{At: r2.Point{X: 44, Y: 50}, RadiusNM: 2, Bright: true},                 // 20 px ring
		{At: r2.Point{X: 56, Y: 50}, RadiusNM: 0.1, Bright: true, ByHand: true}, // 5 px ring and the by-hand one
		{At: r2.Point{X: 50, Y: 57}, RadiusNM: 0.2, Selected: true},             // dark, selected
	}
	sc := &render.Scene{Surface: surf, Survey: &render.SurveyOverlay{Defects: marks}}
	v := render.View{Center: r2.Point{X: 50, Y: 52}, Scale: 0.1, W: 240, H: 200}
	near := 8 * v.Scale // the lattice view's click tolerance: 8 px
	// The marker pixels: those the markers change.
	var r, bare render.Renderer
	img := r.Render(sc, v)
	plain := bare.Render(&render.Scene{Surface: surf, Survey: &render.SurveyOverlay{}}, v)
	hits := make([]int, len(marks))
	for y := 0; y < v.H; y++ {
		for x := 0; x < v.W; x++ {
			if img.RGBAAt(x, y) == plain.RGBAAt(x, y) {
				continue
			}
			p := v.ToField(float64(x)+0.5, float64(y)+0.5)
			want := 0 // the marker it belongs to: the nearest
			for i, m := range marks {
				if m.At.Sub(p).Norm() < marks[want].At.Sub(p).Norm() {
					want = i
				}
			}
			hits[want]++
			if got := render.DefectMarkAt(marks, p, near); got != want {
				t.Fatalf("pixel (%d, %d) of marker %d (%.2f nm from its centre): a click there takes %d", x, y, want, marks[want].At.Sub(p).Norm(), got)
			}
		}
	}
	for i, n := range hits {
		if n < 10 {
			t.Errorf("marker %d: %d pixels drawn in its colour", i, n)
		}
	}
	if got := render.DefectMarkAt(marks, r2.Point{X: 50, Y: 45}, near); got != -1 {
		t.Errorf("a click clear of every marker takes %d", got)
	}
	if got := render.DefectMarkAt(marks, marks[1].At.Add(r2.Point{X: near * 1.76}), near); got != -1 {
		t.Errorf("a click just beyond the tolerance of a small marker takes %d", got)
	}
	if got := render.DefectMarkAt(nil, marks[0].At, near); got != -1 {
		t.Errorf("no markers: %d", got)
	}
}
