package export

import (
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"github.com/golang/geo/r2"

	"dimerpath/internal/jsonfile"
	"dimerpath/lattice/design"
	"dimerpath/planner"
)

// MaxFieldNM bounds the scan field a plan may have (1 mm a side), so
// that no figure or index meets coordinates no instrument could reach.
const MaxFieldNM = 1e6

// checkPlan reports the first value of p that the plan file cannot carry
// or that contradicts the Plan contract, naming it by its path in the
// plan file's schema. Both the writer and the reader run it, so a file
// dimerpath writes is always one it reads back. O(strokes + actions +
// points).
func checkPlan(p *planner.Plan) error {
	if p == nil {
		return invalid("", nil, "no plan")
	}
	// A first pass without field paths costs no allocations; only a plan
	// that fails is checked again to name the field.
	if checkPlanWith(p, false) == nil {
		return nil
	}
	return checkPlanWith(p, true)
}

func checkPlanWith(p *planner.Plan, named bool) error {
	v := checker{named: named}
	v.positive("field_nm[0]", p.FieldWidthNM)
	v.positive("field_nm[1]", p.FieldHeightNM)
	for k, w := range []float64{p.FieldWidthNM, p.FieldHeightNM} {
		if v.err == nil && w > MaxFieldNM {
			v.fail(invalid(fmt.Sprintf("field_nm[%d]", k), w, "larger than %g nm (1 mm), more than any STM scans", float64(MaxFieldNM)))
		}
	}
	if v.err != nil {
		return v.err
	}
	// Every position must lie near the field: within one field size of
	// it (fiducials and moves may stand outside the written area).
	v.near = r2.RectFromPoints(r2.Point{X: -p.FieldWidthNM, Y: -p.FieldHeightNM}, r2.Point{X: 2 * p.FieldWidthNM, Y: 2 * p.FieldHeightNM})
	for i, c := range p.Conditions {
		f := v.at("conditions", i)
		v.mode(f+".mode", c.Mode, false)
		v.kind(f+".kind", c.Kind, true)
		v.nonNeg(f+".dwell_s", c.DwellS)
		v.nonNeg(f+".dwell_cap_s", c.DwellCapS)
		v.finite(f+".bias_v", c.BiasV)
		v.nonNeg(f+".current_a", c.CurrentA)
		v.nonNeg(f+".line_dose_c_per_cm", c.LineDoseCPerCm)
		v.nonNeg(f+".speed_nm_per_s", c.SpeedNMPerS)
		v.nonNeg(f+".line_width_nm", c.LineWidthNM)
		v.count(f+".passes", c.Passes)
		v.nonNeg(f+".pitch_nm", c.PitchNM)
	}
	for i, m := range p.Modes {
		v.count(v.at("modes", i)+".sites", m.Sites)
	}
	for i, fd := range p.Fiducials {
		v.point(v.at("fiducials", i)+".at_nm", fd.At)
	}
	for i := range p.Strokes {
		s := &p.Strokes[i]
		f := v.at("strokes", i)
		if s.ID != i {
			v.fail(invalid(f+".id", s.ID, "stroke %d must have id %d (strokes are indexed by id)", i, i))
		}
		v.mode(f+".mode", s.Mode, false)
		v.kind(f+".kind", s.Kind, false)
		v.nonNeg(f+".tolerance_nm", s.ToleranceNM)
		if len(s.Path) == 0 {
			v.fail(invalid(f+".path_nm", nil, "empty path"))
		}
		if s.Kind == planner.StrokeDwell && len(s.Path) > 1 {
			v.fail(invalid(f+".path_nm", len(s.Path), "a dwell has exactly one point, got %d", len(s.Path)))
		}
		for k, q := range s.Path {
			if !finite(q.X) || !finite(q.Y) || !v.near.ContainsPoint(q) {
				v.point(fmt.Sprintf("%s.path_nm[%d]", f, k), q)
				break
			}
		}
		v.count(f+".passes", s.Passes)
		v.nonNeg(f+".length_nm", s.LengthNM)
		v.nonNeg(f+".duration_s", s.DurationS)
		v.count(f+".sites", s.Sites)
		v.index(f+".segment", s.Segment, len(p.Segments), true)
		v.index(f+".window", s.Window, len(p.Windows), true)
		if v.err != nil {
			return v.err
		}
	}
	for i := range p.Segments {
		s := &p.Segments[i]
		f := v.at("segments", i)
		if s.Index != i {
			v.fail(invalid(f+".index", s.Index, "segment %d must have index %d", i, i))
		}
		v.point(f+".fiducial_at_nm", s.FiducialAt)
		v.nonNeg(f+".start_s", s.StartS)
		v.nonNeg(f+".end_s", s.EndS)
		if s.EndS < s.StartS {
			v.fail(invalid(f+".end_s", s.EndS, "ends before it starts (%g s)", s.StartS))
		}
		v.nonNeg(f+".budget_s", s.BudgetS)
		// A plan without steps is a version 1 plan: no session model.
		if len(p.Steps) > 0 {
			v.index(f+".step", s.Step, len(p.Steps), false)
			if v.err == nil && s.Step < len(p.Steps) && p.Steps[s.Step].Kind != planner.StepLithography {
				v.fail(invalid(f+".step", s.Step, "step %d is a %s step, not a lithography step", s.Step, p.Steps[s.Step].Kind))
			}
			if v.err == nil && s.Registration != planner.RegCoarse && s.Registration != planner.RegLocal {
				v.fail(invalid(f+".registration", string(s.Registration), "unknown registration kind (want coarse or local)"))
			}
		}
		if v.err == nil && s.Registration == planner.RegCoarse && s.Fiducial == "" {
			v.fail(invalid(f+".fiducial", s.Fiducial, "a coarse registration names its fiducial"))
		}
		v.index(f+".tightest", s.Tightest, len(p.Strokes), true)
		v.probability(f+".p_in_tolerance", s.PInTolerance)
		for k, id := range s.Strokes {
			if id < 0 || id >= len(p.Strokes) || p.Strokes[id].Segment != i {
				g := fmt.Sprintf("%s.strokes[%d]", f, k)
				v.index(g, id, len(p.Strokes), false)
				if v.err == nil {
					v.fail(invalid(g, id, "stroke %d says it is in segment %d", id, p.Strokes[id].Segment))
				}
				return v.err
			}
		}
		if v.err != nil {
			return v.err
		}
	}
	end := 0.0
	for i := range p.Actions {
		a := &p.Actions[i]
		f := v.at("actions", i)
		if a.Index != i {
			v.fail(invalid(f+".index", a.Index, "action %d must have index %d", i, i))
		}
		if v.err == nil && !slices.Contains(planner.ActionKinds, a.Kind) {
			v.fail(invalid(f+".kind", string(a.Kind), "unknown action kind (want %s)", actionKindList()))
		}
		v.index(f+".segment", a.Segment, len(p.Segments), true)
		v.index(f+".stroke", a.Stroke, len(p.Strokes), true)
		if (a.Kind == planner.ActWrite || a.Kind == planner.ActDwell) && a.Stroke < 0 {
			v.fail(invalid(f+".stroke", a.Stroke, "a %s action must name its stroke", a.Kind))
		}
		v.point(f+".from_nm", a.From)
		v.point(f+".to_nm", a.To)
		v.nonNeg(f+".start_s", a.StartS)
		v.nonNeg(f+".duration_s", a.DurationS)
		// Actions cover the plan without gaps (the Plan contract); allow
		// for rounding in the planner's sums.
		if i > 0 && v.err == nil && math.Abs(a.StartS-end) > 1e-6*math.Max(1, end) {
			v.fail(invalid(f+".start_s", a.StartS, "does not start when action %d ends (%g s)", i-1, end))
		}
		end = a.StartS + a.DurationS
		v.mode(f+".mode", a.Mode, true)
		v.finite(f+".bias_v", a.BiasV)
		v.nonNeg(f+".current_a", a.CurrentA)
		v.nonNeg(f+".speed_nm_per_s", a.SpeedNMPS)
		if v.err != nil {
			return v.err
		}
	}
	for i, st := range p.Steps {
		f := v.at("steps", i)
		switch st.Kind {
		case planner.StepSurvey, planner.StepLithography, planner.StepDose, planner.StepAnneal, planner.StepReregister, planner.StepDocumentation:
		default:
			v.fail(invalid(f+".kind", string(st.Kind), "unknown step kind (want survey, lithography, dose, anneal, reregister or documentation)"))
		}
		v.nonNeg(f+".start_s", st.StartS)
		v.nonNeg(f+".duration_s", st.DurationS)
		v.nonNeg(f+".exposure_l", st.ExposureL)
		v.finite(f+".temperature_c", st.TemperatureC)
		if v.err == nil && len(st.Segments) > 0 && st.Kind != planner.StepLithography {
			v.fail(invalid(f+".segments", len(st.Segments), "only a lithography step holds segments"))
		}
		for k, g := range st.Segments {
			v.index(fmt.Sprintf("%s.segments[%d]", f, k), g, len(p.Segments), false)
			if v.err == nil && p.Segments[g].Step != i {
				v.fail(invalid(fmt.Sprintf("%s.segments[%d]", f, k), g, "segment %d says it is in step %d", g, p.Segments[g].Step))
			}
		}
		if v.err != nil {
			return v.err
		}
	}
	b := p.Breakdown
	for _, k := range planner.TimeKinds {
		v.nonNeg("breakdown."+breakdownKey(k), b.Seconds(k))
	}
	v.nonNeg("total_s", p.TotalS)
	if v.err == nil && math.Abs(b.Total()-p.TotalS) > 1e-6*math.Max(1, p.TotalS) {
		v.fail(invalid("total_s", p.TotalS, "the breakdown sums to %g s", b.Total()))
	}
	v.nonNeg("p10_s", p.P10S)
	v.nonNeg("p50_s", p.P50S)
	v.nonNeg("p90_s", p.P90S)
	v.nonNeg("floor_s", p.FloorS)
	v.nonNeg("by_hand_s", p.ByHandS)
	v.nonNeg("schedule_s", p.ScheduleS)
	v.probability("p_in_tolerance", p.PInTolerance)
	for i, c := range p.Couplings {
		f := v.at("couplings", i)
		if v.err == nil && c.Kind != planner.CoupledGap && c.Kind != planner.CoupledPlacement {
			v.fail(invalid(f+".kind", string(c.Kind), "unknown coupling kind (want tunnel-gap or placement)"))
		}
		v.positive(f+".tolerance_nm", c.ToleranceNM)
		v.probability(f+".p_in_tolerance", c.PInTolerance)
		for k, id := range c.Strokes {
			v.index(fmt.Sprintf("%s.strokes[%d]", f, k), id, len(p.Strokes), false)
		}
	}
	d := p.Drift
	v.nonNeg("drift_plan.rate_nm_per_min", d.RateNMPerMin)
	v.nonNeg("drift_plan.creep_fraction", d.CreepFraction)
	v.nonNeg("drift_plan.error_z", d.ErrorZ)
	v.nonNeg("drift_plan.margin", d.Margin)
	if v.err == nil && !(p.P10S <= p.P50S && p.P50S <= p.P90S) {
		v.fail(invalid("p50_s", p.P50S, "quantiles out of order (p10 %g s, p90 %g s)", p.P10S, p.P90S))
	}
	for i, w := range p.Windows {
		f := v.at("windows", i)
		v.point(f+".at_nm", w.At)
		v.count(f+".sites", w.Sites)
		v.probability(f+".open_probability", w.OpenProbability)
		v.probability(f+".p0", w.P0)
		v.probability(f+".p1", w.P1)
		v.probability(f+".p2plus", w.P2Plus)
		v.probability(f+".probability", w.Probability)
		if v.err == nil && math.Abs(w.P0+w.P1+w.P2Plus-1) > 1e-9 {
			v.fail(invalid(f+".p2plus", w.P2Plus, "p0 + p1 + p2plus = %g, not 1", w.P0+w.P1+w.P2Plus))
		}
		if v.err == nil && !(w.P1SD >= 0 && w.P1SD < 1) {
			v.fail(invalid(f+".p1_sd", w.P1SD, "an uncertainty must lie in [0, 1)"))
		}
		if v.err == nil && math.Abs(w.Probability-w.OpenProbability*w.P1) > 1e-9 {
			v.fail(invalid(f+".probability", w.Probability, "not open_probability · p1 = %g", w.OpenProbability*w.P1))
		}
		v.nonNeg(f+".open_s", w.OpenS)
	}
	y := p.Yield
	v.count("yield.windows", y.Windows)
	v.probability("yield.all", y.All)
	v.nonNeg("yield.mean_good", y.MeanGood)
	if v.err == nil && y.MeanGood > float64(y.Windows)*(1+1e-9) {
		v.fail(invalid("yield.mean_good", y.MeanGood, "more than the %d windows", y.Windows))
	}
	for k, q := range y.Distribution {
		if !(q >= 0 && q <= 1) {
			v.probability(fmt.Sprintf("yield.distribution[%d]", k), q)
			break
		}
	}
	v.nonNeg("yield.devices_per_perfect", y.DevicesPerPerfect)
	v.nonNeg("yield.sd_good", y.SDGood)
	if v.err == nil && (math.IsNaN(y.Log10All) || y.Log10All > 1e-9 || math.IsInf(y.Log10All, 1)) {
		v.fail(invalid("yield.log10_all", y.Log10All, "the log10 of a probability must be at most 0"))
	}
	if v.err == nil && (y.DistributionFrom < 0 || y.DistributionFrom > max(0, len(y.Distribution))) {
		v.fail(invalid("yield.distribution_from", y.DistributionFrom, "must lie between 0 and the distribution's length %d", len(y.Distribution)))
	}
	for k, iv := range [][2]float64{y.All68, y.All95} {
		name := []string{"yield.all_68", "yield.all_95"}[k]
		v.probability(name, iv[0])
		v.probability(name, iv[1])
		if v.err == nil && iv[0] > iv[1] {
			v.fail(invalid(name, fmt.Sprint(iv), "an interval's low end must not lie above its high end"))
		}
	}
	v.nonNeg("yield.expected_empty", y.ExpectedEmpty)
	v.nonNeg("yield.expected_multiple", y.ExpectedMultiple)
	v.nonNeg("yield.expected_misopened", y.ExpectedMisopened)
	c := p.Coverage
	v.count("coverage.sites", c.Sites)
	v.nonNeg("coverage.expected_missed", c.ExpectedMissed)
	v.nonNeg("coverage.expected_stray", c.ExpectedStray)
	v.count("coverage.over_limit", c.OverLimit)
	if v.err == nil && len(c.StraySites) > c.OverLimit {
		v.fail(invalid("coverage.stray_sites", len(c.StraySites), "more stray sites listed than over_limit (%d)", c.OverLimit))
	}
	for i, r := range c.Regions {
		f := v.at("coverage.regions", i)
		v.count(f+".sites", r.Sites)
		v.nonNeg(f+".expected_missed", r.ExpectedMissed)
		v.nonNeg(f+".expected_stray", r.ExpectedStray)
		v.nonNeg(f+".expected_spurious", r.ExpectedSpurious)
		v.probability(f+".probability", r.Probability)
	}
	for i, s := range c.StraySites {
		f := v.at("coverage.stray_sites", i)
		v.point(f+".at_nm", s.At)
		v.probability(f+".probability", s.Probability)
		if v.err == nil && (s.Stroke < -1 || s.Stroke >= len(p.Strokes)) {
			v.fail(invalid(f+".stroke", s.Stroke, "names no stroke"))
		}
	}
	for i, s := range p.Strokes {
		if s.ExpectedMissed < 0 || s.ExpectedStray < 0 || math.IsNaN(s.ExpectedMissed+s.ExpectedStray) {
			v.nonNeg(v.at("strokes", i)+".expected_missed", s.ExpectedMissed)
			v.nonNeg(v.at("strokes", i)+".expected_stray", s.ExpectedStray)
		}
	}
	return v.err
}

// breakdownKey returns the plan file's key of a kind of time.
func breakdownKey(k planner.TimeKind) string {
	return [...]string{planner.TimeAPWrite: "ap_write_s", planner.TimeFEWrite: "fe_write_s", planner.TimeDwell: "dwell_s",
		planner.TimeTravel: "travel_s", planner.TimeModeSwitch: "mode_switch_s", planner.TimeRegistration: "registration_s",
		planner.TimeVerification: "verification_s", planner.TimeSurvey: "survey_s", planner.TimeConditioning: "conditioning_s",
		planner.TimeTipChange: "tip_change_s", planner.TimeRepair: "repair_s", planner.TimeDocumentation: "documentation_s",
		planner.TimeDose: "dose_s", planner.TimeAnneal: "anneal_s"}[k]
}

// actionKindList lists the action kinds for messages.
func actionKindList() string {
	var ks []string
	for _, k := range planner.ActionKinds {
		ks = append(ks, string(k))
	}
	return strings.Join(ks, ", ")
}

// checker keeps the first failure; later checks are skipped.
type checker struct {
	err   error
	named bool    // build field paths (else they are left empty)
	near  r2.Rect // where positions may lie, nm
}

// at returns the path of element i of array arr, or "" when the checker
// does not name fields (then field+".suffix" allocates nothing either).
func (v *checker) at(arr string, i int) string {
	if !v.named {
		return ""
	}
	return arr + "[" + strconv.Itoa(i) + "]"
}

func finite(x float64) bool { return !math.IsNaN(x) && !math.IsInf(x, 0) }

func (v *checker) fail(e *jsonfile.Error) {
	if v.err == nil {
		v.err = e
	}
}

func (v *checker) finite(f string, x float64) {
	if v.err == nil && (math.IsNaN(x) || math.IsInf(x, 0)) {
		v.fail(invalid(f, x, "must be a finite number"))
	}
}

func (v *checker) nonNeg(f string, x float64) {
	v.finite(f, x)
	if v.err == nil && x < 0 {
		v.fail(invalid(f, x, "must not be negative"))
	}
}

func (v *checker) positive(f string, x float64) {
	v.finite(f, x)
	if v.err == nil && !(x > 0) {
		v.fail(invalid(f, x, "must be positive"))
	}
}

func (v *checker) probability(f string, x float64) {
	v.finite(f, x)
	if v.err == nil && (x < 0 || x > 1) {
		v.fail(invalid(f, x, "a probability must lie in [0, 1]"))
	}
}

func (v *checker) count(f string, n int) {
	if v.err == nil && n < 0 {
		v.fail(invalid(f, n, "must not be negative"))
	}
}

func (v *checker) point(f string, p r2.Point) {
	v.finite(f+"[0]", p.X)
	v.finite(f+"[1]", p.Y)
	if v.err == nil && !v.near.IsEmpty() && !v.near.ContainsPoint(p) {
		v.fail(invalid(f, [2]float64{p.X, p.Y}, "more than one field size outside the scan field"))
	}
}

// index checks 0 <= i < n, or i = -1 when none is allowed.
func (v *checker) index(f string, i, n int, none bool) {
	if v.err != nil || (i >= 0 && i < n) || (none && i == -1) {
		return
	}
	if none {
		v.fail(invalid(f, i, "must be -1 (none) or an index below %d", n))
	} else {
		v.fail(invalid(f, i, "must be an index below %d", n))
	}
}

// kind checks a stroke kind; empty is allowed where the field is
// optional.
func (v *checker) kind(f string, k planner.StrokeKind, empty bool) {
	switch {
	case v.err != nil, empty && k == "":
	case k == planner.StrokeLine, k == planner.StrokeDwell, k == planner.StrokeRaster, k == planner.StrokeOutline:
	default:
		v.fail(invalid(f, string(k), "unknown stroke kind (want line, dwell, raster or outline)"))
	}
}

func (v *checker) mode(f string, m design.Mode, empty bool) {
	if v.err != nil || m == design.ModeAP || m == design.ModeFE || (empty && m == "") {
		return
	}
	v.fail(invalid(f, string(m), "unknown write mode (want ap or fe)"))
}
