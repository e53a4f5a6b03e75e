package planner

import (
	"context"
	"testing"

	"dimerpath/assets"
	"dimerpath/lattice"
	"dimerpath/lattice/design"
)

// rect is a rectangle shape with corners (x0, y0) and (x1, y1) in nm.
func rect(x0, y0, x1, y1 float64) design.Shape {
	return design.Shape{Kind: design.ShapeRect, Points: [][2]float64{{x0, y0}, {x1, y1}}}
}

// testDesign is a one-variant design on a w x h nm field with the given
// regions and a fiducial in each corner.
func testDesign(w, h float64, regions ...design.Region) *design.Design {
	return &design.Design{
		Format: design.FormatName, Version: design.FormatVersion, Name: "test",
		Field:     design.Field{WidthNM: w, HeightNM: h},
		Fiducials: []design.Fiducial{{Name: "SW", AtNM: [2]float64{20, 20}}, {Name: "NE", AtNM: [2]float64{w - 20, h - 20}}},
		Variants:  []design.Variant{{Name: "A", Regions: regions}},
	}
}

func demo(t testing.TB) *design.Design {
	t.Helper()
	d, err := design.Parse(assets.DemoName, assets.DemoDesign)
	if err != nil {
		t.Fatal(err)
	}
	return d
}

// buildVariant lays out the variant of d (the first for "") and plans it.
func buildVariant(ctx context.Context, d *design.Design, variant string, prof Profile, opt Options) (*Plan, error) {
	lay, err := d.Lay(variant)
	if err != nil {
		return nil, err
	}
	return Build(ctx, lay, prof, opt)
}

// layRegions lays out d's first variant for the coverage check.
func layRegions(t testing.TB, d *design.Design) (*design.Layout, []CoverageRegion) {
	t.Helper()
	lay, err := d.Lay("")
	if err != nil {
		t.Fatal(err)
	}
	var cr []CoverageRegion
	for _, rl := range lay.Regions {
		cr = append(cr, CoverageRegion{Name: rl.Region.Name, Sites: rl.Sites})
	}
	return lay, cr
}

// bruteCoverage classifies every site of the surface by summing every
// stroke piece's dose directly (no bounds, no row bookkeeping): the
// reference the fast check must agree with. marginal counts the painted
// sites it finds cleared that would not be without the pieces giving them
// less than coverageNeglect each: the check, which leaves such pieces
// out, may call those uncovered.
func bruteCoverage(surf *lattice.Surface, regions []CoverageRegion, strokes []Stroke, prof Profile) (uncovered, cleared, marginal int) {
	painted := lattice.NewSiteSet()
	for _, r := range regions {
		painted.Union(r.Sites)
	}
	dwelled := lattice.NewSiteSet()
	for _, s := range strokes {
		if s.Kind == StrokeDwell {
			if site, d, ok := surf.Snap(s.Path[0]); ok && d <= 0.05 {
				dwelled.Add(site)
			}
		}
	}
	for t := range surf.Terraces {
		for r := 0; r < surf.RowCount(t); r++ {
			for d := 0; d < surf.DimerCount(t); d++ {
				for side := 0; side < 2; side++ {
					site := lattice.Site{Terrace: t, Row: r, Dimer: d, Side: side}
					if !surf.Valid(site) {
						continue
					}
					q := surf.Position(site)
					e, small := 0.0, 0.0
					for _, s := range strokes {
						if s.Kind == StrokeDwell {
							continue
						}
						m := prof.AP
						if s.Mode == design.ModeFE {
							m = prof.FE
						}
						ratio := float64(max(s.Passes, 1)) * m.LineDoseCPerCm / m.Width.ThresholdDoseCPerCm
						for i := 0; i+1 < len(s.Path); i++ {
							a, b := s.Path[i], s.Path[i+1]
							ab := b.Sub(a)
							L := ab.Norm()
							if L == 0 {
								continue
							}
							u := ab.Mul(1 / L)
							aq := q.Sub(a)
							dd := u.Cross(aq)
							if dd < 0 {
								dd = -dd
							}
							x := exposure(ratio, m.Width.SigmaNM, L, aq.Dot(u), dd)
							e += x
							if x < coverageNeglect {
								small += x
							}
						}
					}
					clear := e >= 1 || dwelled.Contains(site)
					if painted.Contains(site) && !clear {
						uncovered++
					}
					if painted.Contains(site) && clear && !dwelled.Contains(site) && e-small < 1 {
						marginal++
					}
					if clear {
						cleared++
					}
				}
			}
		}
	}
	return uncovered, cleared, marginal
}
