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
		Summary: "fit the line-width-vs-dose model to your test lines and write an instrument profile",
		Help: `MEAS.csv holds one written test line per record, with a header naming the
columns: bias_v, current_a (amperes) or current_na (nanoamperes),
speed_nm_per_s, width_nm (0 for no visible line) and optionally mode (ap or
fe). '#' lines are comments. The dose of each line is current / speed; the
fit is linear least squares on width² = a + b·ln(dose), which gives the
Gaussian footprint σ = sqrt(b/8) and the threshold dose exp(-a/b). The fitted
model replaces the width model of the base profile (--profile: a profile file
or a preset name, rt or lt; default rt), and the result is written to -o for
"dimerpath plan --profile".`,
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

func printFit(env Env, fit planner.WidthFit) {
	w := env.Stdout
	fmt.Fprintf(w, "%s width model: w² = %.4g nm² + %.4g nm² · ln(dose / 1 C/cm)\n", fit.Mode.Abbrev(), fit.A, fit.B)
	if fit.Model.SigmaNM > 0 {
		fmt.Fprintf(w, "  sigma %.4g nm, threshold dose %.4g mC/cm, R² %.4f, RMS residual %.3g nm, %d lines fitted",
			fit.Model.SigmaNM, fit.Model.ThresholdDoseCPerCm*1e3, fit.RSquared, fit.RMSNM, fit.Points)
		if fit.Skipped > 0 {
			fmt.Fprintf(w, " (%d without a line left out)", fit.Skipped)
		}
		fmt.Fprintln(w)
	}
	if len(fit.Residuals) > 0 {
		tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', tabwriter.AlignRight)
		fmt.Fprintln(tw, "  line\tdose mC/cm\tmeasured nm\tfitted nm\tresidual nm\t")
		for _, r := range fit.Residuals {
			fmt.Fprintf(tw, "  %d\t%.4g\t%.3f\t%.3f\t%+.3f\t\n", r.Line, r.DoseCPerCm*1e3, r.WidthNM, r.FitNM, r.ResidualNM)
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
