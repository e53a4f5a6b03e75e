package planner

import (
	"bytes"
	"encoding/json"
	"fmt"
	"math"
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

// v1Threshold is a version 1 mode's width model, if the file gave one.
type v1Threshold struct {
	sigma, threshold *float64
}

// upgradeV1 rewrites a version 1 profile document as version 2 and
// returns the thresholds to apply after decoding (by mode) and notes on
// what changed.
func upgradeV1(data []byte) ([]byte, map[WriteMode]v1Threshold, []string, error) {
	var doc map[string]any
	dec := json.NewDecoder(bytes.NewReader(data))
	dec.UseNumber()
	if err := dec.Decode(&doc); err != nil {
		return nil, nil, nil, err
	}
	doc["version"] = json.Number(fmt.Sprint(ProfileVersion))
	th := map[WriteMode]v1Threshold{}
	var notes []string
	num := func(v any) *float64 {
		if n, ok := v.(json.Number); ok {
			if f, err := n.Float64(); err == nil {
				return &f
			}
		}
		return nil
	}
	for _, mode := range []WriteMode{AP, FE} {
		m, ok := doc[string(mode)].(map[string]any)
		if !ok {
			continue
		}
		if w, ok := m["width"].(map[string]any); ok {
			var t v1Threshold
			if s, ok := w["sigma_nm"]; ok {
				m["sigma_nm"] = s
				t.sigma = num(s)
			}
			t.threshold = num(w["threshold_dose_c_per_cm"])
			delete(w, "sigma_nm")
			delete(w, "threshold_dose_c_per_cm")
			if len(w) == 0 {
				delete(m, "width")
			}
			th[mode] = t
			notes = append(notes, fmt.Sprintf("%s.width (version 1) read as the exposure model: σ kept, the threshold dose turned into the yield at the %s bias and current", mode, mode))
		}
		if _, ok := m["overlap"]; ok && mode == FE {
			delete(m, "overlap")
			notes = append(notes, "fe.overlap (version 1) dropped: the raster pitch follows fe.fill_completion")
		}
	}
	if d, ok := doc["dwell"].(map[string]any); ok {
		if _, ok := d["yield_per_electron"]; ok {
			delete(d, "yield_per_electron")
			notes = append(notes, "dwell.yield_per_electron (version 1) dropped: the dwell's yield follows the exposure model at its bias and current")
		}
	}
	out, err := json.Marshal(doc)
	return out, th, notes, err
}

// applyV1 sets the yield of each mode's regime from its version 1
// threshold dose (see the comment above upgradeV1).
func (p *Profile) applyV1(th map[WriteMode]v1Threshold) error {
	for _, mode := range []WriteMode{AP, FE} {
		t, ok := th[mode]
		if !ok || t.threshold == nil {
			continue
		}
		m := p.modeOf(mode)
		if !(*t.threshold > 0) || !(m.SigmaNM > 0) {
			return fmt.Errorf("%s.width.threshold_dose_c_per_cm = %v: must be a positive number", mode, *t.threshold)
		}
		y := math.Ln2 / lineAmplitude(1, *t.threshold, m.SigmaNM)
		switch p.Exposure.Regime(m.BiasV) {
		case RegimeVibrational:
			v := &p.Exposure.Vibrational
			v.YieldPerElectron, v.BiasV, v.CurrentA = y, math.Abs(m.BiasV), m.CurrentA
		case RegimeElectronic:
			p.Exposure.Electronic.YieldPerElectron = y
		default:
			return fmt.Errorf("%s.width.threshold_dose_c_per_cm: the %s bias %g V lies between the vibrational and electronic regimes, where a version 1 threshold cannot be turned into a yield: re-run dimerpath calibrate", mode, mode, m.BiasV)
		}
	}
	return nil
}
