package export

import (
	"bytes"
	"fmt"
	"io"
	"math"
	"os"
	"strconv"

	"github.com/golang/geo/r2"

	"dimerpath/internal/jsonfile"
	"dimerpath/lattice"
	"dimerpath/lattice/design"
	"dimerpath/planner"
)

// PlanFormat and PlanVersion identify dimerpath plan files. A file with a
// higher version is refused, never half-read.
const (
	PlanFormat  = "dimerpath-plan"
	PlanVersion = 2
)

// MaxPlanFileBytes bounds what ReadPlanJSON reads (512 MiB, about five
// times the file of a plan of 10^5 strokes), so a wrong file cannot
// exhaust memory; a larger file is refused by its size before it is
// read.
const MaxPlanFileBytes = 512 << 20

// The plan file's own schema. It mirrors planner.Plan field by field but
// is declared here, so the file format changes only when this file does;
// points are [x, y] arrays in nm. Fields marked "derived" repeat, for
// people reading the file with their own scripts, what the rest of the
// file says; the reader checks them and rebuilds nothing from them.

type xy [2]float64

func xyOf(p r2.Point) xy     { return xy{p.X, p.Y} }
func (q xy) point() r2.Point { return r2.Point{X: q[0], Y: q[1]} }

type planFile struct {
	Format    string `json:"format"`
	Version   int    `json:"version"`
	Generator string `json:"generator,omitempty"`
	Caution   string `json:"caution"` // derived: planner.Caution

	Design  string `json:"design"`
	Variant string `json:"variant"`
	Profile string `json:"profile"`
	Seed    int64  `json:"seed"`
	FieldNM xy     `json:"field_nm"`

	Conditions []conditionsJSON `json:"conditions"`
	Modes      []regionModeJSON `json:"modes"`
	Fiducials  []fiducialJSON   `json:"fiducials"`
	Strokes    []strokeJSON     `json:"strokes"`
	Segments   []segmentJSON    `json:"segments"`
	Actions    []actionJSON     `json:"actions"`

	Steps     []stepJSON    `json:"steps"`
	Breakdown breakdownJSON `json:"breakdown"`
	TotalS    float64       `json:"total_s"`
	P10S      float64       `json:"p10_s"`
	P50S      float64       `json:"p50_s"`
	P90S      float64       `json:"p90_s"`
	ScheduleS float64       `json:"schedule_s"`
	FloorS    float64       `json:"floor_s"`
	ByHandS   float64       `json:"by_hand_s"`

	PInTolerance float64        `json:"p_in_tolerance"`
	Couplings    []couplingJSON `json:"couplings"`
	Drift        driftPlanJSON  `json:"drift_plan"`

	Windows  []windowJSON `json:"windows"`
	Yield    yieldJSON    `json:"yield"`
	Coverage coverageJSON `json:"coverage"`
	Warnings []string     `json:"warnings"`
}

type conditionsJSON struct {
	Mode           string  `json:"mode"`
	Kind           string  `json:"kind"`
	BiasV          float64 `json:"bias_v"`
	CurrentA       float64 `json:"current_a"`
	LineDoseCPerCm float64 `json:"line_dose_c_per_cm"`
	SpeedNMPerS    float64 `json:"speed_nm_per_s"`
	LineWidthNM    float64 `json:"line_width_nm"`
	Passes         int     `json:"passes"`
	PitchNM        float64 `json:"pitch_nm,omitempty"`
	DwellS         float64 `json:"dwell_s,omitempty"`
	DwellCapS      float64 `json:"dwell_cap_s,omitempty"`
	// The exposure model at these conditions (version 2).
	YieldPerElectron float64 `json:"yield_per_electron,omitempty"`
	SigmaNM          float64 `json:"sigma_nm,omitempty"`
	ElectronsPerSite float64 `json:"electrons_per_site,omitempty"`
}

type regionModeJSON struct {
	Region    string `json:"region"`
	Role      string `json:"role"`
	Requested string `json:"requested"`
	Mode      string `json:"mode"`
	Reason    string `json:"reason"`
	Sites     int    `json:"sites"`
}

type fiducialJSON struct {
	Name string `json:"name"`
	AtNM xy     `json:"at_nm"`
}

type strokeJSON struct {
	ID          int     `json:"id"`
	Number      int     `json:"number,omitempty"` // derived: its place in writing order, from 1, as printed (StrokeNumbers); version 2
	Region      string  `json:"region"`
	Mode        string  `json:"mode"`
	Kind        string  `json:"kind"`
	StartNM     xy      `json:"start_nm"` // derived: path_nm[0]
	EndNM       xy      `json:"end_nm"`   // derived: the last point of path_nm
	PathNM      []xy    `json:"path_nm"`
	Passes      int     `json:"passes"`
	LengthNM    float64 `json:"length_nm"`
	DurationS   float64 `json:"duration_s"`
	Sites       int     `json:"sites"`
	ToleranceNM float64 `json:"tolerance_nm"`
	Segment     int     `json:"segment"`
	Window      int     `json:"window"`
	// From the coverage expectation (version 2; absent in version 1, so
	// optional on reading, always written).
	ExpectedMissed *float64 `json:"expected_missed,omitempty"`
	ExpectedStray  *float64 `json:"expected_stray,omitempty"`
	// derived: the tip conditions of the action that writes the stroke
	BiasV     float64 `json:"bias_v,omitempty"`
	CurrentA  float64 `json:"current_a,omitempty"`
	SpeedNMPS float64 `json:"speed_nm_per_s,omitempty"`
}

type segmentJSON struct {
	Index        int     `json:"index"`
	Step         int     `json:"step"`
	Registration string  `json:"registration"`
	Reason       string  `json:"reason"`
	Fiducial     string  `json:"fiducial"`
	FiducialAtNM xy      `json:"fiducial_at_nm"`
	StartS       float64 `json:"start_s"`
	EndS         float64 `json:"end_s"`
	BudgetS      float64 `json:"budget_s"`
	Strokes      []int   `json:"strokes"`
	Tightest     int     `json:"tightest"`
	PInTolerance float64 `json:"p_in_tolerance"`
}

// stepJSON is one process step (session_plan.go in the planner).
type stepJSON struct {
	Kind         string  `json:"kind"`
	Species      string  `json:"species"`
	StartS       float64 `json:"start_s"`
	DurationS    float64 `json:"duration_s"`
	Segments     []int   `json:"segments"`
	Precursor    string  `json:"precursor,omitempty"`
	ExposureL    float64 `json:"exposure_l,omitempty"`
	TemperatureC float64 `json:"temperature_c,omitempty"`
	Note         string  `json:"note"`
}

type couplingJSON struct {
	Kind         string  `json:"kind"`
	A            string  `json:"a"`
	B            string  `json:"b"`
	ToleranceNM  float64 `json:"tolerance_nm"`
	Strokes      []int   `json:"strokes"`
	SameStep     bool    `json:"same_step"`
	PInTolerance float64 `json:"p_in_tolerance"`
}

type driftPlanJSON struct {
	RateNMPerMin  float64 `json:"rate_nm_per_min"`
	CreepFraction float64 `json:"creep_fraction"`
	ErrorZ        float64 `json:"error_z"`
	Margin        float64 `json:"margin"`
	Compensated   bool    `json:"compensated"`
}

type actionJSON struct {
	Index     int     `json:"index"`
	Kind      string  `json:"kind"`
	Segment   int     `json:"segment"`
	Stroke    int     `json:"stroke"`
	Fiducial  string  `json:"fiducial,omitempty"` // derived: the segment's fiducial, on register actions
	FromNM    xy      `json:"from_nm"`
	ToNM      xy      `json:"to_nm"`
	StartS    float64 `json:"start_s"`
	DurationS float64 `json:"duration_s"`
	Mode      string  `json:"mode,omitempty"`
	BiasV     float64 `json:"bias_v,omitempty"`
	CurrentA  float64 `json:"current_a,omitempty"`
	SpeedNMPS float64 `json:"speed_nm_per_s,omitempty"`
	Note      string  `json:"note,omitempty"`
}

type breakdownJSON struct {
	APWriteS      float64 `json:"ap_write_s"`
	FEWriteS      float64 `json:"fe_write_s"`
	DwellS        float64 `json:"dwell_s"`
	TravelS       float64 `json:"travel_s"`
	ModeSwitchS   float64 `json:"mode_switch_s"`
	RegistrationS float64 `json:"registration_s"`
	VerificationS float64 `json:"verification_s"`
	// version 2: the session around the writing
	SurveyS        float64 `json:"survey_s"`
	ConditioningS  float64 `json:"conditioning_s"`
	TipChangeS     float64 `json:"tip_change_s"`
	RepairS        float64 `json:"repair_s"`
	DocumentationS float64 `json:"documentation_s"`
	DoseS          float64 `json:"dose_s"`
	AnnealS        float64 `json:"anneal_s"`
}

type windowJSON struct {
	Region          string  `json:"region"`
	Species         string  `json:"species"`
	Template        string  `json:"template"`
	AtNM            xy      `json:"at_nm"`
	Sites           int     `json:"sites"`
	OpenProbability float64 `json:"open_probability"`
	// The template's donor counts (version 2; a version 1 file gives
	// probability alone, read as p1 = probability / open_probability).
	P0          *float64 `json:"p0,omitempty"`
	P1          *float64 `json:"p1,omitempty"`
	P2Plus      *float64 `json:"p2plus,omitempty"`
	P1SD        *float64 `json:"p1_sd,omitempty"`
	Probability float64  `json:"probability"`
	OpenS       float64  `json:"open_s"`
}

type yieldJSON struct {
	Windows  int      `json:"windows"`
	All      float64  `json:"all"`
	Log10All *float64 `json:"log10_all"` // null for -Inf (a window that can never be good)
	// Version 2: the intervals of all from the templates' uncertainties,
	// and the expected counts of bad windows.
	All68             *[2]float64 `json:"all_68,omitempty"`
	All95             *[2]float64 `json:"all_95,omitempty"`
	Log10All68        []*float64  `json:"log10_all_68,omitempty"`
	Log10All95        []*float64  `json:"log10_all_95,omitempty"`
	ExpectedEmpty     *float64    `json:"expected_empty,omitempty"`
	ExpectedMultiple  *float64    `json:"expected_multiple,omitempty"`
	ExpectedMisopened *float64    `json:"expected_misopened,omitempty"`
	MeanGood          float64     `json:"mean_good"`
	SDGood            float64     `json:"sd_good"`
	Distribution      []float64   `json:"distribution"`
	DistributionFrom  int         `json:"distribution_from"`
	DevicesPerPerfect float64     `json:"devices_per_perfect"`
}

func log10Pair(v [2]float64) []*float64 { return []*float64{log10JSON(v[0]), log10JSON(v[1])} }

func log10PairOf(p []*float64) [2]float64 {
	if len(p) != 2 {
		return [2]float64{}
	}
	return [2]float64{log10Of(p[0]), log10Of(p[1])}
}

// log10JSON carries log10 of a probability: null for -Inf.
func log10JSON(v float64) *float64 {
	if math.IsInf(v, -1) {
		return nil
	}
	return &v
}

func log10Of(p *float64) float64 {
	if p == nil {
		return math.Inf(-1)
	}
	return *p
}

// coverageJSON: the version 2 fields are optional on reading (a version
// 1 file has uncovered and overcleared instead) and always written.
type coverageJSON struct {
	OK             bool                 `json:"ok"`
	Sites          int                  `json:"sites"`
	StrayLimit     *float64             `json:"stray_limit,omitempty"`
	ExpectedMissed *float64             `json:"expected_missed,omitempty"`
	ExpectedStray  *float64             `json:"expected_stray,omitempty"`
	Regions        []regionCoverageJSON `json:"regions,omitzero"`
	OverLimit      *int                 `json:"over_limit,omitempty"`
	StraySites     []straySiteJSON      `json:"stray_sites,omitzero"`
	Issues         []string             `json:"issues"`
	// Version 1's threshold counts, read (as expected_missed and
	// over_limit) and never written.
	Uncovered   *int `json:"uncovered,omitempty"`
	Overcleared *int `json:"overcleared,omitempty"`
}

type regionCoverageJSON struct {
	Region           string   `json:"region"`
	Sites            int      `json:"sites"`
	ExpectedMissed   float64  `json:"expected_missed"`
	ExpectedStray    float64  `json:"expected_stray"`
	ExpectedSpurious float64  `json:"expected_spurious"`
	Probability      float64  `json:"probability"`
	Log10Probability *float64 `json:"log10_probability"` // null for -Inf
}

type straySiteJSON struct {
	Site        [4]int  `json:"site"` // terrace, row, dimer, side
	AtNM        xy      `json:"at_nm"`
	Probability float64 `json:"probability"`
	Region      string  `json:"region"`
	Stroke      int     `json:"stroke"`
}

// strokeActions returns, for each stroke, the index of the first write
// or dwell action that writes it, or -1.
func strokeActions(p *planner.Plan) []int {
	out := make([]int, len(p.Strokes))
	for i := range out {
		out[i] = -1
	}
	for i, a := range p.Actions {
		if (a.Kind == planner.ActWrite || a.Kind == planner.ActDwell) && a.Stroke >= 0 && a.Stroke < len(out) && out[a.Stroke] < 0 {
			out[a.Stroke] = i
		}
	}
	return out
}

// WritePlanJSON writes p to w as a dimerpath plan file (format
// PlanFormat, version PlanVersion; the schema is in the README): the
// full plan, every stroke with its path and tip conditions, every action
// in order, the estimates and the caution. Top-level fields stand one a
// line and array elements one a line (jsonfile.Compact), so the file
// diffs well and streams. generator names the program ("dimerpath
// 0.1.0"), or is empty. It refuses, with a *jsonfile.Error wrapping
// ErrInvalid and naming the field, a plan the file cannot carry (NaN,
// negative durations, broken references). O(size of p).
func WritePlanJSON(w io.Writer, p *planner.Plan, generator string) error {
	if err := checkPlan(p); err != nil {
		return err
	}
	jw := jsonfile.NewWriter(w, jsonfile.Compact)
	jw.Field("format", PlanFormat)
	jw.Field("version", PlanVersion)
	if generator != "" {
		jw.Field("generator", generator)
	}
	jw.Field("caution", planner.Caution)
	jw.Field("design", p.Design)
	jw.Field("variant", p.Variant)
	jw.Field("profile", p.Profile)
	jw.Field("seed", p.Seed)
	jw.Field("field_nm", xy{p.FieldWidthNM, p.FieldHeightNM})
	jw.List("conditions", len(p.Conditions), func(i int) any {
		c := p.Conditions[i]
		return conditionsJSON{Mode: string(c.Mode), Kind: string(c.Kind), DwellS: c.DwellS, DwellCapS: c.DwellCapS, BiasV: c.BiasV, CurrentA: c.CurrentA, LineDoseCPerCm: c.LineDoseCPerCm,
			SpeedNMPerS: c.SpeedNMPerS, LineWidthNM: c.LineWidthNM, Passes: c.Passes, PitchNM: c.PitchNM,
			YieldPerElectron: c.YieldPerElectron, SigmaNM: c.SigmaNM, ElectronsPerSite: c.ElectronsPerSite}
	})
	jw.List("modes", len(p.Modes), func(i int) any {
		m := p.Modes[i]
		return regionModeJSON{Region: m.Region, Role: string(m.Role), Requested: string(m.Requested), Mode: string(m.Mode), Reason: m.Reason, Sites: m.Sites}
	})
	jw.List("fiducials", len(p.Fiducials), func(i int) any {
		return fiducialJSON{Name: p.Fiducials[i].Name, AtNM: xyOf(p.Fiducials[i].At)}
	})
	writer := strokeActions(p)
	numbers := StrokeNumbers(p)
	var path []xy
	jw.List("strokes", len(p.Strokes), func(i int) any {
		s := &p.Strokes[i]
		path = path[:0]
		for _, q := range s.Path {
			path = append(path, xyOf(q))
		}
		sj := strokeJSON{ID: s.ID, Number: numbers[i], Region: s.Region, Mode: string(s.Mode), Kind: string(s.Kind),
			StartNM: path[0], EndNM: path[len(path)-1], PathNM: path, Passes: s.Passes, LengthNM: s.LengthNM,
			DurationS: s.DurationS, Sites: s.Sites, ToleranceNM: s.ToleranceNM, Segment: s.Segment, Window: s.Window,
			ExpectedMissed: &s.ExpectedMissed, ExpectedStray: &s.ExpectedStray}
		if k := writer[i]; k >= 0 {
			a := p.Actions[k]
			sj.BiasV, sj.CurrentA, sj.SpeedNMPS = a.BiasV, a.CurrentA, a.SpeedNMPS
		}
		return sj
	})
	jw.List("segments", len(p.Segments), func(i int) any {
		s := p.Segments[i]
		return segmentJSON{Index: s.Index, Step: s.Step, Registration: string(s.Registration), Reason: s.Reason, Fiducial: s.Fiducial,
			FiducialAtNM: xyOf(s.FiducialAt), StartS: s.StartS, EndS: s.EndS, BudgetS: s.BudgetS, Strokes: nonNil(s.Strokes),
			Tightest: s.Tightest, PInTolerance: s.PInTolerance}
	})
	jw.List("actions", len(p.Actions), func(i int) any {
		a := p.Actions[i]
		aj := actionJSON{Index: a.Index, Kind: string(a.Kind), Segment: a.Segment, Stroke: a.Stroke,
			FromNM: xyOf(a.From), ToNM: xyOf(a.To), StartS: a.StartS, DurationS: a.DurationS, Mode: string(a.Mode),
			BiasV: a.BiasV, CurrentA: a.CurrentA, SpeedNMPS: a.SpeedNMPS, Note: a.Note}
		if a.Kind == planner.ActRegister && a.Segment >= 0 {
			aj.Fiducial = p.Segments[a.Segment].Fiducial
		}
		return aj
	})
	jw.List("steps", len(p.Steps), func(i int) any { return stepOf(p.Steps[i]) })
	jw.Field("breakdown", breakdownOf(p.Breakdown))
	jw.Field("total_s", p.TotalS)
	jw.Field("p10_s", p.P10S)
	jw.Field("p50_s", p.P50S)
	jw.Field("p90_s", p.P90S)
	jw.Field("schedule_s", p.ScheduleS)
	jw.Field("floor_s", p.FloorS)
	jw.Field("by_hand_s", p.ByHandS)
	jw.Field("p_in_tolerance", p.PInTolerance)
	jw.List("couplings", len(p.Couplings), func(i int) any { return couplingOf(p.Couplings[i]) })
	jw.Field("drift_plan", driftPlanOf(p.Drift))
	jw.List("windows", len(p.Windows), func(i int) any {
		w := p.Windows[i]
		return windowJSON{Region: w.Region, Species: w.Species, Template: w.Template, AtNM: xyOf(w.At), Sites: w.Sites,
			OpenProbability: w.OpenProbability, P0: &w.P0, P1: &w.P1, P2Plus: &w.P2Plus, P1SD: &w.P1SD, Probability: w.Probability, OpenS: w.OpenS}
	})
	y := p.Yield
	jw.Field("yield", yieldJSON{Windows: y.Windows, All: y.All, Log10All: log10JSON(y.Log10All),
		All68: &y.All68, All95: &y.All95, Log10All68: log10Pair(y.Log10All68), Log10All95: log10Pair(y.Log10All95),
		ExpectedEmpty: &y.ExpectedEmpty, ExpectedMultiple: &y.ExpectedMultiple, ExpectedMisopened: &y.ExpectedMisopened,
		MeanGood: y.MeanGood, SDGood: y.SDGood,
		Distribution: nonNil(y.Distribution), DistributionFrom: y.DistributionFrom, DevicesPerPerfect: y.DevicesPerPerfect})
	jw.Field("coverage", coverageOf(p.Coverage))
	jw.Field("warnings", nonNil(p.Warnings))
	return jw.Close()
}

// coverageOf is the file's form of the coverage expectation.
func coverageOf(c planner.Coverage) coverageJSON {
	cj := coverageJSON{OK: c.OK, Sites: c.Sites, StrayLimit: &c.StrayLimit, ExpectedMissed: &c.ExpectedMissed, ExpectedStray: &c.ExpectedStray,
		Regions: []regionCoverageJSON{}, OverLimit: &c.OverLimit, StraySites: []straySiteJSON{}, Issues: nonNil(c.Issues)}
	for _, r := range c.Regions {
		cj.Regions = append(cj.Regions, regionCoverageJSON{Region: r.Region, Sites: r.Sites, ExpectedMissed: r.ExpectedMissed,
			ExpectedStray: r.ExpectedStray, ExpectedSpurious: r.ExpectedSpurious, Probability: r.Probability, Log10Probability: log10JSON(r.Log10Probability)})
	}
	for _, s := range c.StraySites {
		cj.StraySites = append(cj.StraySites, straySiteJSON{Site: [4]int{s.Site.Terrace, s.Site.Row, s.Site.Dimer, s.Site.Side},
			AtNM: xyOf(s.At), Probability: s.Probability, Region: s.Region, Stroke: s.Stroke})
	}
	return cj
}

// coverageFrom reads the file's coverage back; a version 1 file's
// threshold counts become the expected missed sites and the sites over
// the limit.
func coverageFrom(c coverageJSON) planner.Coverage {
	cov := planner.Coverage{OK: c.OK, Sites: c.Sites, StrayLimit: deref(c.StrayLimit), ExpectedMissed: deref(c.ExpectedMissed), ExpectedStray: deref(c.ExpectedStray),
		Issues: c.Issues}
	if c.OverLimit != nil {
		cov.OverLimit = *c.OverLimit
	}
	if c.Uncovered != nil {
		cov.ExpectedMissed = float64(*c.Uncovered)
	}
	if c.Overcleared != nil {
		cov.OverLimit = *c.Overcleared
	}
	for _, r := range c.Regions {
		cov.Regions = append(cov.Regions, planner.RegionCoverage{Region: r.Region, Sites: r.Sites, ExpectedMissed: r.ExpectedMissed,
			ExpectedStray: r.ExpectedStray, ExpectedSpurious: r.ExpectedSpurious, Probability: r.Probability, Log10Probability: log10Of(r.Log10Probability)})
	}
	for _, s := range c.StraySites {
		cov.StraySites = append(cov.StraySites, planner.StraySite{Site: lattice.Site{Terrace: s.Site[0], Row: s.Site[1], Dimer: s.Site[2], Side: s.Site[3]},
			At: s.AtNM.point(), Probability: s.Probability, Region: s.Region, Stroke: s.Stroke})
	}
	return cov
}

func breakdownOf(b planner.Breakdown) breakdownJSON {
	return breakdownJSON{APWriteS: b.APWriteS, FEWriteS: b.FEWriteS, DwellS: b.DwellS, TravelS: b.TravelS,
		ModeSwitchS: b.ModeSwitchS, RegistrationS: b.RegistrationS, VerificationS: b.VerificationS,
		SurveyS: b.SurveyS, ConditioningS: b.ConditioningS, TipChangeS: b.TipChangeS, RepairS: b.RepairS,
		DocumentationS: b.DocumentationS, DoseS: b.DoseS, AnnealS: b.AnnealS}
}

func (b breakdownJSON) breakdown() planner.Breakdown {
	return planner.Breakdown{APWriteS: b.APWriteS, FEWriteS: b.FEWriteS, DwellS: b.DwellS, TravelS: b.TravelS,
		ModeSwitchS: b.ModeSwitchS, RegistrationS: b.RegistrationS, VerificationS: b.VerificationS,
		SurveyS: b.SurveyS, ConditioningS: b.ConditioningS, TipChangeS: b.TipChangeS, RepairS: b.RepairS,
		DocumentationS: b.DocumentationS, DoseS: b.DoseS, AnnealS: b.AnnealS}
}

func stepOf(s planner.Step) stepJSON {
	return stepJSON{Kind: string(s.Kind), Species: s.Species, StartS: s.StartS, DurationS: s.DurationS, Segments: nonNil(s.Segments),
		Precursor: s.Precursor, ExposureL: s.ExposureL, TemperatureC: s.TemperatureC, Note: s.Note}
}

func (s stepJSON) step() planner.Step {
	return planner.Step{Kind: planner.StepKind(s.Kind), Species: s.Species, StartS: s.StartS, DurationS: s.DurationS, Segments: s.Segments,
		Precursor: s.Precursor, ExposureL: s.ExposureL, TemperatureC: s.TemperatureC, Note: s.Note}
}

func couplingOf(c planner.Coupling) couplingJSON {
	return couplingJSON{Kind: string(c.Kind), A: c.A, B: c.B, ToleranceNM: c.ToleranceNM, Strokes: nonNil(c.Strokes), SameStep: c.SameStep, PInTolerance: c.PInTolerance}
}

func (c couplingJSON) coupling() planner.Coupling {
	return planner.Coupling{Kind: planner.CouplingKind(c.Kind), A: c.A, B: c.B, ToleranceNM: c.ToleranceNM, Strokes: c.Strokes, SameStep: c.SameStep, PInTolerance: c.PInTolerance}
}

func driftPlanOf(d planner.DriftPlan) driftPlanJSON {
	return driftPlanJSON{RateNMPerMin: d.RateNMPerMin, CreepFraction: d.CreepFraction, ErrorZ: d.ErrorZ, Margin: d.Margin, Compensated: d.Compensated}
}

// nonNil returns s, or an empty slice for nil, so the file always holds
// arrays (never null) where the schema says array.
func nonNil[T any](s []T) []T {
	if s == nil {
		return []T{}
	}
	return s
}

// planOptions are the plan file's limits for jsonfile.Decode: every
// field the schema does not mark optional must be present.
var planOptions = jsonfile.Options{What: "the plan", MaxString: 1 << 20, MaxList: 1 << 26, MaxDepth: 8, Required: true}

// ReadPlanJSON reads a plan file written by WritePlanJSON and returns
// the plan. It refuses, with a *jsonfile.Error naming the field, its
// value and its line and column, anything else: not JSON (ErrSyntax), not
// a plan file (ErrNotPlan, decided by the "format" field alone, however
// malformed the rest), a newer version (ErrVersion), unknown fields or
// fields in another case, missing fields, values out of range or
// references that do not resolve (ErrInvalid), more than
// MaxPlanFileBytes (ErrTooLarge, refused before reading when r is a
// file). The derived fields (start_nm, end_nm, a register action's
// fiducial) must agree with the rest of the file.
func ReadPlanJSON(r io.Reader) (*planner.Plan, error) {
	return readPlan(r, "")
}

// ReadPlanFile reads the plan file at path (see ReadPlanJSON); errors
// name the file.
func ReadPlanFile(path string) (*planner.Plan, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	return readPlan(f, path)
}

func readPlan(r io.Reader, name string) (*planner.Plan, error) {
	data, err := jsonfile.ReadAll(r, name, MaxPlanFileBytes, nil)
	if err != nil {
		return nil, err
	}
	return ParsePlan(name, data)
}

// ParsePlan reads a plan file from data (see ReadPlanJSON); name labels
// errors.
func ParsePlan(name string, data []byte) (*planner.Plan, error) {
	fail := func(kind error, p jsonfile.Problem) error {
		ps := []jsonfile.Problem{p}
		jsonfile.Locate(data, ps)
		return &jsonfile.Error{File: name, Kind: kind, Problems: ps}
	}
	if len(data) > MaxPlanFileBytes {
		return nil, &jsonfile.Error{File: name, Problems: []jsonfile.Problem{{Message: "the file holds " + jsonfile.Bytes(int64(len(data))) +
			", more than the " + jsonfile.Bytes(MaxPlanFileBytes) + " limit for a plan", Err: ErrTooLarge}}}
	}
	// Identify the file before decoding it strictly, so a design file or
	// a future version gets the right message.
	if err := CheckPlanHead(data); err != nil {
		if e, ok := err.(*jsonfile.Error); ok && len(e.Problems) > 0 {
			return nil, fail(e.Kind, e.Problems[0])
		}
		return nil, err
	}
	var f planFile
	var ps jsonfile.Problems
	opts := planOptions
	if raw, _ := jsonfile.TopField(data, "version"); string(raw) == "1" {
		// A version 1 plan has no session model (steps, session times,
		// P(within tolerance)): read what it has; the plan then has no
		// steps, which the exports say.
		opts.Required = false
	}
	jsonfile.Decode(data, &f, &ps, opts)
	if err := ps.Err(name, ErrInvalid); err != nil {
		for _, p := range ps.List() {
			if p.Err == ErrSyntax {
				err.(*jsonfile.Error).Kind = nil // not JSON: say so alone
			}
		}
		return nil, err
	}
	p, err := f.plan()
	if err == nil {
		err = checkPlan(p)
	}
	if e, ok := err.(*jsonfile.Error); ok {
		e.File = name
		jsonfile.Locate(data, e.Problems)
		return nil, e
	}
	if err != nil {
		return nil, err
	}
	return p, nil
}

// CheckPlanHead reports whether data starts like a plan file this
// program reads: a "format" of PlanFormat (ErrNotPlan otherwise) and a
// whole "version" from 1 to PlanVersion (ErrVersion otherwise), found by
// a scan that tolerates a malformed rest of the file. Input that is not
// a JSON object at all gets its syntax error (ErrSyntax).
func CheckPlanHead(data []byte) error {
	notPlan := func(p jsonfile.Problem) error {
		return &jsonfile.Error{Kind: ErrNotPlan, Problems: []jsonfile.Problem{p}}
	}
	format, ok := jsonfile.TopString(data, "format")
	switch {
	case ok && format != PlanFormat:
		return notPlan(jsonfile.Problem{Path: "format", Value: format, Message: fmt.Sprintf("%s (want %q)", ErrNotPlan, PlanFormat)})
	case !ok:
		if p, bad := jsonfile.SyntaxProblem(data, "the plan"); bad {
			return &jsonfile.Error{Problems: []jsonfile.Problem{p}}
		}
		if raw, found := jsonfile.TopField(data, "format"); found {
			return notPlan(jsonfile.Problem{Path: "format", Value: jsonfile.Text(raw), Message: fmt.Sprintf("%s (want the string %q)", ErrNotPlan, PlanFormat)})
		}
		if !startsObject(data) {
			return notPlan(jsonfile.Problem{Message: ErrNotPlan.Error() + ": a plan file holds a JSON object"})
		}
		return notPlan(jsonfile.Problem{Path: "format", Message: fmt.Sprintf("missing: %s (a plan file starts with \"format\": %q)", ErrNotPlan, PlanFormat)})
	}
	raw, found := jsonfile.TopField(data, "version")
	if v, err := strconv.Atoi(string(raw)); err != nil || v < 1 || v > PlanVersion {
		p := jsonfile.Problem{Path: "version", Message: fmt.Sprintf("%s (this dimerpath reads versions 1 to %d)", ErrVersion, PlanVersion)}
		if found {
			p.Value = jsonfile.Text(raw)
		} else {
			p.Message = "missing: " + p.Message
		}
		return &jsonfile.Error{Kind: ErrVersion, Problems: []jsonfile.Problem{p}}
	}
	return nil
}

func startsObject(data []byte) bool {
	t := bytes.TrimLeft(data, " \t\r\n")
	return len(t) > 0 && t[0] == '{'
}

// plan converts the file to a Plan, checking the derived fields.
func (f *planFile) plan() (*planner.Plan, error) {
	p := &planner.Plan{Design: f.Design, Variant: f.Variant, Profile: f.Profile, Seed: f.Seed,
		FieldWidthNM: f.FieldNM[0], FieldHeightNM: f.FieldNM[1],
		TotalS: f.TotalS, P10S: f.P10S, P50S: f.P50S, P90S: f.P90S, ScheduleS: f.ScheduleS, FloorS: f.FloorS, ByHandS: f.ByHandS, Warnings: f.Warnings,
		PInTolerance: f.PInTolerance}
	p.Steps = mapSlice(f.Steps, stepJSON.step)
	p.Couplings = mapSlice(f.Couplings, couplingJSON.coupling)
	d := f.Drift
	p.Drift = planner.DriftPlan{RateNMPerMin: d.RateNMPerMin, CreepFraction: d.CreepFraction, ErrorZ: d.ErrorZ, Margin: d.Margin, Compensated: d.Compensated}
	p.Conditions = mapSlice(f.Conditions, func(c conditionsJSON) planner.Conditions {
		return planner.Conditions{Mode: design.Mode(c.Mode), Kind: planner.StrokeKind(c.Kind), DwellS: c.DwellS, DwellCapS: c.DwellCapS, BiasV: c.BiasV, CurrentA: c.CurrentA, LineDoseCPerCm: c.LineDoseCPerCm,
			SpeedNMPerS: c.SpeedNMPerS, LineWidthNM: c.LineWidthNM, Passes: c.Passes, PitchNM: c.PitchNM,
			YieldPerElectron: c.YieldPerElectron, SigmaNM: c.SigmaNM, ElectronsPerSite: c.ElectronsPerSite}
	})
	p.Modes = mapSlice(f.Modes, func(m regionModeJSON) planner.RegionMode {
		return planner.RegionMode{Region: m.Region, Role: design.Role(m.Role), Requested: design.Mode(m.Requested), Mode: design.Mode(m.Mode), Reason: m.Reason, Sites: m.Sites}
	})
	p.Fiducials = mapSlice(f.Fiducials, func(d fiducialJSON) planner.Fiducial {
		return planner.Fiducial{Name: d.Name, At: d.AtNM.point()}
	})
	p.Strokes = make([]planner.Stroke, len(f.Strokes))
	for i, s := range f.Strokes {
		if len(s.PathNM) > 0 && (s.StartNM != s.PathNM[0] || s.EndNM != s.PathNM[len(s.PathNM)-1]) {
			return nil, invalid(fmt.Sprintf("strokes[%d].start_nm", i), fmt.Sprint(s.StartNM[:]),
				"start_nm and end_nm must be the first and last points of path_nm")
		}
		p.Strokes[i] = planner.Stroke{ID: s.ID, Region: s.Region, Mode: design.Mode(s.Mode), Kind: planner.StrokeKind(s.Kind),
			Path: mapSlice(s.PathNM, xy.point), Passes: s.Passes, LengthNM: s.LengthNM, DurationS: s.DurationS,
			Sites: s.Sites, ToleranceNM: s.ToleranceNM, Segment: s.Segment, Window: s.Window,
			ExpectedMissed: deref(s.ExpectedMissed), ExpectedStray: deref(s.ExpectedStray)}
	}
	p.Segments = mapSlice(f.Segments, func(s segmentJSON) planner.Segment {
		return planner.Segment{Index: s.Index, Step: s.Step, Registration: planner.RegistrationKind(s.Registration), Reason: s.Reason,
			Fiducial: s.Fiducial, FiducialAt: s.FiducialAtNM.point(), StartS: s.StartS,
			EndS: s.EndS, BudgetS: s.BudgetS, Strokes: s.Strokes, Tightest: s.Tightest, PInTolerance: s.PInTolerance}
	})
	p.Actions = make([]planner.Action, len(f.Actions))
	for i, a := range f.Actions {
		if a.Fiducial != "" && (a.Segment < 0 || a.Segment >= len(p.Segments) || p.Segments[a.Segment].Fiducial != a.Fiducial) {
			return nil, invalid(fmt.Sprintf("actions[%d].fiducial", i), a.Fiducial, "not the fiducial of segment %d", a.Segment)
		}
		p.Actions[i] = planner.Action{Index: a.Index, Kind: planner.ActionKind(a.Kind), Segment: a.Segment, Stroke: a.Stroke,
			From: a.FromNM.point(), To: a.ToNM.point(), StartS: a.StartS, DurationS: a.DurationS, Mode: design.Mode(a.Mode),
			BiasV: a.BiasV, CurrentA: a.CurrentA, SpeedNMPS: a.SpeedNMPS, Note: a.Note}
	}
	p.Breakdown = f.Breakdown.breakdown()
	p.Windows = mapSlice(f.Windows, func(w windowJSON) planner.Window {
		win := planner.Window{Region: w.Region, Species: w.Species, Template: w.Template, At: w.AtNM.point(), Sites: w.Sites,
			OpenProbability: w.OpenProbability, Probability: w.Probability, OpenS: w.OpenS}
		if w.P1 == nil {
			// Version 1: probability = open_probability · p1, the rest
			// empty windows, no uncertainty.
			if w.OpenProbability > 0 {
				win.P1 = min(1, w.Probability/w.OpenProbability)
			}
			win.P0 = 1 - win.P1
		} else {
			win.P1 = *w.P1
			win.P0, win.P2Plus, win.P1SD = deref(w.P0), deref(w.P2Plus), deref(w.P1SD)
		}
		return win
	})
	y := f.Yield
	p.Yield = planner.Yield{Windows: y.Windows, All: y.All, Log10All: log10Of(y.Log10All),
		Log10All68: log10PairOf(y.Log10All68), Log10All95: log10PairOf(y.Log10All95),
		ExpectedEmpty: deref(y.ExpectedEmpty), ExpectedMultiple: deref(y.ExpectedMultiple), ExpectedMisopened: deref(y.ExpectedMisopened),
		MeanGood: y.MeanGood, SDGood: y.SDGood,
		Distribution: y.Distribution, DistributionFrom: y.DistributionFrom, DevicesPerPerfect: y.DevicesPerPerfect}
	if y.All68 != nil {
		p.Yield.All68 = *y.All68
	} else {
		p.Yield.All68, p.Yield.Log10All68 = [2]float64{y.All, y.All}, [2]float64{log10Of(y.Log10All), log10Of(y.Log10All)}
	}
	if y.All95 != nil {
		p.Yield.All95 = *y.All95
	} else {
		p.Yield.All95, p.Yield.Log10All95 = p.Yield.All68, p.Yield.Log10All68
	}
	p.Coverage = coverageFrom(f.Coverage)
	numbers := StrokeNumbers(p)
	for i, s := range f.Strokes {
		if s.Number != 0 && s.Number != numbers[i] {
			return nil, invalid(fmt.Sprintf("strokes[%d].number", i), s.Number, "stroke %d is number %d in writing order", i, numbers[i])
		}
	}
	return p, nil
}

func deref(p *float64) float64 {
	if p == nil {
		return 0
	}
	return *p
}

// mapSlice applies fn to each element; nil stays nil.
func mapSlice[S, T any](s []S, fn func(S) T) []T {
	if s == nil {
		return nil
	}
	out := make([]T, len(s))
	for i, v := range s {
		out[i] = fn(v)
	}
	return out
}
