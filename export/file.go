package export

import (
	"context"
	"fmt"
	"io"
	"path/filepath"
	"strings"
	"time"

	"dimerpath/internal/atomicfile"
	"dimerpath/planner"
)

// Paper is a page size for the printed reports.
type Paper string

const (
	A4     Paper = "a4"     // 210 x 297 mm
	Letter Paper = "letter" // US Letter, 8.5 x 11 in (215.9 x 279.4 mm)
)

// ParsePaper returns the paper named s ("a4" or "letter", any case).
func ParsePaper(s string) (Paper, error) {
	switch p := Paper(strings.ToLower(strings.TrimSpace(s))); p {
	case A4, Letter:
		return p, nil
	}
	return "", fmt.Errorf("export: unknown paper size %q (want a4 or letter)", s)
}

// size returns the page width and height in mm; the zero Paper is A4.
func (p Paper) size() (w, h float64) {
	if p == Letter {
		return 215.9, 279.4
	}
	return 210, 297
}

// Options are what the exporters need besides the plan.
type Options struct {
	// Paper is the page size of PDF reports (default A4).
	Paper Paper
	// Date is printed on reports as the date of the plan; pass it in so
	// the same inputs give the same file. The zero time prints no date.
	Date time.Time
	// Generator names the program, e.g. "dimerpath 0.1.0"; it is printed
	// on reports and recorded in plan files.
	Generator string
	// Pattern, when set, draws the lattice and the regions' sites under
	// the route in PDF and SVG figures.
	Pattern *Pattern
	// Progress, when non-nil, is called with a stage name and the
	// fraction done (0..1) during long exports.
	Progress func(stage string, fraction float64)
}

func (o Options) progress(stage string, f float64) {
	if o.Progress != nil {
		o.Progress(stage, f)
	}
}

// Format is an export file format.
type Format string

const (
	FormatPDF  Format = "pdf"  // the operator's printed plan
	FormatSVG  Format = "svg"  // pattern and route
	FormatJSON Format = "json" // the full plan, machine-readable
	FormatCSV  Format = "csv"  // one row per tip action
)

// FormatFromPath returns the format named by path's extension (.pdf,
// .svg, .json or .csv, any case); any other extension is an error
// wrapping ErrFormat.
func FormatFromPath(path string) (Format, error) {
	ext := strings.ToLower(filepath.Ext(path))
	switch f := Format(strings.TrimPrefix(ext, ".")); f {
	case FormatPDF, FormatSVG, FormatJSON, FormatCSV:
		return f, nil
	}
	if ext == "" {
		return "", fmt.Errorf("%s: %w: the file name has no extension (use .pdf, .svg, .json or .csv)", path, ErrFormat)
	}
	return "", fmt.Errorf("%s: %w %q (use .pdf, .svg, .json or .csv)", path, ErrFormat, ext)
}

// Write writes p in format f to w.
func Write(ctx context.Context, w io.Writer, f Format, p *planner.Plan, opt Options) error {
	switch f {
	case FormatPDF:
		return WritePDF(ctx, w, p, opt)
	case FormatSVG:
		return WriteSVG(w, p, opt)
	case FormatJSON:
		return WritePlanJSON(w, p, opt.Generator)
	case FormatCSV:
		return WriteActionsCSV(w, p)
	}
	return fmt.Errorf("%w %q", ErrFormat, f)
}

// wrapWriter lets tests inject a failing writer between the exporter and
// the temporary file.
var wrapWriter = func(w io.Writer) io.Writer { return w }

// WriteFile writes p to path in the format its extension names, through
// a temporary file in the same directory renamed into place only when
// everything was written: a failed or cancelled export leaves any
// earlier file at path as it was and no partial file behind. Errors
// name path.
func WriteFile(ctx context.Context, path string, p *planner.Plan, opt Options) error {
	f, err := FormatFromPath(path)
	if err != nil {
		return err
	}
	return atomicfile.Write(path, 0o644, func(w io.Writer) error {
		return Write(ctx, wrapWriter(w), f, p, opt)
	})
}
