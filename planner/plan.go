package planner

import (
	"github.com/golang/geo/r2"

	"dimerpath/lattice"
)

// Caution is printed by the command line, shown in the GUI's Help and
// before any export, and printed on every plan.
const Caution = "CAUTION: a dimerpath plan is advisory. Check every bias, current, speed, dose and position " +
	"against your instrument's limits and your lab's procedures before writing."

// WriteMode is the mode a stroke is written in. A hybrid region yields
// strokes of both modes.
type WriteMode string

const (
	AP WriteMode = "ap" // atomic-precision: low bias, tunnelling current, one dimer row wide
	FE WriteMode = "fe" // field-emission: high bias, wide fast lines
)

// StrokeKind is how a stroke is written.
type StrokeKind string

const (
	StrokeLine    StrokeKind = "line"    // AP pass along a dimer row over a run of sites
	StrokeDwell   StrokeKind = "dwell"   // tip parked over one point (a dopant window or a single site)
	StrokeRaster  StrokeKind = "raster"  // FE serpentine fill of a region
	StrokeOutline StrokeKind = "outline" // FE or AP pass along a region's edge
)

// Plan is the complete write plan of one design variant: what is written
// in which mode, in which order, split into drift-safe segments, with its
// time and yield estimates. It is plain data: exporters and the GUI read
// it and never call back into the planner.
type Plan struct {
	Design  string `json:"design"`
	Variant string `json:"variant"`
	Profile string `json:"profile"` // the instrument profile's name
	Seed    int64  `json:"seed"`

	FieldWidthNM  float64 `json:"field_width_nm"`
	FieldHeightNM float64 `json:"field_height_nm"`

	// Conditions lists the tip conditions used, per mode.
	Conditions []Conditions `json:"conditions"`
	// Modes says, per region, the mode chosen and why.
	Modes     []RegionMode `json:"modes"`
	Fiducials []Fiducial   `json:"fiducials"`

	// Strokes are indexed by Stroke.ID; Actions are in execution order.
	Strokes  []Stroke  `json:"strokes"`
	Segments []Segment `json:"segments"`
	Actions  []Action  `json:"actions"`

	// Breakdown sums to TotalS, the expected write time; P10S, P50S and
	// P90S are quantiles of the Monte Carlo spread.
	Breakdown Breakdown `json:"breakdown"`
	TotalS    float64   `json:"total_s"`
	P10S      float64   `json:"p10_s"`
	P50S      float64   `json:"p50_s"`
	P90S      float64   `json:"p90_s"`
	// FloorS is the physical floor: the writing time alone (AP, FE and
	// dwell), without travel, switches or registrations.
	FloorS float64 `json:"floor_s"`
	// ByHandS is the total time of the same work planned the way it is
	// done by hand: regions in file order, rows in raster order, one mode
	// per region, a registration at the fixed interval of the tightest
	// drift budget.
	ByHandS float64 `json:"by_hand_s"`

	Windows  []Window `json:"windows"`
	Yield    Yield    `json:"yield"`
	Coverage Coverage `json:"coverage"`
	// Warnings are findings that do not stop the plan (a stroke split at
	// a registration, a region drawn with a mode the planner would not
	// choose).
	Warnings []string `json:"warnings,omitempty"`
}

// Conditions are the tip settings of one write mode.
type Conditions struct {
	Mode WriteMode `json:"mode"`
	// Kind is the kind of stroke written with these conditions: line
	// (AP), dwell (AP conditions for parking on single sites) or raster
	// (FE).
	Kind           StrokeKind `json:"kind"`
	BiasV          float64    `json:"bias_v"`             // sample bias
	CurrentA       float64    `json:"current_a"`          // setpoint current
	LineDoseCPerCm float64    `json:"line_dose_c_per_cm"` // charge per unit length
	SpeedNMPerS    float64    `json:"speed_nm_per_s"`     // = current / line dose
	LineWidthNM    float64    `json:"line_width_nm"`      // from the width-vs-dose model
	Passes         int        `json:"passes"`
	PitchNM        float64    `json:"pitch_nm,omitempty"` // FE raster line pitch
	// DwellS is the expected time of one feedback-ended dwell and
	// DwellCapS the longest the plan lets it run (its Completion time).
	DwellS    float64 `json:"dwell_s,omitempty"`
	DwellCapS float64 `json:"dwell_cap_s,omitempty"`
}

// RegionMode records the mode given to one region and the reason.
type RegionMode struct {
	Region    string `json:"region"`
	Role      string `json:"role"`
	Requested string `json:"requested"` // auto, ap, fe or hybrid as drawn
	Mode      string `json:"mode"`      // ap, fe or hybrid as planned
	Reason    string `json:"reason"`
	Sites     int    `json:"sites"`
}

// Fiducial is a registration mark, with its field position in nm.
type Fiducial struct {
	Name string   `json:"name"`
	At   r2.Point `json:"at_nm"`
}

// Stroke is one continuous write: a path the tip follows (or, for a
// dwell, the point it parks on) in one mode.
type Stroke struct {
	ID     int        `json:"id"`
	Region string     `json:"region"`
	Mode   WriteMode  `json:"mode"`
	Kind   StrokeKind `json:"kind"`
	// Path is the tip path in nm in the order it is written (the route
	// engine has chosen the direction); a dwell has one point.
	Path      []r2.Point `json:"path_nm"`
	Passes    int        `json:"passes"`
	LengthNM  float64    `json:"length_nm"`  // one pass
	DurationS float64    `json:"duration_s"` // all passes, or the dwell
	Sites     int        `json:"sites"`      // H sites this stroke is meant to clear
	// ToleranceNM is the placement tolerance (±nm) the stroke is held to;
	// its drift budget is ToleranceNM / drift rate.
	ToleranceNM float64 `json:"tolerance_nm"`
	Segment     int     `json:"segment"`
	// Window is the index into Plan.Windows of the dopant window this
	// stroke opens, or -1.
	Window int `json:"window"`
	// ExpectedMissed is the expected number of sites this stroke was the
	// main writer of (it gives them the most exposure) that keep their H;
	// ExpectedStray the expected number of sites outside every region,
	// beyond the edge allowance, it clears (with the spurious background
	// along an AP line). From the coverage check.
	ExpectedMissed float64 `json:"expected_missed"`
	ExpectedStray  float64 `json:"expected_stray"`
}

// Segment is a run of strokes written after one registration, short
// enough that drift stays inside every stroke's placement tolerance.
type Segment struct {
	Index      int      `json:"index"`
	Fiducial   string   `json:"fiducial"`
	FiducialAt r2.Point `json:"fiducial_at_nm"`
	StartS     float64  `json:"start_s"` // plan clock at the start of the registration
	EndS       float64  `json:"end_s"`
	// BudgetS is the drift budget: the least tolerance / drift rate over
	// the segment's strokes; 0 when the profile has no drift (no limit:
	// JSON cannot carry +Inf).
	BudgetS float64 `json:"budget_s"`
	Strokes []int   `json:"strokes"` // stroke IDs in writing order
}

// ActionKind is one kind of tip action.
type ActionKind string

const (
	ActRegister ActionKind = "register" // image a fiducial and correct the offset
	ActMove     ActionKind = "move"     // idle travel in imaging conditions
	ActSwitch   ActionKind = "switch"   // change bias and setpoint to another mode
	ActWrite    ActionKind = "write"    // write a stroke
	ActDwell    ActionKind = "dwell"    // park and pulse for a dwell stroke
	ActVerify   ActionKind = "verify"   // the operator's verification image
)

// Action is one step of the timeline. Actions cover the plan without gaps:
// each starts when the previous one ends.
type Action struct {
	Index     int        `json:"index"`
	Kind      ActionKind `json:"kind"`
	Segment   int        `json:"segment"`
	Stroke    int        `json:"stroke"` // stroke ID, or -1
	From      r2.Point   `json:"from_nm"`
	To        r2.Point   `json:"to_nm"`
	StartS    float64    `json:"start_s"`
	DurationS float64    `json:"duration_s"`
	Mode      WriteMode  `json:"mode,omitempty"`
	BiasV     float64    `json:"bias_v,omitempty"`
	CurrentA  float64    `json:"current_a,omitempty"`
	SpeedNMPS float64    `json:"speed_nm_per_s,omitempty"`
	Note      string     `json:"note,omitempty"`
}

// Breakdown is the expected write time by kind, in seconds.
type Breakdown struct {
	APWriteS      float64 `json:"ap_write_s"`
	FEWriteS      float64 `json:"fe_write_s"`
	DwellS        float64 `json:"dwell_s"`
	TravelS       float64 `json:"travel_s"`
	ModeSwitchS   float64 `json:"mode_switch_s"`
	RegistrationS float64 `json:"registration_s"`
	VerificationS float64 `json:"verification_s"`
}

// Total returns the sum of the parts.
func (b Breakdown) Total() float64 {
	return b.APWriteS + b.FEWriteS + b.DwellS + b.TravelS + b.ModeSwitchS + b.RegistrationS + b.VerificationS
}

// Window is one dopant window of the plan with its donor-count
// probabilities.
type Window struct {
	Region   string   `json:"region"`
	Species  string   `json:"species"`
	Template string   `json:"template"`
	At       r2.Point `json:"at_nm"` // window centre
	Sites    int      `json:"sites"`
	// OpenProbability is the probability that the window is opened as
	// drawn: every one of its sites cleared, none of its neighbours (the
	// unpainted sites within one row spacing) and no spurious dangling
	// bond along its line, from the exposure model.
	OpenProbability float64 `json:"open_probability"`
	// P0, P1 and P2Plus are the template's probabilities of 0, 1 and 2 or
	// more donors in a window opened as drawn, and P1SD the uncertainty
	// of P1.
	P0     float64 `json:"p0"`
	P1     float64 `json:"p1"`
	P2Plus float64 `json:"p2plus"`
	P1SD   float64 `json:"p1_sd"`
	// Probability is the probability that the window is good: opened as
	// drawn and then holding exactly one donor, OpenProbability·P1.
	Probability float64 `json:"probability"`
}

// Yield summarises the dopant windows' outcome.
type Yield struct {
	Windows int `json:"windows"`
	// All is the probability that every window is good (the product of
	// their probabilities: exact).
	All float64 `json:"all"`
	// All68 and All95 are the 68 % and 95 % intervals of All from the
	// templates' uncertainties: each template's P1 drawn from a beta
	// distribution of its mean and spread (shared by every window of the
	// template), YieldSamples times; Log10All68 and Log10All95 are the
	// same in log10, finite where All underflows.
	All68      [2]float64 `json:"all_68"`
	All95      [2]float64 `json:"all_95"`
	Log10All68 [2]float64 `json:"log10_all_68"`
	Log10All95 [2]float64 `json:"log10_all_95"`
	// ExpectedEmpty and ExpectedMultiple are the expected numbers of
	// windows opened as drawn that take no donor and two or more;
	// ExpectedMisopened the expected number not opened as drawn.
	ExpectedEmpty     float64 `json:"expected_empty"`
	ExpectedMultiple  float64 `json:"expected_multiple"`
	ExpectedMisopened float64 `json:"expected_misopened"`
	// MeanGood is the expected number of windows with exactly one donor.
	MeanGood float64 `json:"mean_good"`
	// Distribution[k] is the probability that exactly k windows are good
	// (Poisson-binomial); it may be cut where the probability underflows.
	Distribution []float64 `json:"distribution"`
	// DistributionFrom is the least k whose probability does not
	// underflow: Distribution[k] is 0 for k below it.
	DistributionFrom int `json:"distribution_from"`
	// Log10All is log10 of All; it stays finite when All underflows to 0.
	Log10All float64 `json:"log10_all"`
	// SDGood is the standard deviation of the number of good windows.
	SDGood float64 `json:"sd_good"`
	// DevicesPerPerfect is the expected number of devices written to get
	// one with every window good, 1/All (geometric); 0 when All is 0 (no
	// number of devices suffices; JSON cannot carry +Inf), 1 with no
	// windows.
	DevicesPerPerfect float64 `json:"devices_per_perfect"`
}

// Coverage is the result of the independent coverage check: from the
// strokes' geometry alone and the exposure model (see ExposureModel),
// the expected number of each region's sites left (missed) and of sites
// outside every region cleared (stray), and every site outside the
// regions, beyond their edge allowance, that clears more likely than the
// profile's stray limit: each such site is an error.
type Coverage struct {
	// OK reports whether no site outside every region clears with a
	// probability above StrayLimit.
	OK         bool    `json:"ok"`
	Sites      int     `json:"sites"`       // painted sites to clear
	StrayLimit float64 `json:"stray_limit"` // the profile's limit
	// ExpectedMissed and ExpectedStray are the sums over the regions.
	ExpectedMissed float64          `json:"expected_missed"`
	ExpectedStray  float64          `json:"expected_stray"`
	Regions        []RegionCoverage `json:"regions"`
	// OverLimit is the number of sites outside every region that clear
	// with a probability above StrayLimit; StraySites lists them (the
	// first MaxStraySites), each an error.
	OverLimit  int         `json:"over_limit"`
	StraySites []StraySite `json:"stray_sites,omitempty"`
	// Issues describes the first few errors in words.
	Issues []string `json:"issues,omitempty"`
}

// MaxStraySites caps Coverage.StraySites.
const MaxStraySites = 10000

// RegionCoverage is the coverage expectation of one region.
type RegionCoverage struct {
	Region string `json:"region"`
	Sites  int    `json:"sites"`
	// ExpectedMissed is the expected number of the region's sites left
	// with their H.
	ExpectedMissed float64 `json:"expected_missed"`
	// ExpectedStray is the expected number of sites outside every region
	// that the region's strokes clear beyond its edge allowance, with the
	// spurious dangling bonds along its AP lines (ExpectedSpurious, the
	// profile's background rate).
	ExpectedStray    float64 `json:"expected_stray"`
	ExpectedSpurious float64 `json:"expected_spurious"`
	// Probability is the probability that the region is written without
	// error: every site cleared, no stray site and no spurious dangling
	// bond; Log10Probability its log10, finite where it underflows.
	Probability      float64 `json:"probability"`
	Log10Probability float64 `json:"log10_probability"`
}

// StraySite is a site outside every region, beyond the edge allowance,
// that clears with a probability above the stray limit.
type StraySite struct {
	Site        lattice.Site `json:"site"`
	At          r2.Point     `json:"at_nm"`
	Probability float64      `json:"probability"`
	// Region and Stroke name the region and the stroke that give the
	// site most of its exposure (Stroke −1 when none is known).
	Region string `json:"region"`
	Stroke int    `json:"stroke"`
}
