package editor

import (
	"github.com/golang/geo/r2"

	"dimerpath/lattice"
	"dimerpath/lattice/design"
)

// siteCache is one region's rasterised sites and their extent.
type siteCache struct {
	sites  *lattice.SiteSet
	bounds r2.Rect
	stale  bool // bounds need recomputing
}

func (s *Session) newCache(set *lattice.SiteSet) *siteCache {
	return &siteCache{sites: set, stale: true}
}

// ensureCaches rasterises every region of the current variant that has
// no cached sites.
func (s *Session) ensureCaches() {
	for i := range s.d.Variants[s.variant].Regions {
		s.cacheOf(s.variant, i)
	}
}

// cacheOf returns region i of variant v's cache, rasterising it if
// needed. A region that fails to rasterise shows no sites and sets Err.
func (s *Session) cacheOf(v, i int) *siteCache {
	id := s.ids[v][i]
	if c := s.caches[id]; c != nil {
		return c
	}
	set := lattice.NewSiteSet()
	if s.surf != nil {
		got, err := regionSites(s.surf, s.d, &s.d.Variants[v].Regions[i])
		if err != nil {
			s.Err = err
		} else {
			set = got
		}
	}
	c := s.newCache(set)
	s.caches[id] = c
	return c
}

// pruneCaches drops the caches of region contents no longer live.
func (s *Session) pruneCaches() {
	live := map[regionID]bool{}
	for _, ids := range s.ids {
		for _, id := range ids {
			live[id] = true
		}
	}
	for id := range s.caches {
		if !live[id] {
			delete(s.caches, id)
		}
	}
}

// RegionSites returns the sites of region i of the current variant
// (read only).
func (s *Session) RegionSites(i int) *lattice.SiteSet {
	if i < 0 || i >= len(s.Variant().Regions) {
		return nil
	}
	return s.cacheOf(s.variant, i).sites
}

// RegionBounds returns the field rectangle (nm) of the area region i
// writes: the bounding box of its sites' cells, so a rectangle drawn by
// the tool reports its own size.
func (s *Session) RegionBounds(i int) r2.Rect {
	c := s.cacheOf(s.variant, i)
	if c.stale {
		c.bounds = c.sites.CellBounds(s.surf)
		c.stale = false
	}
	return c.bounds
}

// touch marks region i of variant v as about to change and returns its
// cache, which the caller may then change in place.
func (s *Session) touch(v, i int) *siteCache {
	old := s.ids[v][i]
	c := s.cacheOf(v, i)
	if s.fresh[old] {
		c.stale = true
		return c
	}
	refs := 0
	for _, ids := range s.ids {
		for _, id := range ids {
			if id == old {
				refs++
			}
		}
	}
	nid := s.newID()
	s.ids[v][i] = nid
	if refs > 1 {
		c = s.newCache(c.sites.Clone())
	} else {
		delete(s.caches, old)
	}
	c.stale = true
	s.caches[nid] = c
	return c
}

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
