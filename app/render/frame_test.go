package render

import (
	"image/color"
	"slices"
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

// TestFrameLooks draws the 10^7-site scene at the whole field, at
// 0.25 nm/px and at atomic zoom, and checks pixels whose colour follows
// from the scene alone: inside the painted block its layer's full
// colour, unpainted terrace one of that terrace's background shades
// (plain, trough, hatch), beyond the field the outside colour; zoomed in
// to single sites a painted site in its layer's colour and the clean
// site beside it in the clean-H colour. Set DIMERPATH_FRAME_DIR to keep
// the frames.
func TestFrameLooks(t *testing.T) {
	sc := bigScene(t, 10_000_000)
	surf := sc.Surface
	shades := func(ti int) []color.NRGBA {
		c := ColTerrace[ti%len(ColTerrace)]
		return []color.NRGBA{c, Mix(c, RGB(0, 0, 0), 0.3), Mix(c, ColHatch, 0.6)}
	}
	one := func(c color.NRGBA) []color.NRGBA { return []color.NRGBA{c} }
	// Terrace 1 (rows along y) holds layer 1: rows 2000-2009, dimers
	// 1800-2099. Dimer 1799 of its row 2005 is clean.
	painted := lattice.Site{Terrace: 1, Row: 2005, Dimer: 1800}
	clean := lattice.Site{Terrace: 1, Row: 2005, Dimer: 1799}
	whole := FitView(surf.Field, 1600, 1000, 20)
	type probe struct {
		name string
		at   r2.Point
		want []color.NRGBA
	}
	cases := []struct {
		name   string
		v      View
		atomic bool
		probes []probe
	}{
		{"whole", whole, false, []probe{
			{"inside the block", r2.Point{X: 650, Y: 700}, one(RegionColor(0))},
			{"terrace 0 unpainted", r2.Point{X: 650, Y: 1800}, shades(0)},
			{"terrace 1 unpainted", r2.Point{X: 1900, Y: 200}, shades(1)},
			{"beyond the field", r2.Point{X: -50, Y: 1000}, one(ColOutside)},
		}},
		{"mid", whole.CenteredOn(surf.DimerCentre(1, 2005, 1950), 0.25), false, []probe{
			{"dimer inside layer 1", surf.DimerCentre(1, 2005, 1950), one(RegionColor(1))},
			{"unpainted row beside it", surf.DimerCentre(1, 2015, 1950), shades(1)},
		}},
		{"atomic", whole.CenteredOn(surf.Position(painted), 0.04), true, []probe{
			{"painted site", surf.Position(painted), one(RegionColor(1))},
			{"clean site", surf.Position(clean), one(ColCleanH)},
		}},
	}
	var r Renderer
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			img := r.Render(sc, c.v)
			savePNG(t, c.name+".png", &r)
			if r.Stats().Atomic != c.atomic {
				t.Errorf("drawn site by site: %v, want %v", r.Stats().Atomic, c.atomic)
			}
			for _, p := range c.probes {
				x, y := c.v.ToScreen(p.at)
				got := color.NRGBAModel.Convert(img.At(int(x), int(y))).(color.NRGBA)
				if !slices.Contains(p.want, got) {
					t.Errorf("%s at %v: pixel (%d, %d) is %v, want one of %v", p.name, p.at, int(x), int(y), got, p.want)
				}
			}
		})
	}
}
