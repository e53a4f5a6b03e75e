package planner

// StepKind is one kind of process step of a session.
type StepKind string

const (
	// StepSurvey: tip conditioning and the survey image of the write area
	// before the first lithography.
	StepSurvey StepKind = "survey"
	// StepLithography: the regions of one dopant written, windows last,
	// each atomic-precision feature verified and repaired.
	StepLithography StepKind = "lithography"
	// StepDose: the precursor of the step's dopant let in; it takes any
	// open dangling bond, whichever species it was opened for.
	StepDose StepKind = "dose"
	// StepAnneal: the incorporation anneal and the cool-down.
	StepAnneal StepKind = "anneal"
	// StepReregister: finding the area again after an anneal, before the
	// next lithography step (its first registration is that step's).
	StepReregister StepKind = "reregister"
	// StepDocumentation: finding the area again and the documentation
	// image at the end.
	StepDocumentation StepKind = "documentation"
)

// Step is one process step on the plan clock.
type Step struct {
	Kind StepKind
	// Species is the dopant of a lithography, dose or anneal step (and
	// of the lithography step a reregister step prepares).
	Species   string
	StartS    float64
	DurationS float64
	// Segments are the indices into Plan.Segments of a lithography step.
	Segments []int
	// Precursor and ExposureL describe a dose; TemperatureC an anneal.
	Precursor    string
	ExposureL    float64
	TemperatureC float64
	// Note says what the step does, for the printed plan.
	Note string
}

// CouplingKind says why two regions are coupled.
type CouplingKind string

const (
	// CoupledGap: the two edges of a declared tunnel gap.
	CoupledGap CouplingKind = "tunnel-gap"
	// CoupledPlacement: a declared coupling (a window and the feature it
	// must sit a set distance from).
	CoupledPlacement CouplingKind = "placement"
)

// Coupling is a pair of regions with a tolerance on their placement
// relative to each other, and how the plan holds it.
type Coupling struct {
	Kind        CouplingKind
	A, B        string
	ToleranceNM float64
	// Strokes are the facing strokes of A and B (stroke IDs) written
	// inside one drift window; when A and B are written in different
	// steps, the later side's strokes, whose segment registers locally on
	// the earlier side.
	Strokes []int
	// SameStep says whether both sides are written in one step.
	SameStep bool
	// PInTolerance is the sampled probability that the relative
	// placement stays within ToleranceNM (drift and creep from the first
	// stroke to the last; for different steps, also the local
	// registration's error).
	PInTolerance float64
}

// DriftPlan says what the segments were planned for: the drift rate and
// creep fraction at the profile's level (PInToleranceMin) quantile of
// their spread, the registration errors at the same level, all
// multiplied by Margin (raised until the sampled probability of staying
// within tolerance reaches the level, or until it stops helping).
type DriftPlan struct {
	RateNMPerMin  float64 // the planned drift rate
	CreepFraction float64 // the planned creep fraction
	ErrorZ        float64 // the registration errors' multiple of σ
	Margin        float64
	Compensated   bool // feed-forward compensation used
}

// RegistrationReason is one reason the plan gives for a segment's kind
// of registration, with the segments (indices into Plan.Segments) it is
// given for.
type RegistrationReason struct {
	Kind     RegistrationKind
	Reason   string
	Segments []int
}

// RegistrationReasons groups the segments by their kind of registration
// and its reason (Segment.Registration, Segment.Reason), in the order of
// each group's first segment: what the command line, the printed plan
// and the window say about why each segment registers as it does,
// without a line per segment.
func (p *Plan) RegistrationReasons() []RegistrationReason {
	var out []RegistrationReason
	at := map[[2]string]int{}
	for i, g := range p.Segments {
		k := [2]string{string(g.Registration), g.Reason}
		j, ok := at[k]
		if !ok {
			j = len(out)
			at[k] = j
			out = append(out, RegistrationReason{Kind: g.Registration, Reason: g.Reason})
		}
		out[j].Segments = append(out[j].Segments, i)
	}
	return out
}
