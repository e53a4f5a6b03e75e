package app

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"os/signal"
	"sort"
	"strings"
	"syscall"
	"text/tabwriter"
	"time"

	"dimerpath/export"
	"dimerpath/internal/units"
	"dimerpath/lattice/design"
	"dimerpath/planner"
)

func init() {
	Register(&Command{
		Name:    "plan",
		Usage:   "plan DESIGN.json [--variant NAME] [--profile P.json] [--seed N] [--json]",
		Summary: "plan the write of one variant: modes, strokes, drift-safe segments, time and yield",
		Help: `Plans the write of one variant (default: the first) with an instrument
profile (--profile: a profile file, or a preset: rt room temperature, lt 4 K;
default rt). Prints each region's write mode and why, the tip conditions, the
session time (the mean of a Monte Carlo on the printed plan) with its
breakdown and its P10/P50/P90 spread, the process steps (one lithography step
per dopant, each followed by its dose and anneal), the drift-safe segments of
each step with their registration (coarse on a fiducial, or local beside the
work) and the probability that their strokes stay within tolerance, the
coupled pairs, the dopant windows with the chance that every one takes
exactly one donor and how long each stays open before its dose, and the
coverage check.

--json prints one JSON object instead: total_s (the Monte Carlo mean),
breakdown (seconds by kind, summing to total_s), p10_s, p50_s, p90_s,
schedule_s, floor_s, by_hand_s, steps (kind, species, start_s, duration_s,
segments), segments (each with its step, registration and its reason,
strokes, fiducial, start_s, end_s, p_in_tolerance), p_in_tolerance,
couplings, windows (each with species, probability and open_s), yield_all,
yield, modes (region -> mode and reason), coverage, warnings. The full plan (every stroke and action) is
written by "dimerpath export".

A plan that needs a bias, current or speed beyond the profile's limits is
refused (exit status 2). Long plans report progress on stderr; Ctrl-C stops
cleanly.`,
		Flags: func(fs *flag.FlagSet) func(Env, []string) int {
			variant := fs.String("variant", "", "plan the variant `NAME` (default: the first)")
			profile := fs.String("profile", "", "instrument profile `FILE`, or a preset (rt, lt); default rt")
			seed := fs.Int64("seed", 1, "`N` seeds the route and the Monte Carlo spread")
			asJSON := fs.Bool("json", false, "print one JSON object instead of the summary")
			return func(env Env, args []string) int {
				run, code := startPlanning(env, "plan", args, *profile, "dimerpath plan DESIGN.json [--variant NAME] [--profile P.json] [--json]")
				if code != ExitOK {
					return code
				}
				defer run.stop()
				lay, err := run.design.Lay(*variant)
				if err != nil {
					return planError(env, "plan", args[0], err)
				}
				p, err := planner.Build(run.ctx, lay, run.profile, planner.Options{Seed: *seed, Progress: run.progress.report})
				if err != nil {
					return planError(env, "plan", args[0], err)
				}
				run.progress.done()
				if *asJSON {
					if err := export.WritePlanSummary(env.Stdout, p); err != nil {
						fmt.Fprintln(env.Stderr, "dimerpath plan:", err)
						return ExitFailure
					}
					return coverageExit(env, "plan", p)
				}
				printPlan(env.Stdout, p)
				return coverageExit(env, "plan", p)
			}
		},
	})
}

// planning is what plan and compare start from: the design, the profile,
// a context that Ctrl-C cancels, and progress on stderr.
type planning struct {
	design   *design.Design
	profile  planner.Profile
	ctx      context.Context
	stop     context.CancelFunc
	progress *progress
}

// startPlanning checks for one design file argument and loads it and the
// --profile argument; on failure it has printed why (usage names the
// command's synopsis).
func startPlanning(env Env, cmd string, args []string, profile, usage string) (*planning, int) {
	if len(args) != 1 {
		fmt.Fprintf(env.Stderr, "dimerpath %s: want one design file: %s\n", cmd, usage)
		return nil, ExitFailure
	}
	d, err := design.Load(args[0])
	if err != nil {
		fmt.Fprintf(env.Stderr, "dimerpath %s: %v\n", cmd, err)
		return nil, ExitFailure
	}
	prof, err := loadProfileArg(profile)
	if err != nil {
		fmt.Fprintf(env.Stderr, "dimerpath %s: %v\n", cmd, err)
		return nil, ExitFailure
	}
	ctx, stop := interruptible()
	return &planning{design: d, profile: prof, ctx: ctx, stop: stop, progress: newProgress(env.Stderr, cmd)}, ExitOK
}

// interruptible returns a context cancelled by Ctrl-C or SIGTERM.
func interruptible() (context.Context, context.CancelFunc) {
	return signal.NotifyContext(context.Background(), os.Interrupt, syscall.SIGTERM)
}

// planError reports a failed plan or comparison: an interruption, a
// refusal (a *planner.LimitError or the profile's *jsonfile.Error names the value
// and the limit or field), or a design that cannot be laid out.
func planError(env Env, cmd, file string, err error) int {
	if code := internalError(env, cmd, err); code != 0 {
		return code
	}
	if errors.Is(err, context.Canceled) {
		fmt.Fprintf(env.Stderr, "dimerpath %s: interrupted; nothing was written\n", cmd)
	} else {
		fmt.Fprintf(env.Stderr, "dimerpath %s: %s: %v\n", cmd, file, err)
	}
	return ExitFailure
}

// progress prints planning stages on stderr once the work has taken more
// than progressAfter, so quick plans stay quiet.
type progress struct {
	w     io.Writer
	cmd   string
	start time.Time
	last  string
	shown bool
}

const progressAfter = 500 * time.Millisecond

func newProgress(w io.Writer, cmd string) *progress {
	return &progress{w: w, cmd: cmd, start: time.Now()}
}

func (p *progress) report(stage string, fraction float64) {
	if stage == p.last || time.Since(p.start) < progressAfter {
		return
	}
	p.last = stage
	p.shown = true
	fmt.Fprintf(p.w, "dimerpath %s: %3.0f%% %s\n", p.cmd, 100*fraction, stage)
}

func (p *progress) done() {
	if p.shown {
		fmt.Fprintf(p.w, "dimerpath %s: done in %s\n", p.cmd, time.Since(p.start).Round(time.Millisecond))
	}
}

// printSteps lists the process steps on the plan clock.
func printSteps(w io.Writer, p *planner.Plan) {
	if len(p.Steps) == 0 {
		return
	}
	var order []string
	for _, st := range p.Steps {
		if st.Kind == planner.StepLithography && st.Species != "" {
			order = append(order, st.Species)
		}
	}
	fmt.Fprintf(w, "\nProcess steps (%d lithography step(s)%s; an open window takes any precursor, so each species has its own)\n", len(order), func() string {
		if len(order) == 0 {
			return ""
		}
		return ": " + strings.Join(order, ", then ")
	}())
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "  #\tstep\tspecies\tstarts at\ttakes\twhat")
	for i, st := range p.Steps {
		what := st.Note
		if st.Kind == planner.StepLithography {
			what = fmt.Sprintf("%d segment%s; %s", len(st.Segments), map[bool]string{true: "s", false: ""}[len(st.Segments) != 1], st.Note)
		}
		fmt.Fprintf(tw, "  %d\t%s\t%s\t%s\t%s\t%s\n", i+1, st.Kind, st.Species, units.Duration(st.StartS), units.Duration(st.DurationS), what)
	}
	tw.Flush()
}

// maxReasons is how many reasons for the kinds of registration the
// summary lists; the plan file gives each segment's.
const maxReasons = 12

// printRegistrationReasons says why the segments register as they do:
// each kind of registration with its reason and the segments (by their
// number on the printed plan) it is given for.
func printRegistrationReasons(w io.Writer, p *planner.Plan) {
	rs := p.RegistrationReasons()
	if len(rs) == 0 {
		return
	}
	fmt.Fprintln(w, "  why each segment registers as it does:")
	for i, r := range rs {
		if i == maxReasons {
			fmt.Fprintf(w, "    ... %d more reasons (each segment's is in the plan file: dimerpath export -o PLAN.json)\n", len(rs)-maxReasons)
			break
		}
		nums := make([]int, len(r.Segments))
		for k, g := range r.Segments {
			nums[k] = g + 1
		}
		what := "segment"
		if len(nums) > 1 {
			what = "segments"
		}
		fmt.Fprintf(w, "    %s, %s %s: %s\n", r.Kind, what, units.Ranges(nums, 8), r.Reason)
	}
}

// printSegments lists each lithography step's segments: the kind of
// registration and where, when the segment starts, how long it takes, its
// tightest stroke (the one whose displacement at the planned drift,
// creep and registration error uses the largest share of its tolerance)
// with the budget that stroke leaves, and the sampled probability that
// every stroke of the segment stays within its tolerance.
func printSegments(w io.Writer, p *planner.Plan) {
	segs := "segments"
	if len(p.Segments) == 1 {
		segs = "segment"
	}
	fmt.Fprintf(w, "\nSegments: %d strokes in %d drift-safe %s (each starts with a registration: coarse on a fiducial, or local on the lattice and written features)\n", len(p.Strokes), len(p.Segments), segs)
	listed := 0
	for si, st := range p.Steps {
		if st.Kind != planner.StepLithography || len(st.Segments) == 0 {
			continue
		}
		fmt.Fprintf(w, "  step %d, lithography %s:\n", si+1, st.Species)
		tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
		fmt.Fprintln(tw, "    #\tregistration\tat\tstarts at\ttakes\ttightest stroke (budget)\tP(within)\tstrokes")
		for _, gi := range st.Segments {
			if listed == maxListed {
				fmt.Fprintf(tw, "    ... %d more\n", len(p.Segments)-maxListed)
				listed++
				break
			}
			if listed > maxListed {
				break
			}
			listed++
			g := p.Segments[gi]
			at := g.Fiducial
			if at == "" {
				at = fmt.Sprintf("(%.1f, %.1f)", g.FiducialAt.X, g.FiducialAt.Y)
			}
			tight := ""
			if g.Tightest >= 0 && g.Tightest < len(p.Strokes) {
				s := p.Strokes[g.Tightest]
				budget := "no drift limit"
				if g.BudgetS > 0 {
					budget = units.Duration(g.BudgetS)
				}
				tight = fmt.Sprintf("%s ±%.3g nm (%s)", s.Region, s.ToleranceNM, budget)
			}
			fmt.Fprintf(tw, "    %d\t%s\t%s\t%s\t%s\t%s\t%.3f\t%d\n", g.Index+1, g.Registration, at, units.Duration(g.StartS), units.Duration(g.EndS-g.StartS), tight, g.PInTolerance, len(g.Strokes))
		}
		tw.Flush()
	}
	printRegistrationReasons(w, p)
	d := p.Drift
	fmt.Fprintf(w, "  P(every stroke and coupled pair within tolerance) = %.3f, sampled on this plan; segments planned for %.3g nm/min of drift, %.3g of creep and registration errors at %.2f σ, margin ×%.2f",
		p.PInTolerance, d.RateNMPerMin, d.CreepFraction, d.ErrorZ, d.Margin)
	if d.Compensated {
		fmt.Fprint(w, ", feed-forward drift compensation")
	}
	fmt.Fprintln(w)
	if len(p.Couplings) > 0 {
		fmt.Fprintln(w, "  coupled pairs (relative tolerance):")
		tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
		for _, c := range p.Couplings {
			how := "one drift window"
			if !c.SameStep {
				how = "later step registers locally on the earlier"
			}
			fmt.Fprintf(tw, "    %s\t%s / %s\t±%.3g nm\t%s\tP(within) %.3f\n", c.Kind, c.A, c.B, c.ToleranceNM, how, c.PInTolerance)
		}
		tw.Flush()
	}
}

// maxListed bounds the segments and windows listed in the summary.
const maxListed = 12

// printPlan writes the readable summary.
func printPlan(w io.Writer, p *planner.Plan) {
	fmt.Fprintf(w, "%s, variant %s: plan with profile %q (seed %d)\n", p.Design, p.Variant, p.Profile, p.Seed)
	fmt.Fprintln(w, planner.Caution)

	fmt.Fprintln(w, "\nWrite modes")
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintln(tw, "  region\tsites\tdrawn\tplanned\twhy")
	for _, m := range p.Modes {
		fmt.Fprintf(tw, "  %s\t%d\t%s\t%s\t%s\n", m.Region, m.Sites, m.Requested.Abbrev(), m.Mode.Abbrev(), m.Reason)
	}
	tw.Flush()

	fmt.Fprintln(w, "\nTip conditions")
	tw = tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	for _, c := range p.Conditions {
		switch c.Kind {
		case planner.StrokeDwell:
			fmt.Fprintf(tw, "  %s dwell\t%+.2f V\t%.3g nA\texpected %s per site, stop at %s\n", c.Mode.Abbrev(), c.BiasV, c.CurrentA*1e9, units.Duration(c.DwellS), units.Duration(c.DwellCapS))
		default:
			name := c.Mode.Abbrev() + " " + string(c.Kind)
			extra := ""
			if c.Mode == design.ModeFE {
				extra = fmt.Sprintf(", pitch %.2f nm", c.PitchNM)
			}
			fmt.Fprintf(tw, "  %s\t%+.2f V\t%.3g nA\t%.3g mC/cm, %.4g nm/s, line %.2f nm, %d pass(es)%s\n",
				name, c.BiasV, c.CurrentA*1e9, c.LineDoseCPerCm*1e3, c.SpeedNMPerS, c.LineWidthNM, c.Passes, extra)
		}
	}
	tw.Flush()

	fmt.Fprintf(w, "\nSession time: %s mean of the Monte Carlo on this plan (P10 %s, P50 %s, P90 %s); the printed schedule %s\n",
		units.Duration(p.TotalS), units.Duration(p.P10S), units.Duration(p.P50S), units.Duration(p.P90S), units.Duration(p.ScheduleS))
	tw = tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	b := p.Breakdown
	registrations := 0
	for _, a := range p.Actions {
		if a.Kind == planner.ActRegister {
			registrations++
		}
	}
	for _, k := range planner.TimeKinds {
		s := b.Seconds(k)
		share := 0.0
		if p.TotalS > 0 {
			share = 100 * s / p.TotalS
		}
		note := ""
		if k == planner.TimeRegistration && registrations > 0 && s > 0 {
			note = fmt.Sprintf("  %d registrations, and finding the area again after each anneal", registrations)
		}
		if k == planner.TimeTipChange && s > 0 {
			note = "  mean over the samples: tip failures come at random"
		}
		fmt.Fprintf(tw, "  %s\t%s\t%.1f %%\t%s\n", k, units.Duration(s), share, note)
	}
	tw.Flush()
	if p.FloorS > 0 {
		fmt.Fprintf(w, "  writing alone (physical floor) %s: session = %.2f x floor\n", units.Duration(p.FloorS), p.TotalS/p.FloorS)
	}
	if p.ByHandS > 0 {
		fmt.Fprintf(w, "  by hand (file order, raster rows, fixed-interval registration) %s: plan = %.2f x by hand\n", units.Duration(p.ByHandS), p.TotalS/p.ByHandS)
	}

	printSteps(w, p)
	printSegments(w, p)

	y := p.Yield
	fmt.Fprintf(w, "\nDopant windows: %d", y.Windows)
	if y.Windows > 0 {
		count := map[string]int{}
		for _, win := range p.Windows {
			count[win.Species]++
		}
		var parts []string
		for _, sp := range sortedKeys(count) {
			parts = append(parts, fmt.Sprintf("%s %d", sp, count[sp]))
		}
		fmt.Fprintf(w, " (%s)\n", strings.Join(parts, ", "))
		all := units.Probability(y.All, y.Log10All)
		devices := fmt.Sprintf("%.3g", y.DevicesPerPerfect)
		if y.DevicesPerPerfect == 0 {
			devices = "more than can be written"
		}
		fmt.Fprintf(w, "  P(every window opened as drawn with exactly one donor) = %s (68 %%: %s, 95 %%: %s, from the templates' uncertainties)\n",
			all, units.ProbabilityRange(y.All68, y.Log10All68), units.ProbabilityRange(y.All95, y.Log10All95))
		fmt.Fprintf(w, "  good windows %.2f ± %.2f of %d; expected %.3g without a donor, %.3g with two or more, %.3g not opened as drawn; devices per perfect device %s\n",
			y.MeanGood, y.SDGood, y.Windows, y.ExpectedEmpty, y.ExpectedMultiple, y.ExpectedMisopened, devices)
		tw = tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
		fmt.Fprintln(tw, "  region\tspecies\tat (nm)\topened as drawn\tp0\tp1\tp≥2\tP(good)\topen before its dose")
		for i, win := range p.Windows {
			if i == maxListed {
				fmt.Fprintf(tw, "  ... %d more\n", len(p.Windows)-maxListed)
				break
			}
			p1 := fmt.Sprintf("%.3g", win.P1)
			if win.P1SD > 0 {
				p1 += fmt.Sprintf(" ± %.2g", win.P1SD)
			}
			fmt.Fprintf(tw, "  %s\t%s\t(%.2f, %.2f)\t%.3g\t%.3g\t%s\t%.3g\t%.3g\t%s\n", win.Region, win.Species, win.At.X, win.At.Y,
				win.OpenProbability, win.P0, p1, win.P2Plus, win.Probability, units.Duration(win.OpenS))
		}
		tw.Flush()
	} else {
		fmt.Fprintln(w)
	}

	c := p.Coverage
	if c.OK {
		fmt.Fprintf(w, "\nCoverage: OK, no site outside the regions clears with more than %.3g %% (exposure model)\n", 100*c.StrayLimit)
	} else {
		fmt.Fprintf(w, "\nCoverage: NOT OK, %d site(s) outside every region clear with more than %.3g %%\n", c.OverLimit, 100*c.StrayLimit)
		for _, is := range c.Issues {
			fmt.Fprintln(w, "  "+is)
		}
	}
	fmt.Fprintf(w, "  expected: %s of %d sites left with their H, %s stray sites cleared outside the regions\n", expected(c.ExpectedMissed), c.Sites, expected(c.ExpectedStray))
	tw = tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintln(tw, "  region\tsites\tmissed\tstray\tof them spurious\tP(no error)\t")
	for _, r := range c.Regions {
		fmt.Fprintf(tw, "  %s\t%d\t%s\t%s\t%s\t%s\t\n", r.Region, r.Sites, expected(r.ExpectedMissed), expected(r.ExpectedStray),
			expected(r.ExpectedSpurious), units.Probability(r.Probability, r.Log10Probability))
	}
	tw.Flush()
	if len(p.Warnings) > 0 {
		fmt.Fprintln(w, "\nWarnings")
		for _, warn := range p.Warnings {
			fmt.Fprintln(w, "  "+warn)
		}
	}
}

func sortedKeys(m map[string]int) []string {
	ks := make([]string, 0, len(m))
	for k := range m {
		ks = append(ks, k)
	}
	sort.Strings(ks)
	return ks
}

// expected formats an expected number of sites: whole numbers from 1000
// up ("59224"), three significant digits below ("3.55", "0.0288"), small
// ones with the typographic minus ("3.1e−07").
func expected(x float64) string {
	switch {
	case x >= 1000:
		return fmt.Sprintf("%.0f", x)
	case x != 0 && x < 0.001:
		return strings.Replace(fmt.Sprintf("%.2g", x), "-", "−", 1)
	}
	return fmt.Sprintf("%.3g", x)
}
