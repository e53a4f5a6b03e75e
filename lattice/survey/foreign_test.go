package survey

import (
	"math"
	"math/rand/v2"

	"dimerpath/lattice/survey/synth"
)

// foreignRender draws a topograph the way another program might: a
// smooth sum of cosines for the rows and the dimers (no atoms), defects
// as Gaussians at any position (not on a dimer), the step as a line with
// the other terrace's lattice shifted by the registry, non-square images,
// line offsets as a random walk, quantised to 16 bits without a height
// scale. It shares only the truth's geometry with synth, so that the
// analysis is not tuned to synth's way of drawing.
func foreignRender(p synth.Params, bits int) (*Topograph, []synth.Defect) {
	rng := rand.New(rand.NewPCG(p.Seed, 4242))
	const rs, pitch = 0.76806, 0.38403
	th := p.RotationDeg * math.Pi / 180
	type lat struct {
		along, across [2]float64
		origin        [2]float64
		height        float64
	}
	base := lat{along: [2]float64{math.Cos(th), math.Sin(th)}, across: [2]float64{-math.Sin(th), math.Cos(th)}, origin: p.PhaseNM}
	other := lat{along: base.across, across: [2]float64{-base.along[0], -base.along[1]}}
	// Registry (diamond structure): up moves the dimer centres across the
	// new rows by a quarter row spacing, down along them by half a pitch.
	if p.Step != nil {
		shiftAlong, shiftAcross := pitch/2, 0.0
		other.height = -0.13578
		if p.Step.Up {
			shiftAlong, shiftAcross = 0, rs/4
			other.height = 0.13578
		}
		other.origin = [2]float64{
			base.origin[0] + shiftAlong*other.along[0] + shiftAcross*other.across[0],
			base.origin[1] + shiftAlong*other.along[1] + shiftAcross*other.across[1],
		}
	}
	z := make([]float32, p.Width*p.Height)
	walk := 0.0
	var defects []synth.Defect
	for _, d := range p.Defects {
		defects = append(defects, d)
	}
	for j := 0; j < p.Height; j++ {
		walk += p.LineNoiseNM * rng.NormFloat64()
		for i := 0; i < p.Width; i++ {
			x, y := p.Affine(float64(i)+0.5, float64(j)+0.5)
			l := base
			if p.Step != nil && p.Step.SignedDistanceNM(x, y) > 0 {
				l = other
			}
			dx, dy := x-l.origin[0], y-l.origin[1]
			u := dx*l.along[0] + dy*l.along[1]
			v := dx*l.across[0] + dy*l.across[1]
			cr := math.Cos(math.Pi * v / rs)
			cd := math.Cos(math.Pi * u / pitch)
			h := l.height + 0.05*cr*cr + 0.025*cd*cd*cr*cr
			h += p.TiltNMPerNM[0]*x + p.TiltNMPerNM[1]*y + walk
			for _, d := range defects {
				sd := d.SizeNM / 2.3548
				r2 := (x-d.AtNM[0])*(x-d.AtNM[0]) + (y-d.AtNM[1])*(y-d.AtNM[1])
				if r2 < 25*sd*sd {
					sign := 1.0
					if d.Kind == synth.Dark {
						sign = -1
					}
					h += sign * d.HeightNM * math.Exp(-r2/(2*sd*sd))
				}
			}
			z[j*p.Width+i] = float32(h + p.NoiseNM*rng.NormFloat64())
		}
	}
	t := &Topograph{Name: "foreign", Width: p.Width, Height: p.Height, Z: z}
	// Quantise to the given bits over the height range, no scale given.
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, v := range z {
		lo, hi = math.Min(lo, float64(v)), math.Max(hi, float64(v))
	}
	top := math.Exp2(float64(bits)) - 1
	for i, v := range z {
		z[i] = float32(math.Round((float64(v) - lo) / (hi - lo) * top))
	}
	return t, defects
}
