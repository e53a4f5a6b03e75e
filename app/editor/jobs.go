package editor

import (
	"context"
	"io"
	"strings"
	"time"

	"github.com/golang/geo/r2"

	"dimerpath/export"
	"dimerpath/internal/atomicfile"
	"dimerpath/lattice/design"
	"dimerpath/planner"
)

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
