package survey

import (
	"context"
	"math"
	"math/rand/v2"
	"os"
	"strconv"
	"testing"

	"dimerpath/lattice/survey/synth"
)

// randomScene draws one scene of the ground-truth family.
func randomScene(seed uint64, size int) synth.Params {
	rng := rand.New(rand.NewPCG(seed, 99))
	px := 0.07 + 0.06*rng.Float64()
	if v := os.Getenv("PX"); v != "" {
		base, _ := strconv.ParseFloat(v, 64)
		px = base * (0.9 + 0.2*rng.Float64())
	}
	p := synth.Params{
		Width: size, Height: size,
		ScaleNM:     [2]float64{px * (1 + 0.04*(rng.Float64()-0.5)), px * (1 + 0.04*(rng.Float64()-0.5))},
		SkewDeg:     3 * (rng.Float64() - 0.5),
		RotationDeg: 180*rng.Float64() - 90,
		PhaseNM:     [2]float64{rng.Float64(), rng.Float64()},
		NoiseNM:     0.01, LineNoiseNM: 0.01,
		TiltNMPerNM:    [2]float64{0.02 * (rng.Float64() - 0.5), 0.02 * (rng.Float64() - 0.5)},
		Seed:           seed,
		NominalNMPerPx: [2]float64{px, px},
	}
	w, h := p.Affine(float64(size), float64(size))
	_ = w
	p.Step = &synth.Step{
		Through:   [2]float64{w * (0.3 + 0.4*rng.Float64()), h * (0.3 + 0.4*rng.Float64())},
		AngleDeg:  360 * rng.Float64(),
		Up:        rng.IntN(2) == 0,
		Antiphase: rng.IntN(2) == 0,
	}
	p.Step.Jagged = os.Getenv("JAGGED") != ""
	if rng.IntN(2) == 0 {
		p.Step.WiggleNM, p.Step.WigglePeriodNM = 1+2*rng.Float64(), 20+30*rng.Float64()
	}
	n := int(w * h / 200)
	p.Defects = randomDefects(rng, n, w, h, 1.5, 2.5)
	if os.Getenv("NOSTEP") != "" {
		p.Step = nil
	}
	if v := os.Getenv("NOISE"); v != "" {
		p.NoiseNM, _ = strconv.ParseFloat(v, 64)
	}
	if v := os.Getenv("BLUR"); v != "" {
		p.Contrast = synth.DefaultContrast
		p.Contrast.TipSD, _ = strconv.ParseFloat(v, 64)
	}
	return p
}

func TestSweepExplore(t *testing.T) {
	n, _ := strconv.Atoi(os.Getenv("SWEEP"))
	size := 512
	if s, _ := strconv.Atoi(os.Getenv("SWEEPSIZE")); s > 0 {
		size = s
	}
	if n == 0 {
		t.Skip("set SWEEP=n")
	}
	var totTrue, totHit, totFalse int
	for seed := uint64(1); seed <= uint64(n); seed++ {
		p := randomScene(seed, size)
		if v, _ := strconv.Atoi(os.Getenv("WIDTH")); v > 0 {
			p.Width = v
		}
		top, im := render(t, p)
		if bits, _ := strconv.Atoi(os.Getenv("FOREIGN")); bits > 0 {
			var ds []synth.Defect
			top, ds = foreignRender(p, bits)
			im.Defects = ds
			// the other terrace's rows for the up check
		}
		an, err := Analyse(context.Background(), top, Options{})
		if err != nil {
			t.Errorf("seed %d: %v", seed, err)
			continue
		}
		w, h := p.Affine(float64(size), float64(size))
		eScale := math.Max(math.Abs(an.ScaleNMPerPx[0]/p.ScaleNM[0]-1), math.Abs(an.ScaleNMPerPx[1]/p.ScaleNM[1]-1)) * 100
		// rotation: of the largest terrace; compare with the closest true rows angle
		eRot := math.Inf(1)
		for _, tt := range im.Terraces {
			eRot = math.Min(eRot, math.Abs(angleDiff(an.RotationDeg, tt.RowsDeg)))
		}
		eSkew := math.Abs(an.SkewDeg - p.SkewDeg)
		worst := 0.0
		for _, s := range an.Steps {
			if p.Step == nil {
				worst = math.Inf(1)
				break
			}
			for k := 1; k < len(s.Polyline); k++ {
				a, b := s.Polyline[k-1], s.Polyline[k]
				for t := 0.0; t <= 1; t += 0.05 {
					x, y := a.X+t*(b.X-a.X), a.Y+t*(b.Y-a.Y)
					if x < 1 || y < 1 || x > w-1 || y > h-1 {
						continue
					}
					worst = math.Max(worst, math.Abs(p.Step.SignedDistanceNM(x, y)))
				}
			}
		}
		upOK := "?"
		if len(an.Steps) >= 1 && len(im.Terraces) == 2 {
			s := an.Steps[0]
			if s.Upper >= 0 {
				// The true terrace whose rows match the upper one's.
				up := an.Terraces[s.Upper]
				other := math.Abs(angleDiff(up.RowsDeg, im.Terraces[1].RowsDeg)) < 10
				if p.Step != nil && other == p.Step.Up {
					upOK = "ok"
				} else {
					upOK = "WRONG"
				}
			}
		}
		hit, fa, worstPos := match(im.Defects, an.Defects, 0.2)
		totTrue += len(im.Defects)
		totHit += hit
		totFalse += fa
		if os.Getenv("SWEEPV") != "" {
			for _, d := range an.Defects {
				best := math.Inf(1)
				for _, tr := range im.Defects {
					best = math.Min(best, math.Hypot(d.AtNM.X-tr.AtNM[0], d.AtNM.Y-tr.AtNM[1]))
				}
				if best > 0.2 {
					t.Logf("  false %v %s h %.3f size %.2f sig %.1f nearest true %.2f step %.2f", d.AtNM, d.Kind(), d.HeightNM, d.SizeNM, d.SignificanceSD, best, stepD(p, d.AtNM.X, d.AtNM.Y))
				}
			}
			for _, tr := range im.Defects {
				best := math.Inf(1)
				for _, d := range an.Defects {
					best = math.Min(best, math.Hypot(d.AtNM.X-tr.AtNM[0], d.AtNM.Y-tr.AtNM[1]))
				}
				if best > 0.2 {
					t.Logf("  missed %v kind %d h %.3f size %.2f step %.2f nearest found %.2f", tr.AtNM, tr.Kind, tr.HeightNM, tr.SizeNM, stepD(p, tr.AtNM[0], tr.AtNM[1]), best)
				}
			}
			for i, tr := range an.Terraces {
				t.Logf("  terrace %d rows %.1f height %.4f up_from %d", i, tr.RowsDeg, tr.HeightNM, tr.UpFrom)
			}
		}
		t.Logf("seed %2d px %.3f rot %6.1f skew %5.2f | scale %.3f%% rot %.3f° skew %.3f° step %.2f nm (%d steps, %d terraces) up %s | defects %d/%d found, %d false, worst %.3f",
			seed, p.ScaleNM[0], p.RotationDeg, p.SkewDeg, eScale, eRot, eSkew, worst, len(an.Steps), len(an.Terraces), upOK, hit, len(im.Defects), fa, worstPos)
	}
	t.Logf("total: %d/%d found (%.1f%%), %d false (%.1f%%)", totHit, totTrue, 100*float64(totHit)/float64(totTrue), totFalse, 100*float64(totFalse)/float64(totHit+totFalse))
}

func stepD(p synth.Params, x, y float64) float64 {
	if p.Step == nil {
		return math.NaN()
	}
	return p.Step.SignedDistanceNM(x, y)
}
