package app

import (
	"context"
	"flag"
	"fmt"

	"dimerpath/lattice/design"
	"dimerpath/planner"
)

func init() {
	Register(&Command{
		Name:    "check",
		Usage:   "check DESIGN.json [--variant NAME] [--profile P.json]",
		Summary: "run the design-rule checks on a design file",
		Help: `Checks every variant of the design (or only --variant NAME) against the design
rules: dopant windows on one terrace and on whole dimers, window spacing, the
field-emission keep-out around atomic-precision features, the scan field,
floating device/gate/lead regions, tunnel-gap widths, the registry of terraces
across a step, and over-clearing: the strokes each region would be written
with (in the write mode its plan would choose, with the instrument profile:
--profile, a profile file or a preset rt/lt; default rt) must clear no site
outside every region with more than the profile's stray_limit, so a design
that passes check plans without a coverage error. Prints one line per
finding: severity, rule, regions and position in nm, then a summary.

Exit status: 0 no errors (warnings allowed), 1 errors found, 2 the design
could not be read or is invalid (each problem is printed with its JSON path).`,
		Flags: func(fs *flag.FlagSet) func(Env, []string) int {
			variant := fs.String("variant", "", "check only the variant `NAME` (default: every variant)")
			profile := fs.String("profile", "", "instrument profile `FILE`, or a preset (rt, lt), for the over-clearing rule; default rt")
			return func(env Env, args []string) int {
				if len(args) != 1 {
					fmt.Fprintln(env.Stderr, "dimerpath check: want one design file: dimerpath check DESIGN.json [--variant NAME] [--profile P.json]")
					return ExitFailure
				}
				d, err := design.Load(args[0])
				if err != nil {
					fmt.Fprintf(env.Stderr, "dimerpath check: %v\n", err)
					return ExitFailure
				}
				prof, err := loadProfileArg(*profile)
				if err != nil {
					fmt.Fprintf(env.Stderr, "dimerpath check: %v\n", err)
					return ExitFailure
				}
				return runCheck(env, args[0], d, *variant, prof)
			}
		},
	})
}

func runCheck(env Env, file string, d *design.Design, variant string, prof planner.Profile) int {
	names := d.VariantNames()
	if variant != "" {
		v, err := d.Variant(variant)
		if err != nil {
			fmt.Fprintf(env.Stderr, "dimerpath check: %s: %v\n", file, err)
			return ExitFailure
		}
		names = []string{v.Name}
	}
	errs, warns := 0, 0
	for _, name := range names {
		lay, err := d.Lay(name)
		if err != nil {
			fmt.Fprintf(env.Stderr, "dimerpath check: %s: %v\n", file, err)
			return ExitFailure
		}
		findings := lay.Check()
		over, err := planner.CheckExposure(context.Background(), lay, prof)
		if err != nil {
			// The planner refuses this variant (a limit, too much work):
			// plan would refuse it too, so it is an error here.
			over = []design.Finding{{Rule: planner.RuleOverclearing, Severity: design.SeverityError,
				Message: "cannot be planned with this profile: " + err.Error()}}
		}
		findings = append(findings, over...)
		for _, f := range findings {
			fmt.Fprintf(env.Stdout, "%s: %s\n", name, f)
			if f.Severity == design.SeverityError {
				errs++
			} else {
				warns++
			}
		}
	}
	fmt.Fprintf(env.Stdout, "%s: %d variant(s) checked (%s): %d error(s), %d warning(s)\n", file, len(names), joinNames(names), errs, warns)
	if errs > 0 {
		return ExitFindings
	}
	return ExitOK
}

func joinNames(names []string) string {
	s := ""
	for i, n := range names {
		if i > 0 {
			s += ", "
		}
		s += n
	}
	return s
}
