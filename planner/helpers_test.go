package planner

import (
	"context"
	"math"
	"testing"

	"github.com/golang/geo/r2"

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

// bruteResult is the coverage expectation summed site by site.
type bruteResult struct {
	missed, stray float64
	overLimit     int
	overSites     map[lattice.Site]float64
}

// bruteCoverage sums every site's exposure over every stroke piece and
// dwell directly (no bounds, no ranges, nothing neglected) and counts the
// expectation: the reference the fast check must agree with. A site
// outside every region is tolerated (edge) when a region whose strokes
// give it an exposure above exposureNeglect has a site within that
// stroke's mode's edge allowance, found by comparing with every site of
// the region nearby.
func bruteCoverage(surf *lattice.Surface, regions []CoverageRegion, strokes []Stroke, prof Profile) bruteResult {
	res := bruteResult{overSites: map[lattice.Site]float64{}}
	painted := lattice.NewSiteSet()
	for _, r := range regions {
		painted.Union(r.Sites)
	}
	regionOf := map[string]int{}
	for i, r := range regions {
		regionOf[r.Name] = i
	}
	// Every region's site positions in 2 nm buckets, for the allowance.
	type bucket struct{ i, j int }
	near := make([]map[bucket][]r2.Point, len(regions))
	for i, r := range regions {
		near[i] = map[bucket][]r2.Point{}
		for site := range r.Sites.All() {
			p := surf.Position(site)
			k := bucket{int(math.Floor(p.X / 2)), int(math.Floor(p.Y / 2))}
			near[i][k] = append(near[i][k], p)
		}
	}
	within := func(ri int, q r2.Point, dist float64) bool {
		n := int(math.Ceil(dist/2)) + 1
		ci, cj := int(math.Floor(q.X/2)), int(math.Floor(q.Y/2))
		for i := ci - n; i <= ci+n; i++ {
			for j := cj - n; j <= cj+n; j++ {
				for _, p := range near[ri][bucket{i, j}] {
					if p.Sub(q).Norm() <= dist+1e-9 {
						return true
					}
				}
			}
		}
		return false
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
					x := 0.0
					var dosing []int
					for si, s := range strokes {
						e := 0.0
						if s.Kind == StrokeDwell {
							dist := s.Path[0].Sub(q).Norm()
							if dist <= 0.05 {
								e = exposureFor(prof.Dwell.Completion)
							} else {
								e = prof.Dwell.Completion * gauss(dist, prof.Dwell.SigmaNM)
							}
						} else {
							l := prof.Line(s.Mode)
							amp := float64(max(s.Passes, 1)) * l.PassPeak
							for i := 0; i+1 < len(s.Path); i++ {
								a, b := s.Path[i], s.Path[i+1]
								ab := b.Sub(a)
								L := ab.Norm()
								if L == 0 {
									continue
								}
								u := ab.Mul(1 / L)
								aq := q.Sub(a)
								e += lineExposure(amp, l.SigmaNM, L, aq.Dot(u), math.Abs(u.Cross(aq)))
							}
						}
						x += e
						if e > exposureNeglect {
							dosing = append(dosing, si)
						}
					}
					if painted.Contains(site) {
						res.missed += math.Exp(-x)
						continue
					}
					pc := ClearProbability(x)
					tolerated := false
					for _, si := range dosing {
						allow := prof.AP.EdgeAllowanceNM
						if strokes[si].Mode == design.ModeFE {
							allow = prof.FE.EdgeAllowanceNM
						}
						if ri, ok := regionOf[strokes[si].Region]; ok && allow > 0 && within(ri, q, allow) {
							tolerated = true
							break
						}
					}
					if tolerated {
						continue
					}
					res.stray += pc
					if pc > prof.StrayLimit {
						res.overLimit++
						res.overSites[site] = pc
					}
				}
			}
		}
	}
	return res
}
