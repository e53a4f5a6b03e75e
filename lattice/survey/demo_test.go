package survey

import (
	"bytes"
	"context"
	"math"
	"os"
	"testing"

	"dimerpath/lattice/survey/synth"
)

const demoSurveyPath = "../../assets/demo-survey.png"

// TestDemoSurvey analyses the shipped demo survey and finds what its
// generator drew (synth.DemoParams): the scanner's scale, rotation and
// skew, and every defect inside the image.
func TestDemoSurvey(t *testing.T) {
	top, err := Read(demoSurveyPath)
	if err != nil {
		t.Fatal(err)
	}
	an, err := Analyse(context.Background(), top, Options{})
	if err != nil {
		t.Fatal(err)
	}
	p := synth.DemoParams()
	for i := range 2 {
		if e := an.ScaleNMPerPx[i]/p.ScaleNM[i] - 1; math.Abs(e) > 0.005 {
			t.Errorf("scale %c %.5f nm/px, drawn %.5f", "xy"[i], an.ScaleNMPerPx[i], p.ScaleNM[i])
		}
	}
	if math.Abs(angleDiff(an.RotationDeg, p.RotationDeg)) > 0.3 || math.Abs(an.SkewDeg-p.SkewDeg) > 0.3 {
		t.Errorf("rotation %.3f°, skew %.3f°; drawn %.3f°, %.3f°", an.RotationDeg, an.SkewDeg, p.RotationDeg, p.SkewDeg)
	}
	w, h := p.Affine(float64(p.Width), float64(p.Height))
	var inside []synth.Defect
	for _, d := range p.Defects {
		if d.AtNM[0] > 1 && d.AtNM[1] > 1 && d.AtNM[0] < w-1 && d.AtNM[1] < h-1 {
			inside = append(inside, d)
		}
	}
	// Dark defects move onto their dimer when drawn: match within the
	// dimer cell.
	hit, unmatched, _ := match(inside, an.Defects, 0.45)
	if hit != len(inside) || unmatched != 0 {
		t.Errorf("defects: %d of %d found, %d unmatched", hit, len(inside), unmatched)
	}
}

// TestDemoSurveyIsReproducible renders the demo survey again from its
// generator and seed and compares it with the shipped file byte for byte.
func TestDemoSurveyIsReproducible(t *testing.T) {
	if testing.Short() {
		t.Skip("renders a 900 x 900 image")
	}
	want, err := os.ReadFile(demoSurveyPath)
	if err != nil {
		t.Fatal(err)
	}
	p := synth.DemoParams()
	im, err := synth.Render(p)
	if err != nil {
		t.Fatal(err)
	}
	top := &Topograph{Width: p.Width, Height: p.Height, Z: make([]float32, len(im.Z)), ZUnitNM: 1,
		SizeNM: [2]float64{p.NominalNMPerPx[0] * float64(p.Width), p.NominalNMPerPx[1] * float64(p.Height)}}
	for i, v := range im.Z {
		top.Z[i] = float32(v)
	}
	var got bytes.Buffer
	if err := WritePNG(&got, top, 8); err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(got.Bytes(), want) {
		t.Errorf("assets/demo-survey.png differs from synth.DemoParams rendered with seed %d: regenerate it with go run ./lattice/survey/synth/internal/demosurvey", synth.DemoSeed)
	}
}
