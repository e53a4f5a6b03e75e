package render

import (
	"testing"

	"github.com/golang/geo/r2"

	"dimerpath/app/render/rendertest"
	"dimerpath/lattice"
)

// bigScene returns a 2 µm field with two terraces and a layer holding
// about n sites painted as a block of whole rows on terrace 0, plus a
// few small layers.
func bigScene(tb testing.TB, n int) *Scene {
	tb.Helper()
	surf, err := lattice.NewSurface(2000, 2000,
		lattice.Terrace{Name: "T0", Rows: lattice.RowsAlongX},
		lattice.Terrace{Name: "T1", Rows: lattice.RowsAlongY, Boundary: []r2.Point{{X: 1300, Y: 0}, {X: 2000, Y: 0}, {X: 2000, Y: 2000}, {X: 1500, Y: 2000}}},
	)
	if err != nil {
		tb.Fatal(err)
	}
	big := lattice.NewSiteSet()
	perRow := 2 * 3000 // 3000 dimers, 1152 nm
	rows := (n + perRow - 1) / perRow
	for r := 100; r < 100+rows; r++ {
		big.AddRun(0, r, 200, 200+perRow)
	}
	small := lattice.NewSiteSet()
	for r := 2000; r < 2010; r++ {
		small.AddRun(1, r, 3600, 4200)
	}
	dots := lattice.NewSiteSet()
	for k := range 40 {
		dots.AddRun(0, 1800+k%5*4, 4000+k*20, 4006+k*20)
	}
	sc := &Scene{Surface: surf}
	for i, s := range []*lattice.SiteSet{big, small, dots} {
		sc.Layers = append(sc.Layers, Layer{Sites: s, Color: RegionColor(i), Bounds: s.Bounds(surf)})
	}
	return sc
}

// savePNG keeps the renderer's last frame in $DIMERPATH_FRAME_DIR, when
// set, for a look by eye.
func savePNG(t *testing.T, name string, r *Renderer) { rendertest.SaveImage(t, name, r.Image()) }

func TestFrameLooks(t *testing.T) {
	sc := bigScene(t, 10_000_000)
	var r Renderer
	v := FitView(sc.Surface.Field, 1600, 1000, 20)
	r.Render(sc, v)
	savePNG(t, "whole.png", &r)
	v = v.CenteredOn(r2.Point{X: 1538, Y: 692}, 0.04)
	r.Render(sc, v)
	savePNG(t, "atomic.png", &r)
	v = v.CenteredOn(r2.Point{X: 1538, Y: 692}, 0.04)
	v.Scale = 0.25
	r.Render(sc, v)
	savePNG(t, "mid.png", &r)
}
