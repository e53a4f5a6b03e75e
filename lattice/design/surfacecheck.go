package design

import (
	"fmt"
	"math"

	"dimerpath/lattice"
)

// surfaceClearance checks the design against its survey: dopant windows
// keep DefectWindowClearanceNM and the other atomic-precision features
// DefectClearanceNM from the edge of every defect (its centre less half
// its apparent width), and no atomic-precision feature crosses a step
// edge. A finding points at the defect, or at the crossing.
func (c *checker) surfaceClearance() {
	s := c.l.Design.Survey
	if s == nil {
		return
	}
	rs := c.l.Rules
	defects := s.FieldDefects()
	steps := s.FieldSteps()
	for i := range c.l.Regions {
		rl := &c.l.Regions[i]
		if _, ap := KeepOutClass(rl); !ap {
			continue
		}
		ix := c.cells(i)
		if ix.IsEmpty() {
			continue
		}
		var windows *lattice.CellIndex
		if len(rl.Windows) > 0 {
			set := lattice.NewSiteSet()
			for _, w := range rl.Windows {
				w.AddTo(set)
			}
			windows = lattice.NewCellIndex(c.l.Surface, set)
		}
		for _, d := range defects {
			what := fmt.Sprintf("a %s defect (%s, %.2f nm across)", d.Kind, describeClass(d.Class), d.SizeNM)
			if windows != nil && rs.DefectWindowClearanceNM > 0 {
				if dist, _, ok := windows.NearestWithin(d.At, d.RadiusNM+rs.DefectWindowClearanceNM); ok {
					gap := math.Max(0, dist-d.RadiusNM)
					if gap < rs.DefectWindowClearanceNM {
						c.add(RuleSurfaceClearance, SeverityError, d.At, fmt.Sprintf("a dopant window of %q lies %.2f nm from the edge of %s of the survey; keep windows at least %g nm from defects, or move the device (dimerpath place)", c.name(i), gap, what, rs.DefectWindowClearanceNM), c.name(i))
						continue
					}
				}
			}
			if rs.DefectClearanceNM > 0 {
				if dist, _, ok := ix.NearestWithin(d.At, d.RadiusNM+rs.DefectClearanceNM); ok {
					gap := math.Max(0, dist-d.RadiusNM)
					if gap < rs.DefectClearanceNM {
						c.add(RuleSurfaceClearance, SeverityError, d.At, fmt.Sprintf("atomic-precision region %q comes %.2f nm from the edge of %s of the survey; keep at least %g nm, or move the device (dimerpath place)", c.name(i), gap, what, rs.DefectClearanceNM), c.name(i))
					}
				}
			}
		}
	crossing:
		for _, line := range steps {
			for k := 1; k < len(line); k++ {
				if _, at, ok := ix.SegmentWithin(line[k-1], line[k], 0); ok {
					c.add(RuleSurfaceClearance, SeverityError, at, fmt.Sprintf("atomic-precision region %q crosses a step edge of the survey: its sites there lie on two terraces, whose lattices do not line up", c.name(i)), c.name(i))
					break crossing
				}
			}
		}
	}
}

// describeClass returns a defect's class for a message.
func describeClass(class string) string {
	if class == "" {
		return "unclassed"
	}
	return class
}
