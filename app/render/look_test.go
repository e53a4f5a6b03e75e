package render_test

import (
	"image/color"
	"testing"

	"github.com/golang/geo/r2"

	"dimerpath/app/editor"
	"dimerpath/app/editor/editortest"
	"dimerpath/app/render"
)

// TestDemoAtEveryZoom draws the demo design from the whole field down to
// single sites and checks a known pixel at each zoom: a pad's centre in
// its full colour when zoomed out (every site of the pixel painted), and
// at atomic zoom an island site in the island's colour beside a clean
// site in the clean-H colour. Set DIMERPATH_FRAME_DIR to keep the frames.
func TestDemoAtEveryZoom(t *testing.T) {
	s := editortest.Demo(t)
	region := func(name string) int {
		for i, r := range s.Variant().Regions {
			if r.Name == name {
				return i
			}
		}
		t.Fatalf("demo has no region %q", name)
		return -1
	}
	pad, island := region("pad-source"), region("sensor-island")
	sc := s.Scene(editor.SceneOptions{})
	var r render.Renderer
	at := func(v render.View, p r2.Point) color.NRGBA {
		x, y := v.ToScreen(p)
		return color.NRGBAModel.Convert(r.Image().At(int(x), int(y))).(color.NRGBA)
	}

	whole := render.FitView(s.Surface().Field, 1600, 1000, 20)
	r.Render(sc, whole)
	render.SavePNG(t, "demo-whole.png", &r)
	if r.Stats().Atomic {
		t.Error("the whole field drawn site by site")
	}
	if got, want := at(whole, s.RegionBounds(pad).Center()), render.RegionColor(pad); got != want {
		t.Errorf("pad centre at the whole field is %v, want its colour %v", got, want)
	}

	ib := s.RegionBounds(island)
	for _, scale := range []float64{1, 0.25} {
		v := whole.CenteredOn(ib.Center(), scale)
		r.Render(sc, v)
		if got, want := at(v, ib.Center()), render.RegionColor(island); got != want {
			t.Errorf("island centre at %g nm/px is %v, want %v", scale, got, want)
		}
	}

	v := whole.CenteredOn(ib.Center(), 0.02)
	r.Render(sc, v)
	render.SavePNG(t, "demo-atomic.png", &r)
	if !r.Stats().Atomic {
		t.Fatal("0.02 nm/px not drawn site by site")
	}
	var inside, outside bool
	surf := s.Surface()
	sites := s.RegionSites(island)
	for site := range sites.All() {
		p := surf.Position(site)
		if !v.Bounds().ContainsPoint(p) {
			continue
		}
		if got := at(v, p); got != render.RegionColor(island) {
			t.Fatalf("island site %v drawn %v, want %v", site, got, render.RegionColor(island))
		}
		inside = true
		// The first site beyond the island's edge along the row, when in
		// view and in no region, is clean.
		out := site
		for sites.Contains(out) {
			out.Dimer++
		}
		if q := surf.Position(out); v.Bounds().ContainsPoint(q) && s.RegionAt(q) < 0 {
			if got := at(v, q); got != render.ColCleanH {
				t.Fatalf("clean site %v drawn %v, want %v", out, got, render.ColCleanH)
			}
			outside = true
		}
	}
	if !inside || !outside {
		t.Errorf("no island site (%v) or clean site (%v) in view to check", inside, outside)
	}
}
