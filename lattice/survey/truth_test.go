package survey

import (
	"context"
	"math"
	"math/rand/v2"
	"testing"
	"time"

	"github.com/golang/geo/r2"

	"dimerpath/lattice/survey/synth"
)

// scene is a synthetic survey with its truth.
type scene struct {
	p   synth.Params
	im  *synth.Image
	top *Topograph
}

// randomDefects scatters n defects over the true area, at least minGap nm
// apart and margin nm inside the image, half bright and half dark.
func randomDefects(rng *rand.Rand, n int, w, h, margin, minGap float64) []synth.Defect {
	var out []synth.Defect
	for tries := 0; len(out) < n && tries < 100*n; tries++ {
		at := [2]float64{margin + rng.Float64()*(w-2*margin), margin + rng.Float64()*(h-2*margin)}
		ok := true
		for _, d := range out {
			if math.Hypot(d.AtNM[0]-at[0], d.AtNM[1]-at[1]) < minGap {
				ok = false
				break
			}
		}
		if !ok {
			continue
		}
		d := synth.Defect{AtNM: at}
		if len(out)%2 == 0 {
			d.Kind, d.HeightNM, d.SizeNM = synth.Bright, 0.08+0.12*rng.Float64(), 0.6+0.8*rng.Float64()
		} else {
			d.Kind, d.HeightNM, d.SizeNM = synth.Dark, 0.04+0.06*rng.Float64(), 0.4+0.6*rng.Float64()
		}
		out = append(out, d)
	}
	return out
}

// match pairs found defects with true ones within tol nm (each used once,
// nearest first) and returns how many true ones were found, how many
// found ones are false, and the largest position error of a match.
func match(truth []synth.Defect, found []Defect, tol float64) (hit, false_ int, worst float64) {
	used := make([]bool, len(found))
	for _, d := range truth {
		best, bi := math.Inf(1), -1
		for i, f := range found {
			if used[i] {
				continue
			}
			if e := math.Hypot(f.AtNM.X-d.AtNM[0], f.AtNM.Y-d.AtNM[1]); e < best {
				best, bi = e, i
			}
		}
		if bi >= 0 && best <= tol {
			used[bi] = true
			hit++
			worst = math.Max(worst, best)
		}
	}
	for _, u := range used {
		if !u {
			false_++
		}
	}
	return hit, false_, worst
}

func TestTruthExplore(t *testing.T) {
	rng := rand.New(rand.NewPCG(7, 7))
	p := synth.Params{Width: 1024, Height: 1024, ScaleNM: [2]float64{0.0985, 0.1012}, SkewDeg: 0.7, RotationDeg: 14,
		PhaseNM: [2]float64{0.3, 0.1}, NoiseNM: 0.01, LineNoiseNM: 0.01, TiltNMPerNM: [2]float64{0.01, -0.004}, Seed: 3,
		NominalNMPerPx: [2]float64{0.1, 0.1}}
	p.Step = &synth.Step{Through: [2]float64{60, 50}, AngleDeg: 75, Up: true, WiggleNM: 1.5, WigglePeriodNM: 40}
	w, h := p.Affine(float64(p.Width), float64(p.Height))
	_ = h
	p.Defects = randomDefects(rng, 60, w, 100, 2, 3)
	top, im := render(t, p)
	t0 := time.Now()
	an, err := Analyse(context.Background(), top, Options{Progress: func(st string, d float64) { t.Logf("%6.2fs %s", time.Since(t0).Seconds(), st) }})
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("scale %.5f %.5f skew %.3f rot %.3f (want %.5f %.5f %.3f %.3f) zsource %q notes %v", an.ScaleNMPerPx[0], an.ScaleNMPerPx[1], an.SkewDeg, an.RotationDeg, p.ScaleNM[0], p.ScaleNM[1], p.SkewDeg, p.RotationDeg, an.ZSource, an.Notes)
	for i, tr := range an.Terraces {
		t.Logf("terrace %d rows %.2f area %.0f up_from %d height %.4f dimer %v along %v", i, tr.RowsDeg, tr.AreaNM2, tr.UpFrom, tr.HeightNM, tr.DimerNM, tr.AlongKnown)
	}
	for _, tt := range im.Terraces {
		t.Logf("true terrace rows %.2f dimer %v height %.4f", tt.RowsDeg, tt.DimerNM, tt.HeightNM)
	}
	for _, s := range an.Steps {
		worst := 0.0
		for _, q := range s.Polyline {
			if q.X < 1 || q.Y < 1 || q.X > w-1 || q.Y > 99 {
				continue
			}
			worst = math.Max(worst, math.Abs(p.Step.SignedDistanceNM(q.X, q.Y)))
		}
		t.Logf("step %v upper %d height %.4f worst distance from true %.3f nm, %d points", s.Terraces, s.Upper, s.HeightNM, worst, len(s.Polyline))
	}
	hit, fa, worst := match(im.Defects, an.Defects, 0.2)
	t.Logf("defects: %d true, %d found, %d matched within 0.2 nm (worst %.3f), %d false; noise %.4f", len(im.Defects), len(an.Defects), hit, worst, fa, an.NoiseNM)
	hit5, _, _ := match(im.Defects, an.Defects, 1)
	t.Logf("within 1 nm: %d", hit5)
	for _, d := range an.Defects {
		best := math.Inf(1)
		for _, tr := range im.Defects {
			best = math.Min(best, math.Hypot(d.AtNM.X-tr.AtNM[0], d.AtNM.Y-tr.AtNM[1]))
		}
		if best > 0.2 {
			t.Logf("  unmatched found %v %s h %.3f size %.2f sig %.1f (nearest true %.2f)", d.AtNM, d.Kind(), d.HeightNM, d.SizeNM, d.SignificanceSD, best)
		}
	}
	for _, tr := range im.Defects {
		best := math.Inf(1)
		for _, d := range an.Defects {
			best = math.Min(best, math.Hypot(d.AtNM.X-tr.AtNM[0], d.AtNM.Y-tr.AtNM[1]))
		}
		if best > 0.2 {
			t.Logf("  missed %v kind %d h %.3f size %.2f step dist %.2f (nearest found %.2f)", tr.AtNM, tr.Kind, tr.HeightNM, tr.SizeNM, p.Step.SignedDistanceNM(tr.AtNM[0], tr.AtNM[1]), best)
		}
	}
	_ = r2.Point{}
}
