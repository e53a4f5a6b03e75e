package planner

import (
	"errors"
	"fmt"
	"math"
	"path/filepath"
	"strconv"
	"strings"

	"dimerpath/internal/atomicfile"
	"dimerpath/internal/jsonfile"
	"dimerpath/lattice/design"
)

// ProfileFormat and ProfileVersion identify instrument-profile files.
const (
	ProfileFormat  = "dimerpath-profile"
	ProfileVersion = 2
)

// Profile describes one instrument and tip as the planner needs it: the
// tip conditions of each write mode, the dose model, motion and settle
// times, drift and registration costs, and the instrument's limits. Every
// default comes from the literature (see DefaultProfile for sources).
type Profile struct {
	Format  string `json:"format"`
	Version int    `json:"version"`
	Name    string `json:"name"`
	Notes   string `json:"notes,omitempty"`
	// Base names the preset a profile file starts from ("rt" when
	// empty): fields the file leaves out keep the preset's value.
	Base string `json:"base,omitempty"`

	// Exposure gives the desorption yield per electron at any bias and
	// current; with each mode's footprint it decides how likely every
	// site is to clear (see ExposureModel).
	Exposure ExposureModel `json:"exposure"`

	AP    ModeProfile  `json:"ap"`
	FE    ModeProfile  `json:"fe"`
	Dwell DwellProfile `json:"dwell"`

	// StrayLimit is the largest probability with which a site outside
	// every region (beyond the edge allowance) may clear: a plan or
	// design whose strokes clear such a site more likely than this fails
	// its coverage check.
	StrayLimit float64 `json:"stray_limit"`

	// MoveSpeedNMPerS is the tip speed for idle moves in imaging
	// conditions; SettleS is the wait after each move; ModeSwitchS is
	// the time to change bias and setpoint between modes.
	MoveSpeedNMPerS float64 `json:"move_speed_nm_per_s"`
	SettleS         float64 `json:"settle_s"`
	ModeSwitchS     float64 `json:"mode_switch_s"`

	Drift DriftProfile `json:"drift"`

	// Registration, Process and Session describe the session around the
	// writing (session_profile.go): the two kinds of registration and
	// piezo creep, the process steps per dopant, and the survey,
	// conditioning, tip changes, verification, repair and documentation.
	Registration RegistrationProfile `json:"registration"`
	Process      ProcessProfile      `json:"process"`
	Session      SessionProfile      `json:"session"`

	// ToleranceAPNM and ToleranceFENM are the default placement
	// tolerances (±nm) for regions that give none. ToleranceFENM is also
	// what FE writing can hold: auto mode writes a region in FE only when
	// its own tolerance (if it gives one) is at least this.
	ToleranceAPNM float64 `json:"tolerance_ap_nm"`
	ToleranceFENM float64 `json:"tolerance_fe_nm"`
	// ToleranceLeadNM, ToleranceGateNM and TolerancePadNM are the default
	// placement tolerances (±nm) of leads, gates and pads (a design's
	// rules come first); field-emission work is never held tighter than
	// ToleranceFENM.
	ToleranceLeadNM float64 `json:"tolerance_lead_nm"`
	ToleranceGateNM float64 `json:"tolerance_gate_nm"`
	TolerancePadNM  float64 `json:"tolerance_pad_nm"`

	// Order says which mode is written first: "ap-first" or "fe-first".
	Order string `json:"order"`

	// WindowStyle says how dopant windows are opened: "line" (a short
	// AP stroke along the row over the window's dimers) or "dwell" (the
	// tip parked over each of the window's H sites in turn).
	WindowStyle string `json:"window_style"`

	// HybridBandNM is the width of the AP outline band of a hybrid
	// region; the FE fill covers the rest. It must be at least
	// FE.EdgeAllowanceNM so the fill never clears beyond the region.
	HybridBandNM float64 `json:"hybrid_band_nm"`

	Limits Limits `json:"limits"`
}

// ModeProfile holds the tip conditions and footprint of one write mode.
type ModeProfile struct {
	BiasV          float64 `json:"bias_v"`
	CurrentA       float64 `json:"current_a"`
	LineDoseCPerCm float64 `json:"line_dose_c_per_cm"`
	Passes         int     `json:"passes"`
	// SigmaNM is the standard deviation of the footprint through which
	// the tip's electrons act on the H sites (the effective footprint:
	// in the multi-electron regime the rate goes as a power of the local
	// current, so it is narrower than the current's own).
	SigmaNM float64 `json:"sigma_nm"`
	// FillCompletion is the probability with which the FE raster clears
	// the sites between two lines; it sets the raster pitch (FE only).
	FillCompletion float64 `json:"fill_completion,omitempty"`
	// SpuriousPer100NM is the background of spurious dangling bonds
	// along lines of this mode, per 100 nm of line, beyond what the
	// footprint explains (AP only).
	SpuriousPer100NM float64 `json:"spurious_per_100nm,omitempty"`
	// Outline asks for an extra pass along the region edge (FE).
	Outline bool `json:"outline,omitempty"`
	// EdgeAllowanceNM is how far beyond its region's sites a stroke of
	// this mode may clear H (nm): beyond it, a site must clear with
	// probability below the profile's StrayLimit, and the FE fill insets
	// its paths so that it does.
	EdgeAllowanceNM float64 `json:"edge_allowance_nm"`
	// V1Width and V1Overlap are the version 1 fields "width" and
	// "overlap", read from version 1 files and converted by ParseProfile
	// (profile_v1.go); nil in every version 2 profile.
	V1Width   *V1Width `json:"width,omitempty"`
	V1Overlap *float64 `json:"overlap,omitempty"`
}

// DwellProfile describes single-point depassivation by parking the tip
// (feedback-controlled: the dwell ends when the current rises).
type DwellProfile struct {
	BiasV    float64 `json:"bias_v"`
	CurrentA float64 `json:"current_a"`
	// SigmaNM is the footprint of the parked tip (see ModeProfile).
	SigmaNM float64 `json:"sigma_nm"`
	// Completion is the completion probability the planned dwell time
	// reaches (default 0.99): the dwell is capped there.
	Completion float64 `json:"completion"`
	// V1Yield is the version 1 field "yield_per_electron" (see
	// ModeProfile.V1Width); nil in every version 2 profile.
	V1Yield *float64 `json:"yield_per_electron,omitempty"`
}

// DriftProfile describes thermal drift and the cost of correcting it.
type DriftProfile struct {
	RateNMPerMin   float64 `json:"rate_nm_per_min"`
	RateSDNMPerMin float64 `json:"rate_sd_nm_per_min"`
	// RegistrationS is the time to image a fiducial and correct the
	// offset, not counting the moves to and from it.
	RegistrationS float64 `json:"registration_s"`
	// VerificationS is the operator's verification image after each
	// segment (0 for none).
	VerificationS float64 `json:"verification_s"`
	// Compensation is optional feed-forward drift compensation, Excess
	// the faster drift soon after a long move or an anneal
	// (session_profile.go).
	Compensation DriftCompensation `json:"compensation"`
	Excess       DriftExcess       `json:"excess"`
}

// Limits are the instrument's hard limits; a plan that needs more is
// refused with a message naming the value and the limit.
type Limits struct {
	MaxBiasV     float64 `json:"max_bias_v"`
	MaxCurrentA  float64 `json:"max_current_a"`
	ScanFieldNM  float64 `json:"scan_field_nm"`
	MaxSpeedNMPS float64 `json:"max_speed_nm_per_s,omitempty"`
}

// Write orders and window styles.
const (
	OrderAPFirst      = "ap-first"
	OrderFEFirst      = "fe-first"
	WindowStyleLine   = "line"
	WindowStyleDwell  = "dwell"
	PresetRoomTemp    = "rt"
	PresetLowTemp     = "lt"
	defaultPresetName = PresetRoomTemp
)

// DefaultProfile returns the room-temperature profile ("rt"). Each value
// names its source; "from memory" marks a value recalled from the
// literature but not checked against a stored source, to be replaced by
// the lab's own calibration (dimerpath calibrate).
func DefaultProfile() Profile {
	p := Profile{
		Format:  ProfileFormat,
		Version: ProfileVersion,
		Name:    "room-temperature default",
		Notes:   "literature defaults; calibrate to your own tip and instrument",
		Base:    PresetRoomTemp,
		Exposure: ExposureModel{
			Vibrational: VibrationalYield{
				// Derived: with the 0.1 nm AP footprint below, Schmucker et
				// al.'s working point (+4 V, 2 nA, 2 mC/cm; Nat. Commun. 3
				// (2012)) then clears the sites of its own dimer row with
				// probability 0.999 (exposure ln 1000) and those of the
				// next rows with < 10⁻⁶: a line one dimer row wide, as
				// published. The 99.9 % is from memory (AP lines show a
				// few missing H per 100 nm).
				YieldPerElectron: 4.5e-8,
				BiasV:            4,
				CurrentA:         2e-9,
				// Multi-electron regime below ~5 V: rate ∝ I^n with n of
				// order several, growing as the bias drops (Shen et al.,
				// Science 268, 1590 (1995); Foley et al., PRL 80, 1336
				// (1998)). n = 3 and a decade per volt are from memory.
				Order:    3,
				DecadeV:  1,
				MaxBiasV: 5,
			},
			Electronic: ElectronicYield{
				// Derived: makes the FE default below fill at the ~10⁴
				// nm²/s of Rudolph et al., APL (2014) with every site
				// cleared with 0.99 (a 9.0 nm raster pitch at 1 µm/s).
				// Shen 1995 put the electronic-regime yield at 10⁻⁶–10⁻⁵
				// H/e (from memory): this is at the top of that range.
				YieldPerElectron: 1.6e-5,
				// Electronic threshold ≈ +6.5–7 V (Shen 1995).
				ThresholdV: 6.5,
			},
		},
		AP: ModeProfile{
			// Schmucker et al., Nat. Commun. 3 (2012): +4 V, 2 nA and a
			// 2 mC/cm line dose give one-dimer-row-wide lines, i.e. a tip
			// speed of 10 nm/s.
			BiasV:          4,
			CurrentA:       2e-9,
			LineDoseCPerCm: 2e-3,
			// One pass per line is common practice; Schmucker's box took
			// 5 passes over its area, and full removal can need a
			// multiple of the first dose (Owen et al., JVST B 2011).
			Passes: 1,
			// An effective footprint of 0.1 nm, from memory: the
			// narrowest Gaussian that lets a line clear its own row's H
			// (0.177 nm from its centre) and not the next row's (0.591
			// nm), and end within one dimer pitch (0.384 nm) at a line's
			// end with < 1 % on the next site. With one Gaussian the
			// lines then widen slowly with dose (0.5 nm at the P = 1/2
			// contour), slower than the 0.8–1.5 nm over 1–10 mC/cm
			// typical (from memory): the defaults follow the published
			// one-row line; calibrate fits σ to your own lines.
			SigmaNM: 0.1,
			// Background of spurious dangling bonds along AP lines at
			// room temperature, 1–10 per 100 nm (from memory): the
			// middle of that range on a log scale.
			SpuriousPer100NM: 3,
			// Atomic precision: no site outside the region may be cleared.
			EdgeAllowanceNM: 0,
		},
		FE: ModeProfile{
			// Field emission: above the ≈6.5–7 V electronic threshold
			// (Shen et al., Science 268, 1590 (1995)); +7–10 V and a few
			// nA are typical, from memory; Rudolph et al., APL (2014)
			// write ≳10^4 nm²/s above 10 V.
			BiasV:    8,
			CurrentA: 5e-9,
			// 0.05 mC/cm inside the typical 0.01–0.1 mC/cm, from memory;
			// at 5 nA it gives 1 µm/s (0.1–1 µm/s typical, from memory).
			LineDoseCPerCm: 5e-5,
			Passes:         1,
			// σ = 2.5 nm gives 12 nm lines (the P = 1/2 width) at the
			// default dose: Rudolph 2014 report ~10 nm electrical
			// definition in FE (their spot above 10 V is ~40 nm); 3–10 nm
			// lines at +7–10 V are typical, from memory.
			SigmaNM: 2.5,
			// Every site between two raster lines clears with 0.99
			// (common practice: a pad needs no atomic perfection); this
			// sets the pitch.
			FillCompletion: 0.99,
			// The FE fill keeps its paths far enough inside the region
			// that beyond 5 nm of it every site clears with less than the
			// stray limit: the same 5 nm the FE keep-out design rule
			// assumes (FE lines ~10 nm, Rudolph 2014).
			EdgeAllowanceNM: 5,
		},
		Dwell: DwellProfile{
			// Feedback-controlled single-H removal: tip parked, +2.5–4.5 V,
			// dwell 10 ms–1 s (Walsh & Hersam 2009; details from memory).
			// With the exposure model above: Y = 3.6·10⁻⁹ H/e (the
			// vibrational range 10⁻¹⁰–10⁻⁸ H/e, Shen 1995, Foley 1998,
			// from memory), a 99 % dwell of 0.09 s.
			BiasV:    3.5,
			CurrentA: 1e-9,
			// The AP footprint (from memory, see ap.sigma_nm): the dimer
			// partner (0.354 nm away) clears first with 0.2 %.
			SigmaNM:    0.1,
			Completion: 0.99,
		},
		// A site outside every region may clear with at most 1 %: a
		// design margin (common practice), not a published value.
		StrayLimit: 0.01,
		// Idle moves 0.1–few µm/s, from memory.
		MoveSpeedNMPerS: 500,
		// Small moves settle in well under a second; large offsets take
		// 10 s–minutes (from memory).
		SettleS: 0.5,
		// Changing between AP and FE conditions and letting the tip and
		// feedback settle, from memory.
		ModeSwitchS: 30,
		Drift: DriftProfile{
			// Room temperature 0.1–1 nm/min once settled (up to 5 nm/min
			// soon after large moves), from memory: the low end of that
			// range. A thermally compensated instrument drifts far less
			// (Lyding et al., RSI 59, 1897 (1988): < 1 Å/h, 0.0017
			// nm/min), so a lab with one should calibrate this down.
			RateNMPerMin:   0.1,
			RateSDNMPerMin: 0.05, // ±50 %, from memory
			// A 50×50 nm² registration image of 256 lines at ~1 s/line
			// (a typical image, from memory).
			RegistrationS: 256,
			VerificationS: 0,
		},
		// Issue defaults: AP ±0.2 nm, FE ±2 nm.
		ToleranceAPNM: 0.2,
		ToleranceFENM: 2,
		// Common practice, from memory: write the atomically precise
		// parts while the tip is in its best state; FE at high bias can
		// change the tip.
		Order:       OrderAPFirst,
		WindowStyle: WindowStyleLine,
		// The FE edge allowance (5 nm) plus about one dimer row, so the
		// fill's edge stays inside the AP band.
		HybridBandNM: 6,
		Limits: Limits{
			MaxBiasV:     10,    // common instrument bias range ±10 V, from memory
			MaxCurrentA:  10e-9, // ~10 nA FE cap for a stable tip, from memory
			ScanFieldNM:  2000,  // the design-rule default 2 µm scan field
			MaxSpeedNMPS: 5000,  // few µm/s tip moves, from memory
		},
	}
	sessionDefaults(&p)
	return p
}

// LowTemperatureProfile returns the 4 K preset ("lt"): the room-
// temperature profile with liquid-helium drift, ≤ 0.1 nm/h (from
// memory). The dose model is left at the room-temperature values:
// the low-bias yield rises ~300× at 11 K (Foley et al., PRL 80, 1336
// (1998)), so calibrate at temperature before trusting write times.
func LowTemperatureProfile() Profile {
	p := DefaultProfile()
	p.Name = "low-temperature (4 K) default"
	p.Base = PresetLowTemp
	p.Drift.RateNMPerMin = 0.1 / 60
	p.Drift.RateSDNMPerMin = 0.05 / 60
	lowTemperatureSession(&p)
	return p
}

// Presets returns the names of the built-in profiles, sorted.
func Presets() []string { return []string{PresetLowTemp, PresetRoomTemp} }

// Preset returns the built-in profile of that name ("rt" or "lt").
func Preset(name string) (Profile, error) {
	switch strings.ToLower(name) {
	case PresetRoomTemp, "room-temperature", "":
		return DefaultProfile(), nil
	case PresetLowTemp, "low-temperature", "4k":
		return LowTemperatureProfile(), nil
	}
	return Profile{}, fmt.Errorf("planner: unknown profile preset %q (known: %s)", name, strings.Join(Presets(), ", "))
}

// ErrInvalidProfile is wrapped by the *jsonfile.Error of every profile
// that cannot be read or does not validate.
var ErrInvalidProfile = errors.New("invalid instrument profile")

// MaxProfileBytes bounds a profile file (1 MiB: a profile is a few
// hundred bytes); a larger file is refused before it is read.
const MaxProfileBytes = 1 << 20

// Plausible ranges of the profile's fields. A value outside one is a
// typo, not an instrument (issue 16): a settle of more than an hour, a
// move slower than 1 pm/s, a current above 1 µA or a bias beyond ±100 V.
// The ranges are wide on purpose (common practice: several orders of
// magnitude around the published working points cited in
// DefaultProfile), and with them every time the planner derives is
// finite.
const (
	MaxBiasV            = 100   // |bias|, V
	MinCurrentA         = 1e-15 // 1 fA
	MaxCurrentA         = 1e-6  // 1 µA
	MinLineDoseCPerCm   = 1e-9  // 1 nC/cm
	MaxLineDoseCPerCm   = 0.1   // 100 mC/cm
	MinSpeedNMPerS      = 1e-3  // 1 pm/s, writing or moving
	MaxSpeedNMPerS      = 1e7   // 1 cm/s
	MinSigmaNM          = 0.01  // footprint σ
	MaxSigmaNM          = 100
	MinFillCompletion   = 0.5 // FE raster: the sites between lines clear at least half the time
	MaxFillCompletion   = 0.99999999
	MaxSpuriousPer100NM = 1000
	MaxOrder            = 50    // the vibrational regime's n
	MinDecadeV          = 0.05  // bias step per tenfold yield
	MaxAllowanceNM      = 100   // edge allowance, hybrid band
	MinYield            = 1e-15 // H atoms per electron
	MaxSettleS          = 3600  // settle after a move
	MaxStepS            = 86400 // a mode switch, a registration, a verification image
	MaxDwellS           = 3600  // the planned (capped) dwell on one site
	MaxDriftNMPerMin    = 100   // drift rate and its SD
	MinToleranceNM      = 1e-3  // placement tolerance, ±nm
	MaxToleranceNM      = 1000
	MaxScanFieldNM      = 1e5 // 100 µm
	maxPasses           = 1000
)

// Validate checks every field against its plausible range and the
// relations between fields, and returns a *jsonfile.Error (wrapping
// ErrInvalidProfile) listing each bad one with its JSON path, its value
// and the range, or nil.
func (p Profile) Validate() error {
	var v validator
	if p.Format != ProfileFormat {
		v.add("format", p.Format, fmt.Sprintf("must be %q", ProfileFormat))
	}
	if p.Version < 1 || p.Version > ProfileVersion {
		v.add("version", p.Version, fmt.Sprintf("must be 1..%d (this dimerpath reads up to version %d)", ProfileVersion, ProfileVersion))
	}
	if p.Base != "" {
		if _, err := Preset(p.Base); err != nil {
			v.add("base", p.Base, fmt.Sprintf("must name a preset (%s) or be empty", strings.Join(Presets(), ", ")))
		}
	}
	p.v1Problems(&v)
	model := v.exposure(p.Exposure)
	v.mode("ap", p.AP, false)
	v.mode("fe", p.FE, true)

	v.bias("dwell.bias_v", p.Dwell.BiasV)
	v.current("dwell.current_a", p.Dwell.CurrentA)
	v.within("dwell.sigma_nm", p.Dwell.SigmaNM, MinSigmaNM, MaxSigmaNM, "nm")
	if x := p.Dwell.Completion; !(x > 0 && x < 1) {
		v.add("dwell.completion", x, "must lie strictly between 0 and 1")
	}
	if l := p.StrayLimit; !(l > 0 && l < 1) {
		v.add("stray_limit", l, "must lie strictly between 0 and 1")
	}
	if model && v.Len() == 0 {
		// Only a valid model can say whether the modes clear anything.
		v.clears(p)
	}

	v.within("move_speed_nm_per_s", p.MoveSpeedNMPerS, MinSpeedNMPerS, MaxSpeedNMPerS, "nm/s")
	v.within("settle_s", p.SettleS, 0, MaxSettleS, "s")
	v.within("mode_switch_s", p.ModeSwitchS, 0, MaxStepS, "s")

	v.within("drift.rate_nm_per_min", p.Drift.RateNMPerMin, 0, MaxDriftNMPerMin, "nm/min")
	v.within("drift.rate_sd_nm_per_min", p.Drift.RateSDNMPerMin, 0, MaxDriftNMPerMin, "nm/min")
	v.within("drift.registration_s", p.Drift.RegistrationS, 0, MaxStepS, "s")
	v.within("drift.verification_s", p.Drift.VerificationS, 0, MaxStepS, "s")

	v.within("tolerance_ap_nm", p.ToleranceAPNM, MinToleranceNM, MaxToleranceNM, "nm")
	v.within("tolerance_fe_nm", p.ToleranceFENM, MinToleranceNM, MaxToleranceNM, "nm")
	if p.Order != OrderAPFirst && p.Order != OrderFEFirst {
		v.add("order", p.Order, fmt.Sprintf("must be %q or %q", OrderAPFirst, OrderFEFirst))
	}
	if p.WindowStyle != WindowStyleLine && p.WindowStyle != WindowStyleDwell {
		v.add("window_style", p.WindowStyle, fmt.Sprintf("must be %q or %q", WindowStyleLine, WindowStyleDwell))
	}
	if v.positiveUpTo("hybrid_band_nm", p.HybridBandNM, MaxAllowanceNM, "nm") && finite(p.FE.EdgeAllowanceNM) && p.HybridBandNM < p.FE.EdgeAllowanceNM {
		v.add("hybrid_band_nm", p.HybridBandNM, fmt.Sprintf("must be at least fe.edge_allowance_nm (%s nm) so the FE fill stays inside the region", jsonfile.Number(p.FE.EdgeAllowanceNM)))
	}

	v.validateSession(p)

	v.positiveUpTo("limits.max_bias_v", p.Limits.MaxBiasV, MaxBiasV, "V")
	v.positiveUpTo("limits.max_current_a", p.Limits.MaxCurrentA, MaxCurrentA, "A")
	v.positiveUpTo("limits.scan_field_nm", p.Limits.ScanFieldNM, MaxScanFieldNM, "nm")
	if p.Limits.MaxSpeedNMPS != 0 {
		v.within("limits.max_speed_nm_per_s", p.Limits.MaxSpeedNMPS, MinSpeedNMPerS, MaxSpeedNMPerS, "nm/s (or 0 for no limit)")
	}
	return v.Err("", ErrInvalidProfile)
}

// validator collects a profile's problems, each with its JSON path, the
// bad value and what is wrong.
type validator struct{ jsonfile.Problems }

func (v *validator) add(path string, value any, problem string) {
	v.AddValue(path, value, "%s", problem)
}

func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

// within reports whether lo <= x <= hi, recording a problem that gives
// the range if not (NaN and infinities are outside every range).
func (v *validator) within(path string, x, lo, hi float64, unit string) bool {
	if x >= lo && x <= hi {
		return true
	}
	v.add(path, x, fmt.Sprintf("must be from %s to %s %s", jsonfile.Number(lo), jsonfile.Number(hi), unit))
	return false
}

// positiveUpTo reports whether 0 < x <= hi, recording a problem if not.
func (v *validator) positiveUpTo(path string, x, hi float64, unit string) bool {
	if x > 0 && x <= hi {
		return true
	}
	v.add(path, x, fmt.Sprintf("must be more than 0 and at most %s %s", jsonfile.Number(hi), unit))
	return false
}

func (v *validator) bias(path string, x float64) bool {
	if x != 0 && math.Abs(x) <= MaxBiasV {
		return true
	}
	v.add(path, x, fmt.Sprintf("must be non-zero and within ±%d V", MaxBiasV))
	return false
}

func (v *validator) current(path string, x float64) bool {
	if x >= MinCurrentA && x <= MaxCurrentA {
		return true
	}
	v.add(path, x, "must be from 1 fA to 1 µA (1e-15 to 1e-06 A)")
	return false
}

func (v *validator) mode(prefix string, m ModeProfile, fe bool) {
	v.bias(prefix+".bias_v", m.BiasV)
	cur := v.current(prefix+".current_a", m.CurrentA)
	dose := v.within(prefix+".line_dose_c_per_cm", m.LineDoseCPerCm, MinLineDoseCPerCm, MaxLineDoseCPerCm, "C/cm")
	if cur && dose {
		if sp := m.Speed(); !(sp >= MinSpeedNMPerS && sp <= MaxSpeedNMPerS) {
			v.add(prefix+".line_dose_c_per_cm", m.LineDoseCPerCm, fmt.Sprintf(
				"with %s.current_a = %s A the tip would write at %s nm/s; a writing speed must be from %s to %s nm/s",
				prefix, jsonfile.Number(m.CurrentA), jsonfile.Approx(sp), jsonfile.Number(MinSpeedNMPerS), jsonfile.Number(MaxSpeedNMPerS)))
		}
	}
	if m.Passes < 1 || m.Passes > maxPasses {
		v.add(prefix+".passes", m.Passes, fmt.Sprintf("must be 1..%d", maxPasses))
	}
	v.within(prefix+".sigma_nm", m.SigmaNM, MinSigmaNM, MaxSigmaNM, "nm")
	if fe {
		if c := m.FillCompletion; !(c >= MinFillCompletion && c <= MaxFillCompletion) {
			v.add(prefix+".fill_completion", c, fmt.Sprintf("must be from %g to %g", MinFillCompletion, MaxFillCompletion))
		}
		if m.SpuriousPer100NM != 0 {
			v.add(prefix+".spurious_per_100nm", m.SpuriousPer100NM, "applies to AP lines only; leave it 0")
		}
	} else {
		if m.FillCompletion != 0 {
			v.add(prefix+".fill_completion", m.FillCompletion, "applies to the FE raster only; leave it 0")
		}
		v.within(prefix+".spurious_per_100nm", m.SpuriousPer100NM, 0, MaxSpuriousPer100NM, "per 100 nm")
	}
	v.within(prefix+".edge_allowance_nm", m.EdgeAllowanceNM, 0, MaxAllowanceNM, "nm")
}

// exposure checks the exposure model and reports whether it is valid.
func (v *validator) exposure(m ExposureModel) bool {
	n := v.Len()
	vib, el := m.Vibrational, m.Electronic
	v.within("exposure.vibrational.yield_per_electron", vib.YieldPerElectron, MinYield, 1, "H atoms per electron")
	v.within("exposure.electronic.yield_per_electron", el.YieldPerElectron, MinYield, 1, "H atoms per electron")
	v.within("exposure.vibrational.bias_v", vib.BiasV, 0.1, MaxBiasV, "V")
	v.current("exposure.vibrational.current_a", vib.CurrentA)
	v.within("exposure.vibrational.order", vib.Order, 1, MaxOrder, "(the rate grows as I^n)")
	v.within("exposure.vibrational.decade_v", vib.DecadeV, MinDecadeV, MaxBiasV, "V per tenfold yield")
	maxV := v.within("exposure.vibrational.max_bias_v", vib.MaxBiasV, 0.1, MaxBiasV, "V")
	thr := v.within("exposure.electronic.threshold_v", el.ThresholdV, 0.1, MaxBiasV, "V")
	if maxV && thr && el.ThresholdV <= vib.MaxBiasV {
		v.add("exposure.electronic.threshold_v", el.ThresholdV, fmt.Sprintf("must lie above exposure.vibrational.max_bias_v (%s V)", jsonfile.Number(vib.MaxBiasV)))
	}
	if maxV && vib.BiasV > vib.MaxBiasV {
		v.add("exposure.vibrational.bias_v", vib.BiasV, fmt.Sprintf("must lie in the vibrational regime, at most max_bias_v (%s V)", jsonfile.Number(vib.MaxBiasV)))
	}
	return v.Len() == n
}

// clears records a mode whose lines would clear less than half their
// sites, an exposure that is not a number (a yield or dose far out of
// scale), and a dwell longer than a dwell may take.
func (v *validator) clears(p Profile) {
	for _, mode := range []design.Mode{design.ModeAP, design.ModeFE} {
		m := p.modeOf(mode)
		if l := p.Line(mode); !finite(l.Peak) || l.Peak <= math.Ln2 {
			v.add(string(mode)+".line_dose_c_per_cm", m.LineDoseCPerCm, fmt.Sprintf(
				"gives a centre-line exposure of %s (Y = %s H/e at %s V): lines would clear less than half their sites",
				jsonfile.Approx(l.Peak), jsonfile.Approx(l.Yield), jsonfile.Number(m.BiasV)))
		}
	}
	if d := p.DwellCapS(); !(d <= MaxDwellS) {
		v.add("dwell.current_a", p.Dwell.CurrentA, fmt.Sprintf(
			"a dwell at %s V and this current reaches its completion after %s s per site (the exposure model's yield is %s H/e), more than the %d s a dwell may take",
			jsonfile.Number(p.Dwell.BiasV), jsonfile.Approx(d), jsonfile.Approx(p.DwellYield()), MaxDwellS))
	}
}

// ParseProfile reads a profile from JSON. Fields the document leaves out
// keep the value of the preset named by its "base" field (the
// room-temperature default when absent); unknown fields and fields in
// another case are refused, so a misspelt name is reported rather than
// ignored. name labels errors (usually the file name). The result is
// validated; every problem is reported with its JSON path, line and
// column in a *jsonfile.Error wrapping ErrInvalidProfile.
func ParseProfile(data []byte, name string) (Profile, error) {
	label := name
	if label == "" {
		label = "profile"
	}
	fail := func(ps []jsonfile.Problem) error {
		jsonfile.Locate(data, ps)
		return &jsonfile.Error{File: label, Kind: ErrInvalidProfile, Problems: ps}
	}
	if len(data) > MaxProfileBytes {
		return Profile{}, fail([]jsonfile.Problem{{Message: "the file holds " + jsonfile.Bytes(int64(len(data))) +
			", more than the " + jsonfile.Bytes(MaxProfileBytes) + " limit for a profile", Err: jsonfile.ErrTooLarge}})
	}
	// Identify the file and its preset before decoding it strictly, so a
	// design or a newer version gets the right message.
	if p, bad := jsonfile.SyntaxProblem(data, "the profile"); bad {
		return Profile{}, fail([]jsonfile.Problem{p})
	}
	format, ok := jsonfile.TopString(data, "format")
	if !ok || format != ProfileFormat {
		p := jsonfile.Problem{Path: "format", Message: fmt.Sprintf("not a dimerpath instrument profile (want %q)", ProfileFormat)}
		if raw, found := jsonfile.TopField(data, "format"); found {
			p.Value = jsonfile.Text(raw)
		} else {
			p.Message = "missing: " + p.Message
		}
		return Profile{}, fail([]jsonfile.Problem{p})
	}
	raw, found := jsonfile.TopField(data, "version")
	if v, err := strconv.Atoi(string(raw)); err != nil || v < 1 || v > ProfileVersion {
		p := jsonfile.Problem{Path: "version", Message: fmt.Sprintf("this dimerpath reads profile versions 1 to %d", ProfileVersion)}
		if found {
			p.Value = jsonfile.Text(raw)
		} else {
			p.Message = "missing: " + p.Message
		}
		return Profile{}, fail([]jsonfile.Problem{p})
	}
	base, _ := jsonfile.TopString(data, "base")
	p, err := Preset(base)
	if err != nil {
		return Profile{}, fail([]jsonfile.Problem{{Path: "base", Value: base,
			Message: fmt.Sprintf("unknown profile preset (known: %s)", strings.Join(Presets(), ", "))}})
	}
	// Name and notes describe the file, not the preset it starts from.
	p.Name, p.Notes = "", ""
	var ps jsonfile.Problems
	if !jsonfile.Decode(data, &p, &ps, jsonfile.Options{What: "the profile", MaxString: 10000, MaxList: 100, MaxDepth: 8}) || ps.Len() > 0 {
		return Profile{}, ps.Err(label, ErrInvalidProfile)
	}
	if p.Name == "" && name != "" {
		p.Name = strings.TrimSuffix(filepath.Base(name), filepath.Ext(name))
	}
	if p.Version == 1 {
		notes, ps := p.upgradeV1()
		if ps.Len() > 0 {
			return Profile{}, fail(ps.List())
		}
		if len(notes) > 0 {
			p.Notes = strings.TrimSpace(p.Notes + "\nread from a version 1 file: " + strings.Join(notes, "; "))
		}
	}
	if err := p.Validate(); err != nil {
		e := err.(*jsonfile.Error)
		e.File = label
		jsonfile.Locate(data, e.Problems)
		return Profile{}, e
	}
	return p, nil
}

// LoadProfile reads and validates the profile file at path; a file larger
// than MaxProfileBytes is refused before it is read.
func LoadProfile(path string) (Profile, error) {
	data, err := jsonfile.ReadFile(path, MaxProfileBytes, ErrInvalidProfile)
	if err != nil {
		return Profile{}, err
	}
	return ParseProfile(data, path)
}

// SaveProfile validates p and writes it to path atomically (temp file +
// rename), with the current format and version, one field a line.
func SaveProfile(path string, p Profile) error {
	p.Format, p.Version = ProfileFormat, ProfileVersion
	if p.Base == "" {
		p.Base = defaultPresetName
	}
	if err := p.Validate(); err != nil {
		err.(*jsonfile.Error).File = path
		return err
	}
	data, err := jsonfile.Marshal(p, jsonfile.Indented)
	if err != nil {
		return fmt.Errorf("%s: %w", path, err)
	}
	return atomicfile.WriteBytes(path, data, 0o644)
}

// LimitError reports a value a plan needs that lies beyond the
// instrument's limits.
type LimitError struct {
	// Quantity is the JSON path of the value (for example "fe.bias_v"),
	// Limit the JSON path of the limit ("limits.max_bias_v").
	Quantity string
	Value    float64
	Limit    string
	Max      float64
	Unit     string
}

// ErrBeyondLimits is wrapped by every *LimitError.
var ErrBeyondLimits = errors.New("beyond the instrument's limits")

func (e *LimitError) Error() string {
	return fmt.Sprintf("refused: %s = %s exceeds %s = %s (%s; change the plan or the profile's limits)",
		e.Quantity, formatQuantity(e.Value, e.Unit), e.Limit, formatQuantity(e.Max, e.Unit), ErrBeyondLimits)
}

func (e *LimitError) Unwrap() error { return ErrBeyondLimits }

func formatQuantity(v float64, unit string) string {
	if unit == "A" {
		return fmt.Sprintf("%.4g nA", v*1e9)
	}
	return fmt.Sprintf("%.4g %s", v, unit)
}

// limitCheck is one value compared with one limit.
type limitCheck struct {
	quantity string
	value    float64
	limit    string
	max      float64
	unit     string
}

// CheckLimits returns a *LimitError for the first value p's own settings
// need beyond p.Limits (bias, current, writing and move speeds), with
// the modes in use given by uses (nil checks every mode), or nil.
func (p Profile) CheckLimits(uses *ModeUse) error {
	if uses == nil {
		uses = &ModeUse{AP: true, FE: true, Dwell: true}
	}
	var checks []limitCheck
	mode := func(name string, m ModeProfile) {
		checks = append(checks,
			limitCheck{name + ".bias_v", math.Abs(m.BiasV), "limits.max_bias_v", p.Limits.MaxBiasV, "V"},
			limitCheck{name + ".current_a", m.CurrentA, "limits.max_current_a", p.Limits.MaxCurrentA, "A"})
		if p.Limits.MaxSpeedNMPS > 0 {
			checks = append(checks, limitCheck{name + " writing speed (current / line dose)", WritingSpeed(m.CurrentA, m.LineDoseCPerCm),
				"limits.max_speed_nm_per_s", p.Limits.MaxSpeedNMPS, "nm/s"})
		}
	}
	if uses.AP {
		mode("ap", p.AP)
	}
	if uses.FE {
		mode("fe", p.FE)
	}
	if uses.Dwell {
		checks = append(checks,
			limitCheck{"dwell.bias_v", math.Abs(p.Dwell.BiasV), "limits.max_bias_v", p.Limits.MaxBiasV, "V"},
			limitCheck{"dwell.current_a", p.Dwell.CurrentA, "limits.max_current_a", p.Limits.MaxCurrentA, "A"})
	}
	if p.Limits.MaxSpeedNMPS > 0 {
		checks = append(checks, limitCheck{"move_speed_nm_per_s", p.MoveSpeedNMPerS, "limits.max_speed_nm_per_s", p.Limits.MaxSpeedNMPS, "nm/s"})
	}
	for _, c := range checks {
		if c.value > c.max {
			return &LimitError{Quantity: c.quantity, Value: c.value, Limit: c.limit, Max: c.max, Unit: c.unit}
		}
	}
	return nil
}

// ModeUse says which tip conditions a plan uses.
type ModeUse struct{ AP, FE, Dwell bool }

// checkField returns a *LimitError when a field side exceeds the scan
// field limit.
func (p Profile) checkField(widthNM, heightNM float64) error {
	side := math.Max(widthNM, heightNM)
	if side > p.Limits.ScanFieldNM {
		q := "design field width (field.width_nm)"
		if heightNM > widthNM {
			q = "design field height (field.height_nm)"
		}
		return &LimitError{Quantity: q, Value: side, Limit: "limits.scan_field_nm", Max: p.Limits.ScanFieldNM, Unit: "nm"}
	}
	return nil
}
