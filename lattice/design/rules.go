package design

import (
	"dimerpath/lattice"
)

// Defaults of the design rules, used where a design's Rules leave a
// setting out.
const (
	// DefaultScanFieldNM is the side of the square the instrument scans
	// without a coarse move: 2 µm, at the low end of room-temperature
	// STM scan ranges (1–10 µm, from memory; ±1 µm for a 4 mm tube at
	// ±200 V, Aarhus STM).
	DefaultScanFieldNM = 2000.0
	// DefaultWindowGapDimers: at least one intact dimer between windows
	// on a row (common practice).
	DefaultWindowGapDimers = 1
	// DefaultWindowFacingRows: no window in the facing segment of the
	// next row on either side (common practice).
	DefaultWindowFacingRows = 1
	// DefaultFEKeepOutNM is the least gap between field-emission regions
	// and atomic-precision features (common practice; the FE spot is
	// ~40 nm and its electrical definition ~10 nm, Rudolph et al., APL
	// 2014).
	DefaultFEKeepOutNM = 5.0
	// DefaultTunnelGapMinNM and DefaultTunnelGapMaxNM bound SET tunnel
	// gaps: 7 to 16 intact dimer rows (5.4–12.3 nm), Wang et al.,
	// Commun. Phys. 3, 82 (2020).
	DefaultTunnelGapMinNM = 7 * lattice.RowSpacing
	DefaultTunnelGapMaxNM = 16 * lattice.RowSpacing
	// DefaultAPToleranceNM is the placement tolerance of atomic-precision
	// work, ±0.2 nm: about half a dimer pitch, so that a window lands on
	// the dimer meant (common practice; Fuechsle et al., Nat.
	// Nanotechnol. 7, 242 (2012) place to ±1 lattice site).
	DefaultAPToleranceNM = 0.2
	// DefaultFEToleranceNM is the placement tolerance of field-emission
	// work, ±2 nm (common practice; FE lines are 3–10 nm wide, from
	// memory).
	DefaultFEToleranceNM = 2.0
	// DefaultTunnelGapToleranceNM is the tolerance of a tunnel gap's
	// width, ±half a dimer-row spacing (0.38 nm), so that the gap keeps
	// its number of rows: one row more or less changes the tunnel
	// resistance about tenfold (Wang et al., Commun. Phys. 3, 82 (2020)).
	DefaultTunnelGapToleranceNM = lattice.RowSpacing / 2
	// DefaultDefectWindowClearanceNM is the least distance from a dopant
	// window to the edge of a defect of the survey, 3 nm, and
	// DefaultDefectClearanceNM that of other atomic-precision features,
	// 1.5 nm: a dangling bond or adsorbate next to a window can take the
	// precursor or the donor, next to a wire it can short or scatter (from
	// memory: defaults to set by a lab's own yields, not check values).
	DefaultDefectWindowClearanceNM = 3.0
	DefaultDefectClearanceNM       = 1.5
)

// RuleSettings are the design-rule settings with every default filled
// in; see Rules for what each means. All lengths are in nm.
type RuleSettings struct {
	ScanFieldNM      [2]float64
	WindowGapDimers  int
	WindowFacingRows int
	FEKeepOutNM      float64
	TunnelGapMinNM   float64
	TunnelGapMaxNM   float64
	APToleranceNM    float64
	FEToleranceNM    float64
	// TunnelGapToleranceNM is the tolerance (±nm) of a tunnel gap's
	// width.
	TunnelGapToleranceNM float64
	// DefectWindowClearanceNM and DefectClearanceNM are the least
	// distances from the edge of a survey's defect to dopant windows and
	// to other atomic-precision features.
	DefectWindowClearanceNM float64
	DefectClearanceNM       float64
}

// DefaultRules returns the rule settings of a design without Rules.
func DefaultRules() RuleSettings {
	return RuleSettings{
		ScanFieldNM:      [2]float64{DefaultScanFieldNM, DefaultScanFieldNM},
		WindowGapDimers:  DefaultWindowGapDimers,
		WindowFacingRows: DefaultWindowFacingRows,
		FEKeepOutNM:      DefaultFEKeepOutNM,
		TunnelGapMinNM:   DefaultTunnelGapMinNM,
		TunnelGapMaxNM:   DefaultTunnelGapMaxNM,
		APToleranceNM:    DefaultAPToleranceNM,
		FEToleranceNM:    DefaultFEToleranceNM,

		TunnelGapToleranceNM: DefaultTunnelGapToleranceNM,

		DefectWindowClearanceNM: DefaultDefectWindowClearanceNM,
		DefectClearanceNM:       DefaultDefectClearanceNM,
	}
}

// EffectiveRules returns the design's rule settings: its Rules over
// DefaultRules.
func (d *Design) EffectiveRules() RuleSettings {
	rs := DefaultRules()
	r := d.Rules
	if r == nil {
		return rs
	}
	set := func(dst *float64, src *float64) {
		if src != nil {
			*dst = *src
		}
	}
	if r.ScanFieldNM != nil {
		rs.ScanFieldNM = *r.ScanFieldNM
	}
	if r.WindowGapDimers != nil {
		rs.WindowGapDimers = *r.WindowGapDimers
	}
	if r.WindowFacingRows != nil {
		rs.WindowFacingRows = *r.WindowFacingRows
	}
	set(&rs.FEKeepOutNM, r.FEKeepOutNM)
	set(&rs.TunnelGapMinNM, r.TunnelGapMinNM)
	set(&rs.TunnelGapMaxNM, r.TunnelGapMaxNM)
	set(&rs.APToleranceNM, r.APToleranceNM)
	set(&rs.FEToleranceNM, r.FEToleranceNM)
	set(&rs.TunnelGapToleranceNM, r.TunnelGapToleranceNM)
	set(&rs.DefectWindowClearanceNM, r.DefectWindowClearanceNM)
	set(&rs.DefectClearanceNM, r.DefectClearanceNM)
	return rs
}

// DefaultTolerance returns the placement tolerance (±nm) of a region in
// mode m that gives none: FEToleranceNM for ModeFE, APToleranceNM for
// every other mode (auto and hybrid keep the tighter AP value, since
// their edges may be written atom by atom).
func (rs RuleSettings) DefaultTolerance(m Mode) float64 {
	if m == ModeFE {
		return rs.FEToleranceNM
	}
	return rs.APToleranceNM
}

// Tolerance returns the region's placement tolerance (±nm): its own
// ToleranceNM, or the default for its mode.
func (r *Region) Tolerance(rs RuleSettings) float64 {
	if r.ToleranceNM > 0 {
		return r.ToleranceNM
	}
	return rs.DefaultTolerance(r.EffectiveMode())
}

// EffectiveMode returns the region's mode, ModeAuto when none is given.
func (r *Region) EffectiveMode() Mode {
	if r.Mode == "" {
		return ModeAuto
	}
	return r.Mode
}
