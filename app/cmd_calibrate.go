package app

import (
	"flag"
	"fmt"
	"os"
	"text/tabwriter"

	"dimerpath/internal/atomicfile"
	"dimerpath/lattice/design"
	"dimerpath/planner"
)

func init() {
	Register(&Command{
		Name:    "calibrate",
		Usage:   "calibrate MEAS.csv -o PROFILE.json [--profile BASE.json] [--mode ap|fe]",
		Summary: "fit the exposure model (footprint σ, yield per electron) to your test lines and write an instrument profile",
		Help: `MEAS.csv holds one written test line per record, with a header naming the
columns: bias_v, current_a (amperes) or current_na (nanoamperes),
speed_nm_per_s, width_nm (0 for no visible line) and optionally mode (ap or
fe) and direction (along or across the dimer rows). '#' lines are comments.
The dose of each line is current / speed. A line clears its sites with
probability 1 − exp(−Y·N_e), so its width obeys
width² = 8σ²·ln(Y·(dose/e)·(1/n_H)/(√(2π)σ·ln 2)): the fit gives the footprint
σ and the yield per electron Y at the lines' bias and current (and how Y
grows with current and bias, when the lines span several), each with its
standard error and 95 % interval. Lines that wrote nothing are censored
observations (maximum likelihood); otherwise the fit is least squares.
Lines along and across the rows are fitted apart. The fitted values
replace those of the base profile (--profile: a profile file or a preset
name, rt or lt; default rt), and the result is written to -o for
"dimerpath plan --profile". Nothing is written when the fit fails.`,
		Flags: func(fs *flag.FlagSet) func(Env, []string) int {
			out := fs.String("o", "", "write the calibrated profile to `PROFILE.json` (required)")
			base := fs.String("profile", "", "base profile: a `FILE` or a preset (rt, lt); default rt")
			mode := fs.String("mode", "", "fit this `MODE` only (ap or fe); without a mode column the default is ap")
			return func(env Env, args []string) int {
				if len(args) != 1 {
					fmt.Fprintln(env.Stderr, "dimerpath calibrate: give one measurement file (MEAS.csv)")
					return ExitFailure
				}
				if *out == "" {
					fmt.Fprintln(env.Stderr, "dimerpath calibrate: -o PROFILE.json is required")
					return ExitFailure
				}
				if err := atomicfile.Check(*out); err != nil {
					fmt.Fprintln(env.Stderr, "dimerpath calibrate:", err)
					return ExitFailure
				}
				m := design.Mode(*mode)
				if m != "" && m != design.ModeAP && m != design.ModeFE {
					fmt.Fprintf(env.Stderr, "dimerpath calibrate: --mode %q: want %s or %s\n", *mode, design.ModeAP, design.ModeFE)
					return ExitFailure
				}
				prof, err := loadProfileArg(*base)
				if err != nil {
					fmt.Fprintln(env.Stderr, "dimerpath calibrate:", err)
					return ExitFailure
				}
				f, err := os.Open(args[0])
				if err != nil {
					fmt.Fprintln(env.Stderr, "dimerpath calibrate:", err)
					return ExitFailure
				}
				ms, err := planner.ReadMeasurements(f, args[0])
				f.Close()
				if err != nil {
					fmt.Fprintln(env.Stderr, "dimerpath calibrate:", err)
					return ExitFailure
				}
				cal, fits, err := planner.Calibrate(prof, ms, m, args[0])
				for _, fit := range fits {
					printFit(env, fit)
				}
				if err != nil {
					fmt.Fprintln(env.Stderr, "dimerpath calibrate:", err)
					fmt.Fprintln(env.Stderr, "dimerpath calibrate: no profile written")
					return ExitFailure
				}
				if err := planner.SaveProfile(*out, cal); err != nil {
					fmt.Fprintln(env.Stderr, "dimerpath calibrate:", err)
					return ExitFailure
				}
				fmt.Fprintf(env.Stdout, "wrote %s (use it with: dimerpath plan DESIGN.json --profile %s)\n", *out, *out)
				return ExitOK
			}
		},
	})
}

func printFit(env Env, fit planner.LineFit) {
	w := env.Stdout
	what := fit.Mode.Abbrev() + " lines"
	if fit.Direction != "" {
		what += " " + fit.Direction + " the dimer rows"
	}
	method := "least squares"
	if fit.Censored > 0 {
		method = fmt.Sprintf("maximum likelihood, %d that wrote nothing censored", fit.Censored)
	}
	fmt.Fprintf(w, "%s: %d lines (%s)", what, fit.Lines, method)
	if fit.Regime != "" {
		fmt.Fprintf(w, ", %s regime", fit.Regime)
	}
	fmt.Fprintln(w)
	if fit.Sigma.Value > 0 {
		tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
		est := func(name string, e planner.Estimate, scale float64, unit, format string) {
			f := func(v float64) string { return fmt.Sprintf(format, v*scale) }
			fmt.Fprintf(tw, "  %s\t%s %s\t± %.2g\t95%%: %s to %s\n", name, f(e.Value), unit, e.SE*scale, f(e.Lo95), f(e.Hi95))
		}
		est("footprint σ", fit.Sigma, 1, "nm", "%.4g")
		est(fmt.Sprintf("yield Y at %.2f V, %.3g nA", fit.RefBiasV, fit.RefCurrentA*1e9), fit.Yield, 1, "H/e", "%.3g")
		est("threshold dose (a line appears)", fit.ThresholdDose, 1e3, "mC/cm", "%.3g")
		if fit.Order != nil {
			est("order n (rate ∝ I^n)", *fit.Order, 1, "", "%.3g")
		}
		if fit.DecadeV != nil {
			est("bias per decade of Y", *fit.DecadeV, 1, "V", "%.3g")
		}
		tw.Flush()
		fmt.Fprintf(w, "  residual SD of width² %.3g nm² (%d degrees of freedom); correlation of σ and ln Y %+.2f\n", fit.ResidualSDNM2, fit.DOF, fit.CorrSigmaYield)
	}
	if len(fit.Residuals) > 0 {
		tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
		fmt.Fprintln(tw, "  line\tdose mC/cm\tcurrent nA\tbias V\tmeasured nm\tfitted nm\tresidual nm\t")
		for _, r := range fit.Residuals {
			res := fmt.Sprintf("%+.3f", r.ResidualNM)
			if r.Censored {
				res = "no line"
			}
			fmt.Fprintf(tw, "  %d\t%.4g\t%.3g\t%.2f\t%.3f\t%.3f\t%s\t\n", r.Line, r.DoseCPerCm*1e3, r.CurrentA*1e9, r.BiasV, r.WidthNM, r.FitNM, res)
		}
		tw.Flush()
	}
	for _, warn := range fit.Warnings {
		fmt.Fprintln(env.Stderr, "dimerpath calibrate: warning:", warn)
	}
}

// loadProfileArg returns the profile named by a --profile argument: a
// profile file, or a preset name (rt, lt) when no such file exists; the
// room-temperature default for "".
func loadProfileArg(arg string) (planner.Profile, error) {
	if arg == "" {
		return planner.DefaultProfile(), nil
	}
	if _, err := os.Stat(arg); err != nil {
		if p, perr := planner.Preset(arg); perr == nil {
			return p, nil
		}
	}
	return planner.LoadProfile(arg)
}
