package design

import (
	"fmt"

	"github.com/golang/geo/r2"

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
	words := 0
	for i := range v.Regions {
		r := &v.Regions[i]
		sites, err := r.Sites(surf, l.Templates)
		if err != nil {
			return nil, fmt.Errorf("variant %q: %w", v.Name, err)
		}
		if words += sites.StorageWords(); words > MaxLayoutWords {
			return nil, fmt.Errorf("variant %q: its regions need more than %d MiB of site storage, the limit (at region %q)", v.Name, MaxLayoutWords*8>>20, r.Name)
		}
		windows, err := r.Windows(surf, l.Templates)
		if err != nil {
			return nil, fmt.Errorf("variant %q: %w", v.Name, err)
		}
		l.Regions[i] = RegionLayout{
			Region:      r,
			Sites:       sites,
			Windows:     windows,
			ToleranceNM: r.Tolerance(l.Rules),
			Bounds:      sites.Bounds(surf),
		}
	}
	return l, nil
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
