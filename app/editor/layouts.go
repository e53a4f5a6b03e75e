package editor

import (
	"fmt"
	"slices"
	"strings"

	"github.com/golang/geo/r2"

	"dimerpath/app/render"
	"dimerpath/lattice"
	"dimerpath/lattice/design"
	"dimerpath/lattice/design/gdsimport"
)

// Imported chip layouts (GDSII): kept as reference overlays or
// rasterised into a region. The reading, mapping and rasterising are
// gdsimport's; these methods only put the result into the design as one
// undoable edit.

// ImportReference adds the layout's polygons, mapped into the field
// through f, as a reference overlay named name (made unique) and
// returns the name used.
func (s *Session) ImportReference(l *gdsimport.Layout, name string, f lattice.ChipFrame) string {
	name = s.uniqueReferenceName(name)
	s.d.References = append(slices.Clip(s.d.References), l.Reference(name, f))
	s.commit("import layout "+name, "", ChangeSites)
	return name
}

func (s *Session) uniqueReferenceName(base string) string {
	if strings.TrimSpace(base) == "" {
		base = "layout"
	}
	return uniqueName(base, s.d.References, func(r design.Reference) string { return r.Name })
}

// ImportRegion rasterises the layout's polygons, mapped into the field
// through f, onto the lattice as a new region of the given role in the
// current variant (named name, made unique), selects it and returns its
// index and site count. It refuses polygons that cover no site: the
// frame is then wrong.
func (s *Session) ImportRegion(l *gdsimport.Layout, name string, role design.Role, f lattice.ChipFrame) (int, int, error) {
	if s.surf == nil {
		return -1, 0, fmt.Errorf("the design has no lattice: %v", s.surfErr)
	}
	sites := l.Sites(s.surf, f)
	if sites.IsEmpty() {
		return -1, 0, fmt.Errorf("the %d polygons cover no H site of the field through the chip frame (offset (%.1f, %.1f) nm, rotation %g°): check the frame",
			len(l.Polygons), f.OffsetNM.X, f.OffsetNM.Y, f.RotationDeg)
	}
	i := s.addRegion(name, role)
	r := &s.Variant().Regions[i]
	r.Painted = sites
	s.caches[s.ids[s.variant][i]] = s.newCache(sites.Clone())
	s.commit("import layout as region "+r.Name, "", ChangeRegions|ChangeSelection|ChangeSites)
	return i, sites.Count(), nil
}

// References returns the names of the design's reference overlays.
func (s *Session) References() []string {
	names := make([]string, len(s.d.References))
	for i, r := range s.d.References {
		names[i] = r.Name
	}
	return names
}

// DeleteReference removes reference overlay i.
func (s *Session) DeleteReference(i int) {
	if i < 0 || i >= len(s.d.References) {
		return
	}
	name := s.d.References[i].Name
	s.d.References = slices.Delete(slices.Clone(s.d.References), i, i+1)
	s.commit("delete layout "+name, "", ChangeSites)
}

// referenceOverlays returns the references as the renderer draws them.
func (s *Session) referenceOverlays() []render.Reference {
	out := make([]render.Reference, 0, len(s.d.References))
	for _, ref := range s.d.References {
		var r render.Reference
		for _, poly := range ref.PolygonsNM {
			q := make([]r2.Point, len(poly))
			for i, v := range poly {
				q[i] = r2.Point{X: v[0], Y: v[1]}
			}
			r.Polygons = append(r.Polygons, q)
			r.Bounds = append(r.Bounds, r2.RectFromPoints(q...))
		}
		out = append(out, r)
	}
	return out
}
