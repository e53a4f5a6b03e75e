package planner

// ProfileFormat and ProfileVersion identify instrument-profile files.
const (
	ProfileFormat  = "dimerpath-profile"
	ProfileVersion = 1
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

	AP    ModeProfile  `json:"ap"`
	FE    ModeProfile  `json:"fe"`
	Dwell DwellProfile `json:"dwell"`

	// MoveSpeedNMPerS is the tip speed for idle moves in imaging
	// conditions; SettleS is the wait after each move; ModeSwitchS is
	// the time to change bias and setpoint between modes.
	MoveSpeedNMPerS float64 `json:"move_speed_nm_per_s"`
	SettleS         float64 `json:"settle_s"`
	ModeSwitchS     float64 `json:"mode_switch_s"`

	Drift DriftProfile `json:"drift"`

	// ToleranceAPNM and ToleranceFENM are the default placement
	// tolerances (±nm) for regions that give none.
	ToleranceAPNM float64 `json:"tolerance_ap_nm"`
	ToleranceFENM float64 `json:"tolerance_fe_nm"`

	// Order says which mode is written first: "ap-first" or "fe-first".
	Order string `json:"order"`

	Limits Limits `json:"limits"`
}

// ModeProfile holds the tip conditions and dose model of one write mode.
type ModeProfile struct {
	BiasV          float64 `json:"bias_v"`
	CurrentA       float64 `json:"current_a"`
	LineDoseCPerCm float64 `json:"line_dose_c_per_cm"`
	Passes         int     `json:"passes"`
	// Width is the line width as a function of line dose.
	Width WidthModel `json:"width"`
	// Overlap is the fraction of the line width by which neighbouring
	// raster lines overlap (FE fill); the pitch is width·(1-overlap).
	Overlap float64 `json:"overlap,omitempty"`
	// Outline asks for an extra pass along the region edge (FE).
	Outline bool `json:"outline,omitempty"`
}

// WidthModel gives the written line width from the line dose λ for a
// Gaussian beam footprint of standard deviation SigmaNM and a threshold
// dose below which no site is cleared:
//
//	w(λ) = 2·σ·sqrt(2·ln(λ/λ_thr)) for λ > λ_thr, else 0.
//
// This is the form derived in physics.md §3 (no closed form is
// published); calibrate fits it to a lab's own lines.
type WidthModel struct {
	SigmaNM             float64 `json:"sigma_nm"`
	ThresholdDoseCPerCm float64 `json:"threshold_dose_c_per_cm"`
}

// DwellProfile describes single-point depassivation by parking the tip.
type DwellProfile struct {
	BiasV    float64 `json:"bias_v"`
	CurrentA float64 `json:"current_a"`
	// YieldPerElectron is the desorption yield Y (H atoms per electron);
	// a dwell of t seconds completes with probability 1-exp(-Y·I·t/e).
	YieldPerElectron float64 `json:"yield_per_electron"`
	// Completion is the completion probability the planned dwell time
	// reaches (default 0.99).
	Completion float64 `json:"completion"`
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
}

// Limits are the instrument's hard limits; a plan that needs more is
// refused with a message naming the value and the limit.
type Limits struct {
	MaxBiasV     float64 `json:"max_bias_v"`
	MaxCurrentA  float64 `json:"max_current_a"`
	ScanFieldNM  float64 `json:"scan_field_nm"`
	MaxSpeedNMPS float64 `json:"max_speed_nm_per_s,omitempty"`
}
