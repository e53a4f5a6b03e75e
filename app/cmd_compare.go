package app

import (
	"flag"
	"fmt"
	"io"
	"strings"
	"text/tabwriter"

	"dimerpath/export"
	"dimerpath/internal/units"
	"dimerpath/planner"
)

func init() {
	Register(&Command{
		Name:    "compare",
		Usage:   "compare DESIGN.json [--profile P.json] [--seed N] [-o REPORT.pdf|.svg] [--paper a4|letter] [--date YYYY-MM-DD]",
		Summary: "plan every variant of a design and compare write time, breakdown and yield",
		Help: `Plans every variant of the design with the same instrument profile and seed,
and prints one table row per variant: the session time (the mean of the
Monte Carlo on its plan) with its P10-P90 spread, its lithography steps, the
number of segments, the probability that every stroke stays within its
tolerance and that every dopant window takes exactly one donor (with its 68 %
and 95 % intervals from the window templates' uncertainties), and the
coverage check; then the time by kind (writing, travel, registrations,
survey, conditioning, tip changes, doses, anneals, ...) and what differs
from the first variant (tunnel gap widths, regions, window counts). A variant that
cannot be planned (for example one needing values beyond the profile's
limits) gets its reason in place of a row; the exit status is then 2.

With -o REPORT.pdf or REPORT.svg it also writes the comparison report: a
table of every variant, what differs from the first and, side by side on shared axes, the time
breakdowns, the P10-P90 spreads and the yields (--paper and --date set the
PDF's page size and printed date). The report is written to a temporary
file and renamed into place, also when some variant could not be planned
(it lists the reason).`,
		Flags: func(fs *flag.FlagSet) func(Env, []string) int {
			profile := fs.String("profile", "", "instrument profile `FILE`, or a preset (rt, lt); default rt")
			seed := fs.Int64("seed", 1, "`N` seeds the routes and the Monte Carlo spread")
			var rep reportFlags
			rep.declare(fs, "also write the report to `FILE` (.pdf or .svg)")
			return func(env Env, args []string) int {
				// A bad report name is refused before anything is read.
				opt, ok := rep.reportOptions(env, "compare")
				if !ok {
					return ExitFailure
				}
				run, code := startPlanning(env, "compare", args, *profile, "dimerpath compare DESIGN.json [--profile P.json] [-o REPORT.pdf|.svg]")
				if code != ExitOK {
					return code
				}
				defer run.stop()
				ctx := run.ctx
				results, err := planner.Compare(ctx, run.design, run.profile, planner.Options{Seed: *seed, Progress: run.progress.report})
				if err != nil {
					return planError(env, "compare", args[0], err)
				}
				run.progress.done()
				fmt.Fprintf(env.Stdout, "%s: %d variants with profile %q (seed %d)\n", run.design.Name, len(results), run.profile.Name, *seed)
				fmt.Fprintln(env.Stdout, planner.Caution)
				fmt.Fprintln(env.Stdout)
				printComparison(env.Stdout, results)
				if !rep.writeReport(env, "compare", func(path string) error {
					return export.WriteComparisonFile(ctx, path, results, opt)
				}) {
					return ExitFailure
				}
				failed := false
				for _, r := range results {
					if r.Err != nil {
						failed = true
						fmt.Fprintf(env.Stderr, "dimerpath compare: variant %q: %v\n", r.Variant, r.Err)
					}
				}
				if failed {
					return ExitFailure
				}
				return ExitOK
			}
		},
	})
}

// printComparison writes the comparison table: per variant the session
// time (Monte Carlo mean) with its spread, the lithography steps, the
// segments, the probability that every stroke stays within its tolerance
// and that every window is good, and the coverage check; then the time by
// kind, in seconds, for the kinds any variant has; then how each variant
// differs from the first, so two rows that look alike still tell what
// changed.
func printComparison(w io.Writer, results []planner.VariantResult) {
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintln(tw, "variant\tsession (mean)\tP10\tP90\tlithography steps\tsegments\tP(within tolerance)\tP(all windows good)\t68 % interval\t95 % interval\tcoverage\t")
	for _, r := range results {
		if r.Err != nil {
			fmt.Fprintf(tw, "%s\tnot planned\t\t\t\t\t\t\t\t\t\t\n", r.Variant)
			continue
		}
		p := r.Plan
		y := p.Yield
		// The point value is exact (Poisson-binomial); the intervals come
		// from sampling the templates' probabilities in their
		// uncertainties. A variant without windows has nothing to sample.
		all, i68, i95 := units.Probability(y.All, y.Log10All), "—", "—"
		if y.Windows > 0 {
			i68, i95 = units.ProbabilityRange(y.All68, y.Log10All68), units.ProbabilityRange(y.All95, y.Log10All95)
		}
		// Times to the second (h:mm:ss): two variants a few seconds apart
		// read alike in whole minutes.
		fmt.Fprintf(tw, "%s\t%s\t%s\t%s\t%s\t%d\t%.3f\t%s\t%s\t%s\t%s\t\n", r.Variant, units.Clock(p.TotalS), units.Clock(p.P10S), units.Clock(p.P90S),
			lithographySteps(p), len(p.Segments), p.PInTolerance, all, i68, i95, coverageWord(p))
	}
	tw.Flush()
	fmt.Fprintln(w, "P(all windows good): every window opened as drawn with exactly one donor; its intervals from the window templates' uncertainties")
	var kinds []planner.TimeKind
	for _, k := range planner.TimeKinds {
		for _, r := range results {
			if r.Err == nil && r.Plan.Breakdown.Seconds(k) > 0 {
				kinds = append(kinds, k)
				break
			}
		}
	}
	if len(kinds) > 0 {
		fmt.Fprintln(w, "\ntime by kind, s (means over the Monte Carlo samples)")
		tw = tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
		fmt.Fprint(tw, "variant\t")
		for _, k := range kinds {
			fmt.Fprintf(tw, "%s\t", k.Short())
		}
		fmt.Fprintln(tw)
		for _, r := range results {
			if r.Err != nil {
				continue
			}
			fmt.Fprintf(tw, "%s\t", r.Variant)
			for _, k := range kinds {
				fmt.Fprintf(tw, "%.0f\t", r.Plan.Breakdown.Seconds(k))
			}
			fmt.Fprintln(tw)
		}
		tw.Flush()
	}
	if len(results) < 2 {
		return
	}
	fmt.Fprintf(w, "\nWhat differs from %s:\n", results[0].Variant)
	for _, r := range results[1:] {
		switch {
		case !r.Compared:
			fmt.Fprintf(w, "  %s: not compared (it could not be laid out)\n", r.Variant)
		case len(r.Differences) == 0:
			fmt.Fprintf(w, "  %s: the same layout\n", r.Variant)
		default:
			fmt.Fprintf(w, "  %s:\n", r.Variant)
			for _, d := range r.Differences {
				fmt.Fprintf(w, "    %s\n", d)
			}
		}
	}
}

// coverageWord is the result of a plan's coverage check in a word.
func coverageWord(p *planner.Plan) string {
	if p.Coverage.OK {
		return "passed"
	}
	return "FAILED"
}

// lithographySteps names a plan's lithography steps in order: "As, P".
func lithographySteps(p *planner.Plan) string {
	var sp []string
	for _, st := range p.Steps {
		if st.Kind == planner.StepLithography {
			name := st.Species
			if name == "" {
				name = "no dopant"
			}
			sp = append(sp, name)
		}
	}
	if len(sp) == 0 {
		return "–"
	}
	return strings.Join(sp, ", ")
}
