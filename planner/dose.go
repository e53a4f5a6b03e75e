package planner

import "math"

// ElementaryCharge is e in coulombs, exact by definition since the 2019
// revision of the SI (CODATA 2018).
const ElementaryCharge = 1.602176634e-19

// nmPerCm converts centimetres to nanometres.
const nmPerCm = 1e7

// WritingSpeed returns the tip speed in nm/s that delivers the line dose
// lineDoseCPerCm (C/cm) at currentA (A): v = I/λ, A / (C/cm) = cm/s. For
// example 2 nA at 2 mC/cm gives 10 nm/s (Schmucker et al., Nat. Commun.
// 3 (2012)).
func WritingSpeed(currentA, lineDoseCPerCm float64) float64 {
	return currentA / lineDoseCPerCm * nmPerCm
}

// Speed returns the mode's writing speed in nm/s (current / line dose).
func (m ModeProfile) Speed() float64 { return WritingSpeed(m.CurrentA, m.LineDoseCPerCm) }

// lineExposure returns the exposure (see ExposureModel) at a point for a
// straight pass from the origin along +x of length L (nm), at
// along-distance s and across-distance dist (nm), for a Gaussian
// footprint of standard deviation sigma whose infinitely long line gives
// peak on its centre line: peak·exp(−d²/2σ²)·[Φ((L−s)/σ) − Φ(−s/σ)].
func lineExposure(peak, sigma, L, s, dist float64) float64 {
	across := math.Exp(-dist * dist / (2 * sigma * sigma))
	along := normalCDF((L-s)/sigma) - normalCDF(-s/sigma)
	return peak * across * along
}

func normalCDF(x float64) float64 { return 0.5 * math.Erfc(-x/math.Sqrt2) }
