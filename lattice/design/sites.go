package design

import (
	"fmt"
	"slices"

	"github.com/golang/geo/r2"

	"dimerpath/lattice"
)

// Templates maps template names to dopant-window templates.
type Templates map[string]lattice.WindowTemplate

// Names returns the template names in sorted order.
func (t Templates) Names() []string {
	names := make([]string, 0, len(t))
	for n := range t {
		names = append(names, n)
	}
	slices.Sort(names)
	return names
}

// Templates returns the design's window templates: the built-in P and As
// templates (lattice.BuiltinTemplates) with the design's own templates
// over them, so a design may edit a built-in's probability by giving a
// template of the same name.
func (d *Design) Templates() Templates {
	t := Templates{}
	for _, w := range lattice.BuiltinTemplates() {
		t[w.Name] = w
	}
	for _, w := range d.WindowTemplates {
		t[w.Name] = w.Normalized()
	}
	return t
}

// ParseStep parses the direction of a step as written in design files:
// "up", "down", or "" (a version 1 file), which is read as down.
func ParseStep(s string) (lattice.StepDirection, error) {
	switch s {
	case "up":
		return lattice.StepUp, nil
	case "down", "":
		return lattice.StepDown, nil
	}
	return lattice.StepDown, fmt.Errorf("step %q is not \"up\" or \"down\"", s)
}

// ParseRows parses a row direction as written in design files, "x" or
// "y".
func ParseRows(s string) (lattice.RowDirection, error) {
	switch s {
	case "x":
		return lattice.RowsAlongX, nil
	case "y":
		return lattice.RowsAlongY, nil
	}
	return 0, fmt.Errorf("row direction %q is not \"x\" or \"y\"", s)
}

// Surface returns the lattice of the design's field and terraces. A
// terrace with StepFrom takes its rows and lattice offset from the named
// earlier terrace across one single-height step. A design without
// terraces is one terrace with rows along x. It fails for a design that
// Validate would refuse.
func (d *Design) Surface() (*lattice.Surface, error) {
	terraces := make([]lattice.Terrace, len(d.Terraces))
	for i, t := range d.Terraces {
		lt := lattice.Terrace{Name: t.Name}
		if t.StepFrom != "" {
			j := slices.IndexFunc(d.Terraces[:i], func(o Terrace) bool { return o.Name == t.StepFrom })
			if j < 0 {
				return nil, fmt.Errorf("design: terraces[%d] %q: step_from %q names no earlier terrace", i, t.Name, t.StepFrom)
			}
			dir, err := ParseStep(t.Step)
			if err != nil {
				return nil, fmt.Errorf("design: terraces[%d] %q: %v", i, t.Name, err)
			}
			lt = terraces[j].AcrossStep(dir)
			lt.Name = t.Name
			lt.Offset = lt.Offset.Add(point(t.OffsetNM))
			if t.Rows != "" && t.Rows != lt.Rows.String() {
				return nil, fmt.Errorf("design: terraces[%d] %q: rows %q disagrees with the step from %q, whose rows turn to %q", i, t.Name, t.Rows, t.StepFrom, lt.Rows)
			}
		} else {
			rows, err := ParseRows(t.Rows)
			if err != nil {
				return nil, fmt.Errorf("design: terraces[%d] %q: %v", i, t.Name, err)
			}
			lt.Rows = rows
			lt.Offset = point(t.OffsetNM)
		}
		lt.Boundary = points(t.Boundary)
		terraces[i] = lt
	}
	surf, err := lattice.NewSurface(d.Field.WidthNM, d.Field.HeightNM, terraces...)
	if err != nil {
		return nil, fmt.Errorf("design: %w", err)
	}
	return surf, nil
}

func point(p [2]float64) r2.Point { return r2.Point{X: p[0], Y: p[1]} }

func points(ps [][2]float64) []r2.Point {
	if len(ps) == 0 {
		return nil
	}
	out := make([]r2.Point, len(ps))
	for i, p := range ps {
		out[i] = point(p)
	}
	return out
}

// Sites returns the region's H sites on surf: the union of its shapes
// (windows from templates) and its painted sites, minus its erased
// sites. Parts of shapes outside the field or off the terraces hold no
// sites (Check reports them). It fails when a shape names an unknown
// template or has too few points, or when painted sites do not exist on
// surf; the error names the shape or field. Complexity: O(lattice lines
// crossed + words), independent of the number of sites.
func (r *Region) Sites(surf *lattice.Surface, templates Templates) (*lattice.SiteSet, error) {
	set := lattice.NewSiteSet()
	for i := range r.Shapes {
		if err := addShape(set, surf, templates, &r.Shapes[i]); err != nil {
			return nil, fmt.Errorf("region %q: shapes[%d]: %w", r.Name, i, err)
		}
	}
	if r.Painted != nil {
		if missing := surf.Missing(r.Painted); !missing.IsEmpty() {
			return nil, fmt.Errorf("region %q: painted: %s", r.Name, describeMissing(missing))
		}
		set.Union(r.Painted)
	}
	if r.Erased != nil {
		set.Difference(r.Erased)
	}
	return set, nil
}

// describeMissing says how many sites of a set do not exist and where the
// first is.
func describeMissing(missing *lattice.SiteSet) string {
	n := missing.Count()
	var first lattice.Site
	for s := range missing.All() {
		first = s
		break
	}
	return fmt.Sprintf("%d sites do not exist on the surface (outside the field or on another terrace), the first %v", n, first)
}

// Windows returns every dopant window the region places, in shape order,
// including each copy of an array of windows (row by row). Windows are
// returned as placed even where they reach beyond their terrace (Check
// reports those); a window whose centre is off every terrace is left
// out. The error cases are those of Sites.
func (r *Region) Windows(surf *lattice.Surface, templates Templates) ([]lattice.Window, error) {
	var out []lattice.Window
	for i := range r.Shapes {
		sh := &r.Shapes[i]
		var err error
		out, err = appendWindows(out, surf, templates, sh)
		if err != nil {
			return nil, fmt.Errorf("region %q: shapes[%d]: %w", r.Name, i, err)
		}
	}
	return out, nil
}

func appendWindows(out []lattice.Window, surf *lattice.Surface, templates Templates, sh *Shape) ([]lattice.Window, error) {
	switch sh.Kind {
	case ShapeWindow:
		w, ok, err := placeWindow(surf, templates, sh)
		if err != nil || !ok {
			return out, err
		}
		return append(out, w), nil
	case ShapeArray:
		if sh.Array == nil || sh.Array.Of == nil {
			return out, fmt.Errorf("array: missing \"of\"")
		}
		if sh.Array.Of.Kind != ShapeWindow {
			return out, nil
		}
		w, ok, err := placeWindow(surf, templates, sh.Array.Of)
		if err != nil || !ok {
			return out, err
		}
		a := sh.Array
		// One allocation for the whole array: growing a 10^6-window list
		// by doubling cost most of laying such a variant out.
		out = slices.Grow(out, a.Rows*a.Cols)
		for j := 0; j < a.Rows; j++ {
			for i := 0; i < a.Cols; i++ {
				out = append(out, w.Shifted(i*a.PitchDimers, j*a.PitchRows))
			}
		}
	}
	return out, nil
}

func placeWindow(surf *lattice.Surface, templates Templates, sh *Shape) (lattice.Window, bool, error) {
	t, ok := templates[sh.Template]
	if !ok {
		return lattice.Window{}, false, fmt.Errorf("template %q is not defined (known: %s)", sh.Template, quoteList(templates.Names()))
	}
	if len(sh.Points) < 1 {
		return lattice.Window{}, false, fmt.Errorf("window: needs one point, its centre")
	}
	w, ok := surf.PlaceWindow(t, point(sh.Points[0]))
	return w, ok, nil
}

// Area returns the plane figure of a rect, polygon or polyline shape,
// and false for the other kinds (which are placed on the lattice, not
// rasterised).
func (sh *Shape) Area() (lattice.Area, bool) {
	switch sh.Kind {
	case ShapeRect:
		if len(sh.Points) == 2 {
			return lattice.RectFromCorners(point(sh.Points[0]), point(sh.Points[1])), true
		}
	case ShapePolygon:
		if len(sh.Points) >= 3 {
			return lattice.Polygon(points(sh.Points)), true
		}
	case ShapePolyline:
		if len(sh.Points) >= 1 {
			return lattice.Polyline{Points: points(sh.Points), WidthNM: sh.WidthNM}, true
		}
	}
	return nil, false
}

// minPoints is the least number of points each kind of shape needs.
var minPoints = map[ShapeKind]int{
	ShapeSite: 1, ShapeDimer: 1, ShapeRect: 2, ShapePolygon: 3, ShapePolyline: 2, ShapeWindow: 1, ShapeArray: 0,
}

func addShape(set *lattice.SiteSet, surf *lattice.Surface, templates Templates, sh *Shape) error {
	need, known := minPoints[sh.Kind]
	if !known {
		return fmt.Errorf("unknown shape kind %q", sh.Kind)
	}
	if len(sh.Points) < need {
		return fmt.Errorf("%s: needs %d points, has %d", sh.Kind, need, len(sh.Points))
	}
	switch sh.Kind {
	case ShapeSite:
		if site, _, ok := surf.Snap(point(sh.Points[0])); ok {
			surf.PaintSite(set, site)
		}
	case ShapeDimer:
		if t, r, d, ok := surf.SnapDimer(point(sh.Points[0])); ok {
			surf.PaintDimer(set, t, r, d)
		}
	case ShapeRect, ShapePolygon, ShapePolyline:
		a, _ := sh.Area()
		surf.Paint(set, a)
	case ShapeWindow:
		w, ok, err := placeWindow(surf, templates, sh)
		if err != nil {
			return err
		}
		if ok {
			surf.AddWindow(set, w)
		}
	case ShapeArray:
		return addArray(set, surf, templates, sh.Array)
	}
	return nil
}

// addArray paints every copy of an array of sites, dimers or windows.
func addArray(set *lattice.SiteSet, surf *lattice.Surface, templates Templates, a *Array) error {
	if a == nil || a.Of == nil {
		return fmt.Errorf("array: missing \"of\"")
	}
	of := a.Of
	if len(of.Points) < 1 {
		return fmt.Errorf("array: of: %s needs a point", of.Kind)
	}
	p := point(of.Points[0])
	switch of.Kind {
	case ShapeSite, ShapeDimer:
		site, _, ok := surf.Snap(p)
		if !ok {
			return nil
		}
		for j := 0; j < a.Rows; j++ {
			for i := 0; i < a.Cols; i++ {
				c := site
				c.Dimer += i * a.PitchDimers
				c.Row += j * a.PitchRows
				if of.Kind == ShapeSite {
					surf.PaintSite(set, c)
				} else {
					surf.PaintDimer(set, c.Terrace, c.Row, c.Dimer)
				}
			}
		}
	case ShapeWindow:
		w, ok, err := placeWindow(surf, templates, of)
		if err != nil || !ok {
			return err
		}
		for j := 0; j < a.Rows; j++ {
			for i := 0; i < a.Cols; i++ {
				surf.AddWindow(set, w.Shifted(i*a.PitchDimers, j*a.PitchRows))
			}
		}
	default:
		return fmt.Errorf("array: of: kind %q cannot be arrayed (site, dimer or window)", of.Kind)
	}
	return nil
}
