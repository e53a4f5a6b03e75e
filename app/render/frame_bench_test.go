package render_test

import (
	"context"
	"testing"

	"github.com/golang/geo/r2"

	"dimerpath/app/editor"
	"dimerpath/app/editor/editortest"
	"dimerpath/app/render"
	"dimerpath/planner"
)

// BenchmarkFrame draws 1600 x 1000 frames of a design with 10^7 painted
// sites (the size issue 5 asks to stay above 30 frames/s), at the whole
// field, at an intermediate zoom and at atomic zoom. Clear is the
// baseline: filling the same buffer with one colour, the least any
// frame costs.
func BenchmarkFrame(b *testing.B) {
	sc := render.BigScene(b, 10_000_000)
	if n := sc.Layers[0].Sites.Count(); n < 10_000_000 {
		b.Fatalf("scene holds %d sites, want >= 1e7", n)
	}
	whole := render.FitView(sc.Surface.Field, 1600, 1000, 20)
	views := []struct {
		name string
		v    render.View
	}{
		{"whole-field", whole},
		{"edge-1nm-px", whole.CenteredOn(r2.Point{X: 1250, Y: 700}, 1)},
		{"rows-0.25nm-px", whole.CenteredOn(r2.Point{X: 1250, Y: 700}, 0.25)},
		{"atomic-0.04nm-px", whole.CenteredOn(r2.Point{X: 1538, Y: 692}, 0.04)},
	}
	// The demo design (13.9 million sites, mostly its four pads) with the
	// route of its plan, 1035 strokes, over it.
	for _, aliased := range []bool{false, true} {
		name := "demo-with-route"
		if aliased {
			// The same frame with the overlays drawn without antialiasing:
			// the baseline of what antialiasing costs.
			name += "-aliased"
		}
		b.Run(name, func(b *testing.B) {
			s := editortest.Demo(b)
			p, err := editor.BuildPlan(context.Background(), s.DesignCopy(), s.Variant().Name, s.Profile, planner.Options{Seed: 1})
			if err != nil {
				b.Fatal(err)
			}
			s.SetPlan(p, s.Variant().Name, s.Token())
			sc := s.Scene(editor.SceneOptions{Route: true, Findings: true})
			v := render.FitView(s.Surface().Field, 1600, 1000, 20)
			r := render.Renderer{Aliased: aliased}
			r.Render(sc, v)
			b.ReportAllocs()
			for b.Loop() {
				r.Render(sc, v)
			}
		})
	}
	b.Run("Clear", func(b *testing.B) {
		var r render.Renderer
		r.Render(nil, whole)
		p := render.PackRGBA(render.ColOutside)
		b.ReportAllocs()
		for b.Loop() {
			render.Fill(r.Pix(), p)
		}
	})
	for _, c := range views {
		b.Run(c.name, func(b *testing.B) {
			var r render.Renderer
			r.Render(sc, c.v)
			b.ReportAllocs()
			for b.Loop() {
				r.Render(sc, c.v)
			}
			if r.Stats().Pixels == 0 {
				b.Fatal("frame drew no painted pixel")
			}
		})
	}
}
