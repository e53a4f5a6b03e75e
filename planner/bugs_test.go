package planner

import (
	"context"
	"errors"
	"math"
	"runtime"
	"strings"
	"testing"
)

// TestBuildAbsurdProfileIsAnError feeds Build profiles whose times no
// instrument has (the cases of issue 16's audit that passed validation):
// before issue 9 the Monte Carlo's quantile check panicked on their
// infinite totals. Each must come back as an error about the input that
// names a profile field, never a panic and never an internal error.
func TestBuildAbsurdProfileIsAnError(t *testing.T) {
	d := demo(t)
	for _, tc := range []struct {
		name string
		mod  func(p *Profile)
	}{
		{"settle 1e306 s", func(p *Profile) { p.SettleS = 1e306 }},
		{"move speed 5e-324 nm/s", func(p *Profile) { p.MoveSpeedNMPerS = 5e-324 }},
		{"registration 1e308 s", func(p *Profile) { p.Drift.RegistrationS = 1e308 }},
		{"verification 1e308 s", func(p *Profile) { p.Drift.VerificationS = 1e308 }},
		{"dwell footprint 1000 nm", func(p *Profile) { p.Dwell.SigmaNM = 1000; p.WindowStyle = WindowStyleDwell }},
		{"dwell current 5e-324 A", func(p *Profile) { p.Dwell.CurrentA = 5e-324; p.WindowStyle = WindowStyleDwell }},
		// Legal values whose log-normal spread overflowed: (sd/mean)² is
		// +Inf, the draws were NaN and fastErf indexed its table at
		// -2^63 (found by review9 sweeping every parameter).
		{"creep fraction 1e-300 with a spread", func(p *Profile) { p.Registration.Creep.Fraction = 1e-300 }},
		{"creep fraction 5e-324 with a spread", func(p *Profile) { p.Registration.Creep.Fraction = 5e-324 }},
		{"drift rate 5e-324 nm/min with a spread", func(p *Profile) { p.Drift.RateNMPerMin = 5e-324 }},
	} {
		t.Run(tc.name, func(t *testing.T) {
			p := DefaultProfile()
			tc.mod(&p)
			var plan *Plan
			var err error
			func() {
				defer func() {
					if r := recover(); r != nil {
						t.Fatalf("Build panicked: %v", r)
					}
				}()
				plan, err = buildVariant(context.Background(), d, "", p, Options{Seed: 1, MonteCarloRuns: 200})
			}()
			if err == nil {
				// A plan is acceptable only if every figure is a number.
				for _, v := range []float64{plan.TotalS, plan.P10S, plan.P50S, plan.P90S} {
					if !finite(v) {
						t.Fatalf("Build = plan with total %v, P10 %v, P50 %v, P90 %v; want finite figures or an error", plan.TotalS, plan.P10S, plan.P50S, plan.P90S)
					}
				}
				return
			}
			if errors.Is(err, ErrInternal) {
				t.Errorf("Build = %v; want an error about the input, not a bug", err)
			}
			if !strings.Contains(err.Error(), "_s") && !strings.Contains(err.Error(), "dwell.") {
				t.Errorf("Build = %v; want the profile field named", err)
			}
		})
	}
}

// TestBuildRecoversPanics makes a panic happen inside Build (the progress
// callback is called from every stage) and expects an *InternalError with
// the panic's value and a stack, instead of a crash.
func TestBuildRecoversPanics(t *testing.T) {
	opt := Options{Seed: 1, MonteCarloRuns: 50, Progress: func(stage string, _ float64) {
		if stage == "route" {
			panic("a bug in a progress callback")
		}
	}}
	plan, err := buildVariant(context.Background(), demo(t), "", DefaultProfile(), opt)
	var ie *InternalError
	if plan != nil || !errors.As(err, &ie) || !errors.Is(err, ErrInternal) {
		t.Fatalf("Build = %v, %v; want nil and an *InternalError", plan, err)
	}
	if !strings.Contains(ie.Message, "a bug in a progress callback") || !strings.Contains(string(ie.Stack), "planner.Build") {
		t.Errorf("InternalError = %q with stack\n%s\nwant the panic's value and a stack through planner.Build", ie.Message, ie.Stack)
	}
}

func TestCheckFiniteTime(t *testing.T) {
	for _, tc := range []struct {
		name string
		b    Breakdown
		want string // "" for no error
	}{
		{"finite", Breakdown{APWriteS: 100, TravelS: 20}, ""},
		{"infinite travel", Breakdown{APWriteS: 100, TravelS: math.Inf(1)}, "travel and settling (+Inf s; from move_speed_nm_per_s, settle_s)"},
		{"NaN dwells", Breakdown{DwellS: math.NaN()}, "dwells (NaN s; from dwell.bias_v, dwell.current_a, dwell.completion, exposure.vibrational)"},
		{"finite parts, infinite sum", Breakdown{RegistrationS: 1e308, VerificationS: 1.5e308}, "verification images (1.5e+308 s; from drift.verification_s)"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			err := checkFiniteTime(tc.b)
			switch {
			case tc.want == "" && err != nil:
				t.Errorf("checkFiniteTime(%+v) = %v, want nil", tc.b, err)
			case tc.want != "" && (err == nil || !strings.Contains(err.Error(), tc.want)):
				t.Errorf("checkFiniteTime(%+v) = %v, want an error with %q", tc.b, err, tc.want)
			}
		})
	}
}

func TestCheckProbabilities(t *testing.T) {
	for _, p := range []float64{-0.1, 1.5, math.NaN()} {
		err := checkProbabilities([]Window{{Region: "donor", Probability: 0.6}, {Region: "donor-2", Probability: p}})
		if !errors.Is(err, ErrInternal) || !strings.Contains(err.Error(), `"donor-2"`) {
			t.Errorf("checkProbabilities(probability %v) = %v, want an internal error naming donor-2", p, err)
		}
	}
	if err := checkProbabilities([]Window{{Probability: 0}, {Probability: 1}}); err != nil {
		t.Errorf("checkProbabilities(0, 1) = %v, want nil", err)
	}
}

// TestBuildStopsCoverageOnFailure: Build runs the coverage check on its
// own goroutine beside the route (on more than one core); when the plan
// fails on the way (here a panic in the progress callback at the route
// and at the segments), Build stops the check and waits for it. The
// check is held at its start until its context is cancelled, so a Build
// that returned without stopping it leaves it held.
func TestBuildStopsCoverageOnFailure(t *testing.T) {
	defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(2))
	defer func() { coverageStartHook = nil }()
	d := demo(t)
	for _, stage := range []string{"route", "segments"} {
		stopped := make(chan struct{})
		coverageStartHook = func(ctx context.Context) {
			<-ctx.Done()
			close(stopped)
		}
		opt := Options{Seed: 1, MonteCarloRuns: 50, Progress: func(s string, _ float64) {
			if s == stage {
				panic("stop at " + stage)
			}
		}}
		if plan, err := buildVariant(context.Background(), d, "", DefaultProfile(), opt); plan != nil || !errors.Is(err, ErrInternal) {
			t.Fatalf("stage %s: Build = %v, %v; want nil and an internal error", stage, plan, err)
		}
		select {
		case <-stopped:
		default:
			t.Errorf("stage %s: Build returned with its coverage check still running", stage)
		}
	}
}
