package planner

import (
	"fmt"
	"math"

	"dimerpath/internal/jsonfile"
	"dimerpath/lattice/design"
)

// Version 1 profiles described each mode's lines by a threshold width
// model, w(λ) = 2σ·√(2 ln(λ/λ_thr)), and the dwell by its own yield per
// electron. The exposure model reads that width as the band cleared with
// probability at least ½ (LineModel.Width), so a version 1 mode keeps its
// σ and its threshold dose gives the yield at the mode's bias and current:
// Y = ln 2·e·√(2π)·σ/((λ_thr/1 cm)·(1/n_H)), put into the regime of the
// mode's bias. The FE overlap and the dwell yield have no place in the
// model: the raster pitch follows fe.fill_completion, and the dwell its
// bias and current.
//
// The version 1 fields are decoded in place (ModeProfile.V1Width and
// V1Overlap, DwellProfile.V1Yield), so their errors carry the file's line
// and column like any other; upgradeV1 checks them in their version 1
// ranges, converts them and clears them.

// V1Width is a version 1 mode's "width" object.
type V1Width struct {
	SigmaNM             *float64 `json:"sigma_nm,omitempty"`
	ThresholdDoseCPerCm *float64 `json:"threshold_dose_c_per_cm,omitempty"`
}

// Version 1 ranges.
const (
	v1MaxOverlap       = 0.95  // FE raster: a pitch of at least 5 % of the line width
	v1MinThresholdDose = 1e-12 // C/cm
)

// hasV1 reports whether p holds any version 1 field.
func (p *Profile) hasV1() bool {
	return p.AP.V1Width != nil || p.AP.V1Overlap != nil || p.FE.V1Width != nil || p.FE.V1Overlap != nil || p.Dwell.V1Yield != nil
}

// v1Problems lists the version 1 fields of a version 2 profile.
func (p *Profile) v1Problems(v *validator) {
	for _, m := range []struct {
		prefix string
		m      *ModeProfile
	}{{"ap", &p.AP}, {"fe", &p.FE}} {
		if m.m.V1Width != nil {
			v.add(m.prefix+".width", "{…}", fmt.Sprintf("a version 1 field: version %d profiles give %s.sigma_nm and the exposure model's yield (exposure.*)", ProfileVersion, m.prefix))
		}
		if m.m.V1Overlap != nil {
			v.add(m.prefix+".overlap", *m.m.V1Overlap, fmt.Sprintf("a version 1 field: version %d profiles set the raster pitch by fe.fill_completion", ProfileVersion))
		}
	}
	if p.Dwell.V1Yield != nil {
		v.add("dwell.yield_per_electron", *p.Dwell.V1Yield, fmt.Sprintf("a version 1 field: in version %d the dwell's yield follows the exposure model at its bias and current", ProfileVersion))
	}
}

// upgradeV1 checks a version 1 profile's own fields in their version 1
// ranges, turns them into the exposure model (see above), clears them and
// returns notes on what changed; the problems name the fields' paths.
func (p *Profile) upgradeV1() ([]string, jsonfile.Problems) {
	var v validator
	var notes []string
	for _, m := range []struct {
		mode design.Mode
		m    *ModeProfile
	}{{design.ModeAP, &p.AP}, {design.ModeFE, &p.FE}} {
		prefix := string(m.mode)
		if o := m.m.V1Overlap; o != nil {
			if m.mode != design.ModeFE {
				v.add(prefix+".overlap", *o, "applies to the FE raster only; leave it 0")
			} else if !(*o >= 0 && *o <= v1MaxOverlap) {
				v.add(prefix+".overlap", *o, fmt.Sprintf("must be from 0 to %g (a raster pitch of at least %g %% of the line width)", v1MaxOverlap, 100*(1-v1MaxOverlap)))
			} else {
				notes = append(notes, "fe.overlap (version 1) dropped: the raster pitch follows fe.fill_completion")
			}
			m.m.V1Overlap = nil
		}
		w := m.m.V1Width
		if w == nil {
			continue
		}
		m.m.V1Width = nil
		if w.SigmaNM != nil {
			if !v.within(prefix+".width.sigma_nm", *w.SigmaNM, MinSigmaNM, MaxSigmaNM, "nm") {
				continue
			}
			m.m.SigmaNM = *w.SigmaNM
		}
		if w.ThresholdDoseCPerCm == nil {
			continue
		}
		thr := *w.ThresholdDoseCPerCm
		if !v.within(prefix+".width.threshold_dose_c_per_cm", thr, v1MinThresholdDose, MaxLineDoseCPerCm, "C/cm") {
			continue
		}
		if !(m.m.SigmaNM > 0) {
			continue // reported by Validate
		}
		y := math.Ln2 / lineAmplitude(1, thr, m.m.SigmaNM)
		switch p.Exposure.Regime(m.m.BiasV) {
		case RegimeVibrational:
			e := &p.Exposure.Vibrational
			e.YieldPerElectron, e.BiasV, e.CurrentA = y, math.Abs(m.m.BiasV), m.m.CurrentA
		case RegimeElectronic:
			p.Exposure.Electronic.YieldPerElectron = y
		default:
			v.add(prefix+".width.threshold_dose_c_per_cm", thr, fmt.Sprintf(
				"the %s bias %s V lies between the vibrational and electronic regimes, where a version 1 threshold cannot be turned into a yield: re-run dimerpath calibrate", prefix, jsonfile.Number(m.m.BiasV)))
			continue
		}
		notes = append(notes, fmt.Sprintf("%s.width (version 1) read as the exposure model: σ kept, the threshold dose turned into the yield at the %s bias and current", prefix, prefix))
	}
	if y := p.Dwell.V1Yield; y != nil {
		if v.within("dwell.yield_per_electron", *y, MinYield, 1, "H atoms per electron") {
			notes = append(notes, "dwell.yield_per_electron (version 1) dropped: the dwell's yield follows the exposure model at its bias and current")
		}
		p.Dwell.V1Yield = nil
	}
	p.Version = ProfileVersion
	return notes, v.Problems
}
