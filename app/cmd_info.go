package app

import (
	"flag"
	"fmt"
	"io"
	"slices"
	"strings"
	"text/tabwriter"

	"github.com/golang/geo/r2"

	"dimerpath/lattice"
	"dimerpath/lattice/design"
	"dimerpath/planner"
)

func init() {
	Register(&Command{
		Name:    "info",
		Usage:   "info DESIGN.json [--variant NAME]",
		Summary: "print a summary of a design: field, terraces, fiducials, variants and regions",
		Help: `Prints the design's field, terraces (row direction, offset, extent), fiducial
marks, window templates and rule settings, then for every variant (or only
--variant NAME) a table of its regions: role, write mode, the dopant it
receives (its own species, else the design's dopant; a region without one
names the lithography step it is written in), the placement tolerance the
planner holds it to with the default profile (its own, else its role's for
leads, gates and pads, else its mode's; "AP/FE" where the planner chooses
the mode and the two differ), H-site
count, dopant windows and bounding box, then the width of each declared
tunnel gap and each coupling's tolerance. Exit status 2 when the design cannot be read.`,
		Flags: func(fs *flag.FlagSet) func(Env, []string) int {
			variant := fs.String("variant", "", "show only the variant `NAME` (default: every variant)")
			return func(env Env, args []string) int {
				if len(args) != 1 {
					fmt.Fprintln(env.Stderr, "dimerpath info: want one design file: dimerpath info DESIGN.json [--variant NAME]")
					return ExitFailure
				}
				d, err := design.Load(args[0])
				if err != nil {
					fmt.Fprintf(env.Stderr, "dimerpath info: %v\n", err)
					return ExitFailure
				}
				if err := printInfo(env.Stdout, args[0], d, *variant); err != nil {
					fmt.Fprintf(env.Stderr, "dimerpath info: %s: %v\n", args[0], err)
					return ExitFailure
				}
				return ExitOK
			}
		},
	})
}

// printInfo writes the readable summary of a design.
func printInfo(w io.Writer, file string, d *design.Design, variant string) error {
	names := d.VariantNames()
	if variant != "" {
		v, err := d.Variant(variant)
		if err != nil {
			return err
		}
		names = []string{v.Name}
	}
	surf, err := d.Surface()
	if err != nil {
		return err
	}
	rs := d.EffectiveRules()
	fmt.Fprintf(w, "%s  (%s, %s v%d)\n", d.Name, file, d.Format, d.Version)
	if d.Description != "" {
		fmt.Fprintf(w, "%s\n", wrap(d.Description, 100, ""))
	}
	fmt.Fprintln(w)
	tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
	fmt.Fprintf(tw, "Field\t%g x %g nm (scan field %g x %g nm)\n", d.Field.WidthNM, d.Field.HeightNM, rs.ScanFieldNM[0], rs.ScanFieldNM[1])
	perTerrace := make([]int, len(surf.Terraces))
	whole := lattice.NewSiteSet()
	surf.Paint(whole, lattice.Rect{Rect: surf.Field})
	for run := range whole.Runs() {
		perTerrace[run.Terrace] += run.Len
	}
	for i, t := range surf.Terraces {
		label := ""
		if i == 0 {
			label = "Terraces"
		}
		extent := "the rest of the field"
		if len(t.Boundary) >= 3 {
			extent = fmt.Sprintf("polygon of %d points, %s", len(t.Boundary), rectString(r2.RectFromPoints(t.Boundary...)))
		}
		step := ""
		if i < len(d.Terraces) && d.Terraces[i].StepFrom != "" {
			dir := d.Terraces[i].Step
			if dir == "" {
				dir = "down (no \"step\" given)"
			}
			step = fmt.Sprintf(", one step %s from %s", dir, d.Terraces[i].StepFrom)
		}
		fmt.Fprintf(tw, "%s\t%s: rows along %s%s, offset (%.3f, %.3f) nm, %d H sites; %s\n",
			label, t.Name, t.Rows, step, t.Offset.X, t.Offset.Y, perTerrace[i], extent)
	}
	if len(d.Fiducials) == 0 {
		fmt.Fprintf(tw, "Fiducials\tnone\n")
	}
	for i, f := range d.Fiducials {
		label := ""
		if i == 0 {
			label = "Fiducials"
		}
		fmt.Fprintf(tw, "%s\t%s at (%g, %g) nm\n", label, f.Name, f.AtNM[0], f.AtNM[1])
	}
	templates := d.Templates()
	for i, n := range templates.Names() {
		t := templates[n]
		label := ""
		if i == 0 {
			label = "Templates"
		}
		fmt.Fprintf(tw, "%s\t%s: %s, %d dimers (%d H sites), donors taken: one %s, none %s, two or more %s (%s)\n",
			label, n, t.Species, t.Dimers, t.Sites(), withSD(t.P1, t.P1SD), withSD(t.P0, t.P0SD), withSD(t.P2Plus, t.P2PlusSD), t.Source)
	}
	fmt.Fprintf(tw, "Rules\t>= %d intact dimer(s) between windows, facing rows %d, FE keep-out %g nm, tunnel gaps %.2f–%.2f nm\n",
		rs.WindowGapDimers, rs.WindowFacingRows, rs.FEKeepOutNM, rs.TunnelGapMinNM, rs.TunnelGapMaxNM)
	fmt.Fprintf(tw, "\tdefault tolerance AP ±%g nm, FE ±%g nm\n", rs.APToleranceNM, rs.FEToleranceNM)
	fmt.Fprintf(tw, "Dopant\t%s, for the regions that name none\n", design.DopantLabel(d.DopantOf(&design.Region{})))
	fmt.Fprintf(tw, "Variants\t%s\n", strings.Join(d.VariantNames(), ", "))
	tw.Flush()

	prof := planner.DefaultProfile()
	for _, name := range names {
		l, err := d.Lay(name)
		if err != nil {
			return err
		}
		fmt.Fprintf(w, "\nVariant %s", l.Variant.Name)
		if l.Variant.Description != "" {
			fmt.Fprintf(w, ": %s", l.Variant.Description)
		}
		fmt.Fprintln(w)
		tw := tabwriter.NewWriter(w, 0, 0, 2, ' ', 0)
		fmt.Fprintln(tw, "  region\trole\tmode\tdopant\ttolerance\tH sites\twindows\tbounding box (nm)")
		total, windows := 0, 0
		vi := slices.IndexFunc(d.Variants, func(v design.Variant) bool { return v.Name == l.Variant.Name })
		for ri := range l.Regions {
			rl := &l.Regions[ri]
			r := rl.Region
			species := d.DopantText(r)
			t := planner.RegionTolerances(d, vi, ri, r, &prof)
			// The tolerance of the mode the region is written in; both
			// (AP/FE) for one the planner may write either way.
			tol := fmt.Sprintf("±%.2f nm", t.AP)
			switch m := r.EffectiveMode(); {
			case m == design.ModeFE:
				tol = fmt.Sprintf("±%.2f nm", t.FE)
			case m != design.ModeAP && t.AP != t.FE:
				tol = fmt.Sprintf("±%.2f/%.2f nm", t.AP, t.FE)
			}
			box := "(empty)"
			if !rl.Bounds.IsEmpty() {
				box = rectString(rl.Bounds)
			}
			fmt.Fprintf(tw, "  %s\t%s\t%s\t%s\t%s\t%d\t%d\t%s\n", r.Name, r.Role.Label(), r.EffectiveMode().Abbrev(), species, tol, rl.Sites.Count(), len(rl.Windows), box)
			total += rl.Sites.Count()
			windows += len(rl.Windows)
		}
		tw.Flush()
		fmt.Fprintf(w, "  %d regions, %d H sites, %d dopant window(s)\n", len(l.Regions), total, windows)
		for _, g := range l.Variant.TunnelGaps {
			a, b := l.Region(g.A), l.Region(g.B)
			if a == nil || b == nil {
				continue
			}
			fmt.Fprintf(w, "  tunnel gap %s – %s: %s\n", g.A, g.B, l.Surface.GapText(l.Gap(a, b)))
		}
		for _, c := range l.Variant.Couplings {
			fmt.Fprintf(w, "  coupling %s – %s: placement relative to each other ±%.2f nm\n", c.A, c.B, c.ToleranceNM)
		}
	}
	return nil
}

func rectString(r r2.Rect) string {
	return fmt.Sprintf("(%.1f, %.1f)–(%.1f, %.1f)", r.X.Lo, r.Y.Lo, r.X.Hi, r.Y.Hi)
}

// wrap breaks text into lines of at most width characters at spaces.
func wrap(text string, width int, prefix string) string {
	var b strings.Builder
	line := 0
	for i, word := range strings.Fields(text) {
		if i > 0 && line+1+len(word) > width {
			b.WriteString("\n" + prefix)
			line = 0
		} else if i > 0 {
			b.WriteByte(' ')
			line++
		}
		b.WriteString(word)
		line += len(word)
	}
	return b.String()
}

// withSD prints a probability with its standard deviation when it has one.
func withSD(p, sd float64) string {
	if sd == 0 {
		return fmt.Sprintf("%.2f", p)
	}
	return fmt.Sprintf("%.2f ± %.2f", p, sd)
}
