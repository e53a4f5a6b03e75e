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
// it and never call back into the planner. Its file format belongs to
// package export (the plan file and the summary of "plan --json"), so
// these types carry no json tags.
type Plan struct {
	Design  string
	Variant string
	Profile string // the instrument profile's name
	Seed    int64

	FieldWidthNM  float64
	FieldHeightNM float64

	// Conditions lists the tip conditions used, per mode.
	Conditions []Conditions
	// Modes says, per region, the mode chosen and why.
	Modes     []RegionMode
	Fiducials []Fiducial

	// Strokes are indexed by Stroke.ID; Actions are in execution order.
	Strokes  []Stroke
	Segments []Segment
	Actions  []Action

	// Breakdown sums to TotalS, the expected write time; P10S, P50S and
	// P90S are quantiles of the Monte Carlo spread.
	Breakdown Breakdown
	TotalS    float64
	P10S      float64
	P50S      float64
	P90S      float64
	// FloorS is the physical floor: the writing time alone (AP, FE and
	// dwell), without travel, switches or registrations.
	FloorS float64
	// ByHandS is the total time of the same work planned the way it is
	// done by hand: regions in file order, rows in raster order, one mode
	// per region, a registration at the fixed interval of the tightest
	// drift budget.
	ByHandS float64

	Windows  []Window
	Yield    Yield
	Coverage Coverage
	// Warnings are findings that do not stop the plan (a stroke split at
	// a registration, a region drawn with a mode the planner would not
	// choose).
	Warnings []string
}

// Conditions are the tip settings of one write mode.
type Conditions struct {
	Mode design.Mode
	// Kind is the kind of stroke written with these conditions: line
	// (AP), dwell (AP conditions for parking on single sites) or raster
	// (FE).
	Kind           StrokeKind
	BiasV          float64 // sample bias
	CurrentA       float64 // setpoint current
	LineDoseCPerCm float64 // charge per unit length
	SpeedNMPerS    float64 // = current / line dose
	LineWidthNM    float64 // from the width-vs-dose model
	Passes         int
	PitchNM        float64 // FE raster line pitch
	// DwellS is the expected time of one feedback-ended dwell and
	// DwellCapS the longest the plan lets it run (its Completion time).
	DwellS    float64
	DwellCapS float64
}

// RegionMode records the mode given to one region and the reason.
type RegionMode struct {
	Region    string
	Role      design.Role
	Requested design.Mode // auto, ap, fe or hybrid as drawn
	Mode      design.Mode // ap, fe or hybrid as planned
	Reason    string
	Sites     int
}

// Fiducial is a registration mark, with its field position in nm.
type Fiducial struct {
	Name string
	At   r2.Point
}

// Stroke is one continuous write: a path the tip follows (or, for a
// dwell, the point it parks on) in one mode.
type Stroke struct {
	ID     int
	Region string
	Mode   design.Mode
	Kind   StrokeKind
	// Path is the tip path in nm in the order it is written (the route
	// engine has chosen the direction); a dwell has one point.
	Path      []r2.Point
	Passes    int
	LengthNM  float64 // one pass
	DurationS float64 // all passes, or the dwell
	Sites     int     // H sites this stroke is meant to clear
	// ToleranceNM is the placement tolerance (±nm) the stroke is held to;
	// its drift budget is ToleranceNM / drift rate.
	ToleranceNM float64
	Segment     int
	// Window is the index into Plan.Windows of the dopant window this
	// stroke opens, or -1.
	Window int
}

// Segment is a run of strokes written after one registration, short
// enough that drift stays inside every stroke's placement tolerance.
type Segment struct {
	Index      int
	Fiducial   string
	FiducialAt r2.Point
	StartS     float64 // plan clock at the start of the registration
	EndS       float64
	// BudgetS is the drift budget: the least tolerance / drift rate over
	// the segment's strokes; 0 when the profile has no drift (no limit:
	// JSON cannot carry +Inf).
	BudgetS float64
	Strokes []int // stroke IDs in writing order
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
	Index     int
	Kind      ActionKind
	Segment   int
	Stroke    int // stroke ID, or -1
	From      r2.Point
	To        r2.Point
	StartS    float64
	DurationS float64
	Mode      design.Mode
	BiasV     float64
	CurrentA  float64
	SpeedNMPS float64
	Note      string
}

// Breakdown is the expected write time by kind, in seconds.
type Breakdown struct {
	APWriteS      float64
	FEWriteS      float64
	DwellS        float64
	TravelS       float64
	ModeSwitchS   float64
	RegistrationS float64
	VerificationS float64
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
	Region   string
	Species  string
	Template string
	At       r2.Point // window centre
	Sites    int
	// OpenProbability is the chance that every site of the window is
	// cleared (1 for a line; Completion^sites for dwells), and
	// Probability the template's single-donor probability times it.
	OpenProbability float64
	Probability     float64
}

// Yield summarises the dopant windows' outcome.
type Yield struct {
	Windows int
	// All is the probability that every window takes exactly one donor.
	All float64
	// MeanGood is the expected number of windows with exactly one donor.
	MeanGood float64
	// Distribution[k] is the probability that exactly k windows are good
	// (Poisson-binomial); it may be cut where the probability underflows.
	Distribution []float64
	// DistributionFrom is the least k whose probability does not
	// underflow: Distribution[k] is 0 for k below it.
	DistributionFrom int
	// Log10All is log10 of All; it stays finite when All underflows to 0.
	Log10All float64
	// SDGood is the standard deviation of the number of good windows.
	SDGood float64
	// DevicesPerPerfect is the expected number of devices written to get
	// one with every window good, 1/All (geometric); 0 when All is 0 (no
	// number of devices suffices; JSON cannot carry +Inf), 1 with no
	// windows.
	DevicesPerPerfect float64
}

// Coverage is the result of the independent coverage check: every
// painted site is cleared by some stroke, and no stroke clears sites
// outside its region beyond the model's edge allowance.
type Coverage struct {
	OK          bool
	Sites       int // painted sites to clear
	Uncovered   int // painted sites no stroke clears
	Overcleared int // sites outside any region cleared beyond the allowance
	Issues      []string
}
