package render_test

import (
	"context"
	"crypto/sha256"
	"fmt"
	"testing"

	"github.com/golang/geo/r2"

	"dimerpath/app/editor"
	"dimerpath/app/editor/editortest"
	"dimerpath/app/render"
	"dimerpath/planner"
)

func TestZZHash(t *testing.T) {
	sc := render.BigScene(t, 10_000_000)
	whole := render.FitView(sc.Surface.Field, 1600, 1000, 20)
	var r render.Renderer
	for _, v := range []render.View{whole, whole.CenteredOn(r2.Point{X: 1250, Y: 700}, 1), whole.CenteredOn(r2.Point{X: 1250, Y: 700}, 0.25), whole.CenteredOn(r2.Point{X: 1538, Y: 692}, 0.04), whole.CenteredOn(r2.Point{X: 1500, Y: 1000}, 0.3)} {
		img := r.Render(sc, v)
		fmt.Printf("HASH big %g %x\n", v.Scale, sha256.Sum256(img.Pix))
	}
	s := editortest.Demo(t)
	p, err := editor.BuildPlan(context.Background(), s.DesignCopy(), s.Variant().Name, s.Profile, planner.Options{Seed: 1})
	if err != nil {
		t.Fatal(err)
	}
	s.SetPlan(p, s.Variant().Name, s.Token())
	dsc := s.Scene(editor.SceneOptions{Route: true, Findings: true})
	v := render.FitView(s.Surface().Field, 1600, 1000, 20)
	for _, vv := range []render.View{v, v.CenteredOn(v.Center, 0.5), v.CenteredOn(v.Center, 0.03)} {
		img := r.Render(dsc, vv)
		fmt.Printf("HASH demo %g %x\n", vv.Scale, sha256.Sum256(img.Pix))
	}
}
