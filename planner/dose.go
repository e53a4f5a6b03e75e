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

// LineWidth returns the width in nm of a line written with the mode's
// conditions and passes (the delivered dose is passes·λ).
func (m ModeProfile) LineWidth() float64 {
	return m.Width.Width(m.LineDoseCPerCm * float64(max(m.Passes, 1)))
}

// Pitch returns the FE raster line pitch, width·(1-overlap), in nm.
func (m ModeProfile) Pitch() float64 { return m.LineWidth() * (1 - m.Overlap) }

// ArealRate returns the raster writing rate in nm²/s: speed × pitch, per
// pass.
func (m ModeProfile) ArealRate() float64 {
	return m.Speed() * m.Pitch() / float64(max(m.Passes, 1))
}

// Width returns the line width in nm at line dose λ (C/cm):
// 2σ·sqrt(2 ln(λ/λ_thr)), or 0 at or below the threshold.
func (w WidthModel) Width(lineDoseCPerCm float64) float64 {
	if !(lineDoseCPerCm > w.ThresholdDoseCPerCm) {
		return 0
	}
	return 2 * w.SigmaNM * math.Sqrt(2*math.Log(lineDoseCPerCm/w.ThresholdDoseCPerCm))
}

// Rate returns the dwell's completion rate k = Y·I/e in 1/s: the
// completion time is exponential with this rate.
func (d DwellProfile) Rate() float64 {
	return d.YieldPerElectron * d.CurrentA / ElementaryCharge
}

// CompletionProbability returns the probability that a dwell of t
// seconds has removed its H atom: 1 - exp(-Y·I·t/e).
func (d DwellProfile) CompletionProbability(t float64) float64 {
	if t <= 0 {
		return 0
	}
	return -math.Expm1(-d.Rate() * t)
}

// CapS returns the longest dwell the plan allows, the time by which the
// completion probability reaches Completion: -ln(1-C)/k.
func (d DwellProfile) CapS() float64 { return -math.Log1p(-d.Completion) / d.Rate() }

// ExpectedS returns the expected duration of one feedback-ended dwell
// capped at CapS: E[min(T, cap)] = (1-exp(-k·cap))/k = C/k.
func (d DwellProfile) ExpectedS() float64 { return d.Completion / d.Rate() }

// exposure returns the dose at a point relative to the clearing
// threshold for a straight pass from the origin along +x of length L
// (nm), at along-distance s and across-distance dist (nm), for a
// Gaussian footprint of standard deviation sigma and a delivered
// dose-to-threshold ratio ratio. A site is cleared where the sum over all
// passes is at least 1. For an infinite line this is ratio·exp(-d²/2σ²),
// which is 1 exactly at the width model's half width.
func exposure(ratio, sigma, L, s, dist float64) float64 {
	across := math.Exp(-dist * dist / (2 * sigma * sigma))
	along := normalCDF((L-s)/sigma) - normalCDF(-s/sigma)
	return ratio * across * along
}

func normalCDF(x float64) float64 { return 0.5 * math.Erfc(-x/math.Sqrt2) }
