package editor

import (
	"fmt"
	"image/color"
	"slices"
	"strings"

	"dimerpath/app/render"
	"dimerpath/lattice"
	"dimerpath/lattice/design"
)

// uniqueRegionName returns base, or base with a number, not yet used in
// the current variant.
func (s *Session) uniqueRegionName(base string) string {
	return uniqueName(base, s.Variant().Regions, func(r design.Region) string { return r.Name })
}

// NewRegionName returns the name a new region of role r would get: the
// role's base name ("lead", "pad", "device"), made unique in the
// current variant ("lead 2").
func (s *Session) NewRegionName(r design.Role) string {
	return s.uniqueRegionName(regionBaseName(r))
}

// AddRegion appends a region with the given name (made unique) and
// role, selects it and returns its index.
func (s *Session) AddRegion(name string, role design.Role) int {
	i := s.addRegion(name, role)
	s.commit("add region "+s.Variant().Regions[i].Name, "", ChangeRegions|ChangeSelection|ChangeSites)
	return i
}

// addRegion appends a region without committing.
func (s *Session) addRegion(name string, role design.Role) int {
	if strings.TrimSpace(name) == "" {
		name = regionBaseName(role)
	}
	r := design.Region{Name: s.uniqueRegionName(name), Role: role, Mode: design.ModeAuto, Colour: s.freeColour()}
	v := s.Variant()
	v.Regions = append(v.Regions, r)
	s.ids[s.variant] = append(s.ids[s.variant], s.newID())
	i := len(v.Regions) - 1
	s.caches[s.ids[s.variant][i]] = s.newCache(lattice.NewSiteSet())
	s.sel = []int{i}
	s.shapeSel = nil
	return i
}

// DeleteRegions removes the given regions of the current variant.
func (s *Session) DeleteRegions(regions ...int) {
	v := s.Variant()
	var names []string
	del := map[int]bool{}
	for _, i := range regions {
		if i >= 0 && i < len(v.Regions) && !del[i] {
			del[i] = true
			names = append(names, v.Regions[i].Name)
		}
	}
	if len(del) == 0 {
		return
	}
	var keep []design.Region
	var ids []regionID
	for i, r := range v.Regions {
		if !del[i] {
			keep = append(keep, r)
			ids = append(ids, s.ids[s.variant][i])
		}
	}
	v.Regions, s.ids[s.variant] = keep, ids
	// A tunnel gap or coupling to a deleted region goes with it.
	v.TunnelGaps = slices.DeleteFunc(slices.Clone(v.TunnelGaps), func(g design.TunnelGap) bool {
		return slices.Contains(names, g.A) || slices.Contains(names, g.B)
	})
	v.Couplings = slices.DeleteFunc(slices.Clone(v.Couplings), func(c design.Coupling) bool {
		return slices.Contains(names, c.A) || slices.Contains(names, c.B)
	})
	s.sel = nil
	s.shapeSel = nil
	label := "delete region " + names[0]
	if len(names) > 1 {
		label = fmt.Sprintf("delete %d regions", len(names))
	}
	s.commit(label, "", ChangeRegions|ChangeSelection|ChangeSites)
}

// RenameRegion renames region i of the current variant; the design's
// rules refuse an empty name or one another region of the variant has.
// The variant's tunnel gaps and couplings follow the rename.
func (s *Session) RenameRegion(i int, name string) error {
	v := s.Variant()
	if i < 0 || i >= len(v.Regions) {
		return fmt.Errorf("no region %d", i)
	}
	name = strings.TrimSpace(name)
	old := v.Regions[i].Name
	if name == old {
		return nil
	}
	err := s.validEdit(fmt.Sprintf("rename region %q to %q", old, name), func() func() {
		gaps, cs := v.TunnelGaps, v.Couplings
		v.Regions[i].Name = name
		v.TunnelGaps = slices.Clone(gaps)
		for g := range v.TunnelGaps {
			rename(&v.TunnelGaps[g].A, old, name)
			rename(&v.TunnelGaps[g].B, old, name)
		}
		v.Couplings = slices.Clone(cs)
		for c := range v.Couplings {
			rename(&v.Couplings[c].A, old, name)
			rename(&v.Couplings[c].B, old, name)
		}
		return func() { v.Regions[i].Name, v.TunnelGaps, v.Couplings = old, gaps, cs }
	})
	if err != nil {
		return err
	}
	s.touch(s.variant, i)
	s.commit("rename region", fmt.Sprintf("rename-region-%d-%d", s.variant, i), ChangeRegions)
	return nil
}

// rename sets *ref to name where it names old.
func rename(ref *string, old, name string) {
	if *ref == old {
		*ref = name
	}
}

// SetRegionRole sets region i's role in the device.
func (s *Session) SetRegionRole(i int, role design.Role) error {
	return s.setRegion(i, "role", func(r *design.Region) { r.Role = role })
}

// SetRegionMode sets the write mode asked for region i.
func (s *Session) SetRegionMode(i int, mode design.Mode) error {
	return s.setRegion(i, "mode", func(r *design.Region) { r.Mode = mode })
}

// SetRegionSpecies sets the dopant region i receives: the species of a
// window template of the design, "" for the design's dopant, or
// design.NoDopant for none. A region with a dopant is written in its
// dopant's step, so it forgets the lithography step it named without.
func (s *Session) SetRegionSpecies(i int, species string) error {
	return s.setRegion(i, "dopant", func(r *design.Region) {
		r.Species = species
		if species != design.NoDopant {
			r.LithographyStep = ""
		}
	})
}

// SetRegionTolerance sets region i's placement tolerance in nm (0 takes
// the mode's default); the design's rules refuse a negative, non-finite
// or larger than field-sized one.
func (s *Session) SetRegionTolerance(i int, nm float64) error {
	return s.setRegion(i, "tolerance", func(r *design.Region) { r.ToleranceNM = nm })
}

// setRegion applies f to a copy of region i of the current variant and
// keeps the result if it differs and the design's rules accept it.
func (s *Session) setRegion(i int, what string, f func(*design.Region)) error {
	v := s.Variant()
	if i < 0 || i >= len(v.Regions) {
		return fmt.Errorf("no region %d", i)
	}
	old := v.Regions[i]
	r := old
	f(&r)
	if r.Role == old.Role && r.Mode == old.Mode && r.Species == old.Species && r.LithographyStep == old.LithographyStep && r.ToleranceNM == old.ToleranceNM && r.Colour == old.Colour {
		return nil
	}
	err := s.validEdit("set "+what+" of "+r.Name, func() func() {
		v.Regions[i] = r
		return func() { v.Regions[i] = old }
	})
	if err != nil {
		return err
	}
	s.touch(s.variant, i)
	s.commit("set "+what+" of "+r.Name, fmt.Sprintf("%s-%d-%d", what, s.variant, i), ChangeRegions)
	return nil
}

// RegionColour returns the colour region i of the current variant is
// drawn in: its own (design.Region.Colour), which stays with it, or the
// palette's colour for its place when it has none or an unreadable one.
func (s *Session) RegionColour(i int) color.NRGBA {
	v := s.Variant()
	if i >= 0 && i < len(v.Regions) {
		if c, ok := render.ParseColour(v.Regions[i].Colour); ok {
			return c
		}
	}
	return render.RegionColor(i)
}

// SetRegionColour sets region i's colour, "#rrggbb".
func (s *Session) SetRegionColour(i int, colour string) error {
	return s.setRegion(i, "colour", func(r *design.Region) { r.Colour = colour })
}

// giveColours gives every region without a colour the palette's colour
// for its place in its variant, as it was drawn before regions kept
// their own: opening a design changes nothing on screen, and from then
// on deleting a region recolours no other.
func giveColours(d *design.Design) {
	for v := range d.Variants {
		for i := range d.Variants[v].Regions {
			if r := &d.Variants[v].Regions[i]; r.Colour == "" {
				r.Colour = render.ColourHex(render.RegionColor(i))
			}
		}
	}
}

// freeColour returns the first palette colour no region of the current
// variant has, or the palette's colour for the next place when all are
// taken.
func (s *Session) freeColour() string {
	used := map[string]bool{}
	v := s.Variant()
	for _, r := range v.Regions {
		used[strings.ToLower(r.Colour)] = true
	}
	for _, c := range render.RegionPalette() {
		if h := render.ColourHex(c); !used[h] {
			return h
		}
	}
	return render.ColourHex(render.RegionColor(len(v.Regions)))
}
