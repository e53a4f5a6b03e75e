package editor

import (
	"slices"

	"dimerpath/lattice"
	"dimerpath/lattice/design"
)

// Deep copies of the design model. The editor keeps immutable copies for
// undo and hands the planner a copy it may read while the user edits on.

func cloneDesign(d *design.Design) *design.Design {
	c := cloneDesignShell(d)
	for v := range c.Variants {
		for i := range c.Variants[v].Regions {
			c.Variants[v].Regions[i] = cloneRegion(d.Variants[v].Regions[i])
		}
	}
	return c
}

// cloneDesignShell copies everything but the regions' contents: the
// region slices are new, the Region values shallow copies sharing their
// shapes and site sets with d.
func cloneDesignShell(d *design.Design) *design.Design {
	c := *d
	c.Terraces = slices.Clone(d.Terraces)
	for i, t := range c.Terraces {
		c.Terraces[i].Boundary = slices.Clone(t.Boundary)
	}
	c.Fiducials = slices.Clone(d.Fiducials)
	if d.Rules != nil {
		r := cloneRules(*d.Rules)
		c.Rules = &r
	}
	c.WindowTemplates = slices.Clone(d.WindowTemplates)
	// References are never changed in place, only added or removed:
	// share them, but let an append allocate anew.
	c.References = slices.Clip(d.References)
	c.Variants = slices.Clone(d.Variants)
	for i, v := range c.Variants {
		c.Variants[i].Regions = slices.Clone(v.Regions)
		c.Variants[i].TunnelGaps = slices.Clone(v.TunnelGaps)
		c.Variants[i].Couplings = slices.Clone(v.Couplings)
	}
	return &c
}

// cloneRules copies every rule a pointer holds, so an undo snapshot
// keeps its values when the live design's rules change
// (TestCloneRulesSharesNothing finds the fields by reflection).
func cloneRules(r design.Rules) design.Rules {
	r.ScanFieldNM = clonePointer(r.ScanFieldNM)
	r.WindowGapDimers = clonePointer(r.WindowGapDimers)
	r.WindowFacingRows = clonePointer(r.WindowFacingRows)
	r.FEKeepOutNM = clonePointer(r.FEKeepOutNM)
	r.TunnelGapMinNM = clonePointer(r.TunnelGapMinNM)
	r.TunnelGapMaxNM = clonePointer(r.TunnelGapMaxNM)
	r.APToleranceNM = clonePointer(r.APToleranceNM)
	r.FEToleranceNM = clonePointer(r.FEToleranceNM)
	r.LeadToleranceNM = clonePointer(r.LeadToleranceNM)
	r.GateToleranceNM = clonePointer(r.GateToleranceNM)
	r.PadToleranceNM = clonePointer(r.PadToleranceNM)
	r.TunnelGapToleranceNM = clonePointer(r.TunnelGapToleranceNM)
	r.DefectWindowClearanceNM = clonePointer(r.DefectWindowClearanceNM)
	r.DefectClearanceNM = clonePointer(r.DefectClearanceNM)
	return r
}

// clonePointer returns a pointer to a copy of *p, or nil.
func clonePointer[T any](p *T) *T {
	if p == nil {
		return nil
	}
	v := *p
	return &v
}

func cloneVariant(v design.Variant) design.Variant {
	c := v
	c.Regions = make([]design.Region, len(v.Regions))
	for i, r := range v.Regions {
		c.Regions[i] = cloneRegion(r)
	}
	c.TunnelGaps = slices.Clone(v.TunnelGaps)
	c.Couplings = slices.Clone(v.Couplings)
	return c
}

func cloneRegion(r design.Region) design.Region {
	c := r
	c.Shapes = make([]design.Shape, len(r.Shapes))
	for i, s := range r.Shapes {
		c.Shapes[i] = cloneShape(s)
	}
	if r.Shapes == nil {
		c.Shapes = nil
	}
	c.Painted = cloneSet(r.Painted)
	c.Erased = cloneSet(r.Erased)
	return c
}

func cloneShape(s design.Shape) design.Shape {
	c := s
	c.Points = slices.Clone(s.Points)
	if s.Array != nil {
		a := *s.Array
		if a.Of != nil {
			of := cloneShape(*a.Of)
			a.Of = &of
		}
		c.Array = &a
	}
	return c
}

func cloneSet(s *lattice.SiteSet) *lattice.SiteSet {
	if s == nil {
		return nil
	}
	return s.Clone()
}
