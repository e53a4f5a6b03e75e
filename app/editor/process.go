package editor

import (
	"fmt"
	"slices"

	"dimerpath/lattice"
	"dimerpath/lattice/design"
	"dimerpath/planner"
)

// The design's fields for the session as a lab runs it: the dopant each
// region receives (and so its process step), the step a region without
// dopant is written in, couplings of relative placement and the
// tolerance of a tunnel gap's width. Every edit is checked by the
// design's own rules (validEdit) and can be undone.

// Species returns the donor species the design can deliver, the species
// of its window templates: the built-in ones first (P, As), then a
// lab's own in name order. These are the dopants a region or the design
// may name.
func (s *Session) Species() []string {
	var out []string
	seen := map[string]bool{}
	add := func(sp string) {
		if sp != "" && !seen[sp] {
			seen[sp] = true
			out = append(out, sp)
		}
	}
	ts := s.d.Templates()
	for _, w := range lattice.BuiltinTemplates() {
		add(ts[w.Name].Species)
	}
	var own []string
	for _, w := range ts {
		if !seen[w.Species] {
			own = append(own, w.Species)
		}
	}
	slices.Sort(own)
	for _, sp := range own {
		add(sp)
	}
	return out
}

// DesignDopant returns the dopant of the regions that name none: the
// design's Dopant, or design.DefaultDopant when it names none.
func (s *Session) DesignDopant() string {
	if s.d.Dopant != "" {
		return s.d.Dopant
	}
	return design.DefaultDopant
}

// SetDesignDopant sets the dopant of the regions that name none; the
// design's rules refuse a species no window template delivers.
func (s *Session) SetDesignDopant(species string) error {
	if species == s.DesignDopant() {
		return nil
	}
	old := s.d.Dopant
	return s.validCommit(fmt.Sprintf("set the design's dopant to %q", species), "set the design's dopant", "", ChangeRegions, func() func() {
		s.d.Dopant = species
		return func() { s.d.Dopant = old }
	})
}

// SetRegionLithographyStep sets the process step, by its species, in
// which region i is written when it receives no dopant (species
// design.NoDopant); "" writes it in the first step. The design's rules
// refuse it for a region with a dopant (it is written in its dopant's
// step) and a species no window template delivers.
func (s *Session) SetRegionLithographyStep(i int, species string) error {
	return s.setRegion(i, "lithography step", func(r *design.Region) { r.LithographyStep = species })
}

// AddCoupling declares that the placement of regions a and b of the
// current variant relative to each other matters (a dopant window and
// the island that senses it): the planner writes their facing parts in
// one drift window, or registers the later on the earlier. Its
// tolerance starts at NewCouplingTolerance(a, b). The design's rules
// refuse a region the variant does not have, a region coupled to itself
// and a pair already coupled.
func (s *Session) AddCoupling(a, b string) error {
	v := s.Variant()
	c := design.Coupling{A: a, B: b, ToleranceNM: s.NewCouplingTolerance(a, b)}
	label := "couple " + a + " – " + b
	return s.validCommit(label, label, "", ChangeRegions, func() func() {
		cs := v.Couplings
		v.Couplings = append(slices.Clone(cs), c)
		return func() { v.Couplings = cs }
	})
}

// NewCouplingTolerance is the tolerance a new coupling of a and b
// starts with: the tighter of the two regions' placement tolerances
// (their own, else their mode's default), which each of them already
// holds on its own. The user tightens it from there.
func (s *Session) NewCouplingTolerance(a, b string) float64 {
	rs := s.d.EffectiveRules()
	tol := 0.0
	for _, r := range s.Variant().Regions {
		if r.Name == a || r.Name == b {
			if t := r.Tolerance(rs); tol == 0 || t < tol {
				tol = t
			}
		}
	}
	if tol == 0 {
		tol = rs.APToleranceNM
	}
	return tol
}

// RemoveCoupling removes coupling i of the current variant.
func (s *Session) RemoveCoupling(i int) {
	v := s.Variant()
	if i < 0 || i >= len(v.Couplings) {
		return
	}
	c := v.Couplings[i]
	v.Couplings = slices.Delete(slices.Clone(v.Couplings), i, i+1)
	s.commit("remove coupling "+c.A+" – "+c.B, "", ChangeRegions)
}

// SetCouplingTolerance sets the tolerance (±nm) of coupling i of the
// current variant; the design's rules refuse one that is not more than
// 0 or larger than the field. Consecutive changes of one coupling's
// tolerance (typing) undo as one.
func (s *Session) SetCouplingTolerance(i int, nm float64) error {
	v := s.Variant()
	if i < 0 || i >= len(v.Couplings) {
		return fmt.Errorf("no coupling %d", i)
	}
	c := v.Couplings[i]
	if c.ToleranceNM == nm {
		return nil
	}
	label := "set tolerance of coupling " + c.A + " – " + c.B
	return s.validCommit(label, label, fmt.Sprintf("coupling-tolerance-%d-%d", s.variant, i), ChangeRegions, func() func() {
		cs := v.Couplings
		v.Couplings = slices.Clone(cs)
		v.Couplings[i].ToleranceNM = nm
		return func() { v.Couplings = cs }
	})
}

// SetTunnelGapTolerance sets the tolerance (±nm) of the width of tunnel
// gap i of the current variant, 0 for the design rule's; the design's
// rules refuse a negative or larger than field-sized one. Consecutive
// changes of one gap's tolerance (typing) undo as one.
func (s *Session) SetTunnelGapTolerance(i int, nm float64) error {
	v := s.Variant()
	if i < 0 || i >= len(v.TunnelGaps) {
		return fmt.Errorf("no tunnel gap %d", i)
	}
	g := v.TunnelGaps[i]
	if g.ToleranceNM == nm {
		return nil
	}
	label := "set tolerance of tunnel gap " + g.A + " – " + g.B
	return s.validCommit(label, label, fmt.Sprintf("gap-tolerance-%d-%d", s.variant, i), ChangeRegions, func() func() {
		gs := v.TunnelGaps
		v.TunnelGaps = slices.Clone(gs)
		v.TunnelGaps[i].ToleranceNM = nm
		return func() { v.TunnelGaps = gs }
	})
}

// DefaultTolerances returns the tolerances (±nm) the planner holds
// region i of the current variant to when the region names none of its
// own: its role's for leads, gates and pads, else its mode's, each from
// the design's rules, else the session's profile
// (planner.RegionTolerances).
func (s *Session) DefaultTolerances(i int) planner.Tolerances {
	v := s.Variant()
	if i < 0 || i >= len(v.Regions) {
		return planner.Tolerances{}
	}
	r := v.Regions[i]
	r.ToleranceNM = 0
	return planner.RegionTolerances(s.d, s.variant, i, &r, &s.Profile)
}
