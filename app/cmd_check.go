package app

import (
	"flag"
	"fmt"

	"dimerpath/lattice/design"
)

func init() {
	Register(&Command{
		Name:    "check",
		Usage:   "check DESIGN.json [--variant NAME]",
		Summary: "run the design-rule checks on a design file",
		Help: `Checks every variant of the design (or only --variant NAME) against the design
rules: dopant windows on one terrace and on whole dimers, window spacing, the
field-emission keep-out around atomic-precision features, the scan field,
floating device/gate/lead regions, and tunnel-gap widths. Prints one line per
finding: severity, rule, regions and position in nm, then a summary.

Exit status: 0 no errors (warnings allowed), 1 errors found, 2 the design
could not be read or is invalid (each problem is printed with its JSON path).`,
		Flags: func(fs *flag.FlagSet) func(Env, []string) int {
			variant := fs.String("variant", "", "check only the variant `NAME` (default: every variant)")
			return func(env Env, args []string) int {
				if len(args) != 1 {
					fmt.Fprintln(env.Stderr, "dimerpath check: want one design file: dimerpath check DESIGN.json [--variant NAME]")
					return ExitFailure
				}
				d, err := design.Load(args[0])
				if err != nil {
					fmt.Fprintf(env.Stderr, "dimerpath check: %v\n", err)
					return ExitFailure
				}
				return runCheck(env, args[0], d, *variant)
			}
		},
	})
}

func runCheck(env Env, file string, d *design.Design, variant string) int {
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
		findings, err := design.Check(d, name)
		if err != nil {
			fmt.Fprintf(env.Stderr, "dimerpath check: %s: %v\n", file, err)
			return ExitFailure
		}
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
