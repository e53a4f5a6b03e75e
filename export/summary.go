package export

import (
	"io"

	"dimerpath/internal/jsonfile"
	"dimerpath/planner"
)

// The plan summary is what "dimerpath plan --json" prints: a digest of
// the plan for scripts, in the plan file's field names (see planFile),
// with the per-stroke and per-action detail left to the plan file.

type planSummary struct {
	Design    string           `json:"design"`
	Variant   string           `json:"variant"`
	Profile   string           `json:"profile"`
	Seed      int64            `json:"seed"`
	Caution   string           `json:"caution"`
	TotalS    float64          `json:"total_s"`
	Breakdown breakdownJSON    `json:"breakdown"`
	P10S      float64          `json:"p10_s"`
	P50S      float64          `json:"p50_s"`
	P90S      float64          `json:"p90_s"`
	ScheduleS float64          `json:"schedule_s"`
	FloorS    float64          `json:"floor_s"`
	ByHandS   float64          `json:"by_hand_s"`
	Strokes   int              `json:"strokes"`
	Steps     []stepJSON       `json:"steps"`
	Segments  []segmentSummary `json:"segments"`
	// PInTolerance is the probability that every stroke and coupled pair
	// stays within its tolerance.
	PInTolerance float64                `json:"p_in_tolerance"`
	Couplings    []couplingJSON         `json:"couplings"`
	Windows      []windowSummary        `json:"windows"`
	YieldAll     float64                `json:"yield_all"`
	Yield        yieldSummary           `json:"yield"`
	Modes        map[string]modeSummary `json:"modes"`
	Coverage     coverageSummary        `json:"coverage"`
	Warnings     []string               `json:"warnings"`
}

type segmentSummary struct {
	Index        int     `json:"index"`
	Step         int     `json:"step"`
	Registration string  `json:"registration"`
	Reason       string  `json:"reason"`
	Fiducial     string  `json:"fiducial"`
	StartS       float64 `json:"start_s"`
	EndS         float64 `json:"end_s"`
	BudgetS      float64 `json:"budget_s"`
	Strokes      []int   `json:"strokes"`
	PInTolerance float64 `json:"p_in_tolerance"`
}

type windowSummary struct {
	Region          string  `json:"region"`
	Species         string  `json:"species"`
	Template        string  `json:"template"`
	AtNM            xy      `json:"at_nm"`
	OpenProbability float64 `json:"open_probability"`
	P0              float64 `json:"p0"`
	P1              float64 `json:"p1"`
	P2Plus          float64 `json:"p2plus"`
	Probability     float64 `json:"probability"`
	OpenS           float64 `json:"open_s"`
}

type yieldSummary struct {
	Windows           int        `json:"windows"`
	All               float64    `json:"all"`
	All68             [2]float64 `json:"all_68"`
	All95             [2]float64 `json:"all_95"`
	Log10All          *float64   `json:"log10_all"` // null for -Inf, as in the plan file
	ExpectedEmpty     float64    `json:"expected_empty"`
	ExpectedMultiple  float64    `json:"expected_multiple"`
	ExpectedMisopened float64    `json:"expected_misopened"`
	MeanGood          float64    `json:"mean_good"`
	SDGood            float64    `json:"sd_good"`
	DevicesPerPerfect float64    `json:"devices_per_perfect"`
}

type modeSummary struct {
	Requested string `json:"requested"`
	Mode      string `json:"mode"`
	Reason    string `json:"reason"`
}

// coverageSummary is the plan file's coverage without the list of stray
// sites (over_limit counts them).
type coverageSummary struct {
	OK             bool                 `json:"ok"`
	Sites          int                  `json:"sites"`
	StrayLimit     float64              `json:"stray_limit"`
	ExpectedMissed float64              `json:"expected_missed"`
	ExpectedStray  float64              `json:"expected_stray"`
	Regions        []regionCoverageJSON `json:"regions"`
	OverLimit      int                  `json:"over_limit"`
	Issues         []string             `json:"issues,omitempty"`
}

// WritePlanSummary writes the digest of p that "dimerpath plan --json"
// prints, indented one field a line (jsonfile.Indented): totals, the
// breakdown, the spread, segments, windows, yield, each region's mode
// and why, coverage and warnings, in the plan file's field names. It
// refuses a plan checkPlan refuses.
func WritePlanSummary(w io.Writer, p *planner.Plan) error {
	if err := checkPlan(p); err != nil {
		return err
	}
	s := planSummary{
		Design: p.Design, Variant: p.Variant, Profile: p.Profile, Seed: p.Seed, Caution: planner.Caution,
		TotalS: p.TotalS, Breakdown: breakdownOf(p.Breakdown), P10S: p.P10S, P50S: p.P50S, P90S: p.P90S, ScheduleS: p.ScheduleS,
		FloorS: p.FloorS, ByHandS: p.ByHandS, Strokes: len(p.Strokes),
		Steps: []stepJSON{}, Segments: []segmentSummary{}, Windows: []windowSummary{}, Couplings: []couplingJSON{},
		PInTolerance: p.PInTolerance,
		YieldAll:     p.Yield.All,
		Yield: yieldSummary{Windows: p.Yield.Windows, All: p.Yield.All, All68: p.Yield.All68, All95: p.Yield.All95, Log10All: log10JSON(p.Yield.Log10All),
			ExpectedEmpty: p.Yield.ExpectedEmpty, ExpectedMultiple: p.Yield.ExpectedMultiple, ExpectedMisopened: p.Yield.ExpectedMisopened,
			MeanGood: p.Yield.MeanGood, SDGood: p.Yield.SDGood, DevicesPerPerfect: p.Yield.DevicesPerPerfect},
		Modes:    map[string]modeSummary{},
		Coverage: coverageSummaryOf(p.Coverage),
		Warnings: nonNil(p.Warnings),
	}
	for _, st := range p.Steps {
		s.Steps = append(s.Steps, stepOf(st))
	}
	for _, g := range p.Segments {
		s.Segments = append(s.Segments, segmentSummary{Index: g.Index, Step: g.Step, Registration: string(g.Registration), Reason: g.Reason, Fiducial: g.Fiducial,
			StartS: g.StartS, EndS: g.EndS, BudgetS: g.BudgetS, Strokes: g.Strokes, PInTolerance: g.PInTolerance})
	}
	for _, c := range p.Couplings {
		s.Couplings = append(s.Couplings, couplingOf(c))
	}
	for _, win := range p.Windows {
		s.Windows = append(s.Windows, windowSummary{Region: win.Region, Species: win.Species, Template: win.Template, AtNM: xyOf(win.At),
			OpenProbability: win.OpenProbability, P0: win.P0, P1: win.P1, P2Plus: win.P2Plus, Probability: win.Probability, OpenS: win.OpenS})
	}
	for _, m := range p.Modes {
		s.Modes[m.Region] = modeSummary{Requested: string(m.Requested), Mode: string(m.Mode), Reason: m.Reason}
	}
	data, err := jsonfile.Marshal(s, jsonfile.Indented)
	if err != nil {
		return err
	}
	_, err = w.Write(data)
	return err
}

func coverageSummaryOf(c planner.Coverage) coverageSummary {
	cj := coverageOf(c)
	return coverageSummary{OK: c.OK, Sites: c.Sites, StrayLimit: c.StrayLimit, ExpectedMissed: c.ExpectedMissed, ExpectedStray: c.ExpectedStray,
		Regions: cj.Regions, OverLimit: c.OverLimit, Issues: cj.Issues}
}
