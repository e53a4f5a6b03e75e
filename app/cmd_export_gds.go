package app

import (
	"flag"
	"fmt"
	"math"
	"path/filepath"
	"strconv"
	"strings"

	"github.com/golang/geo/r2"

	"dimerpath/export"
	"dimerpath/internal/atomicfile"
	"dimerpath/lattice"
	"dimerpath/lattice/design"
)

// gdsFlags are the flags that place the field on the chip (export to
// GDSII, import-gds) and pick the layer table (export only: import-gds
// names its layers with --layer).
type gdsFlags struct {
	offset   string
	rotation float64
	layers   string
}

func (g *gdsFlags) declare(fs *flag.FlagSet, layerMap bool) {
	fs.StringVar(&g.offset, "chip-offset", "0,0", "GDSII: chip position `X,Y` in nm of the field's lower-left corner")
	fs.Float64Var(&g.rotation, "chip-rotation", 0, "GDSII: rotation in `DEG`rees, counter-clockwise, of the field on the chip")
	if layerMap {
		fs.StringVar(&g.layers, "layers", "", "GDSII: layer map `MAP.json` over the default table (README \"GDSII layouts\")")
	}
}

// onlyForGDS refuses the GDSII flags on an export to another format.
func (g *gdsFlags) onlyForGDS(set map[string]bool) error {
	for _, n := range []string{"chip-offset", "chip-rotation", "layers"} {
		if set[n] {
			return fmt.Errorf("--%s applies only to a GDSII export (-o FILE.gds)", n)
		}
	}
	return nil
}

// frame returns the chip frame the flags give.
func (g *gdsFlags) frame() (lattice.ChipFrame, error) {
	off, err := parsePointNM(g.offset)
	if err != nil {
		return lattice.ChipFrame{}, fmt.Errorf("--chip-offset: %v", err)
	}
	if math.IsNaN(g.rotation) || math.IsInf(g.rotation, 0) {
		return lattice.ChipFrame{}, fmt.Errorf("--chip-rotation %g: want a finite angle in degrees", g.rotation)
	}
	return lattice.ChipFrame{OffsetNM: off, RotationDeg: g.rotation}, nil
}

// parsePointNM reads "X,Y" in nm, both finite and within ±1 m.
func parsePointNM(s string) (r2.Point, error) {
	xs, ys, ok := strings.Cut(s, ",")
	if !ok {
		return r2.Point{}, fmt.Errorf("%q: want X,Y in nm", s)
	}
	x, errX := strconv.ParseFloat(strings.TrimSpace(xs), 64)
	y, errY := strconv.ParseFloat(strings.TrimSpace(ys), 64)
	if errX != nil || errY != nil || math.IsNaN(x) || math.IsNaN(y) || math.Abs(x) > 1e9 || math.Abs(y) > 1e9 {
		return r2.Point{}, fmt.Errorf("%q: want X,Y, two finite numbers in nm", s)
	}
	return r2.Point{X: x, Y: y}, nil
}

func isGDSPath(path string) bool { return strings.EqualFold(filepath.Ext(path), ".gds") }

// runExportGDS writes the variant of a design as a GDSII library.
func runExportGDS(env Env, in string, fl exportFlags) int {
	fail := failer(env, "export")
	for _, n := range []string{"profile", "seed", "paper", "date"} {
		if fl.set[n] {
			return fail("--%s does not apply to a GDSII export, which writes the design's geometry without planning", n)
		}
	}
	frame, err := fl.gds.frame()
	if err != nil {
		return fail("%v", err)
	}
	layers := export.DefaultGDSLayers()
	if fl.gds.layers != "" {
		if layers, err = export.ReadGDSLayers(fl.gds.layers); err != nil {
			return fail("%v", err)
		}
	}
	if err := atomicfile.Check(fl.report.out); err != nil {
		return fail("%v", err)
	}
	data, isPlan, err := export.ReadInput(in)
	if err != nil {
		return fail("%v", err)
	}
	if isPlan {
		return fail("%s is a plan file: a GDSII export needs the design it was planned from", in)
	}
	d, err := design.Parse(in, data)
	if err != nil {
		return fail("%v", err)
	}
	l, err := d.Lay(fl.variant)
	if err != nil {
		return fail("%s: %v", in, err)
	}
	ctx, stop := interruptible()
	defer stop()
	sum, err := export.WriteGDSFile(ctx, fl.report.out, l, export.GDSOptions{Layers: layers, Chip: frame})
	if err != nil {
		return writeFailed(fail, fl.report.out, err)
	}
	arrays := ""
	if sum.ArrayRefs > 0 {
		arrays = fmt.Sprintf(", %d windows in %d arrays (AREF)", sum.ArrayWindows, sum.ArrayRefs)
	}
	fmt.Fprintf(env.Stderr, "dimerpath export: wrote %s (%s, variant %s: %d polygons, %d labels, %d windows%s; 1 pm database unit, 1 nm user unit%s)\n",
		fl.report.out, d.Name, l.Variant.Name, sum.Polygons, sum.Texts, sum.Windows, arrays, sizeNote(fl.report.out))
	if sum.SkippedWindows > 0 {
		fmt.Fprintf(env.Stderr, "dimerpath export: warning: %d windows left out: some of their dimers are not on their terrace (dimerpath check reports them)\n", sum.SkippedWindows)
	}
	fmt.Fprintln(env.Stderr, gdsCaution)
	return ExitOK
}

// gdsCaution is printed with every GDSII export and import.
const gdsCaution = "CAUTION: the GDSII layout is the design's geometry, not the written device: check registration marks and contact positions against the written sample's registration images before exposing a mask."
