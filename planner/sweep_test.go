package planner

import (
	"context"
	"errors"
	"fmt"
	"reflect"
	"strings"
	"sync/atomic"
	"testing"

	"dimerpath/lattice/design"
)

// sweepDesign is a small design to sweep: a 6 x 4 array of As windows and
// an AP gate beside it, on a 300 nm field.
func sweepDesign() *design.Design {
	d := testDesign(300, 300,
		design.Region{Name: "donors", Role: design.RoleDonor, Mode: design.ModeAP, Species: "As",
			Shapes: []design.Shape{{Kind: design.ShapeArray, Array: &design.Array{
				Of:   &design.Shape{Kind: design.ShapeWindow, Template: "As", Points: [][2]float64{{60, 60}}},
				Cols: 6, Rows: 4, PitchDimers: 3, PitchRows: 2,
			}}}},
		design.Region{Name: "gate", Role: design.RoleGate, Mode: design.ModeAP, Shapes: []design.Shape{rect(120, 50, 140, 60)}},
	)
	return d
}

func TestSweepParametersFollowTheProfile(t *testing.T) {
	params := SweepParameters(sweepDesign(), "", DefaultProfile())
	byName := map[string]SweepParameter{}
	for _, p := range params {
		byName[p.Name] = p
	}
	for name, unit := range map[string]string{
		"drift.rate_nm_per_min": "nm/min", "drift.registration_s": "s", "tolerance_ap_nm": "nm",
		"ap.current_a": "A", "fe.current_a": "A", "ap.passes": "", "move_speed_nm_per_s": "nm/s",
	} {
		p, ok := byName[name]
		if !ok {
			t.Errorf("parameter %q missing from %v", name, params)
			continue
		}
		if p.Unit != unit {
			t.Errorf("%s: unit %q, want %q", name, p.Unit, unit)
		}
	}
	if p := byName["drift.rate_nm_per_min"]; p.Current != "0.1" {
		t.Errorf("drift rate now %q, want the rt preset's 0.1", p.Current)
	}
	if p := byName["ap.current_a"]; p.Axis() != "ap.current_a (nA)" || p.DisplayValue(2e-9) != 2 {
		t.Errorf("ap.current_a axis %q, 2e-9 A shown as %v", p.Axis(), p.DisplayValue(2e-9))
	}
	for _, name := range []string{"version", "format", "limits.max_bias_v", "limits.scan_field_nm", "order"} {
		if _, ok := byName[name]; ok {
			t.Errorf("%q must not be sweepable", name)
		}
	}
	a, ok := byName["array:donors"]
	if !ok || a.Array == nil || a.Current != "6x4" || a.Axis() != "windows in array donors" {
		t.Errorf("array parameter: %+v", a)
	}
}

func TestSweepRefusesBadInputAndPlansNothing(t *testing.T) {
	d := sweepDesign()
	for _, c := range []struct {
		name, param string
		values      []string
		want        []string // substrings of the error
	}{
		{"unknown parameter lists the known ones", "drift.rate", []string{"1"},
			[]string{`no parameter "drift.rate"`, "drift.rate_nm_per_min", "drift.registration_s", "array:donors"}},
		{"current beyond the instrument's limit", "ap.current_a", []string{"2e-9", "2e-8"},
			[]string{"ap.current_a = 2e-8", "limits.max_current_a = 10 nA", "20 nA"}},
		{"negative drift rate", "drift.rate_nm_per_min", []string{"0.1", "-0.5"},
			[]string{"drift.rate_nm_per_min = -0.5: must be"}},
		{"every bad value is listed", "drift.registration_s", []string{"-1", "x", "100"},
			[]string{"2 values refused", "drift.registration_s = -1", `drift.registration_s = "x": not a number`}},
		{"passes must be whole", "ap.passes", []string{"1.5"}, []string{"whole number"}},
		{"a value the dose model refuses", "ap.line_dose_c_per_cm", []string{"1e-5"},
			[]string{"ap.line_dose_c_per_cm = 1e-05", "lines would clear less than half their sites"}},
		{"array beyond the field", "array:donors", []string{"6x4", "400x4"},
			[]string{"array donors = 400x4", "column 400", "off the lattice", "at most"}},
		{"array beyond the file's limit", "array:donors", []string{"3000x3000"},
			[]string{"9000000 copies", "limit"}},
		{"not an array size", "array:donors", []string{"6by4"}, []string{"not an array size"}},
		{"no values", "drift.rate_nm_per_min", nil, []string{"no values"}},
	} {
		t.Run(c.name, func(t *testing.T) {
			var calls atomic.Int32
			opt := SweepOptions{Options: Options{Seed: 1, Progress: func(string, float64) { calls.Add(1) }}}
			sw, err := PlanSweep(context.Background(), d, "", DefaultProfile(), c.param, c.values, opt)
			if err == nil {
				t.Fatalf("planned %+v, want an error", sw)
			}
			if !errors.Is(err, ErrSweep) {
				t.Errorf("error %v does not wrap ErrSweep", err)
			}
			for _, w := range c.want {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("error %q does not say %q", err, w)
				}
			}
			if calls.Load() != 0 {
				t.Errorf("progress reported %d times: something was planned", calls.Load())
			}
		})
	}
}

// TestSweepMatchesPlansOneByOne checks that each point of a sweep, planned
// in parallel, is exactly the plan of its value planned alone.
func TestSweepMatchesPlansOneByOne(t *testing.T) {
	d := sweepDesign()
	for _, c := range []struct {
		param  string
		values []string
		apply  func(p *Profile, d *design.Design, i int) *design.Design
	}{
		{"drift.rate_nm_per_min", []string{"0.05", "0.2", "0.4"}, func(p *Profile, d *design.Design, i int) *design.Design {
			p.Drift.RateNMPerMin = []float64{0.05, 0.2, 0.4}[i]
			return d
		}},
		{"drift.registration_s", []string{"60", "500"}, func(p *Profile, d *design.Design, i int) *design.Design {
			p.Drift.RegistrationS = []float64{60, 500}[i]
			return d
		}},
		{"array:donors", []string{"2x2", "10x6", "8"}, func(p *Profile, d *design.Design, i int) *design.Design {
			size := [][2]int{{2, 2}, {10, 6}, {8, 8}}[i]
			c := *d
			c.Variants = []design.Variant{d.Variants[0]}
			c.Variants[0].Regions = append([]design.Region(nil), d.Variants[0].Regions...)
			r := &c.Variants[0].Regions[0]
			r.Shapes = append([]design.Shape(nil), r.Shapes...)
			a := *r.Shapes[0].Array
			a.Cols, a.Rows = size[0], size[1]
			r.Shapes[0].Array = &a
			return &c
		}},
	} {
		t.Run(c.param, func(t *testing.T) {
			opt := Options{Seed: 3, MonteCarloRuns: 100}
			sw, err := PlanSweep(context.Background(), d, "", DefaultProfile(), c.param, c.values, SweepOptions{Options: opt, Workers: 2})
			if err != nil {
				t.Fatal(err)
			}
			if len(sw.Points) != len(c.values) {
				t.Fatalf("%d points for %d values", len(sw.Points), len(c.values))
			}
			for i, pt := range sw.Points {
				prof := DefaultProfile()
				dd := c.apply(&prof, d, i)
				want, err := buildVariant(context.Background(), dd, "", prof, opt)
				if err != nil {
					t.Fatal(err)
				}
				if pt.Err != nil {
					t.Fatalf("%s: %v", pt.Value, pt.Err)
				}
				if !reflect.DeepEqual(pt.Plan, want) {
					t.Errorf("%s = %s: the sweep's plan differs from the plan of that value alone (total %v, want %v)", c.param, pt.Value, pt.Plan.TotalS, want.TotalS)
				}
			}
			if c.param == "array:donors" {
				if got := []float64{sw.Points[0].X, sw.Points[1].X, sw.Points[2].X}; !reflect.DeepEqual(got, []float64{4, 60, 64}) {
					t.Errorf("array sweep X = %v, want the windows 4, 60, 64", got)
				}
				if n := sw.Points[1].Plan.Yield.Windows; n != 60 {
					t.Errorf("10x6 planned %d windows", n)
				}
			}
		})
	}
	// The design the sweep resized is unchanged.
	if a := d.Variants[0].Regions[0].Shapes[0].Array; a.Cols != 6 || a.Rows != 4 {
		t.Errorf("the sweep changed the design's array to %dx%d", a.Cols, a.Rows)
	}
}

func TestSweepWarnsWhenNothingChanges(t *testing.T) {
	d := sweepDesign()
	tol := 0.3
	d.Rules = &design.Rules{APToleranceNM: &tol}
	sw, err := PlanSweep(context.Background(), d, "", DefaultProfile(), "tolerance_ap_nm", []string{"0.1", "0.5"}, SweepOptions{Options: Options{Seed: 1, MonteCarloRuns: 50}})
	if err != nil {
		t.Fatal(err)
	}
	joined := strings.Join(sw.Warnings, "\n")
	for _, w := range []string{"rules.ap_tolerance_nm (0.3 nm) replaces", "gives the same write time"} {
		if !strings.Contains(joined, w) {
			t.Errorf("warnings %q do not say %q", joined, w)
		}
	}
}

func TestSweepCancelled(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	_, err := PlanSweep(ctx, sweepDesign(), "", DefaultProfile(), "drift.rate_nm_per_min", []string{"0.1", "0.2"}, SweepOptions{})
	if !errors.Is(err, context.Canceled) {
		t.Errorf("err = %v, want context.Canceled", err)
	}
}

func ExamplePlanSweep() {
	// A 6 x 4 array of As windows and a small AP gate, swept over the
	// drift rate: faster drift, shorter drift budgets, more registrations.
	d := sweepDesign()
	sw, err := PlanSweep(context.Background(), d, "", DefaultProfile(), "drift.rate_nm_per_min", []string{"0.02", "0.5", "2"}, SweepOptions{Options: Options{Seed: 1}})
	if err != nil {
		panic(err)
	}
	for _, p := range sw.Points {
		fmt.Printf("%s = %s %s: %d segment(s)\n", sw.Param.Name, p.Value, sw.Param.Unit, len(p.Plan.Segments))
	}
	// Output:
	// drift.rate_nm_per_min = 0.02 nm/min: 3 segment(s)
	// drift.rate_nm_per_min = 0.5 nm/min: 3 segment(s)
	// drift.rate_nm_per_min = 2 nm/min: 10 segment(s)
}

// TestSweepOfTheDemoSharesItsLayoutSafely plans the demo (FE pads,
// hybrid and AP regions, two terraces) for two values at once from one
// shared layout; run with -race it checks that planning only reads the
// layout.
func TestSweepOfTheDemoSharesItsLayoutSafely(t *testing.T) {
	d := demo(t)
	opt := Options{Seed: 2, MonteCarloRuns: 100}
	sw, err := PlanSweep(context.Background(), d, "", DefaultProfile(), "mode_switch_s", []string{"10", "60"}, SweepOptions{Options: opt, Workers: 2})
	if err != nil {
		t.Fatal(err)
	}
	for i, v := range []float64{10, 60} {
		prof := DefaultProfile()
		prof.ModeSwitchS = v
		want, err := buildVariant(context.Background(), d, "", prof, opt)
		if err != nil {
			t.Fatal(err)
		}
		if got := sw.Points[i].Plan; !reflect.DeepEqual(got, want) {
			t.Errorf("mode_switch_s = %v: the sweep's plan differs from the plan alone", v)
		}
	}
	if a, b := sw.Points[0].Plan.Breakdown.ModeSwitchS, sw.Points[1].Plan.Breakdown.ModeSwitchS; !(a > 0 && b == 6*a) {
		t.Errorf("mode switches %v s at 10 s each and %v s at 60 s each: want six times as much", a, b)
	}
}
