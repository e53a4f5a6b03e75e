package export

import (
	"bytes"
	"context"
	"math"
	"testing"

	"dimerpath/lattice"
	"dimerpath/lattice/design/gdsimport"
)

// Design -> GDSII -> import -> the same sites: every region layer of
// the demo, read back and rasterised onto the demo's lattice, gives
// exactly the sites of the regions on that layer, and the windows layer
// the windows' sites; with the field placed on the chip by an offset and
// a rotation, read back through the same frame or through two of the
// fiducial marks.
func TestGDSRoundTripGivesTheSameSites(t *testing.T) {
	cases := gdsCases(t)
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			l := lay(t, c.d, c.variant)
			var buf bytes.Buffer
			if _, err := WriteGDS(context.Background(), &buf, l, GDSOptions{Chip: c.chip}); err != nil {
				t.Fatal(err)
			}
			ly := DefaultGDSLayers()
			want := map[GDSLayer]*lattice.SiteSet{}
			add := func(k GDSLayer, s *lattice.SiteSet) {
				if want[k] == nil {
					want[k] = lattice.NewSiteSet()
				}
				want[k].Union(s)
			}
			for _, r := range l.Regions {
				add(ly.Region(r.Region), r.Sites)
				for _, w := range r.Windows {
					ws := lattice.NewSiteSet()
					l.Surface.AddWindow(ws, w)
					add(ly.Windows, ws)
				}
			}
			frames := map[string]func(*gdsimport.Layout) (lattice.ChipFrame, error){
				"given frame": func(*gdsimport.Layout) (lattice.ChipFrame, error) { return c.chip, nil },
				"from marks": func(g *gdsimport.Layout) (lattice.ChipFrame, error) {
					f := l.Design.Fiducials
					return g.FrameFromMarks(l.Design, [2]gdsimport.Mark{{Label: f[0].Name, Fiducial: f[0].Name}, {Label: f[1].Name, Fiducial: f[1].Name}})
				},
			}
			for layer, sites := range want {
				for how, frame := range frames {
					g, err := gdsimport.Read(bytes.NewReader(buf.Bytes()), "layout.gds",
						gdsimport.Options{Layers: []gdsimport.Layer{{Layer: layer.Layer, Datatype: layer.Datatype}}})
					if err != nil {
						t.Fatal(err)
					}
					f, err := frame(g)
					if err != nil {
						t.Fatal(err)
					}
					// Marks rounded to 1 pm, 1400 nm apart: the angle is good to
					// about 1 pm / 1400 nm = 4e-5°, the offset to a few pm.
					if how == "from marks" && (f.OffsetNM.Sub(c.chip.OffsetNM).Norm() > 0.01 || math.Abs(f.RotationDeg-c.chip.RotationDeg) > 1e-4) {
						t.Errorf("frame from marks %+v, exported with %+v", f, c.chip)
					}
					got := g.Sites(l.Surface, f)
					if !got.Equal(sites) {
						extra := got.Clone().Difference(sites).Count()
						missing := sites.Clone().Difference(got).Count()
						t.Errorf("layer %v, %s: %d sites read back, want %d: %d extra, %d missing", layer, how, got.Count(), sites.Count(), extra, missing)
					}
				}
			}
		})
	}
}
