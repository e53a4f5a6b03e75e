package app

import (
	"flag"
	"fmt"
	"maps"
	"slices"
	"strings"

	"dimerpath/internal/atomicfile"
	"dimerpath/lattice"
	"dimerpath/lattice/design"
	"dimerpath/lattice/design/gdsimport"
)

func init() {
	Register(&Command{
		Name:    "import-gds",
		Usage:   "import-gds FILE.gds --layer L[/D] [--layer ...] [--as reference|region] [--role ROLE] [--name NAME] [--variant NAME] [--top CELL] [--chip-offset X,Y] [--chip-rotation DEG | --marks LABEL=FIDUCIAL,LABEL=FIDUCIAL] [-o OUT.json] DESIGN.json",
		Summary: "bring layers of a GDSII layout into a design, as a reference overlay or as a region's sites",
		Help: `Reads the GDSII library FILE.gds, flattens its hierarchy (every SREF and AREF
with its reflection, rotation and magnification) from its top structure (or
--top CELL), keeps the polygons and paths of the layers given with --layer (L
for every data type of layer L, L/D for one), and maps them from chip to field
coordinates: through --chip-offset and --chip-rotation (the same flags as the
GDSII export: a field point p lies at offset + R·p on the chip), or through
--marks, two labels (TEXT) of the layout matched to two fiducials of the
design, whose distances must agree within 1%.

--as reference (the default) keeps the polygons in the design as a reference
overlay: drawn on the lattice in the window and on the plan's overview, never
written. --as region rasterises them onto the lattice: every H site inside a
polygon becomes a site of a new region of --role ROLE (device, gate, lead,
pad, donor or other) in --variant NAME (default: the first).

The design is written back to DESIGN.json (or to -o OUT.json) through a
temporary file renamed into place, only if it still validates. Exit status 0
imported, 2 anything else (unreadable layout, no such layer, marks that do not
match, a name already used).`,
		Flags: func(fs *flag.FlagSet) func(Env, []string) int {
			var fl importFlags
			fs.Var(&fl.layers, "layer", "import layer `L[/D]` (repeat for more layers)")
			fs.StringVar(&fl.as, "as", "reference", "keep the layers as a `reference` overlay, or rasterise them as a region")
			fs.StringVar(&fl.role, "role", "", "with --as region: the region's `ROLE` (device, gate, lead, pad, donor, other)")
			fs.StringVar(&fl.name, "name", "", "`NAME` of the reference or region (default: the file's name and layers)")
			fs.StringVar(&fl.variant, "variant", "", "with --as region: the variant `NAME` to add the region to (default: the first)")
			fs.StringVar(&fl.top, "top", "", "flatten the structure `CELL` (default: every top structure)")
			fs.StringVar(&fl.marks, "marks", "", "map chip to field by two marks: `LABEL=FIDUCIAL,LABEL=FIDUCIAL`")
			fs.StringVar(&fl.out, "o", "", "write the design to `OUT.json` (default: back to DESIGN.json)")
			fl.gds.declare(fs, false)
			return func(env Env, args []string) int {
				fl.set = map[string]bool{}
				fs.Visit(func(f *flag.Flag) { fl.set[f.Name] = true })
				return runImportGDS(env, args, fl)
			}
		},
	})
}

type layerList []gdsimport.Layer

func (l *layerList) String() string {
	var s []string
	for _, x := range *l {
		s = append(s, x.String())
	}
	return strings.Join(s, ",")
}

func (l *layerList) Set(v string) error {
	for _, part := range strings.Split(v, ",") {
		x, err := gdsimport.ParseLayer(part)
		if err != nil {
			return err
		}
		*l = append(*l, x)
	}
	return nil
}

type importFlags struct {
	layers                                   layerList
	as, role, name, variant, top, marks, out string
	gds                                      gdsFlags
	set                                      map[string]bool
}

func runImportGDS(env Env, args []string, fl importFlags) int {
	fail := failer(env, "import-gds")
	if len(args) != 2 {
		return fail("want a layout and a design file, got %d arguments (dimerpath import-gds --help)", len(args))
	}
	gdsPath, designPath := args[0], args[1]
	if !isGDSPath(gdsPath) && isGDSPath(designPath) {
		return fail("the layout comes first: dimerpath import-gds FILE.gds ... DESIGN.json")
	}
	if len(fl.layers) == 0 {
		return fail("--layer is required: the layers to import, L or L/D (repeat --layer for more)")
	}
	switch fl.as {
	case "reference":
		for _, n := range []string{"role", "variant"} {
			if fl.set[n] {
				return fail("--%s applies only with --as region", n)
			}
		}
	case "region":
		if fl.role == "" {
			return fail("--as region needs --role: device, gate, lead, pad, donor or other")
		}
	default:
		return fail("--as %q: want reference or region", fl.as)
	}
	if fl.marks != "" && (fl.set["chip-offset"] || fl.set["chip-rotation"]) {
		return fail("give the chip frame either by --marks or by --chip-offset and --chip-rotation, not both")
	}
	out := fl.out
	if out == "" {
		out = designPath
	}
	// Before the work: a read-only, full or missing destination shows now.
	if err := atomicfile.Check(out); err != nil {
		return fail("%v", err)
	}
	d, err := design.Load(designPath)
	if err != nil {
		return fail("%v", err)
	}
	layout, err := gdsimport.ReadFile(gdsPath, gdsimport.Options{Layers: fl.layers, Top: fl.top})
	if err != nil {
		return fail("%v", err)
	}
	if len(layout.Polygons) == 0 {
		return fail("%s: nothing on layer %s (the layout has %s)", gdsPath, fl.layers.String(), layerCounts(layout.Found))
	}
	var frame lattice.ChipFrame
	how := ""
	if fl.marks != "" {
		marks, err := gdsimport.ParseMarks(fl.marks)
		if err != nil {
			return fail("--marks %v", err)
		}
		if frame, err = layout.FrameFromMarks(d, marks); err != nil {
			return fail("%v", err)
		}
		how = fmt.Sprintf("from marks %s and %s", marks[0].Label, marks[1].Label)
	} else {
		if frame, err = fl.gds.frame(); err != nil {
			return fail("%v", err)
		}
		how = "as given"
	}
	name := fl.name
	if name == "" {
		name = layout.DefaultName()
	}
	var what string
	if fl.as == "reference" {
		if err := gdsimport.AddReference(d, layout.Reference(name, frame)); err != nil {
			return fail("%v", err)
		}
		what = fmt.Sprintf("reference %q: %d polygons", name, len(layout.Polygons))
	} else {
		surf, err := d.Surface()
		if err != nil {
			return fail("%s: %v", designPath, err)
		}
		sites := layout.Sites(surf, frame)
		if sites.IsEmpty() {
			return fail("the %d polygons of layer %s cover no H site of the field through the chip frame (offset %v nm, rotation %g°): check the frame",
				len(layout.Polygons), fl.layers.String(), frame.OffsetNM, frame.RotationDeg)
		}
		if err := gdsimport.AddRegion(d, fl.variant, name, design.Role(fl.role), sites); err != nil {
			return fail("%v", err)
		}
		what = fmt.Sprintf("region %q (%s): %d polygons, %d H sites", name, fl.role, len(layout.Polygons), sites.Count())
	}
	if err := design.Save(out, d); err != nil {
		return fail("%v", err)
	}
	fmt.Fprintf(env.Stderr, "dimerpath import-gds: %s from %s layer %s, chip frame %s (offset %.3f, %.3f nm, rotation %.6g°); wrote %s\n",
		what, gdsPath, fl.layers.String(), how, frame.OffsetNM.X, frame.OffsetNM.Y, frame.RotationDeg, out)
	if layout.Paths > 0 || layout.ZeroWidthPaths > 0 {
		fmt.Fprintf(env.Stderr, "dimerpath import-gds: %d path segments taken as rectangles (round ends as square), %d zero-width paths left out\n", layout.Paths, layout.ZeroWidthPaths)
	}
	for k, n := range layout.Skipped {
		fmt.Fprintf(env.Stderr, "dimerpath import-gds: %d %s elements left out (not polygons)\n", n, k)
	}
	fmt.Fprintln(env.Stderr, gdsCaution)
	return ExitOK
}

// layerCounts lists the layers a layout has, "13/2 (4), 14/1 (2)".
func layerCounts(found map[string]int) string {
	if len(found) == 0 {
		return "no polygons or paths at all"
	}
	return "polygons on " + strings.Join(countsByName(found, "%s (%d)"), ", ")
}

// countsByName formats each name of counts with its count by format (a
// %s, then a %d), in the order of the names.
func countsByName(counts map[string]int, format string) []string {
	var parts []string
	for _, k := range slices.Sorted(maps.Keys(counts)) {
		parts = append(parts, fmt.Sprintf(format, k, counts[k]))
	}
	return parts
}
