package survey

import (
	"testing"

	"dimerpath/lattice/survey/synth"
)

func TestCalibExplore(t *testing.T) {
	for _, c := range []struct {
		sx, sy, skew, rot float64
		step            bool
		blur            float64
	}{
		{0.1, 0.1, 0, 0, false, 0},
		{0.1, 0.103, 0.5, 7, false, 0},
		{0.1, 0.097, -0.8, 33, true, 0},
		{0.2, 0.21, 1, -20, true, 0.1},
		{0.1, 0.103, 0.5, 7, false, 0.15},
		{0.05, 0.049, 0.3, 88, true, 0},
	} {
		p := synth.Params{Width: 512, Height: 512, ScaleNM: [2]float64{c.sx, c.sy}, SkewDeg: c.skew, RotationDeg: c.rot,
			NoiseNM: 0.01, LineNoiseNM: 0.01, TiltNMPerNM: [2]float64{0.01, -0.005}, Seed: 1}
		p.Contrast = synth.DefaultContrast
		p.Contrast.TipSD = c.blur
		if c.step {
			p.Step = &synth.Step{Through: [2]float64{c.sx * 300, c.sy * 256}, AngleDeg: 80, Up: true}
		}
		topo, _ := render(t, p)
		g := toGrid(topo)
		subtractPlane(g)
		cal, b, err := calibrate(g, [2]float64{})
		if err != nil {
			t.Fatal(err)
		}
		t.Logf("want sx %.4f sy %.4f skew %.2f rot %.2f | got sx %.5f±%.5f sy %.5f±%.5f skew %.3f±%.3f rows %.3f/%.3f±%.3f iso %v dimers %v peaks %d",
			c.sx, c.sy, c.skew, c.rot, cal.ScaleNMPerPx[0], cal.ScaleSD[0], cal.ScaleNMPerPx[1], cal.ScaleSD[1], cal.SkewDeg, cal.SkewSD, cal.RowsDeg[0], cal.RowsDeg[1], cal.RowsSD, cal.Isotropic, cal.DimersResolved, cal.Peaks)
		_ = b
	}
}
