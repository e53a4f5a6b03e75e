package planner

import (
	"context"
	"errors"
	"fmt"
	"reflect"
	"runtime"
	"runtime/debug"
	"strconv"
	"strings"
	"sync"

	"dimerpath/internal/jsonfile"
	"dimerpath/lattice/design"
)

// A sweep plans one variant once for each value of one parameter, to
// show how the write time and the dopant yield grow with it: a number of
// the instrument profile (drift rate, tolerance, registration time,
// current, ...) or the size of one array of the design. Every value is
// planned with the same seed, so the differences between the points come
// from the parameter and not from the random draws (common random
// numbers).

// ArrayParamPrefix starts the name of an array-size parameter:
// "array:donors" is the size of region donors' first array,
// "array:donors#2" its second.
const ArrayParamPrefix = "array:"

// SweepParameter is one parameter a sweep can vary.
type SweepParameter struct {
	// Name is how the parameter is given: a profile field's JSON path
	// ("drift.rate_nm_per_min"), or ArrayParamPrefix and an array's name.
	Name string
	// Unit is the unit of the values as given ("nm/min", "A"); for an
	// array, the values are sizes COLSxROWS and the unit is "".
	Unit string
	// Current is the value the profile or the design holds now.
	Current string
	// Whole says the parameter takes whole numbers only (passes).
	Whole bool
	// Array is the array whose size the parameter is, or nil for a
	// profile parameter.
	Array *design.ArrayRef
}

// Axis returns the label of the parameter's axis on a chart, in the
// display unit (see DisplayValue): "drift.rate_nm_per_min (nm/min)",
// "ap.current_a (nA)", "windows in array donors".
func (p SweepParameter) Axis() string {
	if p.Array != nil {
		what := "copies"
		if p.Array.Of == design.ShapeWindow {
			what = "windows"
		}
		return what + " in array " + p.Array.Name()
	}
	if u, _ := displayUnit(p.Unit); u != "" {
		return p.Name + " (" + u + ")"
	}
	return p.Name
}

// DisplayValue returns x, a value of the parameter in its own unit, in
// the unit its axis shows: currents in nA, line doses in mC/cm, the rest
// as they are.
func (p SweepParameter) DisplayValue(x float64) float64 {
	_, scale := displayUnit(p.Unit)
	return x * scale
}

// displayUnit returns the unit a value of unit u is shown in and the
// factor to it: the units the command line and the PDF print.
func displayUnit(u string) (string, float64) {
	switch u {
	case "A":
		return "nA", 1e9
	case "C/cm":
		return "mC/cm", 1e3
	}
	return u, 1
}

// SweepParameters lists the parameters a sweep of the named variant
// (empty: the first) can vary: every number of the profile (its limits
// aside) and the size of every array of the variant.
func SweepParameters(d *design.Design, variant string, prof Profile) []SweepParameter {
	var out []SweepParameter
	for _, f := range profileFields() {
		out = append(out, SweepParameter{Name: f.path, Unit: unitOf(f.path), Current: formatSweepNumber(f.get(&prof)), Whole: f.kind == reflect.Int})
	}
	if d != nil {
		arrays, _ := d.Arrays(variant)
		for i := range arrays {
			a := arrays[i]
			out = append(out, SweepParameter{Name: ArrayParamPrefix + a.Name(), Current: fmt.Sprintf("%dx%d", a.Cols, a.Rows), Array: &a})
		}
	}
	return out
}

// SweepPoint is one value of a sweep and what planning with it gave.
type SweepPoint struct {
	// Value is the value as it was planned ("0.2", "1000x500").
	Value string
	// X is its place on the parameter's axis, in the parameter's own
	// unit: the value, or the copies in the array (cols x rows).
	X float64
	// Plan is the plan with that value, or nil when Err says why not.
	Plan *Plan
	Err  error
}

// Sweep is the outcome of PlanSweep: one point per value, in the order
// the values were given.
type Sweep struct {
	Design  string
	Variant string
	Profile string
	Seed    int64
	Param   SweepParameter
	Points  []SweepPoint
	// Warnings are findings about the sweep as a whole (a parameter the
	// design overrides, every value giving the same plan).
	Warnings []string
}

// SweepOptions control PlanSweep.
type SweepOptions struct {
	// Options are passed to every plan. Progress, when set, sees the
	// fraction of the whole sweep done, with the value and the stage
	// ("drift.rate_nm_per_min = 0.2: route"); it is called from one
	// goroutine at a time.
	Options
	// Workers is how many values are planned at once; 0 takes
	// runtime.GOMAXPROCS(0): every core.
	Workers int
}

// ErrSweep is wrapped by every *SweepError.
var ErrSweep = errors.New("sweep refused")

// SweepError is a sweep refused before anything was planned: an unknown
// parameter, or values the profile's checks or limits, or the lattice's
// limits, refuse. Problems lists every bad value.
type SweepError struct {
	Param    string
	Problems []string
}

func (e *SweepError) Error() string {
	if len(e.Problems) == 1 {
		return fmt.Sprintf("sweep of %s: %s (%s: nothing planned)", e.Param, e.Problems[0], ErrSweep)
	}
	return fmt.Sprintf("sweep of %s: %d values refused (%s: nothing planned):\n  %s", e.Param, len(e.Problems), ErrSweep, strings.Join(e.Problems, "\n  "))
}

func (e *SweepError) Unwrap() error { return ErrSweep }

// MaxSweepValues bounds the values of one sweep.
const MaxSweepValues = 100

// sweepJob is one value ready to plan: a profile, and a design when the
// value changes the design.
type sweepJob struct {
	value  string
	x      float64
	prof   Profile
	design *design.Design // nil: the shared layout
}

// prepareSweep checks the parameter and every value and returns one job
// per value, or a *SweepError listing every refusal (or the error of an
// invalid profile or a variant that does not exist).
func prepareSweep(d *design.Design, variant string, prof Profile, param string, values []string) (SweepParameter, []sweepJob, error) {
	if err := prof.Validate(); err != nil {
		return SweepParameter{}, nil, err
	}
	if _, err := d.Variant(variant); err != nil {
		return SweepParameter{}, nil, err
	}
	if err := prof.checkField(d.Field.WidthNM, d.Field.HeightNM); err != nil {
		return SweepParameter{}, nil, err
	}
	refuse := func(problems ...string) error { return &SweepError{Param: param, Problems: problems} }
	params := SweepParameters(d, variant, prof)
	var sp *SweepParameter
	for i := range params {
		if params[i].Name == param {
			sp = &params[i]
		}
	}
	if sp == nil {
		names := make([]string, len(params))
		for i, p := range params {
			names[i] = p.Name
		}
		return SweepParameter{}, nil, refuse(fmt.Sprintf("no parameter %q; the parameters are: %s", param, strings.Join(names, ", ")))
	}
	if len(values) == 0 {
		return *sp, nil, refuse("no values given")
	}
	if len(values) > MaxSweepValues {
		return *sp, nil, refuse(fmt.Sprintf("%d values, more than the limit of %d", len(values), MaxSweepValues))
	}
	var problems []string
	jobs := make([]sweepJob, 0, len(values))
	for _, v := range values {
		v = strings.TrimSpace(v)
		job, bad := sweepValue(d, variant, prof, *sp, v)
		if len(bad) > 0 {
			problems = append(problems, bad...)
			continue
		}
		jobs = append(jobs, job)
	}
	if len(problems) > 0 {
		return *sp, nil, refuse(problems...)
	}
	return *sp, jobs, nil
}

// sweepValue turns one value into a job, or says what is wrong with it.
func sweepValue(d *design.Design, variant string, prof Profile, sp SweepParameter, v string) (sweepJob, []string) {
	if sp.Array != nil {
		cols, rows, err := design.ParseArraySize(v)
		if err != nil {
			return sweepJob{}, []string{fmt.Sprintf("%s = %q: %v", sp.Name, v, err)}
		}
		nd, err := d.WithArraySize(variant, *sp.Array, cols, rows)
		if err != nil {
			return sweepJob{}, []string{err.Error()}
		}
		return sweepJob{value: fmt.Sprintf("%dx%d", cols, rows), x: float64(cols) * float64(rows), prof: prof, design: nd}, nil
	}
	f, _ := findProfileField(sp.Name)
	x, err := strconv.ParseFloat(v, 64)
	if err != nil {
		return sweepJob{}, []string{fmt.Sprintf("%s = %q: not a number", sp.Name, v)}
	}
	p := prof
	if err := f.set(&p, x); err != nil {
		return sweepJob{}, []string{err.Error()}
	}
	var bad []string
	if err := p.Validate(); err != nil {
		var je *jsonfile.Error
		if errors.As(err, &je) {
			for _, pr := range je.Problems {
				if pr.Path == sp.Name {
					bad = append(bad, pr.String()) // names the field and the value itself
				} else {
					bad = append(bad, fmt.Sprintf("%s = %s: %s", sp.Name, v, pr.String()))
				}
			}
		} else {
			bad = append(bad, fmt.Sprintf("%s = %s: %v", sp.Name, v, err))
		}
		return sweepJob{}, bad
	}
	// Every mode's limits, used by the design or not: a value beyond the
	// instrument is refused whatever the design needs of it.
	if err := p.CheckLimits(nil); err != nil {
		return sweepJob{}, []string{fmt.Sprintf("%s = %s: %v", sp.Name, v, err)}
	}
	return sweepJob{value: formatSweepNumber(x), x: x, prof: p}, nil
}

// CheckSweep checks a sweep as PlanSweep would, without planning: it
// returns the parameter, or a *SweepError listing every refusal.
func CheckSweep(d *design.Design, variant string, prof Profile, param string, values []string) (SweepParameter, error) {
	sp, _, err := prepareSweep(d, variant, prof, param, values)
	return sp, err
}

// PlanSweep plans the named variant of d (empty: the first) once for
// each value of the parameter param (see SweepParameters) and returns
// one point per value. It checks every value first and plans nothing
// when one is refused (a *SweepError: an unknown parameter, listing the
// ones there are; a value the profile's checks or its limits refuse,
// named with the limit; an array size beyond the design's or the
// lattice's limits). The values are planned opt.Workers at a time (every
// core by default), each with opt's seed; a profile parameter shares
// one layout of the variant between its plans. A value that cannot be
// planned carries its error and the others are still planned; PlanSweep
// itself fails when ctx is cancelled.
func PlanSweep(ctx context.Context, d *design.Design, variant string, prof Profile, param string, values []string, opt SweepOptions) (*Sweep, error) {
	sp, jobs, err := prepareSweep(d, variant, prof, param, values)
	if err != nil {
		return nil, err
	}
	v, _ := d.Variant(variant)
	sw := &Sweep{Design: d.Name, Variant: v.Name, Profile: prof.Name, Seed: opt.Seed, Param: sp, Points: make([]SweepPoint, len(jobs))}
	var shared *design.Layout
	if sp.Array == nil {
		if shared, err = d.Lay(variant); err != nil {
			return nil, err
		}
	}
	workers := opt.Workers
	if workers <= 0 {
		workers = runtime.GOMAXPROCS(0)
	}
	workers = min(workers, len(jobs))

	var mu sync.Mutex
	done := make([]float64, len(jobs))
	report := func(i int, stage string, f float64) {
		if opt.Progress == nil {
			return
		}
		mu.Lock()
		defer mu.Unlock()
		done[i] = f
		sum := 0.0
		for _, x := range done {
			sum += x
		}
		opt.Progress(fmt.Sprintf("%s = %s: %s", sp.Name, jobs[i].value, stage), sum/float64(len(jobs)))
	}
	next := make(chan int)
	var wg sync.WaitGroup
	for w := 0; w < workers; w++ {
		wg.Add(1)
		go func() {
			defer wg.Done()
			for i := range next {
				sw.Points[i] = planSweepJob(ctx, jobs[i], variant, shared, opt.Options, func(stage string, f float64) { report(i, stage, f) })
			}
		}()
	}
feed:
	for i := range jobs {
		select {
		case next <- i:
		case <-ctx.Done():
			break feed
		}
	}
	close(next)
	wg.Wait()
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	sw.Warnings = sweepWarnings(d, sp, sw.Points)
	return sw, nil
}

// planSweepJob lays out (for an array size) and plans one value. A panic
// on the way comes back as an *InternalError: it runs in a goroutine of
// its own, where nothing else would recover it.
func planSweepJob(ctx context.Context, job sweepJob, variant string, shared *design.Layout, opt Options, progress func(string, float64)) (pt SweepPoint) {
	pt = SweepPoint{Value: job.value, X: job.x}
	defer func() {
		if r := recover(); r != nil {
			pt.Plan, pt.Err = nil, &InternalError{Message: fmt.Sprintf("panic: %v", r), Stack: debug.Stack()}
		}
	}()
	lay := shared
	if job.design != nil {
		var err error
		if lay, err = job.design.Lay(variant); err != nil {
			pt.Err = err
			return pt
		}
	}
	opt.Progress = progress
	pt.Plan, pt.Err = Build(ctx, lay, job.prof, opt)
	return pt
}

// sweepWarnings says when the sweep cannot show what it was asked: a
// tolerance the design's rules override, or every value giving the same
// plan.
func sweepWarnings(d *design.Design, sp SweepParameter, pts []SweepPoint) []string {
	var out []string
	if r := d.Rules; r != nil {
		if sp.Name == "tolerance_ap_nm" && r.APToleranceNM != nil {
			out = append(out, fmt.Sprintf("the design's rules.ap_tolerance_nm (%g nm) replaces the profile's tolerance_ap_nm for every region that gives none", *r.APToleranceNM))
		}
		if sp.Name == "tolerance_fe_nm" && r.FEToleranceNM != nil {
			out = append(out, fmt.Sprintf("the design's rules.fe_tolerance_nm (%g nm) replaces the profile's tolerance_fe_nm for every region that gives none", *r.FEToleranceNM))
		}
	}
	var first *Plan
	same, planned := true, 0
	for _, p := range pts {
		if p.Plan == nil {
			continue
		}
		planned++
		if first == nil {
			first = p.Plan
			continue
		}
		if p.Plan.TotalS != first.TotalS || p.Plan.P10S != first.P10S || p.Plan.P90S != first.P90S || p.Plan.Yield.All != first.Yield.All {
			same = false
		}
	}
	if planned > 1 && same {
		out = append(out, fmt.Sprintf("every value of %s gives the same write time and yield: this design's plan does not depend on it", sp.Name))
	}
	return out
}
