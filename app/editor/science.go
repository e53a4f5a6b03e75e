package editor

import (
	"context"
	"io"
	"strings"
	"time"

	"github.com/golang/geo/r2"

	"dimerpath/assets"
	"dimerpath/export"
	"dimerpath/internal/atomicfile"
	"dimerpath/lattice"
	"dimerpath/lattice/design"
	"dimerpath/planner"
)

// This file is the one place where the GUI calls the pure packages for
// anything beyond reading their types: surfaces, rasterised regions,
// design-rule findings, plans, profiles and files. The GUI computes none
// of these itself.

// surfaceOf returns the lattice surface of d's field and terraces.
func surfaceOf(d *design.Design) (*lattice.Surface, error) { return d.Surface() }

// regionSites returns the H sites of region r: its shapes and painted
// sites, minus its erased sites.
func regionSites(surf *lattice.Surface, d *design.Design, r *design.Region) (*lattice.SiteSet, error) {
	return r.Sites(surf, d.Templates())
}

// ShapeSites rasterises one shape onto the lattice.
func ShapeSites(surf *lattice.Surface, d *design.Design, s *design.Shape) (*lattice.SiteSet, error) {
	r := design.Region{Name: "new shape", Shapes: []design.Shape{*s}}
	return r.Sites(surf, d.Templates())
}

// TemplateOf returns the window template named name: the design's own
// or a built-in one.
func TemplateOf(d *design.Design, name string) (lattice.WindowTemplate, bool) {
	t, ok := d.Templates()[name]
	return t, ok
}

// Finding is a design-rule finding as the GUI lists and draws it.
type Finding struct {
	Rule    string
	Error   bool // an error rather than a warning
	Message string
	Regions []string
	// At is the position the finding names, in field nm; Bounds the area
	// to zoom to (empty for a point finding).
	At     r2.Point
	Bounds r2.Rect
}

// CheckResult is what a design-rule check of one variant finds: the
// findings, and the measured width (nm) of each declared tunnel gap,
// keyed by its two region names in the order declared.
type CheckResult struct {
	Findings  []Finding
	GapWidths map[[2]string]float64
}

// CheckDesign runs the design-rule checks on one variant of d and
// measures its tunnel gaps. The error is for a variant that cannot be
// laid out at all.
func CheckDesign(ctx context.Context, d *design.Design, variant string) (CheckResult, error) {
	var res CheckResult
	fs, err := design.Check(d, variant)
	if err != nil {
		return res, err
	}
	if err := ctx.Err(); err != nil {
		return res, err
	}
	res.Findings = make([]Finding, len(fs))
	for i, f := range fs {
		res.Findings[i] = Finding{Rule: f.Rule, Error: f.Severity == design.SeverityError, Message: f.Message, Regions: f.Regions, At: f.AtNM, Bounds: r2.EmptyRect()}
	}
	v, err := d.Variant(variant)
	if err != nil || len(v.TunnelGaps) == 0 {
		return res, nil
	}
	l, err := d.Lay(variant)
	if err != nil {
		return res, nil // the findings say what is wrong
	}
	res.GapWidths = map[[2]string]float64{}
	for _, g := range v.TunnelGaps {
		if a, b := l.Region(g.A), l.Region(g.B); a != nil && b != nil {
			res.GapWidths[[2]string{g.A, g.B}] = l.GapNM(a, b)
		}
	}
	return res, ctx.Err()
}

// BuildPlan plans one variant of d.
func BuildPlan(ctx context.Context, d *design.Design, variant string, prof planner.Profile, opt planner.Options) (*planner.Plan, error) {
	return planner.Build(ctx, d, variant, prof, opt)
}

// defaultProfile returns the instrument profile planning starts from.
func defaultProfile() planner.Profile { return planner.DefaultProfile() }

// LoadDesign reads and validates a design file.
func LoadDesign(path string) (*design.Design, error) { return design.Load(path) }

// SaveDesign validates d and writes it atomically to path.
func SaveDesign(path string, d *design.Design) error { return design.Save(path, d) }

// DemoDesign returns the built-in demo design.
func DemoDesign() (*design.Design, error) {
	return design.Parse(assets.DemoName, assets.DemoDesign)
}

// ExportSettings are the choices an export needs besides the plan.
type ExportSettings struct {
	Paper     export.Paper
	Generator string // program name and version printed on reports
	Date      time.Time
}

// ExportPlan writes plan p of d in the format path's extension names
// (pdf, svg, json or csv), through a temporary file renamed into place.
// The figures draw the lattice and regions of the plan's variant.
func ExportPlan(ctx context.Context, path string, d *design.Design, p *planner.Plan, es ExportSettings, progress func(string, float64)) error {
	opt := export.Options{Paper: es.Paper, Date: es.Date, Generator: es.Generator, Progress: progress}
	if l, err := d.Lay(p.Variant); err == nil {
		opt.Pattern = export.PatternOf(l)
	}
	return export.WriteFile(ctx, path, p, opt)
}

// ExportComparison writes the comparison report of every variant's
// result to path (.pdf or .svg).
func ExportComparison(ctx context.Context, path string, res []export.VariantResult, es ExportSettings) error {
	opt := export.Options{Paper: es.Paper, Date: es.Date, Generator: es.Generator}
	return atomicfile.Write(path, 0o644, func(w io.Writer) error {
		if strings.HasSuffix(strings.ToLower(path), ".svg") {
			return export.WriteComparisonSVG(w, res, opt)
		}
		return export.WriteComparisonPDF(ctx, w, res, opt)
	})
}

// ValidateProfile reports every field of p that is not physical, then
// the first tip condition beyond the profile's own instrument limits.
func ValidateProfile(p planner.Profile) error {
	if err := p.Validate(); err != nil {
		return err
	}
	return p.CheckLimits(nil)
}

// LoadProfile reads and validates an instrument-profile file.
func LoadProfile(path string) (planner.Profile, error) { return planner.LoadProfile(path) }

// SaveProfile writes a valid profile atomically to path.
func SaveProfile(path string, p planner.Profile) error { return planner.SaveProfile(path, p) }

// PresetProfile returns the built-in profile of that name.
func PresetProfile(name string) (planner.Profile, error) { return planner.Preset(name) }
