package app

import (
	"context"
	"flag"
	"fmt"
	"io"
	"math"
	"path/filepath"
	"strings"

	"dimerpath/internal/jsonfile"
	"dimerpath/lattice/design"
	"dimerpath/lattice/placement"
	"dimerpath/lattice/survey"
)

func init() {
	Register(&Command{
		Name:    "place",
		Usage:   "place DESIGN.json [--survey IMAGE [--size W,H]] [--regions A,B] [--box X0,Y0,X1,Y1] [--variant NAME] [--best N] [--json]",
		Summary: "find where on the surveyed surface the device's atomic-precision core keeps clear of defects and step edges",
		Help: `Searches the translations of the device's atomic-precision core (--regions A,B;
default: every atomic-precision region, as the design rules class them) by
whole lattice vectors of its terrace (dimer pitches along its rows, row
spacings across them) that keep the core inside --box X0,Y0,X1,Y1 (field nm;
default: the survey's area) and on its terrace, and prints the best few with
their clearances: from the dopant windows and from the other core sites to the
edge of the nearest defect, and to the nearest step edge or the border of the
survey and the box, and the defects nearest each. The placements are ranked by
their margin over the surface-clearance rule (windows at least
rules.defect_window_clearance_nm, other atomic-precision sites at least
rules.defect_clearance_nm from every defect, no step edge crossed).

The survey is the design's own, or the image --survey IMAGE analysed now (as
dimerpath survey does) and laid on the field: where the design's survey sits,
or else centred on the core and turned so that the dimer rows of the image's
largest terrace run along the core terrace's rows. Nothing is written: apply a
placement in the window (Survey panel), where it is one undoable move of the
core's regions (their fan-outs and pads stay; the checks then say what the
move broke).

Exit status: 0 placements found, 2 the design or image could not be read, the
design has no survey, or the core does not fit.`,
		Flags: func(fs *flag.FlagSet) func(Env, []string) int {
			image := fs.String("survey", "", "analyse the survey topograph `IMAGE` and place on it")
			size := fs.String("size", "", "with --survey: the image's nominal scan size `W,H` in nm")
			regions := fs.String("regions", "", "the core's regions `A,B` (default: every atomic-precision region)")
			box := fs.String("box", "", "keep the core inside `X0,Y0,X1,Y1` (field nm; default: the survey's area)")
			variant := fs.String("variant", "", "place in the variant `NAME` (default: the first)")
			best := fs.Int("best", 5, "how many placements to print (`N`, 1 to 50)")
			asJSON := fs.Bool("json", false, "print one JSON object")
			return func(env Env, args []string) int {
				fail := func(format string, a ...any) int {
					fmt.Fprintf(env.Stderr, "dimerpath place: "+format+"\n", a...)
					return ExitFailure
				}
				if len(args) != 1 {
					return fail("want one design file: dimerpath place DESIGN.json [--survey IMAGE] [--regions A,B] [--box X0,Y0,X1,Y1] [--json]")
				}
				if *best < 1 || *best > 50 {
					return fail("--best %d: want 1 to 50", *best)
				}
				opt := placement.Options{Best: *best}
				opt.Regions = placement.ParseRegions(*regions)
				b, err := placement.ParseBox(*box)
				if err != nil {
					return fail("--box %v", err)
				}
				opt.Box = b
				d, err := design.Load(args[0])
				if err != nil {
					return fail("%v", err)
				}
				l, err := d.Lay(*variant)
				if err != nil {
					return fail("%s: %v", args[0], err)
				}
				if *image != "" {
					var sopt survey.Options
					if *size != "" {
						w, h, err := parseSizeNM(*size)
						if err != nil {
							return fail("--size %v", err)
						}
						sopt.SizeNM = [2]float64{w, h}
					}
					an, err := analyseFile(*image, sopt)
					if err != nil {
						return fail("%v", err)
					}
					d.Survey = an.Lay(l, d.Survey, relativeTo(args[0], *image), opt.Regions)
					if l, err = d.Lay(*variant); err != nil {
						return fail("%s: %v", args[0], err)
					}
				} else if d.Survey == nil {
					return fail("%s: %v", args[0], placement.ErrNoSurvey)
				}
				current, found, err := placement.Search(context.Background(), l, opt)
				if err != nil {
					return fail("%s: %v", args[0], err)
				}
				if *asJSON {
					data, err := jsonfile.Marshal(placeReport(l, opt, current, found), jsonfile.Indented)
					if err != nil {
						fmt.Fprintf(env.Stderr, "dimerpath place: %v\n", err)
						return ExitBug
					}
					env.Stdout.Write(data)
					return ExitOK
				}
				printPlacements(env.Stdout, args[0], l, current, found)
				return ExitOK
			}
		},
	})
}

// relativeTo names image from the folder of the design file.
func relativeTo(designPath, image string) string {
	dir, _ := filepath.Abs(filepath.Dir(designPath))
	abs, _ := filepath.Abs(image)
	if rel, err := filepath.Rel(dir, abs); err == nil {
		return filepath.ToSlash(rel)
	}
	return image
}

// placeJSON is one placement as place --json prints it.
type placeJSON struct {
	MoveNM            [2]float64 `json:"move_nm"`
	Dimers            int        `json:"dimers"`
	Rows              int        `json:"rows"`
	MarginNM          *float64   `json:"margin_nm"`
	WindowClearanceNM *float64   `json:"window_clearance_nm"`
	ClearanceNM       *float64   `json:"clearance_nm"`
	StepClearanceNM   *float64   `json:"step_clearance_nm"`
	Nearest           []nearJSON `json:"nearest"`
}

type nearJSON struct {
	Defect int        `json:"defect"`
	AtNM   [2]float64 `json:"at_nm"`
	Kind   string     `json:"kind"`
	Class  string     `json:"class"`
	GapNM  float64    `json:"gap_nm"`
}

func finiteOrNil(v float64) *float64 {
	if math.IsInf(v, 0) || math.IsNaN(v) {
		return nil
	}
	return &v
}

func toPlaceJSON(p placement.Placement) placeJSON {
	j := placeJSON{
		MoveNM: [2]float64{p.MoveNM.X, p.MoveNM.Y}, Dimers: p.Dimers, Rows: p.Rows,
		MarginNM: finiteOrNil(p.MarginNM), WindowClearanceNM: finiteOrNil(p.WindowClearanceNM),
		ClearanceNM: finiteOrNil(p.OtherClearanceNM), StepClearanceNM: finiteOrNil(p.StepClearanceNM),
		Nearest: []nearJSON{},
	}
	for _, n := range p.Nearest {
		j.Nearest = append(j.Nearest, nearJSON{Defect: n.Index, AtNM: [2]float64{n.At.X, n.At.Y}, Kind: n.Kind, Class: n.Class, GapNM: n.GapNM})
	}
	return j
}

func placeReport(l *design.Layout, opt placement.Options, current placement.Placement, found []placement.Placement) any {
	r := struct {
		Variant                 string      `json:"variant"`
		DefectWindowClearanceNM float64     `json:"defect_window_clearance_nm"`
		DefectClearanceNM       float64     `json:"defect_clearance_nm"`
		Current                 placeJSON   `json:"current"`
		Placements              []placeJSON `json:"placements"`
	}{
		Variant: l.Variant.Name, DefectWindowClearanceNM: l.Rules.DefectWindowClearanceNM, DefectClearanceNM: l.Rules.DefectClearanceNM,
		Current: toPlaceJSON(current), Placements: []placeJSON{},
	}
	for _, p := range found {
		r.Placements = append(r.Placements, toPlaceJSON(p))
	}
	return r
}

// printPlacements writes the placements for a reader.
func printPlacements(w io.Writer, file string, l *design.Layout, current placement.Placement, found []placement.Placement) {
	nm := func(v float64) string {
		if math.IsInf(v, 1) {
			return "clear"
		}
		return fmt.Sprintf("%.2f nm", v)
	}
	line := func(p placement.Placement) string {
		s := fmt.Sprintf("margin %s; windows %s, other sites %s, steps and border %s", nm(p.MarginNM), nm(p.WindowClearanceNM), nm(p.OtherClearanceNM), nm(p.StepClearanceNM))
		var near []string
		for _, n := range p.Nearest {
			near = append(near, fmt.Sprintf("%s %s at (%.1f, %.1f) %.2f nm", n.Kind, describeDefect(n.Class), n.At.X, n.At.Y, n.GapNM))
		}
		if len(near) > 0 {
			s += "\n       nearest: " + strings.Join(near, "; ")
		}
		return s
	}
	fmt.Fprintf(w, "%s, variant %s: surface-clearance keeps windows %g nm and other atomic-precision sites %g nm from the edge of every defect (from memory), and off step edges\n",
		file, l.Variant.Name, l.Rules.DefectWindowClearanceNM, l.Rules.DefectClearanceNM)
	fmt.Fprintf(w, "as drawn:  %s\n", line(current))
	fmt.Fprintf(w, "best moves by whole lattice vectors:\n")
	for i, p := range found {
		fmt.Fprintf(w, "  %d  move (%+.2f, %+.2f) nm = %+d dimers, %+d rows: %s\n", i+1, p.MoveNM.X, p.MoveNM.Y, p.Dimers, p.Rows, line(p))
	}
	if len(found) == 0 {
		fmt.Fprintln(w, "  none: the core does not fit in the box on its terrace")
	}
}

func describeDefect(class string) string {
	if class == "" {
		return "defect"
	}
	return class
}
