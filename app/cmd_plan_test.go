package app

import (
	"encoding/json"
	"fmt"
	"math"
	"os"
	"path/filepath"
	"regexp"
	"strconv"
	"strings"
	"testing"

	"dimerpath/lattice/design"
	"dimerpath/planner"
)

const demoPath = "../assets/demo.json"

func TestPlanJSON(t *testing.T) {
	out, errs, code := runMain(t, "plan", demoPath, "--json", "--seed", "3")
	if code != ExitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var got map[string]json.RawMessage
	if err := json.Unmarshal([]byte(out), &got); err != nil {
		t.Fatalf("stdout is not one JSON object: %v", err)
	}
	for _, k := range []string{"total_s", "breakdown", "p10_s", "p50_s", "p90_s", "segments", "windows", "yield_all", "modes"} {
		if _, ok := got[k]; !ok {
			t.Errorf("plan --json lacks %q", k)
		}
	}
	var s struct {
		TotalS    float64            `json:"total_s"`
		Breakdown map[string]float64 `json:"breakdown"`
		Segments  []struct {
			Strokes      []int   `json:"strokes"`
			Fiducial     string  `json:"fiducial"`
			Registration string  `json:"registration"`
			StartS       float64 `json:"start_s"`
			EndS         float64 `json:"end_s"`
		} `json:"segments"`
		Steps []struct {
			Kind    string `json:"kind"`
			Species string `json:"species"`
		} `json:"steps"`
		PInTolerance float64 `json:"p_in_tolerance"`
		Windows      []struct {
			Species     string  `json:"species"`
			Open        float64 `json:"open_probability"`
			P1          float64 `json:"p1"`
			Probability float64 `json:"probability"`
		} `json:"windows"`
		YieldAll float64 `json:"yield_all"`
		Modes    map[string]struct {
			Mode, Reason string
		} `json:"modes"`
	}
	if err := json.Unmarshal([]byte(out), &s); err != nil {
		t.Fatal(err)
	}
	sum := 0.0
	for _, v := range s.Breakdown {
		sum += v
	}
	// The breakdown's keys are the names scripts rely on, and
	// they sum to total_s, the Monte Carlo mean.
	for _, k := range []string{"ap_write_s", "fe_write_s", "dwell_s", "travel_s", "mode_switch_s", "registration_s", "verification_s",
		"survey_s", "conditioning_s", "tip_change_s", "repair_s", "documentation_s", "dose_s", "anneal_s"} {
		if _, ok := s.Breakdown[k]; !ok {
			t.Errorf("breakdown lacks %s", k)
		}
	}
	if math.Abs(sum-s.TotalS) > 1e-9*s.TotalS || len(s.Breakdown) != 14 {
		t.Errorf("breakdown %v sums to %v, total %v", s.Breakdown, sum, s.TotalS)
	}
	if len(s.Segments) == 0 || s.Segments[len(s.Segments)-1].EndS > s.TotalS {
		t.Errorf("segments %+v", s.Segments)
	}
	for i, g := range s.Segments {
		if g.Registration == "coarse" && g.Fiducial == "" || g.Registration != "coarse" && g.Registration != "local" {
			t.Errorf("segments[%d]: registration %q at fiducial %q", i, g.Registration, g.Fiducial)
		}
	}
	if len(s.Steps) < 4 || s.Steps[1].Kind != "lithography" || s.PInTolerance <= 0 || s.PInTolerance > 1 {
		t.Errorf("steps %+v, p_in_tolerance %v", s.Steps, s.PInTolerance)
	}
	// A window is good when it opened as drawn and took one donor: the
	// template's p1 (Ivie et al. 0.63 for P, Stock et al. 0.97 for As)
	// times the exposure model's chance of opening it as drawn.
	if len(s.Windows) != 2 || s.Windows[0].Species != "P" || s.Windows[0].P1 != 0.63 || s.Windows[1].P1 != 0.97 {
		t.Errorf("windows %+v", s.Windows)
	} else {
		all := 1.0
		for _, w := range s.Windows {
			if w.Open <= 0.5 || w.Open > 1 || math.Abs(w.Probability-w.Open*w.P1) > 1e-12 {
				t.Errorf("window %+v: probability is not open_probability × p1", w)
			}
			all *= w.Probability
		}
		if math.Abs(s.YieldAll-all) > 1e-12 {
			t.Errorf("yield_all %v, product of the windows %v", s.YieldAll, all)
		}
	}
	if m := s.Modes["pad-drain"]; m.Mode != "fe" || m.Reason == "" {
		t.Errorf("modes[pad-drain] = %+v", m)
	}
}

func TestPlanText(t *testing.T) {
	out, _, code := runMain(t, "plan", "--variant", "gap-12-source", demoPath)
	if code != ExitOK {
		t.Fatalf("exit %d", code)
	}
	for _, want := range []string{"gap-12-source", planner.Caution, "Write modes", "Session time:", "P10", "Process steps", "lithography    As",
		"lithography    P", "Segments:", "Dopant windows: 2", "Coverage: OK", "tightest stroke", "P(every stroke and coupled pair within tolerance)",
		"tunnel-gap", "open before its dose"} {
		if !strings.Contains(out, want) {
			t.Errorf("summary lacks %q", want)
		}
	}
	// Every listed segment states its probability of staying within
	// tolerance, a number in [0, 1].
	ps := regexp.MustCompile(`\)\s+(\d\.\d{3})\s+\d+\n`).FindAllStringSubmatch(out, -1)
	if len(ps) == 0 {
		t.Errorf("no segment lists its probability:\n%s", out)
	}
	for _, m := range ps {
		if p, _ := strconv.ParseFloat(m[1], 64); p < 0 || p > 1 {
			t.Errorf("a segment's P(within) is %v", p)
		}
	}
}

func TestPlanRefusals(t *testing.T) {
	hot := writeFile(t, "hot.json", `{"format":"dimerpath-profile","version":1,"fe":{"bias_v":12}}`)
	bad := writeFile(t, "bad.json", `{"format":"dimerpath-profile","version":1,"ap":{"current_a":0},"settle_s":-1}`)
	cases := []struct {
		args []string
		want string
	}{
		{[]string{"plan", demoPath, "--profile", hot}, "fe.bias_v = 12 V exceeds limits.max_bias_v = 10 V"},
		{[]string{"plan", demoPath, "--profile", bad}, "ap.current_a = 0"},
		{[]string{"plan", demoPath, "--profile", bad}, "settle_s = -1"},
		{[]string{"plan", demoPath, "--variant", "nope"}, `no variant "nope"`},
		{[]string{"plan", filepath.Join(t.TempDir(), "missing.json")}, "missing.json"},
		{[]string{"plan"}, "want one design file"},
		{[]string{"compare", demoPath, "--profile", hot}, "fe.bias_v = 12 V"},
	}
	for _, c := range cases {
		out, errs, code := runMain(t, c.args...)
		if code != ExitFailure || !strings.Contains(errs, c.want) {
			t.Errorf("%v: exit %d, stderr %q; want exit 2 and %q", c.args, code, errs, c.want)
		}
		if c.args[0] == "plan" && out != "" {
			t.Errorf("%v printed to stdout on failure: %q", c.args, out)
		}
	}
}

func TestCompareTable(t *testing.T) {
	out, errs, code := runMain(t, "compare", demoPath, "--profile", "lt")
	if code != ExitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	// Each row shows P(all windows good) with its 68 % and 95 % intervals,
	// the same as the variant's own plan (issue 10 §4).
	pout, errs, code := runMain(t, "plan", demoPath, "--profile", "lt", "--variant", "gap-9", "--json")
	if code != ExitOK {
		t.Fatalf("plan: exit %d: %s", code, errs)
	}
	var plan struct {
		Yield struct {
			All   float64    `json:"all"`
			All68 [2]float64 `json:"all_68"`
			All95 [2]float64 `json:"all_95"`
		} `json:"yield"`
	}
	if err := json.Unmarshal([]byte(pout), &plan); err != nil {
		t.Fatal(err)
	}
	y := plan.Yield
	if !(y.All95[0] < y.All68[0] && y.All68[0] < y.All && y.All < y.All68[1] && y.All68[1] < y.All95[1]) {
		t.Fatalf("plan's yield intervals not nested around the point value: %+v", y)
	}
	g3 := func(v float64) string { return strconv.FormatFloat(v, 'g', 3, 64) }
	row := fmt.Sprintf("%s  %s to %s  %s to %s", g3(y.All), g3(y.All68[0]), g3(y.All68[1]), g3(y.All95[0]), g3(y.All95[1]))
	for _, want := range []string{"gap-9", "gap-12-source", "P(all windows good)  68 % interval   95 % interval", row} {
		if !strings.Contains(out, want) {
			t.Errorf("compare output lacks %q:\n%s", want, out)
		}
	}
}

func TestCalibrateThenPlan(t *testing.T) {
	// Lines written at 4 V, 2 nA from an exposure model with σ = 0.12 nm
	// and Y = 3·10⁻⁸ H/e (widths from the model's P = ½ band, plus a line
	// that wrote nothing); the calibrated profile recovers them and plan
	// uses it.
	var b strings.Builder
	b.WriteString("# test lines\nbias_v,current_na,speed_nm_per_s,width_nm\n")
	truth := planner.DefaultProfile()
	truth.AP.SigmaNM = 0.12
	truth.Exposure.Vibrational.YieldPerElectron = 3e-8
	for _, v := range []float64{4, 6, 8, 12, 16, 24, 2000} {
		truth.AP.LineDoseCPerCm = 2e-9 / v * 1e7
		fmt.Fprintf(&b, "4,2,%g,%.10g\n", v, truth.Line(design.ModeAP).Width())
	}
	meas := writeFile(t, "lines.csv", b.String())
	prof := filepath.Join(filepath.Dir(meas), "cal.json")
	out, errs, code := runMain(t, "calibrate", meas, "-o", prof)
	if code != ExitOK || !strings.Contains(out, "footprint σ                      0.12 nm") || !strings.Contains(out, "1 that wrote nothing censored") {
		t.Fatalf("calibrate: exit %d\n%s\n%s", code, out, errs)
	}
	p, err := planner.LoadProfile(prof)
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(p.AP.SigmaNM-0.12) > 1e-6 || math.Abs(p.Exposure.Vibrational.YieldPerElectron-3e-8) > 1e-12 {
		t.Errorf("calibrated σ %v, Y %v; want 0.12 nm, 3e-8", p.AP.SigmaNM, p.Exposure.Vibrational.YieldPerElectron)
	}
	out, errs, code = runMain(t, "plan", demoPath, "--profile", prof, "--json")
	if code != ExitOK || !strings.Contains(out, "calibrated from lines.csv") {
		t.Errorf("plan with the calibrated profile: exit %d, %s", code, errs)
	}
	// Too few lines: refused, nothing written.
	few := writeFile(t, "few.csv", "bias_v,current_a,speed_nm_per_s,width_nm\n4,2e-9,10,1\n4,2e-9,20,0.7\n")
	none := filepath.Join(t.TempDir(), "none.json")
	if _, errs, code := runMain(t, "calibrate", few, "-o", none); code != ExitFailure || !strings.Contains(errs, "few.csv: too few usable lines") {
		t.Errorf("calibrate with 2 lines: exit %d, %s", code, errs)
	}
	if _, err := os.Stat(none); !os.IsNotExist(err) {
		t.Errorf("a refused calibration wrote %s", none)
	}
}

func ftoa(v float64) string { return strings.TrimRight(strings.TrimRight(jsonNum(v), "0"), ".") }

func jsonNum(v float64) string {
	b, _ := json.Marshal(v)
	return string(b)
}
