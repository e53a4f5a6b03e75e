package editor

import (
	"fmt"
	"math"
	"slices"

	"github.com/golang/geo/r2"

	"dimerpath/app/render"
	"dimerpath/lattice"
	"dimerpath/lattice/design"
)

// Shape selection, deletion and moving. The Select tool picks the shape
// under the pointer (and its region); Delete removes that shape, and a
// drag that starts on a shape moves it by whole lattice vectors of its
// terrace (a dimer pitch along the rows, a row spacing across), so the
// moved shape covers the same pattern of sites as before. Every change
// is one undo step.

// shapeRef names shape Shape of region Region of the current variant.
type shapeRef struct{ Region, Shape int }

var noShape = shapeRef{-1, -1}

// selectedShape is the shape selection with its rasterised sites and
// their extent, for hit tests and the outline drawn on the view.
type selectedShape struct {
	ref    shapeRef
	sites  *lattice.SiteSet
	bounds r2.Rect
}

// SelectedShape returns the selected shape's region and index in the
// region's Shapes, or -1, -1.
func (s *Session) SelectedShape() (region, shape int) {
	if s.shapeSel == nil {
		return -1, -1
	}
	return s.shapeSel.ref.Region, s.shapeSel.ref.Shape
}

// SelectedShapeBounds returns the field extent (nm) of the area the
// selected shape writes (its sites' cells), empty when none is selected.
func (s *Session) SelectedShapeBounds() r2.Rect {
	if s.shapeSel == nil {
		return r2.EmptyRect()
	}
	return s.shapeSel.bounds
}

// SelectShape selects shape k of region i (and the region). It returns
// false, selecting nothing, for indices out of range.
func (s *Session) SelectShape(i, k int) bool {
	v := s.Variant()
	if i < 0 || i >= len(v.Regions) || k < 0 || k >= len(v.Regions[i].Shapes) {
		return false
	}
	sites, err := ShapeSites(s.surf, s.d, &v.Regions[i].Shapes[k])
	if err != nil {
		s.Err = err
		return false
	}
	s.sel = []int{i}
	s.shapeSel = &selectedShape{ref: shapeRef{i, k}, sites: sites, bounds: sites.CellBounds(s.surf)}
	s.notify(ChangeSelection | ChangeSites)
	return true
}

// ShapeAt returns the topmost region holding the site nearest p and
// the last of its shapes that holds that site (shapes are drawn in
// order, so the last one is on top); shape is -1 when the site was
// painted by hand, and both are -1 off every region. A hit costs one
// rasterisation per shape of that region tried.
func (s *Session) ShapeAt(p r2.Point) (region, shape int) {
	region = s.RegionAt(p)
	if region < 0 {
		return -1, -1
	}
	site, _, _ := s.surf.Snap(p)
	r := &s.Variant().Regions[region]
	for k := len(r.Shapes) - 1; k >= 0; k-- {
		if s.shapeSel != nil && s.shapeSel.ref == (shapeRef{region, k}) {
			if s.shapeSel.sites.Contains(site) {
				return region, k
			}
			continue
		}
		sites, err := ShapeSites(s.surf, s.d, &r.Shapes[k])
		if err == nil && sites.Contains(site) {
			return region, k
		}
	}
	return region, -1
}

// ShapeName says what a shape is, for labels: "rectangle", "window (P)".
func ShapeName(sh design.Shape) string {
	switch sh.Kind {
	case design.ShapeRect:
		return "rectangle"
	case design.ShapePolyline:
		return "line"
	case design.ShapeWindow:
		return "window (" + sh.Template + ")"
	case design.ShapeArray:
		if sh.Array != nil && sh.Array.Of != nil {
			return fmt.Sprintf("%d x %d array of %s", sh.Array.Cols, sh.Array.Rows, ShapeName(*sh.Array.Of)+"s")
		}
		return "array"
	}
	return string(sh.Kind)
}

// DeleteSelectedShape removes the selected shape from its region. A
// region left with no shape and no painted site goes too, in the same
// undo step. It reports whether something was deleted.
func (s *Session) DeleteSelectedShape() bool {
	i, k := s.SelectedShape()
	if i < 0 {
		return false
	}
	v := s.Variant()
	r := v.Regions[i]
	what := ShapeName(r.Shapes[k])
	if len(r.Shapes) == 1 && (r.Painted == nil || r.Painted.IsEmpty()) {
		s.shapeSel = nil
		s.DeleteRegions(i)
		return true
	}
	s.cancelGesture()
	c := s.touch(s.variant, i)
	r = v.Regions[i]
	r.Shapes = slices.Delete(slices.Clone(r.Shapes), k, k+1)
	v.Regions[i] = r
	if err := s.rasterise(c, &v.Regions[i]); err != nil {
		s.Err = err
	}
	s.shapeSel = nil
	s.commit("delete "+what+" from "+r.Name, "", ChangeSites|ChangeRegions|ChangeSelection)
	return true
}

// rasterise sets the cache's sites to region r's.
func (s *Session) rasterise(c *siteCache, r *design.Region) error {
	sites, err := regionSites(s.surf, s.d, r)
	if err != nil {
		c.sites = lattice.NewSiteSet()
		return err
	}
	c.sites = sites
	c.stale = true
	return nil
}

// LatticeStep returns the lattice vector of the terrace under p nearest
// to d (nm): whole dimer pitches along its rows and whole row spacings
// across them. Off the field it returns d unchanged.
func (s *Session) LatticeStep(p, d r2.Point) r2.Point {
	ti := s.surf.TerraceAt(p)
	if ti < 0 {
		return d
	}
	return s.surf.Frame(ti).LatticeVector(d)
}

// movedShape returns sh translated by d (nm), its points rounded to
// 0.1 pm so that files stay readable (far below any snapping distance).
func movedShape(sh design.Shape, d r2.Point) design.Shape {
	move := func(pts [][2]float64) [][2]float64 {
		out := make([][2]float64, len(pts))
		for i, q := range pts {
			out[i] = [2]float64{roundPM(q[0] + d.X), roundPM(q[1] + d.Y)}
		}
		return out
	}
	m := sh
	m.Points = move(sh.Points)
	if sh.Array != nil {
		a := *sh.Array
		if a.Of != nil {
			of := *a.Of
			of.Points = move(a.Of.Points)
			a.Of = &of
		}
		m.Array = &a
	}
	return m
}

func roundPM(v float64) float64 { return math.Round(v*1e4) / 1e4 }

// MoveSelectedShape moves the selected shape by the lattice vector
// nearest d (nm) on the terrace under the shape's first point, and
// reports the vector used; a vector of zero changes nothing. The sites
// the moved shape covers are taken off the region's erased sites, as for
// a new shape, so it shows whole.
func (s *Session) MoveSelectedShape(d r2.Point) r2.Point {
	i, k := s.SelectedShape()
	if i < 0 {
		return r2.Point{}
	}
	v := s.Variant()
	sh := v.Regions[i].Shapes[k]
	step := s.LatticeStep(s.shapeAnchor(sh), d)
	if step == (r2.Point{}) {
		return step
	}
	moved := movedShape(sh, step)
	sites, err := ShapeSites(s.surf, s.d, &moved)
	if err != nil {
		s.Err = err
		return r2.Point{}
	}
	s.cancelGesture()
	c := s.touch(s.variant, i)
	r := v.Regions[i]
	r.Shapes = slices.Clone(r.Shapes)
	r.Shapes[k] = moved
	if r.Erased != nil {
		r.Erased = r.Erased.Clone().Difference(sites)
	}
	v.Regions[i] = r
	if err := s.rasterise(c, &v.Regions[i]); err != nil {
		s.Err = err
	}
	s.shapeSel = &selectedShape{ref: shapeRef{i, k}, sites: sites, bounds: sites.CellBounds(s.surf)}
	s.commit(fmt.Sprintf("move %s of %s by (%.2f, %.2f) nm", ShapeName(sh), r.Name, step.X, step.Y), "", ChangeSites|ChangeRegions|ChangeSelection)
	return step
}

// shapeAnchor is the point whose terrace a shape moves on: its first
// point (an array's first element).
func (s *Session) shapeAnchor(sh design.Shape) r2.Point {
	if len(sh.Points) > 0 {
		return r2.Point{X: sh.Points[0][0], Y: sh.Points[0][1]}
	}
	if sh.Array != nil && sh.Array.Of != nil && len(sh.Array.Of.Points) > 0 {
		q := sh.Array.Of.Points[0]
		return r2.Point{X: q[0], Y: q[1]}
	}
	return r2.Point{}
}

// movePreview returns the outline of the selected shape moved by the
// lattice vector nearest d: the figure itself for rectangles, polygons
// and lines, the extent of its sites for the others.
func (s *Session) movePreview(d r2.Point) *render.Preview {
	i, k := s.SelectedShape()
	if i < 0 {
		return nil
	}
	sh := s.Variant().Regions[i].Shapes[k]
	step := s.LatticeStep(s.shapeAnchor(sh), d)
	m := movedShape(sh, step)
	var ps []r2.Point
	for _, q := range m.Points {
		ps = append(ps, r2.Point{X: q[0], Y: q[1]})
	}
	switch m.Kind {
	case design.ShapeRect:
		return &render.Preview{Points: ps, Rect: true}
	case design.ShapePolygon:
		return &render.Preview{Points: ps, Closed: true}
	case design.ShapePolyline:
		return &render.Preview{Points: ps, WidthNM: m.WidthNM}
	}
	b := s.shapeSel.bounds
	if b.IsEmpty() {
		return nil
	}
	lo, hi := b.Lo().Add(step), b.Hi().Add(step)
	return &render.Preview{Points: []r2.Point{lo, hi}, Rect: true}
}
