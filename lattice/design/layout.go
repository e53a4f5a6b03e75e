package design

import (
	"fmt"
	"sync/atomic"

	"github.com/golang/geo/r2"

	"dimerpath/internal/blocks"
	"dimerpath/lattice"
)

// MaxLayoutWords bounds the site storage of all regions of one laid-out
// variant, in 64-bit words (256 MiB: about 40 fully covered 2 µm fields).
const MaxLayoutWords = 1 << 25

// Layout is one variant of a design laid onto its lattice: the surface,
// the rule settings, the templates and every region's sites and windows.
// It is what the planner, the checks and the GUI work from; it shares
// the Design's regions and variant (pointers), so it is stale once the
// design is edited.
type Layout struct {
	Design    *Design
	Variant   *Variant
	Surface   *lattice.Surface
	Rules     RuleSettings
	Templates Templates
	// Regions are in the variant's order.
	Regions []RegionLayout
}

// RegionLayout is one region laid onto the lattice.
type RegionLayout struct {
	Region *Region
	// Sites are the region's H sites (Region.Sites); they include the
	// sites of its windows.
	Sites *lattice.SiteSet
	// Windows are the dopant windows the region places (Region.Windows).
	Windows []lattice.Window
	// ToleranceNM is the placement tolerance, ±nm (Region.Tolerance).
	ToleranceNM float64
	// Bounds is the bounding box of the sites in field nm; empty when the
	// region has no sites.
	Bounds r2.Rect
}

// Lay lays the named variant (empty: the first) onto the design's
// lattice. Complexity: the sum of Region.Sites over the regions.
func (d *Design) Lay(variant string) (*Layout, error) {
	v, err := d.Variant(variant)
	if err != nil {
		return nil, err
	}
	surf, err := d.Surface()
	if err != nil {
		return nil, err
	}
	l := &Layout{
		Design:    d,
		Variant:   v,
		Surface:   surf,
		Rules:     d.EffectiveRules(),
		Templates: d.Templates(),
		Regions:   make([]RegionLayout, len(v.Regions)),
	}
	pre := paintRegions(v.Regions, surf, l.Templates)
	words := 0
	for i := range v.Regions {
		r := &v.Regions[i]
		p := pre[i]
		if p.sites == nil && p.err == nil {
			p = paintRegion(r, surf, l.Templates)
		}
		if p.err != nil {
			return nil, fmt.Errorf("variant %q: %w", v.Name, p.err)
		}
		if words += p.sites.StorageWords(); words > MaxLayoutWords {
			return nil, fmt.Errorf("variant %q: its regions need more than %d MiB of site storage, the limit (at region %q)", v.Name, MaxLayoutWords*8>>20, r.Name)
		}
		windows, err := r.Windows(surf, l.Templates)
		if err != nil {
			return nil, fmt.Errorf("variant %q: %w", v.Name, err)
		}
		l.Regions[i] = RegionLayout{
			Region:      r,
			Sites:       p.sites,
			Windows:     windows,
			ToleranceNM: r.Tolerance(l.Rules),
			Bounds:      p.bounds,
		}
	}
	return l, nil
}

// paintedRegion is a region's sites (and their bounds) or its error, as
// paintRegions left them; neither set: not painted.
type paintedRegion struct {
	sites  *lattice.SiteSet
	bounds r2.Rect
	err    error
}

// paintRegion paints one region's sites and finds their bounds.
func paintRegion(r *Region, surf *lattice.Surface, templates Templates) paintedRegion {
	var p paintedRegion
	if p.sites, p.err = r.Sites(surf, templates); p.err == nil {
		p.bounds = p.sites.Bounds(surf)
	}
	return p
}

// paintRegions paints the regions' sites on every core at once (a
// design's large pads take most of Lay). Lay then checks them in region
// order as it always did, painting there any region left out here, so
// its result and its first error are those of painting one by one. The
// regions are taken in order, and none is taken once one has failed or
// those painted hold more than MaxLayoutWords: beyond the limit at most
// one region per core is painted, as one region is one by one.
func paintRegions(regions []Region, surf *lattice.Surface, templates Templates) []paintedRegion {
	out := make([]paintedRegion, len(regions))
	var words atomic.Int64
	var stop atomic.Bool
	blocks.Run(len(regions), 2, 1, func() func(lo, hi int) {
		return func(lo, hi int) {
			for i := lo; i < hi; i++ {
				if stop.Load() {
					return
				}
				p := paintRegion(&regions[i], surf, templates)
				out[i] = p
				if p.err != nil {
					stop.Store(true)
					continue
				}
				if words.Add(int64(p.sites.StorageWords())) > MaxLayoutWords {
					stop.Store(true)
				}
			}
		}
	})
	return out
}

// Region returns the laid-out region with the given name, or nil.
func (l *Layout) Region(name string) *RegionLayout {
	for i := range l.Regions {
		if l.Regions[i].Region.Name == name {
			return &l.Regions[i]
		}
	}
	return nil
}
