package planner

import (
	"fmt"
	"math"

	"dimerpath/lattice"
	"dimerpath/lattice/design"
)

// The exposure model: how likely an H site is to be cleared by the tip.
//
// A site receives N_e electrons from the tip's Gaussian footprint summed
// over every pass of every stroke near it, and is cleared with
// probability 1 − exp(−Y·N_e), where Y is the desorption yield per
// electron at the stroke's bias and current. N_e is the areal electron
// dose of the footprint at the site times the area per H site, 1/n_H, so
// that Y·N_e = Y·D/(e·n_H) for an areal dose D: the definition of the
// yield per electron under which a uniform dose D clears the fraction
// 1 − exp(−Y·D/(e·n_H)) of the H.
//
// x = Y·N_e is the site's exposure: clearing events are Poisson with mean
// x, and exposures of independent strokes add. Everything the planner
// says about clearing (line widths, the FE raster pitch, line-end
// extensions, the coverage expectation, the windows' P(opened as drawn),
// dwell times) follows from x.

// SiteAreaNM2 is the area per H site on Si(100)-2x1:H, 1/n_H =
// 0.14748 nm², from the CODATA lattice constant (lattice.HDensity).
const SiteAreaNM2 = 1 / lattice.HDensity

// ExposureModel gives the desorption yield per electron Y(V, I) in the
// two regimes of Shen et al., Science 268, 1590 (1995): above the
// electronic threshold (about +6.5–7 V) direct σ→σ* excitation by
// field-emitted electrons, with a yield roughly independent of the
// current; below about +5 V multiple-vibrational excitation by tunnelling
// electrons, whose rate grows as I^n, so that the yield per electron
// rises as I^(n−1). Between the two, log Y is interpolated linearly in
// the bias. The bias is taken as its magnitude; the defaults are for
// positive sample bias (negative-bias desorption follows another curve,
// Stokbro et al., PRL 80, 2618 (1998): calibrate it).
type ExposureModel struct {
	Vibrational VibrationalYield `json:"vibrational"`
	Electronic  ElectronicYield  `json:"electronic"`
}

// VibrationalYield is the multi-electron regime:
//
//	Y(V, I) = Y_ref · (I/I_ref)^(n−1) · 10^((V−V_ref)/D)
//
// for V up to MaxBiasV.
type VibrationalYield struct {
	// YieldPerElectron is Y_ref, H atoms per electron at BiasV and
	// CurrentA.
	YieldPerElectron float64 `json:"yield_per_electron"`
	BiasV            float64 `json:"bias_v"`
	CurrentA         float64 `json:"current_a"`
	// Order is n: the desorption rate grows as I^n.
	Order float64 `json:"order"`
	// DecadeV is the bias step that raises the yield tenfold, D.
	DecadeV float64 `json:"decade_v"`
	// MaxBiasV is the upper end of the regime.
	MaxBiasV float64 `json:"max_bias_v"`
}

// ElectronicYield is the field-emission regime: Y = YieldPerElectron at
// and above ThresholdV, independent of the current.
type ElectronicYield struct {
	YieldPerElectron float64 `json:"yield_per_electron"`
	ThresholdV       float64 `json:"threshold_v"`
}

// Yield regimes, as Regime names them.
const (
	RegimeVibrational = "vibrational"
	RegimeCrossover   = "crossover"
	RegimeElectronic  = "electronic"
)

// Regime names the regime of a bias: vibrational at or below
// Vibrational.MaxBiasV, electronic at or above Electronic.ThresholdV,
// crossover between.
func (m ExposureModel) Regime(biasV float64) string {
	v := math.Abs(biasV)
	switch {
	case v <= m.Vibrational.MaxBiasV:
		return RegimeVibrational
	case v >= m.Electronic.ThresholdV:
		return RegimeElectronic
	}
	return RegimeCrossover
}

// Yield returns Y(V, I) in H atoms per electron (see ExposureModel).
func (m ExposureModel) Yield(biasV, currentA float64) float64 {
	v := math.Abs(biasV)
	vib := m.Vibrational
	vibAt := func(v float64) float64 {
		return vib.YieldPerElectron * math.Pow(currentA/vib.CurrentA, vib.Order-1) * math.Pow(10, (v-vib.BiasV)/vib.DecadeV)
	}
	switch m.Regime(v) {
	case RegimeVibrational:
		return vibAt(v)
	case RegimeElectronic:
		return m.Electronic.YieldPerElectron
	}
	lo, hi := math.Log(vibAt(vib.MaxBiasV)), math.Log(m.Electronic.YieldPerElectron)
	f := (v - vib.MaxBiasV) / (m.Electronic.ThresholdV - vib.MaxBiasV)
	return math.Exp(lo + f*(hi-lo))
}

// ClearProbability returns the probability that a site of exposure x is
// cleared, 1 − exp(−x).
func ClearProbability(x float64) float64 { return -math.Expm1(-x) }

// exposureFor returns the exposure −ln(1−p) at which a site clears with
// probability p.
func exposureFor(p float64) float64 { return -math.Log1p(-p) }

// electronsPerNM returns the electrons per nm of a line dose in C/cm.
func electronsPerNM(lineDoseCPerCm float64) float64 {
	return lineDoseCPerCm / nmPerCm / ElementaryCharge
}

// ElectronsPerRowSite returns the electrons a line dose λ (C/cm) delivers
// per H site of one dimer row when all of it lands on that row: λ/e over
// the row's 2/DimerPitch sites per nm. At Schmucker et al.'s 2 mC/cm this
// is 2.4·10⁸ electrons per H.
func ElectronsPerRowSite(lineDoseCPerCm float64) float64 {
	return electronsPerNM(lineDoseCPerCm) * lattice.DimerPitch / lattice.SitesPerDimer
}

// LineModel is the exposure of one mode's lines, resolved from a profile:
// an infinitely long line of the mode's passes gives a site at
// perpendicular distance d the exposure Peak·exp(−d²/2σ²).
type LineModel struct {
	Mode design.Mode `json:"mode"`
	// Yield is Y at the mode's bias and current (H per electron).
	Yield   float64 `json:"yield_per_electron"`
	SigmaNM float64 `json:"sigma_nm"`
	// PassPeak is the exposure on the centre line of one pass; Peak that
	// of all Passes.
	PassPeak float64 `json:"pass_peak"`
	Passes   int     `json:"passes"`
	Peak     float64 `json:"peak"`
}

// lineAmplitude returns the exposure on the centre line of one pass of
// an infinitely long line of dose λ (C/cm), yield Y and footprint σ:
// Y·(λ/e)·(1/n_H)/(√(2π)·σ).
func lineAmplitude(yield, lineDoseCPerCm, sigma float64) float64 {
	return yield * electronsPerNM(lineDoseCPerCm) * SiteAreaNM2 / (math.Sqrt(2*math.Pi) * sigma)
}

// dotAmplitude returns the exposure beneath a tip parked with charge q
// (C) and footprint σ: Y·(q/e)·(1/n_H)/(2πσ²).
func dotAmplitude(yield, chargeC, sigma float64) float64 {
	return yield * chargeC / ElementaryCharge * SiteAreaNM2 / (2 * math.Pi * sigma * sigma)
}

// Line returns the line model of mode (AP or FE).
func (p *Profile) Line(mode design.Mode) LineModel {
	m := p.modeOf(mode)
	y := p.Exposure.Yield(m.BiasV, m.CurrentA)
	passes := max(m.Passes, 1)
	pass := lineAmplitude(y, m.LineDoseCPerCm, m.SigmaNM)
	return LineModel{Mode: mode, Yield: y, SigmaNM: m.SigmaNM, PassPeak: pass, Passes: passes, Peak: pass * float64(passes)}
}

// At returns the exposure at perpendicular distance d (nm) from an
// infinitely long line.
func (l LineModel) At(d float64) float64 { return l.Peak * gauss(d, l.SigmaNM) }

// Reach returns the distance from the centre line at which the exposure
// of an infinitely long line falls to x, or 0 where it never reaches x.
func (l LineModel) Reach(x float64) float64 {
	if !(l.Peak > x) {
		return 0
	}
	return l.SigmaNM * math.Sqrt(2*math.Log(l.Peak/x))
}

// Width returns the width (nm) of the band in which a long line clears
// sites with probability at least one half: 2σ·√(2 ln(X/ln 2)) for a
// centre-line exposure X, 0 when X ≤ ln 2. It is the line width the
// model predicts, and what calibrate fits to measured widths.
func (l LineModel) Width() float64 { return 2 * l.Reach(math.Ln2) }

// ArealRate returns the area per second a mode clears: for AP one dimer
// row per line (speed × row spacing), for FE the raster (speed × pitch
// / passes).
func (p *Profile) ArealRate(mode design.Mode) float64 {
	if mode == design.ModeFE {
		return p.FE.Speed() * p.FEPitch() / float64(max(p.FE.Passes, 1))
	}
	return p.AP.Speed() * lattice.RowSpacing / float64(max(p.AP.Passes, 1))
}

// FEPitch returns the FE raster pitch (nm): the largest spacing of
// parallel lines at which every site between them still gets the
// exposure that clears it with probability FE.FillCompletion. The least
// exposure lies midway between two lines; lines further out add to it.
func (p *Profile) FEPitch() float64 {
	l := p.Line(design.ModeFE)
	target := exposureFor(p.FE.FillCompletion)
	if !(l.Peak > 0) || !(l.SigmaNM > 0) || math.IsNaN(target) {
		return 0
	}
	between := func(pitch float64) float64 {
		sum := 0.0
		for k := 0; k < 64; k++ {
			d := (float64(k) + 0.5) * pitch
			if d > 12*l.SigmaNM {
				break
			}
			sum += 2 * l.At(d)
		}
		return sum
	}
	// between falls as the pitch grows: bisect on [lo, hi].
	lo, hi := 1e-3*l.SigmaNM, 40*l.SigmaNM
	if between(hi) >= target {
		return hi
	}
	if between(lo) < target {
		return lo
	}
	for range 100 {
		mid := (lo + hi) / 2
		if between(mid) >= target {
			lo = mid
		} else {
			hi = mid
		}
	}
	return lo
}

// OwnRowExposure returns the exposure of the H sites of the row an AP
// line runs along (HOffset from its centre line), all passes.
func (p *Profile) OwnRowExposure() float64 { return p.Line(design.ModeAP).At(lattice.HOffset) }

// NextRowExposure returns the exposure of the nearest H sites of the
// neighbouring row (RowSpacing − HOffset from the line), all passes.
func (p *Profile) NextRowExposure() float64 {
	return p.Line(design.ModeAP).At(lattice.RowSpacing - lattice.HOffset)
}

// DwellYield returns Y at the dwell's bias and current.
func (p *Profile) DwellYield() float64 { return p.Exposure.Yield(p.Dwell.BiasV, p.Dwell.CurrentA) }

// DwellRate returns the rate k (1/s) at which a parked tip clears the H
// beneath it: Y·(I/e)·(1/n_H)/(2πσ²), from the footprint's areal density
// at its centre. The completion time is exponential with this rate.
func (p *Profile) DwellRate() float64 {
	return dotAmplitude(p.DwellYield(), p.Dwell.CurrentA, p.Dwell.SigmaNM)
}

// DwellCompletionProbability returns the probability that a dwell of t
// seconds has cleared its site: 1 − exp(−k·t).
func (p *Profile) DwellCompletionProbability(t float64) float64 {
	if t <= 0 {
		return 0
	}
	return ClearProbability(p.DwellRate() * t)
}

// DwellCapS returns the longest dwell the plan allows: the time by which
// the completion probability reaches Dwell.Completion, −ln(1−C)/k.
func (p *Profile) DwellCapS() float64 { return exposureFor(p.Dwell.Completion) / p.DwellRate() }

// DwellExpectedS returns the expected duration of a feedback-ended dwell
// capped at DwellCapS: E[min(T, cap)] = (1−exp(−k·cap))/k = C/k.
func (p *Profile) DwellExpectedS() float64 { return p.Dwell.Completion / p.DwellRate() }

// DwellNeighbourProbability returns the probability that a dwell on one
// site clears a site at distance d (nm) before the dwell ends. The dwell
// ends when its own site clears (feedback sees the current rise) or at
// the cap; the neighbour clears at the rate r·k with r = exp(−d²/2σ²),
// so it is first with probability r/(1+r)·(1 − exp(−(1+r)·k·cap)).
func (p *Profile) DwellNeighbourProbability(d float64) float64 {
	r := gauss(d, p.Dwell.SigmaNM)
	kc := exposureFor(p.Dwell.Completion)
	return r / (1 + r) * -math.Expm1(-(1+r)*kc)
}

// dwellExposure returns the exposure a dwell gives a neighbour at
// relative footprint r = exp(−d²/2σ²), linearised: Completion·r. It
// bounds the exact −ln(1 − DwellNeighbourProbability) from above to
// within a share r/2 of it, so it may be summed with other strokes'
// exposures; the dwell's own site is taken apart (see
// dwellOwnExposure).
func (p *Profile) dwellExposure(r float64) float64 { return p.Dwell.Completion * r }

// dwellOwnExposure is the exposure of the site a dwell is parked on:
// −ln(1 − Completion).
func (p *Profile) dwellOwnExposure() float64 { return exposureFor(p.Dwell.Completion) }

// modeSummary returns one line describing a mode's exposure, for
// messages.
func (l LineModel) String() string {
	return fmt.Sprintf("%s lines: Y %.3g H/e, σ %.3g nm, centre exposure %.3g (%d pass)", l.Mode, l.Yield, l.SigmaNM, l.Peak, l.Passes)
}
