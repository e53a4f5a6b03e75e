package editor

import (
	"fmt"
	"math"
	"slices"
	"strings"

	"dimerpath/lattice"
	"dimerpath/lattice/design"
)

// uniqueRegionName returns base, or base with a number, not yet used in
// the current variant.
func (s *Session) uniqueRegionName(base string) string {
	used := map[string]bool{}
	for _, r := range s.Variant().Regions {
		used[r.Name] = true
	}
	if !used[base] {
		return base
	}
	for k := 2; ; k++ {
		if n := fmt.Sprintf("%s %d", base, k); !used[n] {
			return n
		}
	}
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
		name = "region"
	}
	r := design.Region{Name: s.uniqueRegionName(name), Role: role, Mode: design.ModeAuto}
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
	// A tunnel gap to a deleted region goes with it.
	v.TunnelGaps = slices.DeleteFunc(slices.Clone(v.TunnelGaps), func(g design.TunnelGap) bool {
		return slices.Contains(names, g.A) || slices.Contains(names, g.B)
	})
	s.sel = nil
	s.shapeSel = nil
	label := "delete region " + names[0]
	if len(names) > 1 {
		label = fmt.Sprintf("delete %d regions", len(names))
	}
	s.commit(label, "", ChangeRegions|ChangeSelection|ChangeSites)
}

// RenameRegion renames region i; the name must be unique in the variant.
func (s *Session) RenameRegion(i int, name string) error {
	v := s.Variant()
	if i < 0 || i >= len(v.Regions) {
		return fmt.Errorf("no region %d", i)
	}
	name = strings.TrimSpace(name)
	if name == v.Regions[i].Name {
		return nil
	}
	for j, r := range v.Regions {
		if name == "" || (j != i && r.Name == name) {
			return fmt.Errorf("region name %q: %w", name, ErrName)
		}
	}
	s.touch(s.variant, i)
	old := v.Regions[i].Name
	v.Regions[i].Name = name
	// Tunnel gaps name their regions: they follow the rename.
	v.TunnelGaps = slices.Clone(v.TunnelGaps)
	for g := range v.TunnelGaps {
		if v.TunnelGaps[g].A == old {
			v.TunnelGaps[g].A = name
		}
		if v.TunnelGaps[g].B == old {
			v.TunnelGaps[g].B = name
		}
	}
	s.commit("rename region", fmt.Sprintf("rename-region-%d-%d", s.variant, i), ChangeRegions)
	return nil
}

// SetRegionRole sets region i's role in the device.
func (s *Session) SetRegionRole(i int, role design.Role) {
	s.setRegion(i, "role", func(r *design.Region) bool {
		if r.Role == role {
			return false
		}
		r.Role = role
		return true
	})
}

// SetRegionMode sets the write mode asked for region i.
func (s *Session) SetRegionMode(i int, mode design.Mode) {
	s.setRegion(i, "mode", func(r *design.Region) bool {
		if r.Mode == mode {
			return false
		}
		r.Mode = mode
		return true
	})
}

// SetRegionSpecies sets region i's dopant species ("P", "As" or "").
func (s *Session) SetRegionSpecies(i int, species string) {
	s.setRegion(i, "species", func(r *design.Region) bool {
		if r.Species == species {
			return false
		}
		r.Species = species
		return true
	})
}

// SetRegionTolerance sets region i's placement tolerance in nm (0 takes
// the mode's default). It refuses a negative or non-finite value.
func (s *Session) SetRegionTolerance(i int, nm float64) error {
	if !(nm >= 0) || math.IsInf(nm, 0) {
		return fmt.Errorf("tolerance %g nm: must be 0 (the mode's default) or a positive number", nm)
	}
	s.setRegion(i, "tolerance", func(r *design.Region) bool {
		if r.ToleranceNM == nm {
			return false
		}
		r.ToleranceNM = nm
		return true
	})
	return nil
}

func (s *Session) setRegion(i int, what string, f func(*design.Region) bool) {
	v := s.Variant()
	if i < 0 || i >= len(v.Regions) {
		return
	}
	r := v.Regions[i]
	if !f(&r) {
		return
	}
	s.touch(s.variant, i)
	v.Regions[i] = r
	s.commit("set "+what+" of "+r.Name, fmt.Sprintf("%s-%d-%d", what, s.variant, i), ChangeRegions)
}
