package planner

import (
	"fmt"

	"github.com/golang/geo/r2"

	"dimerpath/lattice/design"
)

// Caution is printed by the command line, shown in the GUI's Help and
// before any export, and printed on every plan.
const Caution = "CAUTION: a dimerpath plan is advisory. Check every bias, current, speed, dose and position " +
	"against your instrument's limits and your lab's procedures before writing."

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
	Mode design.Mode `json:"mode"`
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
	Region    string      `json:"region"`
	Role      design.Role `json:"role"`
	Requested design.Mode `json:"requested"` // auto, ap, fe or hybrid as drawn
	Mode      design.Mode `json:"mode"`      // ap, fe or hybrid as planned
	Reason    string      `json:"reason"`
	Sites     int         `json:"sites"`
}

// Fiducial is a registration mark, with its field position in nm.
type Fiducial struct {
	Name string   `json:"name"`
	At   r2.Point `json:"at_nm"`
}

// Stroke is one continuous write: a path the tip follows (or, for a
// dwell, the point it parks on) in one mode.
type Stroke struct {
	ID     int         `json:"id"`
	Region string      `json:"region"`
	Mode   design.Mode `json:"mode"`
	Kind   StrokeKind  `json:"kind"`
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
	Index     int         `json:"index"`
	Kind      ActionKind  `json:"kind"`
	Segment   int         `json:"segment"`
	Stroke    int         `json:"stroke"` // stroke ID, or -1
	From      r2.Point    `json:"from_nm"`
	To        r2.Point    `json:"to_nm"`
	StartS    float64     `json:"start_s"`
	DurationS float64     `json:"duration_s"`
	Mode      design.Mode `json:"mode,omitempty"`
	BiasV     float64     `json:"bias_v,omitempty"`
	CurrentA  float64     `json:"current_a,omitempty"`
	SpeedNMPS float64     `json:"speed_nm_per_s,omitempty"`
	Note      string      `json:"note,omitempty"`
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

// TimeKind is one kind of time in a Breakdown.
type TimeKind int

const (
	TimeAPWrite      TimeKind = iota // writing AP lines (APWriteS)
	TimeFEWrite                      // writing FE rasters and outlines (FEWriteS)
	TimeDwell                        // dwells on single sites (DwellS)
	TimeTravel                       // idle moves and settling (TravelS)
	TimeModeSwitch                   // bias and setpoint changes between modes (ModeSwitchS)
	TimeRegistration                 // imaging a fiducial and correcting the offset (RegistrationS)
	TimeVerification                 // the verification image of each segment (VerificationS)
)

// TimeKinds lists every kind of time in the order Breakdown holds them.
var TimeKinds = []TimeKind{TimeAPWrite, TimeFEWrite, TimeDwell, TimeTravel, TimeModeSwitch, TimeRegistration, TimeVerification}

// timeNames holds each kind's display name and column header, the one
// wording the command line, the GUI and the printed plan use.
var timeNames = [...]struct{ name, short string }{
	TimeAPWrite:      {design.ModeAP.Abbrev() + " writing", design.ModeAP.Abbrev()},
	TimeFEWrite:      {design.ModeFE.Abbrev() + " writing", design.ModeFE.Abbrev()},
	TimeDwell:        {"dwells", "dwell"},
	TimeTravel:       {"travel and settling", "travel"},
	TimeModeSwitch:   {"mode switches", "switch"},
	TimeRegistration: {"registrations", "register"},
	TimeVerification: {"verification images", "verify"},
}

// String returns the kind's display name: "AP writing", "FE writing",
// "dwells", "travel and settling", "mode switches", "registrations",
// "verification images".
func (k TimeKind) String() string {
	if k < 0 || int(k) >= len(timeNames) {
		return fmt.Sprintf("TimeKind(%d)", int(k))
	}
	return timeNames[k].name
}

// Short returns the kind's name as a column header: "AP", "FE",
// "dwell", "travel", "switch", "register", "verify".
func (k TimeKind) Short() string {
	if k < 0 || int(k) >= len(timeNames) {
		return k.String()
	}
	return timeNames[k].short
}

// Seconds returns the time of kind k in b, 0 for an unknown kind.
func (b Breakdown) Seconds(k TimeKind) float64 {
	switch k {
	case TimeAPWrite:
		return b.APWriteS
	case TimeFEWrite:
		return b.FEWriteS
	case TimeDwell:
		return b.DwellS
	case TimeTravel:
		return b.TravelS
	case TimeModeSwitch:
		return b.ModeSwitchS
	case TimeRegistration:
		return b.RegistrationS
	case TimeVerification:
		return b.VerificationS
	}
	return 0
}

// Window is one dopant window of the plan with its single-donor
// probability.
type Window struct {
	Region   string   `json:"region"`
	Species  string   `json:"species"`
	Template string   `json:"template"`
	At       r2.Point `json:"at_nm"` // window centre
	Sites    int      `json:"sites"`
	// OpenProbability is the chance that every site of the window is
	// cleared (1 for a line; Completion^sites for dwells), and
	// Probability the template's single-donor probability times it.
	OpenProbability float64 `json:"open_probability"`
	Probability     float64 `json:"probability"`
}

// Yield summarises the dopant windows' outcome.
type Yield struct {
	Windows int `json:"windows"`
	// All is the probability that every window takes exactly one donor.
	All float64 `json:"all"`
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

// Coverage is the result of the independent coverage check: every
// painted site is cleared by some stroke, and no stroke clears sites
// outside its region beyond the model's edge allowance.
type Coverage struct {
	OK          bool     `json:"ok"`
	Sites       int      `json:"sites"`       // painted sites to clear
	Uncovered   int      `json:"uncovered"`   // painted sites no stroke clears
	Overcleared int      `json:"overcleared"` // sites outside any region cleared beyond the allowance
	Issues      []string `json:"issues,omitempty"`
}
