package render_test

import (
	"fmt"
	"image/color"

	"github.com/golang/geo/r2"

	"dimerpath/app/render"
	"dimerpath/lattice"
)

// A Renderer draws a Scene (what to show) through a View (where to look)
// into one reused image, without a window.
func ExampleRenderer() {
	surf, err := lattice.NewSurface(100, 100, lattice.Terrace{Name: "T0", Rows: lattice.RowsAlongX})
	if err != nil {
		panic(err)
	}
	block := lattice.NewSiteSet()
	for row := 50; row < 100; row++ {
		block.AddRun(0, row, 0, 200) // 100 dimers, both sides
	}
	sc := &render.Scene{Surface: surf, Layers: []render.Layer{{Sites: block, Color: render.RegionColor(0), Bounds: block.Bounds(surf)}}}
	v := render.FitView(surf.Field, 400, 300, 10)
	var r render.Renderer
	img := r.Render(sc, v)
	pixel := func(p r2.Point) color.NRGBA {
		x, y := v.ToScreen(p)
		return color.NRGBAModel.Convert(img.At(int(x), int(y))).(color.NRGBA)
	}
	fmt.Println(img.Bounds().Dx(), img.Bounds().Dy(), r.Stats().Atomic)
	fmt.Println(pixel(surf.DimerCentre(0, 70, 50)) == render.RegionColor(0)) // in the block
	fmt.Println(pixel(r2.Point{X: -5, Y: 50}) == render.ColOutside)          // beyond the field
	// Output:
	// 400 300 false
	// true
	// true
}
