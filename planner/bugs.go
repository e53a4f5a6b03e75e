package planner

import (
	"errors"
	"fmt"
	"runtime/debug"
	"strings"
)

// ErrInternal is wrapped by every *InternalError: the planner broke one
// of its own invariants, which is a bug in dimerpath, not a problem with
// the design or the profile.
var ErrInternal = errors.New("internal error in the planner (a bug in dimerpath)")

// InternalError is a broken invariant of the planning path, or a panic
// that Build recovered. Build returns it instead of panicking, so a bug
// in planning never takes the caller (the GUI with unsaved work, a
// command) down with it; callers tell it from bad input with
// errors.Is(err, ErrInternal).
type InternalError struct {
	// Message says which invariant broke, or what the panic carried.
	Message string
	// Stack is the goroutine's stack where a panic was recovered (for a
	// bug report); nil for an invariant the planner checked itself.
	Stack []byte
}

func (e *InternalError) Error() string {
	return "planner: " + e.Message + " (" + ErrInternal.Error() + ")"
}

func (e *InternalError) Unwrap() error { return ErrInternal }

// recoverInternal, deferred at an entry point of the planning path, turns
// a panic into an *InternalError in *err (and clears *plan). Nothing on
// that path starts goroutines, so every panic of Build arrives here.
func recoverInternal(plan **Plan, err *error) {
	r := recover()
	if r == nil {
		return
	}
	*plan = nil
	*err = &InternalError{Message: fmt.Sprintf("panic: %v", r), Stack: debug.Stack()}
}

// timeSources names, for each kind of time, the profile fields it comes
// from, for errors about a time that overflows.
var timeSources = map[TimeKind][]string{
	TimeAPWrite:      {"ap.current_a", "ap.line_dose_c_per_cm", "ap.passes"},
	TimeFEWrite:      {"fe.current_a", "fe.line_dose_c_per_cm", "fe.passes"},
	TimeDwell:        {"dwell.bias_v", "dwell.current_a", "dwell.completion", "exposure.vibrational"},
	TimeTravel:       {"move_speed_nm_per_s", "settle_s"},
	TimeModeSwitch:   {"mode_switch_s"},
	TimeRegistration: {"drift.registration_s"},
	TimeVerification: {"drift.verification_s"},
}

// checkFiniteTime returns an error naming the profile fields behind the
// part of the timeline whose time is not a finite number of seconds (or,
// when the parts are finite but their sum is not, the largest part): the
// profile asks for times no float64 holds, and every figure of the plan
// would be Inf or NaN.
func checkFiniteTime(b Breakdown) error {
	if finite(b.Total()) {
		return nil
	}
	var bad []string
	for _, k := range TimeKinds {
		if s := b.Seconds(k); !finite(s) {
			bad = append(bad, fmt.Sprintf("%s (%v s; from %s)", k, s, strings.Join(timeSources[k], ", ")))
		}
	}
	if len(bad) == 0 {
		largest := TimeKinds[0]
		for _, k := range TimeKinds[1:] {
			if b.Seconds(k) > b.Seconds(largest) {
				largest = k
			}
		}
		bad = append(bad, fmt.Sprintf("%s (%.3g s; from %s)", largest, b.Seconds(largest), strings.Join(timeSources[largest], ", ")))
	}
	return fmt.Errorf("planner: the write time is not a finite number of seconds: %s; the profile's values there are beyond any instrument", strings.Join(bad, "; "))
}

// checkProbabilities returns an *InternalError for a window probability
// outside [0, 1]: the templates and the dwell model give probabilities,
// so one outside is a bug (and PoissonBinomial would panic on it).
func checkProbabilities(windows []Window) error {
	for _, w := range windows {
		if !(w.Probability >= 0 && w.Probability <= 1) {
			return &InternalError{Message: fmt.Sprintf("window of region %q at (%.1f, %.1f) nm has probability %v, outside [0, 1]", w.Region, w.At.X, w.At.Y, w.Probability)}
		}
	}
	return nil
}
