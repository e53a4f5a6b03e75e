package planner

import (
	"fmt"

	"github.com/golang/geo/r2"

	"dimerpath/lattice"
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

	// Steps are the process steps in order (session_plan.go): survey,
	// lithography of each dopant with its dose and anneal, finding the
	// area again, documentation.
	Steps []Step

	// Breakdown sums to TotalS, the mean of the Monte Carlo samples of
	// the session's time on the fixed plan; P10S, P50S and P90S are their
	// quantiles. ScheduleS is the end of the plan clock: the actions as
	// printed, every random part at its expected value and no tip change.
	Breakdown Breakdown
	TotalS    float64
	P10S      float64
	P50S      float64
	P90S      float64
	ScheduleS float64
	// PInTolerance is the probability that every stroke and every coupled
	// pair stays within its tolerance, sampled on the fixed plan;
	// Couplings are the coupled pairs with theirs, and Drift says what
	// the segments were planned for.
	PInTolerance float64
	Couplings    []Coupling
	Drift        DriftPlan
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
	LineWidthNM    float64 // the band a line clears with probability ≥ ½ (LineModel.Width)
	Passes         int
	PitchNM        float64 // FE raster line pitch
	// DwellS is the expected time of one feedback-ended dwell and
	// DwellCapS the longest the plan lets it run (its Completion time).
	DwellS    float64
	DwellCapS float64
	// YieldPerElectron is the exposure model's yield at these conditions
	// (H per electron), SigmaNM the footprint, and ElectronsPerSite the
	// electrons a line delivers per H site of the dimer row it is written
	// along (ElectronsPerRowSite; lines only).
	YieldPerElectron float64
	SigmaNM          float64
	ElectronsPerSite float64
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
	// ExpectedMissed is the expected number of sites this stroke was the
	// main writer of (it gives them the most exposure) that keep their H;
	// ExpectedStray the expected number of sites outside every region,
	// beyond the edge allowance, it clears (with the spurious background
	// along an AP line). From the coverage check.
	ExpectedMissed float64
	ExpectedStray  float64
}

// Segment is a run of strokes written after one registration, short
// enough that drift stays inside every stroke's placement tolerance.
type Segment struct {
	Index int
	// Step is the index into Plan.Steps of its lithography step.
	Step int
	// Registration is the kind of its registration, and Reason why.
	Registration RegistrationKind
	Reason       string
	// Fiducial names the mark of a coarse registration ("" for a local
	// one); FiducialAt is where the registration is made.
	Fiducial   string
	FiducialAt r2.Point
	StartS     float64 // plan clock at the start of the segment
	EndS       float64
	// BudgetS is the drift budget of its tightest stroke at the planned
	// drift rate: (tolerance − registration error − creep) / rate; 0 when
	// the profile has no drift (no limit: JSON cannot carry +Inf).
	BudgetS float64
	Strokes []int // stroke IDs in writing order
	// Tightest is the stroke whose displacement at the planning values
	// uses the largest share of its tolerance; PInTolerance the sampled
	// probability that every stroke of the segment stays within its
	// tolerance.
	Tightest     int
	PInTolerance float64
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
	// Session actions around the writing (session.go).
	ActSurvey    ActionKind = "survey"    // image of the write area before the first lithography
	ActCondition ActionKind = "condition" // tip conditioning
	ActRepair    ActionKind = "repair"    // dwells on the missed sites the verification finds, each re-imaged
	ActDose      ActionKind = "dose"      // precursor exposure after a lithography step
	ActAnneal    ActionKind = "anneal"    // incorporation anneal and cool-down
	ActRefind    ActionKind = "refind"    // approach and find the write area again after an anneal
	ActDocument  ActionKind = "document"  // documentation image at the end
)

// ActionKinds lists every action kind, in the order the README's table
// gives them.
var ActionKinds = []ActionKind{ActMove, ActRegister, ActSwitch, ActWrite, ActDwell, ActVerify,
	ActSurvey, ActCondition, ActRepair, ActDose, ActAnneal, ActRefind, ActDocument}

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

// Breakdown is the session's mean time by kind, in seconds.
type Breakdown struct {
	APWriteS      float64
	FEWriteS      float64
	DwellS        float64
	TravelS       float64
	ModeSwitchS   float64
	RegistrationS float64 // registrations and finding the area again
	VerificationS float64 // verification images of segments and features
	// The session around the writing (session.go).
	SurveyS        float64
	ConditioningS  float64
	TipChangeS     float64
	RepairS        float64
	DocumentationS float64
	DoseS          float64
	AnnealS        float64
}

// Total returns the sum of the parts.
func (b Breakdown) Total() float64 {
	t := 0.0
	for _, k := range TimeKinds {
		t += b.Seconds(k)
	}
	return t
}

// TimeKind is one kind of time in a Breakdown.
type TimeKind int

const (
	TimeAPWrite       TimeKind = iota // writing AP lines (APWriteS)
	TimeFEWrite                       // writing FE rasters and outlines (FEWriteS)
	TimeDwell                         // dwells on single sites (DwellS)
	TimeTravel                        // idle moves and settling (TravelS)
	TimeModeSwitch                    // bias and setpoint changes between modes (ModeSwitchS)
	TimeRegistration                  // imaging a fiducial and correcting the offset (RegistrationS)
	TimeVerification                  // verification images of segments and features (VerificationS)
	TimeSurvey                        // the survey image (SurveyS)
	TimeConditioning                  // tip conditioning (ConditioningS)
	TimeTipChange                     // tip changes, random (TipChangeS)
	TimeRepair                        // repair of missed sites (RepairS)
	TimeDocumentation                 // the documentation image (DocumentationS)
	TimeDose                          // precursor doses (DoseS)
	TimeAnneal                        // incorporation anneals and cool-downs (AnnealS)
)

// TimeKinds lists every kind of time in the order Breakdown holds them.
var TimeKinds = []TimeKind{TimeAPWrite, TimeFEWrite, TimeDwell, TimeTravel, TimeModeSwitch, TimeRegistration, TimeVerification,
	TimeSurvey, TimeConditioning, TimeTipChange, TimeRepair, TimeDocumentation, TimeDose, TimeAnneal}

// timeNames holds each kind's display name and column header, the one
// wording the command line, the GUI and the printed plan use.
var timeNames = [...]struct{ name, short string }{
	TimeAPWrite:       {design.ModeAP.Abbrev() + " writing", design.ModeAP.Abbrev()},
	TimeFEWrite:       {design.ModeFE.Abbrev() + " writing", design.ModeFE.Abbrev()},
	TimeDwell:         {"dwells", "dwell"},
	TimeTravel:        {"travel and settling", "travel"},
	TimeModeSwitch:    {"mode switches", "switch"},
	TimeRegistration:  {"registrations", "register"},
	TimeVerification:  {"verification images", "verify"},
	TimeSurvey:        {"survey image", "survey"},
	TimeConditioning:  {"tip conditioning", "condition"},
	TimeTipChange:     {"tip changes", "tip"},
	TimeRepair:        {"repairs", "repair"},
	TimeDocumentation: {"documentation image", "document"},
	TimeDose:          {"doses", "dose"},
	TimeAnneal:        {"anneals and cool-down", "anneal"},
}

// String returns the kind's display name: "AP writing", "FE writing",
// "dwells", "travel and settling", "mode switches", "registrations",
// "verification images", "survey image", "tip conditioning", "tip
// changes", "repairs", "documentation image", "doses", "anneals and
// cool-down".
func (k TimeKind) String() string {
	if k < 0 || int(k) >= len(timeNames) {
		return fmt.Sprintf("TimeKind(%d)", int(k))
	}
	return timeNames[k].name
}

// Short returns the kind's name as a column header: "AP", "FE",
// "dwell", "travel", "switch", "register", "verify", "survey",
// "condition", "tip", "repair", "document", "dose", "anneal".
func (k TimeKind) Short() string {
	if k < 0 || int(k) >= len(timeNames) {
		return k.String()
	}
	return timeNames[k].short
}

// Seconds returns the time of kind k in b, 0 for an unknown kind.
func (b Breakdown) Seconds(k TimeKind) float64 {
	if f := b.field(k); f != nil {
		return *f
	}
	return 0
}

// field returns a pointer to the time of kind k in b, nil for an unknown
// kind.
func (b *Breakdown) field(k TimeKind) *float64 {
	switch k {
	case TimeAPWrite:
		return &b.APWriteS
	case TimeFEWrite:
		return &b.FEWriteS
	case TimeDwell:
		return &b.DwellS
	case TimeTravel:
		return &b.TravelS
	case TimeModeSwitch:
		return &b.ModeSwitchS
	case TimeRegistration:
		return &b.RegistrationS
	case TimeVerification:
		return &b.VerificationS
	case TimeSurvey:
		return &b.SurveyS
	case TimeConditioning:
		return &b.ConditioningS
	case TimeTipChange:
		return &b.TipChangeS
	case TimeRepair:
		return &b.RepairS
	case TimeDocumentation:
		return &b.DocumentationS
	case TimeDose:
		return &b.DoseS
	case TimeAnneal:
		return &b.AnnealS
	}
	return nil
}

// Window is one dopant window of the plan with its donor-count
// probabilities.
type Window struct {
	Region   string
	Species  string
	Template string
	At       r2.Point // window centre
	Sites    int
	// OpenProbability is the probability that the window is opened as
	// drawn: every one of its sites cleared, none of its neighbours (the
	// unpainted sites within one row spacing) and no spurious dangling
	// bond along its line, from the exposure model.
	OpenProbability float64
	// P0, P1 and P2Plus are the template's probabilities of 0, 1 and 2 or
	// more donors in a window opened as drawn, and P1SD the uncertainty
	// of P1.
	P0     float64
	P1     float64
	P2Plus float64
	P1SD   float64
	// Probability is the probability that the window is good: opened as
	// drawn and then holding exactly one donor, OpenProbability·P1.
	Probability float64
	// OpenS is how long the window stays open: from the end of its write
	// to the start of its step's dose.
	OpenS float64
}

// Yield summarises the dopant windows' outcome.
type Yield struct {
	Windows int
	// All is the probability that every window is good (the product of
	// their probabilities: exact).
	All float64
	// All68 and All95 are the 68 % and 95 % intervals of All from the
	// templates' uncertainties: each template's P1 drawn from a beta
	// distribution of its mean and spread (shared by every window of the
	// template), YieldSamples times; Log10All68 and Log10All95 are the
	// same in log10, finite where All underflows.
	All68      [2]float64
	All95      [2]float64
	Log10All68 [2]float64
	Log10All95 [2]float64
	// ExpectedEmpty and ExpectedMultiple are the expected numbers of
	// windows opened as drawn that take no donor and two or more;
	// ExpectedMisopened the expected number not opened as drawn.
	ExpectedEmpty     float64
	ExpectedMultiple  float64
	ExpectedMisopened float64
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

// Coverage is the result of the independent coverage check: from the
// strokes' geometry alone and the exposure model (see ExposureModel),
// the expected number of each region's sites left (missed) and of sites
// outside every region cleared (stray), and every site outside the
// regions, beyond their edge allowance, that clears more likely than the
// profile's stray limit: each such site is an error.
type Coverage struct {
	// OK reports whether no site outside every region clears with a
	// probability above StrayLimit.
	OK         bool
	Sites      int     // painted sites to clear
	StrayLimit float64 // the profile's limit
	// ExpectedMissed and ExpectedStray are the sums over the regions.
	ExpectedMissed float64
	ExpectedStray  float64
	Regions        []RegionCoverage
	// OverLimit is the number of sites outside every region that clear
	// with a probability above StrayLimit; StraySites lists them (the
	// first MaxStraySites), each an error.
	OverLimit  int
	StraySites []StraySite
	// Issues describes the first few errors in words.
	Issues []string
}

// MaxStraySites caps Coverage.StraySites.
const MaxStraySites = 10000

// RegionCoverage is the coverage expectation of one region.
type RegionCoverage struct {
	Region string
	Sites  int
	// ExpectedMissed is the expected number of the region's sites left
	// with their H.
	ExpectedMissed float64
	// ExpectedStray is the expected number of sites outside every region
	// that the region's strokes clear beyond its edge allowance, with the
	// spurious dangling bonds along its AP lines (ExpectedSpurious, the
	// profile's background rate).
	ExpectedStray    float64
	ExpectedSpurious float64
	// Probability is the probability that the region is written without
	// error: every site cleared, no stray site and no spurious dangling
	// bond; Log10Probability its log10, finite where it underflows.
	Probability      float64
	Log10Probability float64
}

// StraySite is a site outside every region, beyond the edge allowance,
// that clears with a probability above the stray limit.
type StraySite struct {
	Site        lattice.Site
	At          r2.Point
	Probability float64
	// Region and Stroke name the region and the stroke that give the
	// site most of its exposure (Stroke −1 when none is known).
	Region string
	Stroke int
}
