package survey

import (
	"image"
	"image/color"
	"image/png"
	"math"
	"os"
	"testing"

	"dimerpath/lattice"
	"dimerpath/lattice/survey/synth"
)

func TestDbgSegment(t *testing.T) {
	p := synth.Params{Width: 512, Height: 512, ScaleNM: [2]float64{0.1, 0.102}, SkewDeg: 0.5, RotationDeg: 12,
		NoiseNM: 0.01, LineNoiseNM: 0.01, TiltNMPerNM: [2]float64{0.01, -0.005}, Seed: 1}
	p.Step = &synth.Step{Through: [2]float64{30, 25}, AngleDeg: 60, Up: true, WiggleNM: 2, WigglePeriodNM: 20}
	topo, _ := render(t, p)
	g := toGrid(topo)
	subtractPlane(g)
	cal, b, err := calibrate(g, [2]float64{})
	if err != nil {
		t.Fatal(err)
	}
	rowPx := lattice.RowSpacing / cal.ScaleNMPerPx[0]
	sigma := 1.2 * rowPx
	pd := padZero(g, int(math.Ceil(4*sigma)))
	S := forward2D(pd.v, pd.w, pd.h)
	sg := segment(S, pd, b, sigma, 10/(cal.ScaleNMPerPx[0]*cal.ScaleNMPerPx[1]))
	t.Logf("present %v comps %d", sg.present, len(sg.comps))
	img := image.NewRGBA(image.Rect(0, 0, g.w, g.h))
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, v := range g.v {
		lo, hi = math.Min(lo, v), math.Max(hi, v)
	}
	for j := 0; j < g.h; j++ {
		for i := 0; i < g.w; i++ {
			v := uint8(255 * (g.at(i, j) - lo) / (hi - lo))
			img.Set(i, g.h-1-j, color.RGBA{v, v, v, 255})
		}
	}
	drawLine := func(line []pt, c color.RGBA) {
		for k := 0; k+1 < len(line); k++ {
			a, b := line[k], line[k+1]
			n := int(math.Hypot(b.x-a.x, b.y-a.y)*2) + 1
			for s := 0; s <= n; s++ {
				x := a.x + (b.x-a.x)*float64(s)/float64(n)
				y := a.y + (b.y-a.y)*float64(s)/float64(n)
				img.Set(int(x), g.h-1-int(y), c)
			}
		}
	}
	for _, l := range sg.steps() {
		drawLine(l, color.RGBA{255, 0, 0, 255})
	}
	for c := range sg.comps {
		o := sg.outline(c)
		t.Logf("comp %d kind %d nodes %d outline %d pts", c, sg.comps[c].kind, sg.comps[c].nodes, len(o))
		drawLine(simplify(o, 1), color.RGBA{0, 255, 0, 255})
	}
	// true step line
	for k := 0; k < 4000; k++ {
		// sample true boundary: points where signed distance ~ 0
	}
	f, _ := os.Create("/tmp/sv/seg.png")
	png.Encode(f, img)
	f.Close()
}
