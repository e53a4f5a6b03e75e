package app

import (
	"context"
	"flag"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"dimerpath/internal/atomicfile"
	"dimerpath/internal/jsonfile"
	"dimerpath/lattice"
	"dimerpath/lattice/design"
	"dimerpath/lattice/survey"
)

func init() {
	Register(&Command{
		Name:    "survey",
		Usage:   "survey IMAGE [--size W,H] [--threshold K] [--json] [--into DESIGN.json [--at X,Y] [--rotation DEG] [--terraces] [-o OUT.json]]",
		Summary: "calibrate a survey topograph on the lattice; find its terraces, step edges and defects",
		Help: `Reads a survey topograph of Si(100)-2x1:H: a grey-scale PNG or TIFF (8 or 16
bits a pixel) or a plain-text height matrix (numbers separated by spaces, tabs
or commas, one scan line per line; "# key: value" headers width_nm,
height_nm, unit m|nm, first_line top|bottom). The image is levelled (plane
and line-by-line median offset) and calibrated on the lattice itself: the
dimer-row period (0.768 nm) and, where resolved, the dimer pitch (0.384 nm),
both from the CODATA 2018 silicon lattice constant, give the true scale in x
and y, the rotation and the skew, each with its standard uncertainty. The
local row direction divides the image into terraces (rows turn by 90° at a
single-height step); their heights say which side of each step is up. What
stands out once the lattice's Fourier peaks are taken out, beyond --threshold
K robust standard deviations (default 6), is reported as a defect: bright or
dark, with its position, apparent height and size, and a coarse class by
appearance.

--size W,H gives the nominal scan size in nm (it overrides the file's).
Positions are in nm from the image's lower-left corner, x along the image's
x axis, by the measured scale. --json prints one object (keys in README).

--into DESIGN.json puts the image and what was found into the design's
survey (replacing one it had), which the design-rule check (rule
surface-clearance) and dimerpath place then use, and writes the design back
(or to -o OUT.json; through a temporary file renamed into place, only if it
still validates). The survey sits where the design's old survey sat, or
--at X,Y (the field position of the image's lower-left corner, nm) and
--rotation DEG (the field angle of its x axis); by default it is centred on
the device's atomic-precision core and turned so that the dimer rows of the
image's largest terrace run along the core terrace's rows. With --terraces the
design's terraces become the survey's: the largest takes the rest of the
field, the others their outlines, each step_from the terrace beside it with
step up or down as the survey's heights say, in the antiphase registry nearer
the imaged dimers (refused when the survey's rows run more than 1° from the
field's axes: give --rotation).

Exit status: 0 analysed, 2 the image could not be read (truncated, 0 x 0,
more than 8192 x 8192 pixels, NaN heights, ragged matrix lines) or shows no
lattice to calibrate on.`,
		Flags: func(fs *flag.FlagSet) func(Env, []string) int {
			size := fs.String("size", "", "nominal scan size `W,H` in nm")
			threshold := fs.Float64("threshold", survey.DefaultThresholdSD, "defect threshold `K` in robust standard deviations of the residual")
			asJSON := fs.Bool("json", false, "print the analysis as one JSON object")
			into := fs.String("into", "", "put the survey into the design `DESIGN.json`")
			at := fs.String("at", "", "with --into: the field position `X,Y` (nm) of the image's lower-left corner")
			rotation := fs.Float64("rotation", math.NaN(), "with --into: the field angle (`DEG`) of the image's x axis")
			out := fs.String("o", "", "with --into: write the design to `OUT.json` (default: back to DESIGN.json)")
			terraces := fs.Bool("terraces", false, "with --into: make the survey's terraces the design's")
			return func(env Env, args []string) int {
				if len(args) != 1 {
					fmt.Fprintln(env.Stderr, "dimerpath survey: want one image: dimerpath survey IMAGE [--size W,H] [--json]")
					return ExitFailure
				}
				var opt survey.Options
				if *size != "" {
					w, h, err := parseSizeNM(*size)
					if err != nil {
						fmt.Fprintf(env.Stderr, "dimerpath survey: --size %v\n", err)
						return ExitFailure
					}
					opt.SizeNM = [2]float64{w, h}
				}
				if !(*threshold > 0) || *threshold > 100 {
					fmt.Fprintf(env.Stderr, "dimerpath survey: --threshold %g: want a number of standard deviations in (0, 100]\n", *threshold)
					return ExitFailure
				}
				opt.ThresholdSD = *threshold
				an, err := analyseFile(args[0], opt)
				if err != nil {
					fmt.Fprintf(env.Stderr, "dimerpath survey: %v\n", err)
					return ExitFailure
				}
				if *into != "" {
					return surveyInto(env, an, args[0], *into, *at, *rotation, *out, *terraces)
				}
				if *at != "" || !math.IsNaN(*rotation) || *out != "" || *terraces {
					fmt.Fprintln(env.Stderr, "dimerpath survey: --at, --rotation, --terraces and -o go with --into DESIGN.json")
					return ExitFailure
				}
				if *asJSON {
					data, err := jsonfile.Marshal(an.Report(), jsonfile.Indented)
					if err != nil {
						fmt.Fprintf(env.Stderr, "dimerpath survey: %v\n", err)
						return ExitBug
					}
					env.Stdout.Write(data)
					return ExitOK
				}
				printSurvey(env.Stdout, an)
				return ExitOK
			}
		},
	})
}

// surveyInto puts the analysis into a design's survey and writes the
// design.
func surveyInto(env Env, an *survey.Analysis, image, path, at string, rotation float64, out string, terraces bool) int {
	fail := func(format string, a ...any) int {
		fmt.Fprintf(env.Stderr, "dimerpath survey: "+format+"\n", a...)
		return ExitFailure
	}
	if out == "" {
		out = path
	}
	if err := atomicfile.Check(out); err != nil {
		return fail("%v", err)
	}
	d, err := design.Load(path)
	if err != nil {
		return fail("%v", err)
	}
	l, err := d.Lay("")
	if err != nil {
		return fail("%s: %v", path, err)
	}
	old := d.Survey
	if at != "" || !math.IsNaN(rotation) {
		if old == nil {
			old = &design.Survey{}
		} else {
			cp := *old
			old = &cp
		}
		if at != "" {
			p, err := parsePointNM(at)
			if err != nil {
				return fail("--at %v", err)
			}
			old.OffsetNM = [2]float64{p.X, p.Y}
		}
		if !math.IsNaN(rotation) {
			if math.IsInf(rotation, 0) || math.Abs(rotation) > 360 {
				return fail("--rotation %g: want an angle within ±360°", rotation)
			}
			old.RotationDeg = rotation
		}
	}
	d.Survey = an.Lay(l, old, relativeTo(out, image), nil)
	if terraces {
		ts, err := d.Survey.DesignTerraces()
		if err != nil {
			return fail("%s: --terraces: %v", image, err)
		}
		d.Terraces = ts
	}
	if err := d.Validate(); err != nil {
		return fail("%v", err)
	}
	if err := design.Save(out, d); err != nil {
		return fail("%v", err)
	}
	s := d.Survey
	fmt.Fprintf(env.Stdout, "%s: survey %s at (%.2f, %.2f) nm, turned %.3f°: %d terraces, %d step edges, %d defects\n",
		out, s.Image, s.OffsetNM[0], s.OffsetNM[1], s.RotationDeg, len(s.Terraces), len(s.Steps), len(s.Defects))
	return ExitOK
}

// analyseFile reads and analyses one topograph.
func analyseFile(path string, opt survey.Options) (*survey.Analysis, error) {
	t, err := survey.Read(path)
	if err != nil {
		return nil, err
	}
	return survey.Analyse(context.Background(), t, opt)
}

// parseSizeNM reads "W,H", two positive sizes in nm up to 1 mm.
func parseSizeNM(s string) (float64, float64, error) {
	ws, hs, ok := strings.Cut(s, ",")
	w, errW := strconv.ParseFloat(strings.TrimSpace(ws), 64)
	h, errH := strconv.ParseFloat(strings.TrimSpace(hs), 64)
	if !ok || errW != nil || errH != nil || !(w > 0) || !(h > 0) || w > 1e6 || h > 1e6 {
		return 0, 0, fmt.Errorf("%q: want W,H, two positive sizes in nm", s)
	}
	return w, h, nil
}

// printSurvey writes the analysis for a reader.
func printSurvey(w io.Writer, an *survey.Analysis) {
	pm := func(v, sd float64, prec int) string {
		if math.IsNaN(sd) {
			return "not measured (one lattice direction seen), taken as " + strconv.FormatFloat(v, 'f', prec, 64)
		}
		return strconv.FormatFloat(v, 'f', prec, 64) + " ± " + strconv.FormatFloat(sd, 'f', prec, 64)
	}
	unit := "nm"
	switch an.ZSource {
	case "step":
		unit = "nm (scaled on the step height a/4)"
	case "":
		unit = "grey levels (no height scale)"
	}
	fmt.Fprintf(w, "%s: %d x %d pixels, heights in %s\n", an.Name, an.Width, an.Height, unit)
	if an.NominalNMPerPx[0] > 0 {
		fmt.Fprintf(w, "nominal scale   %.5f x %.5f nm/px\n", an.NominalNMPerPx[0], an.NominalNMPerPx[1])
	} else {
		fmt.Fprintf(w, "nominal scale   none given (--size W,H)\n")
	}
	fmt.Fprintf(w, "measured scale  x %s, y %s nm/px\n", pm(an.ScaleNMPerPx[0], an.ScaleSD[0], 5), pm(an.ScaleNMPerPx[1], an.ScaleSD[1], 5))
	fmt.Fprintf(w, "rotation        %s° (dimer rows of terrace 0 from the image's x axis, counter-clockwise)\n", pm(an.RotationDeg, an.RowsSD, 3))
	fmt.Fprintf(w, "skew            %s° (the image's y axis leaning towards +x)\n", pm(an.SkewDeg, an.SkewSD, 3))
	what := "dimer rows only"
	if an.DimersResolved[0] || an.DimersResolved[1] {
		what = "dimer rows and dimers"
	}
	fmt.Fprintf(w, "model           Fourier fit of %d lattice peaks (%s; row spacing %.4f nm and dimer pitch %.4f nm from the CODATA 2018 lattice constant); uncertainties from the four quadrants' scatter\n",
		an.Peaks, what, lattice.RowSpacing, lattice.DimerPitch)
	fmt.Fprintf(w, "\nterraces (%d):\n", len(an.Terraces))
	for i, t := range an.Terraces {
		up := ""
		if t.UpFrom >= 0 {
			up = fmt.Sprintf("  one step up from %d", t.UpFrom)
		}
		h := fmt.Sprintf("%.3f", t.HeightNM)
		if an.ZSource == "" {
			h = fmt.Sprintf("%.0f levels", t.HeightNM)
		}
		fmt.Fprintf(w, "  %d  rows %6.2f°  %7.0f nm²  height %s%s\n", i, t.RowsDeg, t.AreaNM2, h, up)
	}
	fmt.Fprintf(w, "\nstep edges (%d):\n", len(an.Steps))
	for i, s := range an.Steps {
		a, b := s.Polyline[0], s.Polyline[len(s.Polyline)-1]
		side := "heights do not tell which side is up"
		if s.Upper >= 0 {
			side = fmt.Sprintf("terrace %d is up", s.Upper)
			if an.ZSource == "file" {
				side += fmt.Sprintf(" by %.3f nm (a single step is %.4f nm)", s.HeightNM, lattice.StepHeight)
			}
		}
		fmt.Fprintf(w, "  %d  between terraces %d and %d, %s; from (%.1f, %.1f) to (%.1f, %.1f) nm, %d points\n",
			i, s.Terraces[0], s.Terraces[1], side, a.X, a.Y, b.X, b.Y, len(s.Polyline))
	}
	classes := map[string]int{}
	bright := 0
	for _, d := range an.Defects {
		classes[d.Class]++
		if d.Bright {
			bright++
		}
	}
	byClass := countsByName(classes, "%s %d")
	fmt.Fprintf(w, "\ndefects (%d: %d bright, %d dark; %s), beyond %.1f SD of the residual (SD %.4g):\n",
		len(an.Defects), bright, len(an.Defects)-bright, strings.Join(byClass, ", "), an.ThresholdSD, an.NoiseNM)
	if len(an.Defects) > 0 {
		fmt.Fprintf(w, "  %8s %8s  %-6s %8s %7s  %-15s %s\n", "x nm", "y nm", "kind", "height", "size nm", "class (look)", "terrace")
	}
	for _, d := range an.Defects {
		h := fmt.Sprintf("%8.3f", d.HeightNM)
		if an.ZSource == "" {
			h = fmt.Sprintf("%8.0f", d.HeightNM)
		}
		fmt.Fprintf(w, "  %8.2f %8.2f  %-6s %s %7.2f  %-15s %d\n", d.AtNM.X, d.AtNM.Y, d.Kind(), h, d.SizeNM, d.Class, d.Terrace)
	}
	for _, n := range an.Notes {
		fmt.Fprintf(w, "note: %s\n", n)
	}
}
