package app

import (
	"context"
	"errors"
	"flag"
	"fmt"
	"os"
	"path/filepath"
	"slices"
	"strings"
	"time"

	"dimerpath/export"
	"dimerpath/internal/atomicfile"
	"dimerpath/internal/units"
	"dimerpath/lattice/design"
	"dimerpath/planner"
)

func init() {
	Register(&Command{
		Name:    "export",
		Usage:   "export DESIGN.json|PLAN.json -o FILE.pdf|.svg|.json|.csv|.gds [--variant NAME] [--profile P.json] [--paper a4|letter] [--seed N] [--date YYYY-MM-DD] [--chip-offset X,Y] [--chip-rotation DEG] [--layers MAP.json]",
		Summary: "write a plan as the operator's PDF, an SVG, the plan JSON or the action CSV, or a design as a GDSII layout",
		Help: `Plans the variant (default: the first) of DESIGN.json with the instrument
profile and writes it in the format the output file's extension names:
  .pdf   the operator's printed plan (cover, pattern and route, segment table
         with tick boxes, time and yield, zoomed atomic-precision areas)
  .svg   the pattern and route, viewBox in nm
  .json  the whole plan, machine-readable (README "Plan files")
  .csv   one row per tip action, in order
Given a plan file written with -o PLAN.json instead of a design, it exports
that plan without planning again (the figures then show no lattice).

  .gds   the variant's geometry as a GDSII library for the mask layout of
         the contacts (no planning): regions as outlines of their sites on a
         layer per role and write mode, dopant windows, fiducial marks with
         their names, the field, the scan field and the terraces (README
         "GDSII layouts"); --chip-offset and --chip-rotation place the STM
         field on the chip, --layers MAP.json changes the layer table.

The caution is printed on stderr before the file is written. The file is
written to a temporary file and renamed into place: an export that fails or
is interrupted (Ctrl-C) leaves no partial file and any earlier file as it was.
Exit status 0 written, 2 anything else.`,
		Flags: func(fs *flag.FlagSet) func(Env, []string) int {
			var fl exportFlags
			fl.report.declare(fs, "output `FILE` (.pdf, .svg, .json or .csv)")
			fs.StringVar(&fl.variant, "variant", "", "plan the variant `NAME` (default: the first)")
			fs.StringVar(&fl.profile, "profile", "", "instrument profile: a file `P.json`, or a built-in preset rt or lt (default: rt)")
			fs.Int64Var(&fl.seed, "seed", 1, "seed of the plan's random choices (same design, profile and seed: same plan)")
			fl.gds.declare(fs, true)
			return func(env Env, args []string) int {
				fl.set = map[string]bool{}
				fs.Visit(func(f *flag.Flag) { fl.set[f.Name] = true })
				return runExport(env, args, fl)
			}
		},
	})
}

type exportFlags struct {
	report           reportFlags
	variant, profile string
	seed             int64
	set              map[string]bool // flags given on the command line
	gds              gdsFlags
}

func runExport(env Env, args []string, fl exportFlags) int {
	fail := failer(env, "export")
	if len(args) != 1 {
		return fail("want one design or plan file, got %d (dimerpath export --help)", len(args))
	}
	if fl.report.out == "" {
		return fail("-o FILE is required: the output file, .pdf, .svg, .json, .csv or .gds")
	}
	if isGDSPath(fl.report.out) {
		return runExportGDS(env, args[0], fl)
	}
	if err := fl.gds.onlyForGDS(fl.set); err != nil {
		return fail("%v", err)
	}
	// Refuse a bad output name or flag before any planning.
	opt, err := fl.report.options([]export.Format{export.FormatPDF, export.FormatSVG, export.FormatJSON, export.FormatCSV}, ".gds")
	if err != nil {
		return fail("%v", err)
	}
	in := args[0]
	data, isPlan, err := export.ReadInput(in)
	if err != nil {
		return fail("%v", err)
	}
	ctx, stop := interruptible()
	defer stop()

	var p *planner.Plan
	if isPlan {
		for _, name := range []string{"variant", "profile", "seed"} {
			if fl.set[name] {
				return fail("%s is a plan file: --%s applies only when planning a design", in, name)
			}
		}
		if p, err = export.ParsePlan(in, data); err != nil {
			return fail("%v", err)
		}
	} else {
		var pat *export.Pattern
		if p, pat, err = planDesign(ctx, env, in, data, fl); err != nil {
			if code := internalError(env, "export", err); code != 0 {
				return code
			}
			return fail("%v", err)
		}
		opt.Pattern = pat
	}

	fmt.Fprintln(env.Stderr, planner.Caution)
	if err := export.WriteFile(ctx, fl.report.out, p, opt); err != nil {
		return writeFailed(fail, fl.report.out, err)
	}
	fmt.Fprintf(env.Stderr, "dimerpath export: wrote %s (%s, variant %s: %d strokes in %d segments, session %s on average%s)\n",
		fl.report.out, p.Design, p.Variant, len(p.Strokes), len(p.Segments), units.Duration(p.TotalS), sizeNote(fl.report.out))
	return coverageExit(env, "export", p)
}

// coverageExit reports a plan whose coverage check failed (a site outside
// every region clears above the stray limit) and returns ExitFindings for
// it, ExitOK otherwise: the plan is written all the same, with the error
// on its first page.
func coverageExit(env Env, cmd string, p *planner.Plan) int {
	c := p.Coverage
	if c.OK {
		return ExitOK
	}
	fmt.Fprintf(env.Stderr, "dimerpath %s: coverage error: %d site(s) outside every region clear with more than %.3g %%:\n", cmd, c.OverLimit, 100*c.StrayLimit)
	for _, is := range c.Issues {
		fmt.Fprintln(env.Stderr, "  "+is)
	}
	return ExitFindings
}

// planDesign plans the chosen variant of the design in data, reporting
// the planning stages on stderr when it takes a while, and returns the
// plan and its pattern.
func planDesign(ctx context.Context, env Env, name string, data []byte, fl exportFlags) (*planner.Plan, *export.Pattern, error) {
	d, err := design.Parse(name, data)
	if err != nil {
		return nil, nil, err
	}
	layout, err := d.Lay(fl.variant)
	if err != nil {
		return nil, nil, fmt.Errorf("%s: %w", name, err)
	}
	prof, err := loadProfileArg(fl.profile)
	if err != nil {
		return nil, nil, err
	}
	prog := newProgress(env.Stderr, "export")
	p, err := planner.Build(ctx, layout, prof, planner.Options{Seed: fl.seed, Progress: prog.report})
	prog.done()
	if err != nil {
		return nil, nil, fmt.Errorf("%s, variant %s: %w", name, layout.Variant.Name, err)
	}
	return p, export.PatternOf(layout), nil
}

// reportFlags are the -o, --paper and --date flags of the commands that
// write files (export, compare).
type reportFlags struct {
	out, paper, date string
}

func (r *reportFlags) declare(fs *flag.FlagSet, outHelp string) {
	fs.StringVar(&r.out, "o", "", outHelp)
	fs.StringVar(&r.paper, "paper", "a4", "PDF page size: `a4` or letter")
	fs.StringVar(&r.date, "date", "", "date printed on the PDF, `YYYY-MM-DD` (default: today)")
}

// options checks the flags and returns the export options. formats are
// the formats this command writes from its -o extension, and also names
// the other extensions it takes (".gds"), for the message on a bad one.
func (r *reportFlags) options(formats []export.Format, also ...string) (export.Options, error) {
	opt := export.Options{Date: time.Now(), Generator: "dimerpath " + Version}
	var err error
	if r.out != "" {
		if st, err := os.Stat(r.out); err == nil && st.IsDir() {
			return opt, fmt.Errorf("-o %s is a directory: give the file to write (%s)", r.out, formatList(formats, also))
		}
		// The message names what this command writes, not every format
		// export knows (compare -o x.txt once suggested .json or .csv).
		f, err := export.FormatFromPath(r.out)
		if ext := filepath.Ext(r.out); err != nil && ext == "" {
			return opt, fmt.Errorf("-o %s: %w: the file name has no extension; this command writes %s", r.out, export.ErrFormat, formatList(formats, also))
		} else if err != nil || !slices.Contains(formats, f) {
			return opt, fmt.Errorf("-o %s: %w %q: this command writes %s", r.out, export.ErrFormat, ext, formatList(formats, also))
		}
		// A read-only, missing or full directory shows now, not after
		// the planning.
		if err := atomicfile.Check(r.out); err != nil {
			return opt, err
		}
	}
	if opt.Paper, err = export.ParsePaper(r.paper); err != nil {
		return opt, fmt.Errorf("--paper: %w", err)
	}
	if r.date != "" {
		if opt.Date, err = time.Parse("2006-01-02", r.date); err != nil {
			return opt, fmt.Errorf("--date %q: want YYYY-MM-DD", r.date)
		}
	}
	return opt, nil
}

// reportOptions checks the flags of a command that writes a PDF or SVG
// report (compare, sweep) before anything is read; a bad one is printed
// on env.Stderr and ok is false.
func (r *reportFlags) reportOptions(env Env, cmd string) (opt export.Options, ok bool) {
	opt, err := r.options([]export.Format{export.FormatPDF, export.FormatSVG})
	if err != nil {
		fmt.Fprintf(env.Stderr, "dimerpath %s: %v\n", cmd, err)
		return opt, false
	}
	return opt, true
}

// writeReport writes the report to -o with write when -o was given and
// says so on env.Stderr; it returns false, the error printed, when the
// report could not be written.
func (r *reportFlags) writeReport(env Env, cmd string, write func(path string) error) bool {
	if r.out == "" {
		return true
	}
	if err := write(r.out); err != nil {
		fmt.Fprintf(env.Stderr, "dimerpath %s: %v\n", cmd, err)
		return false
	}
	fmt.Fprintf(env.Stderr, "dimerpath %s: wrote %s\n", cmd, r.out)
	return true
}

// failer returns the failure of command cmd: it prints "dimerpath CMD: "
// and the message on env.Stderr and returns ExitFailure.
func failer(env Env, cmd string) func(format string, a ...any) int {
	return func(format string, a ...any) int {
		fmt.Fprintf(env.Stderr, "dimerpath "+cmd+": "+format+"\n", a...)
		return ExitFailure
	}
}

// writeFailed reports a file that could not be written to path: the
// error, or that Ctrl-C stopped the writing before the file was renamed
// into place.
func writeFailed(fail func(format string, a ...any) int, path string, err error) int {
	if errors.Is(err, context.Canceled) {
		return fail("interrupted: %s was not written", path)
	}
	return fail("%v", err)
}

// sizeNote is ", N bytes" for the file at path, or "" when it cannot be
// read: the tail of a "wrote FILE (...)" message.
func sizeNote(path string) string {
	if st, err := os.Stat(path); err == nil {
		return fmt.Sprintf(", %d bytes", st.Size())
	}
	return ""
}

// formatList names the formats and the other extensions as ".pdf,
// .svg or .gds".
func formatList(fs []export.Format, also []string) string {
	var names []string
	for _, f := range fs {
		names = append(names, "."+string(f))
	}
	names = append(names, also...)
	if len(names) < 2 {
		return strings.Join(names, "")
	}
	return strings.Join(names[:len(names)-1], ", ") + " or " + names[len(names)-1]
}
