package app

import (
	"errors"
	"flag"
	"fmt"
	"io"
	"strings"
	"text/tabwriter"

	"dimerpath/export"
	"dimerpath/lattice/design"
	"dimerpath/planner"
)

func init() {
	Register(&Command{
		Name:    "sweep",
		Usage:   "sweep DESIGN.json --param NAME --values A,B,C [--variant NAME] [--profile P.json] [--seed N] [--jobs N] [-o CHART.pdf|.svg] [--paper a4|letter] [--date YYYY-MM-DD]",
		Summary: "plan one variant for each value of a parameter: write time and yield against it",
		Help: `Plans one variant (default: the first) once for each value of one
parameter, on every core at once, and prints one row per value: the expected
write time with its P10 and P90, the segments, the strokes and the probability
that every dopant window takes exactly one donor. Every value is planned with
the same seed, so the rows differ by the parameter alone.

The parameter is a number of the instrument profile, named by its path in the
profile file (drift.rate_nm_per_min, drift.registration_s, tolerance_ap_nm,
ap.current_a, ...; values in the file's units: the current in A), or the size
of an array of the design, "array:REGION" (the region's first array;
"array:REGION#2" its second), with values COLSxROWS or N for N x N.
Without --param the parameters are listed with their present values.

Nothing is planned when a value is refused: an unknown parameter (the list of
the ones there are is printed), a value the profile's checks refuse or beyond
its limits (named with the limit), an array size beyond the design file's
limits or one whose copies would leave the field or their terrace.

With -o CHART.pdf or CHART.svg it also writes the sweep report: the table,
and against the parameter the write time with its P10-P90 band and the
probability that every window is good. --jobs sets how many values are
planned at once (default: every core). A value that cannot be planned shows
"not planned" and its reason; the exit status is then 2.`,
		Flags: func(fs *flag.FlagSet) func(Env, []string) int {
			param := fs.String("param", "", "the parameter `NAME` to vary (see above; without it the parameters are listed)")
			values := fs.String("values", "", "the values, `A,B,C`")
			variant := fs.String("variant", "", "plan the variant `NAME` (default: the first)")
			profile := fs.String("profile", "", "instrument profile `FILE`, or a preset (rt, lt); default rt")
			seed := fs.Int64("seed", 1, "`N` seeds the routes and the Monte Carlo spread of every value")
			jobs := fs.Int("jobs", 0, "plan `N` values at once (default: every core)")
			var rep reportFlags
			rep.declare(fs, "also write the sweep report to `FILE` (.pdf or .svg)")
			return func(env Env, args []string) int {
				opt, ok := rep.reportOptions(env, "sweep")
				if !ok {
					return ExitFailure
				}
				if *jobs < 0 {
					fmt.Fprintf(env.Stderr, "dimerpath sweep: --jobs %d: want 1 or more (0: every core)\n", *jobs)
					return ExitFailure
				}
				run, code := startPlanning(env, "sweep", args, *profile, "dimerpath sweep DESIGN.json --param NAME --values A,B,C")
				if code != ExitOK {
					return code
				}
				defer run.stop()
				if *param == "" {
					if _, err := run.design.Variant(*variant); err != nil {
						return planError(env, "sweep", args[0], err)
					}
					fmt.Fprintf(env.Stdout, "Parameters of %s (variant %s) with profile %q, and their values now:\n", args[0], variantName(run.design, *variant), run.profile.Name)
					printSweepParameters(env.Stdout, planner.SweepParameters(run.design, *variant, run.profile))
					fmt.Fprintln(env.Stderr, "dimerpath sweep: give --param NAME and --values A,B,C")
					return ExitFailure
				}
				var vals []string
				if strings.TrimSpace(*values) != "" {
					vals = strings.Split(*values, ",")
				}
				// Each value's own stages would interleave; the terminal hears
				// of each value when it is planned.
				progress := func(stage string, f float64) {
					if strings.HasSuffix(stage, ": done") {
						run.progress.report(strings.TrimSuffix(stage, ": done")+" planned", f)
					}
				}
				sw, err := planner.PlanSweep(run.ctx, run.design, *variant, run.profile, *param, vals,
					planner.SweepOptions{Options: planner.Options{Seed: *seed, Progress: progress}, Workers: *jobs})
				if err != nil {
					var se *planner.SweepError
					if errors.As(err, &se) {
						fmt.Fprintf(env.Stderr, "dimerpath sweep: %s: %v\n", args[0], err)
						return ExitFailure
					}
					return planError(env, "sweep", args[0], err)
				}
				run.progress.done()
				fmt.Fprintf(env.Stdout, "%s, variant %s: sweep of %s with profile %q (seed %d)\n", sw.Design, sw.Variant, sw.Param.Name, sw.Profile, sw.Seed)
				fmt.Fprintln(env.Stdout, planner.Caution)
				fmt.Fprintln(env.Stdout)
				printSweep(env.Stdout, sw)
				for _, w := range sw.Warnings {
					fmt.Fprintf(env.Stdout, "note: %s\n", w)
				}
				if !rep.writeReport(env, "sweep", func(path string) error {
					return export.WriteSweepFile(run.ctx, path, sw, opt)
				}) {
					return ExitFailure
				}
				failed := false
				for _, pt := range sw.Points {
					if pt.Err != nil {
						failed = true
						fmt.Fprintf(env.Stderr, "dimerpath sweep: %s = %s: %v\n", sw.Param.Name, pt.Value, pt.Err)
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

func variantName(d *design.Design, name string) string {
	if v, err := d.Variant(name); err == nil {
		return v.Name
	}
	return name
}

// printSweepParameters lists the parameters with their units and present
// values.
func printSweepParameters(w io.Writer, params []planner.SweepParameter) {
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	for _, p := range params {
		unit := p.Unit
		if p.Array != nil {
			unit = "COLSxROWS"
		}
		fmt.Fprintf(tw, "  %s\t%s\t%s\n", p.Name, p.Current, unit)
	}
	tw.Flush()
}

// printSweep writes the sweep's table (export.SweepRows: the same columns
// as the report's).
func printSweep(w io.Writer, sw *planner.Sweep) {
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
	rows := export.SweepRows(sw)
	for _, r := range rows {
		if len(r) == 2 {
			fmt.Fprintf(tw, "%s\t%s\t\n", r[0], r[1])
			continue
		}
		fmt.Fprintln(tw, strings.Join(r, "\t")+"\t")
	}
	tw.Flush()
}
