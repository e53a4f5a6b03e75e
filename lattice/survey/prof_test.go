package survey

import (
	"context"
	"testing"

	"dimerpath/lattice/survey/synth"
)

func BenchmarkAnalyseDbg(b *testing.B) {
	p := synth.Params{Width: 1024, Height: 1024, ScaleNM: [2]float64{0.0985, 0.1012}, SkewDeg: 0.7, RotationDeg: 14,
		NoiseNM: 0.01, LineNoiseNM: 0.01, Seed: 3}
	p.Step = &synth.Step{Through: [2]float64{60, 50}, AngleDeg: 75, Up: true}
	top, _ := render(b, p)
	b.ResetTimer()
	for i := 0; i < b.N; i++ {
		if _, err := Analyse(context.Background(), top, Options{}); err != nil {
			b.Fatal(err)
		}
	}
}
