package editor

import (
	"errors"
	"fmt"
	"math"
	"slices"

	"github.com/golang/geo/r2"

	"dimerpath/lattice/design"
)

// Drawing by numbers: the selected shape's position and size as fields
// the user types into. A typed value is snapped to the lattice as the
// tools snap what the mouse draws, so the shape stored is always one the
// tools could have drawn; the panel shows the typed value beside the
// snapped one.

// ShapeFields are a shape's position and size in field nm, the fields of
// its kind set:
//
//   - rect: X, Y (lower-left corner), W, H (width, height);
//   - polygon: Points; polyline: Points and WidthNM;
//   - window, site, dimer: X, Y (the window's or dimer's centre, the
//     site's position), and Template for a window;
//   - array: X, Y (its first element, as for that element's kind),
//     Cols, Rows, PitchDimers, PitchRows, and Template when its element
//     is a window.
type ShapeFields struct {
	Kind                               design.ShapeKind
	Of                                 design.ShapeKind // an array's element
	X, Y, W, H                         float64
	Points                             []r2.Point
	WidthNM                            float64
	Template                           string
	Cols, Rows, PitchDimers, PitchRows int
}

// FieldsOf returns sh's position and size as fields.
func FieldsOf(sh design.Shape) ShapeFields {
	f := ShapeFields{Kind: sh.Kind, WidthNM: sh.WidthNM, Template: sh.Template}
	pts := make([]r2.Point, len(sh.Points))
	for i, q := range sh.Points {
		pts[i] = r2.Point{X: q[0], Y: q[1]}
	}
	switch sh.Kind {
	case design.ShapeRect:
		if len(pts) == 2 {
			r := r2.RectFromPoints(pts[0], pts[1])
			f.X, f.Y, f.W, f.H = r.X.Lo, r.Y.Lo, r.X.Length(), r.Y.Length()
		}
	case design.ShapePolygon, design.ShapePolyline:
		f.Points = pts
	case design.ShapeArray:
		if a := sh.Array; a != nil {
			f.Cols, f.Rows, f.PitchDimers, f.PitchRows = a.Cols, a.Rows, a.PitchDimers, a.PitchRows
			if a.Of != nil {
				f.Of, f.Template = a.Of.Kind, a.Of.Template
				if len(a.Of.Points) > 0 {
					f.X, f.Y = a.Of.Points[0][0], a.Of.Points[0][1]
				}
			}
		}
	default: // window, site, dimer
		if len(pts) > 0 {
			f.X, f.Y = pts[0].X, pts[0].Y
		}
	}
	return f
}

// limitNM bounds typed coordinates, as design files bound theirs.
const limitNM = 1e4

// SnapShape returns the shape the fields describe, snapped to the lattice
// as the tools snap: a rectangle's edges to the nearest cell edges
// (midway between dimers and between rows), polygon and line vertices,
// windows and dimers to dimer centres, sites to sites. It refuses, naming
// the field, values that are not finite, beyond ±10 µm, a rectangle or
// line without width, a polygon of fewer than 3 vertices or a line of
// fewer than 2, an unknown template, and array counts or pitches out of
// the Array tool's ranges.
func (s *Session) SnapShape(f ShapeFields) (design.Shape, error) {
	num := func(name string, v float64) error {
		if math.IsNaN(v) || math.IsInf(v, 0) || math.Abs(v) > limitNM {
			return fmt.Errorf("%s %g nm: must be a number within ±%g nm", name, v, limitNM)
		}
		return nil
	}
	for _, c := range []struct {
		name string
		v    float64
	}{{"x", f.X}, {"y", f.Y}, {"width", f.W}, {"height", f.H}, {"line width", f.WidthNM}} {
		if err := num(c.name, c.v); err != nil {
			return design.Shape{}, err
		}
	}
	for i, p := range f.Points {
		if err := errors.Join(num(fmt.Sprintf("point %d x", i+1), p.X), num(fmt.Sprintf("point %d y", i+1), p.Y)); err != nil {
			return design.Shape{}, err
		}
	}
	at := r2.Point{X: f.X, Y: f.Y}
	switch f.Kind {
	case design.ShapeRect:
		if !(f.W > 0 && f.H > 0) {
			return design.Shape{}, fmt.Errorf("a rectangle %g x %g nm: width and height must be above 0", f.W, f.H)
		}
		lo, hi := s.snapRect(at, at.Add(r2.Point{X: f.W, Y: f.H}))
		return design.Shape{Kind: design.ShapeRect, Points: pts(roundPt(lo), roundPt(hi))}, nil
	case design.ShapePolygon, design.ShapePolyline:
		want := 3
		if f.Kind == design.ShapePolyline {
			want = 2
			if !(f.WidthNM >= 0.1 && f.WidthNM <= 2000) {
				return design.Shape{}, fmt.Errorf("line width %g nm: must be between 0.1 and 2000 nm", f.WidthNM)
			}
		}
		var ps []r2.Point
		for _, p := range f.Points {
			q := roundPt(s.snapDimerCentre(p))
			if len(ps) == 0 || ps[len(ps)-1] != q {
				ps = append(ps, q)
			}
		}
		if len(ps) < want {
			return design.Shape{}, fmt.Errorf("a %s needs at least %d different vertices (after snapping to dimer centres), got %d", ShapeName(design.Shape{Kind: f.Kind}), want, len(ps))
		}
		sh := design.Shape{Kind: f.Kind, Points: pts(ps...)}
		if f.Kind == design.ShapePolyline {
			sh.WidthNM = f.WidthNM
		}
		return sh, nil
	case design.ShapeArray:
		o := DefaultToolOptions()
		o.Template, o.ArrayOf, o.ArrayCols, o.ArrayRows, o.ArrayPitchDimers, o.ArrayPitchRows = f.Template, string(f.Of), f.Cols, f.Rows, f.PitchDimers, f.PitchRows
		if err := o.Validate(); err != nil {
			return design.Shape{}, err
		}
		of, err := s.snapElement(f.Of, f.Template, at)
		if err != nil {
			return design.Shape{}, err
		}
		return design.Shape{Kind: design.ShapeArray, Array: &design.Array{Of: &of, Cols: f.Cols, Rows: f.Rows, PitchDimers: f.PitchDimers, PitchRows: f.PitchRows}}, nil
	case design.ShapeWindow, design.ShapeSite, design.ShapeDimer:
		return s.snapElement(f.Kind, f.Template, at)
	}
	return design.Shape{}, fmt.Errorf("a %s cannot be edited by number", f.Kind)
}

// snapElement is a window, dimer or site at p, snapped as the tools do.
func (s *Session) snapElement(kind design.ShapeKind, template string, p r2.Point) (design.Shape, error) {
	switch kind {
	case design.ShapeWindow:
		if _, ok := TemplateOf(s.d, template); !ok {
			return design.Shape{}, fmt.Errorf("window template %q: not defined (built in: P, As)", template)
		}
		return design.Shape{Kind: design.ShapeWindow, Template: template, Points: pts(roundPt(s.snapDimerCentre(p)))}, nil
	case design.ShapeDimer:
		return design.Shape{Kind: design.ShapeDimer, Points: pts(roundPt(s.snapDimerCentre(p)))}, nil
	case design.ShapeSite:
		return design.Shape{Kind: design.ShapeSite, Points: pts(roundPt(s.snapSite(p)))}, nil
	}
	return design.Shape{}, fmt.Errorf("an array of %q: must be of windows, dimers or sites", kind)
}

// roundPt rounds to 0.1 pm, as moved shapes are, so files stay readable.
func roundPt(p r2.Point) r2.Point { return r2.Point{X: roundPM(p.X), Y: roundPM(p.Y)} }

// SetSelectedShapeFields replaces the selected shape by the one the
// fields describe, snapped (SnapShape), as one undo step; the region is
// rasterised again and the new shape's sites are taken off its erased
// sites, as for a shape drawn. The design's own rules may refuse the
// result (an *EditError). It returns the fields of the shape stored,
// that is the snapped values, for the panel to show beside the typed
// ones.
func (s *Session) SetSelectedShapeFields(f ShapeFields) (ShapeFields, error) {
	i, k := s.SelectedShape()
	if i < 0 {
		return ShapeFields{}, errors.New("no shape is selected")
	}
	v := s.Variant()
	old := v.Regions[i]
	sh, err := s.SnapShape(f)
	if err != nil {
		return ShapeFields{}, err
	}
	if shapesEqual(sh, old.Shapes[k]) {
		return FieldsOf(sh), nil
	}
	sites, err := ShapeSites(s.surf, s.d, &sh)
	if err != nil {
		return ShapeFields{}, err
	}
	what := fmt.Sprintf("set %s of %s by number", ShapeName(old.Shapes[k]), old.Name)
	err = s.validEdit(what, func() func() {
		r := old
		r.Shapes = slices.Clone(old.Shapes)
		r.Shapes[k] = sh
		if r.Erased != nil {
			r.Erased = r.Erased.Clone().Difference(sites)
		}
		v.Regions[i] = r
		return func() { v.Regions[i] = old }
	})
	if err != nil {
		return ShapeFields{}, err
	}
	s.cancelGesture()
	c := s.touch(s.variant, i)
	if err := s.rasterise(c, &v.Regions[i]); err != nil {
		s.Err = err
	}
	s.shapeSel = &selectedShape{ref: shapeRef{i, k}, sites: sites, bounds: sites.CellBounds(s.surf)}
	s.commit(what, "", ChangeSites|ChangeRegions|ChangeSelection)
	return FieldsOf(sh), nil
}

func shapesEqual(a, b design.Shape) bool {
	if a.Kind != b.Kind || a.Template != b.Template || a.WidthNM != b.WidthNM || !slices.Equal(a.Points, b.Points) {
		return false
	}
	if (a.Array == nil) != (b.Array == nil) {
		return false
	}
	if a.Array == nil {
		return true
	}
	x, y := *a.Array, *b.Array
	if x.Cols != y.Cols || x.Rows != y.Rows || x.PitchDimers != y.PitchDimers || x.PitchRows != y.PitchRows || (x.Of == nil) != (y.Of == nil) {
		return false
	}
	return x.Of == nil || shapesEqual(*x.Of, *y.Of)
}

// WrittenArea describes what the selected shape writes, in the lattice's
// own terms: the extent of its sites' cells in field nm and, for a
// rectangle, its size in dimers and rows ("x 990.02–1009.99 nm, y
// 994.47–1005.99 nm: 19.97 × 11.52 nm, 52 dimers × 15 rows, 1560 H
// sites"). It is "" when no shape is selected.
func (s *Session) WrittenArea() string {
	i, k := s.SelectedShape()
	if i < 0 {
		return ""
	}
	b := s.shapeSel.bounds
	n := s.shapeSel.sites.Count()
	if b.IsEmpty() {
		return "no H site on the lattice"
	}
	text := fmt.Sprintf("x %.2f–%.2f nm, y %.2f–%.2f nm: %.2f × %.2f nm", b.X.Lo, b.X.Hi, b.Y.Lo, b.Y.Hi, b.X.Length(), b.Y.Length())
	if sh := s.Variant().Regions[i].Shapes[k]; sh.Kind == design.ShapeRect && len(sh.Points) == 2 {
		a := r2.Point{X: sh.Points[0][0], Y: sh.Points[0][1]}
		c := r2.Point{X: sh.Points[1][0], Y: sh.Points[1][1]}
		d, r := s.surf.Frame(s.terraceFor(a, c)).CellCount(r2.RectFromPoints(a, c))
		text += fmt.Sprintf(", %d dimers × %d rows", d, r)
	}
	return text + fmt.Sprintf(", %d H sites", n)
}
