package planner

import (
	"strings"
	"testing"

	"github.com/golang/geo/r2"

	"dimerpath/lattice"
	"dimerpath/lattice/design"
)

// smallDesign holds an AP rectangle, an AP line of half dimers, two
// windows and an FE pad on a 120 x 80 nm field.
func smallDesign() *design.Design {
	return testDesign(120, 80,
		design.Region{Name: "island", Role: design.RoleDevice, Mode: design.ModeAP, Shapes: []design.Shape{rect(10, 10, 22, 16)}},
		design.Region{Name: "donors", Role: design.RoleDonor, Mode: design.ModeAP, Shapes: []design.Shape{
			{Kind: design.ShapeWindow, Template: "P", Points: [][2]float64{{30, 30}}},
			{Kind: design.ShapeWindow, Template: "As", Points: [][2]float64{{40, 30}}},
		}},
		design.Region{Name: "pad", Role: design.RolePad, Mode: design.ModeFE, Shapes: []design.Shape{rect(60, 20, 100, 60)}},
	)
}

func generate(t *testing.T, d *design.Design, prof Profile) ([]Stroke, []CoverageRegion, *design.Layout) {
	t.Helper()
	lay, cr := layRegions(t, d)
	g := newStrokeGen(lay.Surface, &prof)
	var ss []Stroke
	for _, rl := range lay.Regions {
		plain, win := rl.Sites.Clone(), lattice.NewSiteSet()
		for i, w := range rl.Windows {
			ss = append(ss, g.windowStrokes(rl.Region.Name, w, i)...)
			w.AddTo(win)
		}
		plain.Difference(win)
		if rl.Region.Mode == design.ModeFE {
			ss = append(ss, g.feStrokes(rl.Region.Name, plain)...)
		} else {
			ss = append(ss, g.apStrokes(rl.Region.Name, plain)...)
		}
	}
	return ss, cr, lay
}

func TestCoverageOfGeneratedStrokes(t *testing.T) {
	for _, style := range []string{WindowStyleLine, WindowStyleDwell} {
		prof := DefaultProfile()
		prof.WindowStyle = style
		ss, cr, lay := generate(t, smallDesign(), prof)
		cov := CheckCoverage(lay.Surface, cr, ss, prof)
		if !cov.OK {
			t.Errorf("window style %s: coverage %+v", style, cov)
		}
		want := 0
		for _, r := range cr {
			want += r.Sites.Count()
		}
		if cov.Sites != want {
			t.Errorf("coverage counts %d sites, regions hold %d", cov.Sites, want)
		}
	}
}

func TestCoverageMatchesBruteForce(t *testing.T) {
	// Brute force: every site's dose summed from every stroke piece. The
	// fast check must find the same uncovered sites, including after the
	// stroke set is broken.
	prof := DefaultProfile()
	ss, cr, lay := generate(t, smallDesign(), prof)
	broken := append([]Stroke(nil), ss...)
	broken = broken[1:] // drop the first AP line of the island
	for _, set := range [][]Stroke{ss, broken} {
		cov := CheckCoverage(lay.Surface, cr, set, prof)
		unc, _ := bruteCoverage(lay.Surface, cr, set, prof)
		if cov.Uncovered != unc {
			t.Errorf("CheckCoverage finds %d uncovered sites, brute force %d", cov.Uncovered, unc)
		}
	}
}

func TestCoverageCatchesBrokenStrokes(t *testing.T) {
	prof := DefaultProfile()
	ss, cr, lay := generate(t, smallDesign(), prof)
	// Find the island's first line and the pad's serpentine.
	line, fe := -1, -1
	for i, s := range ss {
		if s.Region == "island" && s.Kind == StrokeLine && line < 0 {
			line = i
		}
		if s.Region == "pad" && fe < 0 {
			fe = i
		}
	}
	cases := []struct {
		name           string
		edit           func([]Stroke) []Stroke
		uncov, overclr bool
	}{
		{"a line left out", func(s []Stroke) []Stroke { return append(s[:line:line], s[line+1:]...) }, true, false},
		{"a line one row off", func(s []Stroke) []Stroke {
			st := s[line]
			st.Path = []r2.Point{st.Path[0].Sub(r2.Point{Y: 0.7681}), st.Path[1].Sub(r2.Point{Y: 0.7681})}
			s[line] = st
			return s
		}, true, true},
		{"the FE fill 10 nm to the right", func(s []Stroke) []Stroke {
			st := s[fe]
			p := make([]r2.Point, len(st.Path))
			for i, q := range st.Path {
				p[i] = q.Add(r2.Point{X: 10})
			}
			st.Path = p
			s[fe] = st
			return s
		}, true, true},
		{"a dwell on a site outside every region", func(s []Stroke) []Stroke {
			return append(s, Stroke{Region: "island", Mode: AP, Kind: StrokeDwell, Path: []r2.Point{lay.Surface.Position(siteAt(lay, 5, 5))}, Passes: 1})
		}, false, true},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			set := c.edit(append([]Stroke(nil), ss...))
			cov := CheckCoverage(lay.Surface, cr, set, prof)
			if (cov.Uncovered > 0) != c.uncov || (cov.Overcleared > 0) != c.overclr || cov.OK {
				t.Errorf("coverage %d uncovered, %d overcleared, OK %v; want uncovered %v, overcleared %v", cov.Uncovered, cov.Overcleared, cov.OK, c.uncov, c.overclr)
			}
			if len(cov.Issues) == 0 || !strings.Contains(strings.Join(cov.Issues, "\n"), "site T") {
				t.Errorf("issues do not name a site: %v", cov.Issues)
			}
		})
	}
}

func siteAt(lay *design.Layout, x, y float64) (s lattice.Site) {
	s, _, _ = lay.Surface.Snap(r2.Point{X: x, Y: y})
	return s
}

func TestCoverageDemo(t *testing.T) {
	d := demo(t)
	for _, v := range d.VariantNames() {
		p, err := buildTest(t, d, v)
		if err != nil {
			t.Fatal(err)
		}
		if !p.Coverage.OK {
			t.Errorf("variant %s: coverage %+v", v, p.Coverage)
		}
	}
}
