package survey

import (
	"testing"

	"dimerpath/lattice/survey/synth"
)

// render draws p and returns it as a topograph in nm.
func render(t testing.TB, p synth.Params) (*Topograph, *synth.Image) {
	t.Helper()
	im, err := synth.Render(p)
	if err != nil {
		t.Fatal(err)
	}
	z := make([]float32, len(im.Z))
	for i, v := range im.Z {
		z[i] = float32(v)
	}
	topo := &Topograph{Name: "synthetic", Width: p.Width, Height: p.Height, Z: z, ZUnitNM: 1}
	if p.NominalNMPerPx[0] > 0 {
		topo.SizeNM = [2]float64{p.NominalNMPerPx[0] * float64(p.Width), p.NominalNMPerPx[1] * float64(p.Height)}
	}
	return topo, im
}
