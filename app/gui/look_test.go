package gui

import (
	"testing"

	"github.com/golang/geo/r2"
)

func TestLookDemo(t *testing.T) {
	d, err := demoDesign()
	if err != nil {
		t.Fatal(err)
	}
	s, err := NewSession(d, "")
	if err != nil {
		t.Fatal(err)
	}
	var r Renderer
	sc := s.Scene(SceneOptions{})
	c := r2.Point{X: 1000, Y: 1000}
	for _, z := range []struct {
		name  string
		scale float64
	}{{"z1.png", 0.25}, {"z2.png", 0.06}, {"z3.png", 0.02}, {"z4.png", 1}} {
		v := View{Center: c, Scale: z.scale, W: 1000, H: 700}
		r.Render(sc, v)
		savePNG(t, z.name, &r)
	}
}
