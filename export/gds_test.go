package export

import (
	"bytes"
	"context"
	"fmt"
	"math"
	"strings"
	"testing"

	"github.com/golang/geo/r2"

	"dimerpath/assets"
	"dimerpath/export/internal/planfixture"
	"dimerpath/internal/gdsii"
	"dimerpath/lattice"
	"dimerpath/lattice/design"
)

// cellArea is the area of one site's cell, nm² (half a 2x1 cell).
const cellArea = lattice.DimerPitch * lattice.RowSpacing / 2

// arrayDesign returns a design with one donor region holding a cols x
// rows array of P windows (4 dimers and 2 rows apart) on a terrace with
// rows along y beyond a step, and a lead with a hole on the lower
// terrace.
func arrayDesign(t testing.TB, cols, rows int) *design.Design {
	t.Helper()
	src := fmt.Sprintf(`{"format": "dimerpath-design", "version": 1, "name": "array test", "field": {"width_nm": 2000, "height_nm": 2000},
	  "terraces": [{"name": "low", "rows": "x", "offset_nm": [0, 0]},
	               {"name": "high", "step_from": "low", "boundary_nm": [[300, 0], [2000, 0], [2000, 2000], [300, 2000]]}],
	  "fiducials": [{"name": "M1", "at_nm": [100, 100]}, {"name": "M2", "at_nm": [150, 1900]}],
	  "variants": [{"name": "v", "regions": [
	    {"name": "qubits", "role": "donor", "mode": "ap", "species": "P",
	     "shapes": [{"kind": "array", "array": {"of": {"kind": "window", "template": "P", "points_nm": [[400, 200]]}, "cols": %d, "rows": %d, "pitch_dimers": 4, "pitch_rows": 2}}]},
	    {"name": "ring", "role": "lead", "mode": "fe", "shapes": [{"kind": "polygon", "points_nm": [[20, 300], [200, 310], [180, 500], [30, 480]]}],
	     "erased": {"rows": [[0, 500, 100, 40], [0, 501, 100, 40]]}}
	  ]}]}`, cols, rows)
	d, err := design.Parse("array.json", []byte(src))
	if err != nil {
		t.Fatal(err)
	}
	return d
}

func lay(t testing.TB, d *design.Design, variant string) *design.Layout {
	t.Helper()
	l, err := d.Lay(variant)
	if err != nil {
		t.Fatal(err)
	}
	return l
}

// layerStats are what a flattened layer holds: polygon count, total
// area (nm², polygons summed, overlaps counted twice), bounding box and
// total perimeter (nm).
type layerStats struct {
	count     int
	area, per float64
	box       r2.Rect
}

func flatStats(t testing.TB, lib *gdsii.Library) (map[string]*layerStats, []gdsii.FlatText) {
	t.Helper()
	f, err := lib.Flatten("", gdsii.FlattenOptions{})
	if err != nil {
		t.Fatal(err)
	}
	out := map[string]*layerStats{}
	for _, p := range f.Polygons {
		key := GDSLayer{p.Layer, p.Datatype}.String()
		s := out[key]
		if s == nil {
			s = &layerStats{box: r2.EmptyRect()}
			out[key] = s
		}
		s.count++
		a := 0.0
		for i, v := range p.XY {
			w := p.XY[(i+1)%len(p.XY)]
			a += v.X*w.Y - w.X*v.Y
			s.per += math.Hypot(w.X-v.X, w.Y-v.Y) / gdsPerNM
			s.box = s.box.AddPoint(r2.Point{X: v.X / gdsPerNM, Y: v.Y / gdsPerNM})
		}
		s.area += math.Abs(a) / 2 / gdsPerNM / gdsPerNM
	}
	return out, f.Texts
}

// expectedAreas returns, per layer, the area the layout's own numbers
// give: each region's sites times the cell area, each window's sites,
// each terrace's sites.
func expectedAreas(l *design.Layout, ly GDSLayers) map[string]float64 {
	want := map[string]float64{}
	for _, r := range l.Regions {
		want[ly.Region(r.Region).String()] += float64(r.Sites.Count()) * cellArea
		for _, w := range r.Windows {
			if l.Surface.WindowExists(w) {
				want[ly.Windows.String()] += float64(w.Template.Sites()) * cellArea
			}
		}
	}
	all := lattice.NewSiteSet()
	l.Surface.Paint(all, lattice.Rect{Rect: l.Surface.Field})
	for ti := range l.Surface.Terraces {
		n := 0
		for s := range all.Runs() {
			if s.Terrace == ti {
				n += s.Len
			}
		}
		want[GDSLayer{ly.Terraces.Layer, ly.Terraces.Datatype + int16(ti)}.String()] = float64(n) * cellArea
	}
	// A cross S across with arms S/5 wide: two S x S/5 bars sharing an
	// (S/5)² square.
	mark := ly.MarkSizeNM
	want[ly.Fiducials.String()] = float64(len(l.Design.Fiducials)) * (2*mark*mark/5 - mark*mark/25)
	w, h := l.Surface.Width(), l.Surface.Height()
	want[ly.Field.String()] = w * h
	scan := l.Rules.ScanFieldNM
	want[ly.ScanField.String()] = scan[0] * scan[1]
	return want
}

type gdsCase struct {
	name    string
	d       *design.Design
	variant string
	chip    lattice.ChipFrame
}

func gdsCases(t testing.TB) []gdsCase {
	demo, err := design.Parse(assets.DemoName, assets.DemoDesign)
	if err != nil {
		t.Fatal(err)
	}
	return []gdsCase{
		{"demo", demo, "", lattice.ChipFrame{}},
		{"demo on a chip, rotated 30°", demo, "gap-12-source", lattice.ChipFrame{OffsetNM: r2.Point{X: 1e6, Y: -5e4}, RotationDeg: 30}},
		{"array, rotated 90°", arrayDesign(t, 40, 25), "", lattice.ChipFrame{OffsetNM: r2.Point{X: -3000, Y: 500}, RotationDeg: 90}},
	}
}

// The export's own numbers: each layer's flattened area is what the
// lattice says (sites times cell area), to the rounding of 1 pm
// coordinates; labels are the fiducial and region names at their chip
// positions.
func TestGDSExportMatchesTheLayout(t *testing.T) {
	for _, c := range gdsCases(t) {
		t.Run(c.name, func(t *testing.T) {
			l := lay(t, c.d, c.variant)
			lib, sum, err := GDSLibraryOf(context.Background(), l, GDSOptions{Chip: c.chip})
			if err != nil {
				t.Fatal(err)
			}
			stats, texts := flatStats(t, lib)
			for layer, want := range expectedAreas(l, DefaultGDSLayers()) {
				s := stats[layer]
				if s == nil {
					if want != 0 {
						t.Errorf("layer %s missing, want area %g nm²", layer, want)
					}
					continue
				}
				// Each vertex moves by at most 0.5·√2 pm in rounding.
				if tol := 0.71e-3*s.per + 1e-9*want; math.Abs(s.area-want) > tol {
					t.Errorf("layer %s: area %.6f nm², want %.6f ± %.3g", layer, s.area, want, tol)
				}
			}
			wantTexts := map[string]r2.Point{}
			for _, f := range l.Design.Fiducials {
				wantTexts[f.Name] = c.chip.ToChip(r2.Point{X: f.AtNM[0], Y: f.AtNM[1]})
			}
			for _, r := range l.Regions {
				if !r.Bounds.IsEmpty() {
					wantTexts[r.Region.Name] = c.chip.ToChip(r.Bounds.Center())
				}
			}
			if len(texts) != len(wantTexts) {
				t.Errorf("%d labels, want %d", len(texts), len(wantTexts))
			}
			for _, tx := range texts {
				want, ok := wantTexts[tx.String]
				at := r2.Point{X: tx.At.X / gdsPerNM, Y: tx.At.Y / gdsPerNM}
				if !ok || at.Sub(want).Norm() > 1e-3 {
					t.Errorf("label %q at %v, want %v (known: %v)", tx.String, at, want, ok)
				}
			}
			if strings.HasPrefix(c.name, "array") {
				if sum.ArrayRefs != 1 || sum.ArrayWindows != 1000 || sum.Windows != 0 {
					t.Errorf("summary %+v, want 1 AREF of 1000 windows", sum)
				}
			}
		})
	}
}

// A 10^6-window array stays a few hundred bytes beyond the rest of the
// layout: one AREF of one window cell.
func TestGDSArrayIsOneAREF(t *testing.T) {
	small, big := arrayDesign(t, 2, 1), arrayDesign(t, 1000, 1000)
	var a, b bytes.Buffer
	if _, err := WriteGDS(context.Background(), &a, lay(t, small, ""), GDSOptions{}); err != nil {
		t.Fatal(err)
	}
	sum, err := WriteGDS(context.Background(), &b, lay(t, big, ""), GDSOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if sum.ArrayWindows != 1_000_000 || sum.ArrayRefs != 1 {
		t.Errorf("summary %+v, want one AREF of 10^6 windows", sum)
	}
	if b.Len() > 10_000 || b.Len()-a.Len() > 200 {
		t.Errorf("10^6-window layout is %d bytes, the 2-window one %d: want at most 10 kB and the same size give or take a few records", b.Len(), a.Len())
	}
}

func TestGDSWindowsPartlyErasedAreNotAnAREF(t *testing.T) {
	d := arrayDesign(t, 3, 2)
	l := lay(t, d, "")
	w := l.Regions[0].Windows[4]
	l.Regions[0].Sites.Remove(lattice.Site{Terrace: w.Terrace, Row: w.Row, Dimer: w.FirstDimer})
	_, sum, err := GDSLibraryOf(context.Background(), l, GDSOptions{})
	if err != nil {
		t.Fatal(err)
	}
	if sum.ArrayRefs != 0 || sum.Windows != 6 {
		t.Errorf("summary %+v: an array with a window partly erased must be written window by window", sum)
	}
}

func TestGDSChipBeyondReachIsRefused(t *testing.T) {
	l := lay(t, arrayDesign(t, 2, 2), "")
	_, _, err := GDSLibraryOf(context.Background(), l, GDSOptions{Chip: lattice.ChipFrame{OffsetNM: r2.Point{X: 3e6}}})
	if err == nil || !strings.Contains(err.Error(), "--chip-offset") {
		t.Errorf("error %v, want one naming --chip-offset", err)
	}
}

func TestParseGDSLayers(t *testing.T) {
	g, err := ParseGDSLayers("map.json", []byte(`{"format": "dimerpath-gds-layers", "version": 1, "windows": "40/2",
	  "regions": {"pad": "50/0", "pad/ap": "51/7"}, "mark_size_nm": 5}`))
	if err != nil {
		t.Fatal(err)
	}
	pad := func(m design.Mode) GDSLayer { return g.Region(&design.Region{Role: design.RolePad, Mode: m}) }
	if g.Windows != (GDSLayer{40, 2}) || pad(design.ModeFE) != (GDSLayer{50, 0}) || pad(design.ModeAP) != (GDSLayer{51, 7}) ||
		g.Region(&design.Region{Role: design.RoleGate}) != (GDSLayer{11, 0}) || g.MarkSizeNM != 5 {
		t.Errorf("parsed %+v", g)
	}
	for _, bad := range []struct{ src, want string }{
		{`{"format": "dimerpath-gds-layers", "version": 1, "windws": "4/0"}`, "windws"},
		{`{"format": "dimerpath-gds-layers", "version": 1, "regions": {"pads": "4/0"}}`, `unknown role "pads"`},
		{`{"format": "dimerpath-gds-layers", "version": 1, "regions": {"pad/xx": "4/0"}}`, `unknown mode "xx"`},
		{`{"format": "dimerpath-gds-layers", "version": 1, "field": "4/-1"}`, `field = "4/-1": layer`},
		{`{"format": "dimerpath-gds-layers", "version": 1, "field": "70000"}`, `field = "70000": layer`},
		{`{"format": "dimerpath-gds-layers", "version": 2}`, "version = 2: this dimerpath reads layer map version 1"},
		{`{"format": "dimerpath-gds-layers", "version": 1, "Windows": "4/0"}`, `Windows: unknown field: names are case-sensitive, did you mean "windows"?`},
		{`{"format": "dimerpath-gds-layers", "version": 1, "mark_size_nm": -1}`, "mark_size_nm"},
	} {
		if _, err := ParseGDSLayers("map.json", []byte(bad.src)); err == nil || !strings.Contains(err.Error(), bad.want) || !strings.HasPrefix(err.Error(), "map.json:") {
			t.Errorf("ParseGDSLayers(%s) error %v, want one naming map.json and %q", bad.src, err, bad.want)
		}
	}
}

// A reference overlay is drawn on the overview as its own group, one
// closed outline per polygon, and named in the legend.
func TestReferenceOnTheOverview(t *testing.T) {
	d := planfixture.SET()
	opt := fixtureOptions(d)
	opt.Pattern.References = []PatternReference{{Name: "contact mask", Polygons: [][]r2.Point{
		{{X: 10, Y: 10}, {X: 40, Y: 10}, {X: 40, Y: 30}}, {{X: 50, Y: 50}, {X: 60, Y: 50}, {X: 60, Y: 60}, {X: 50, Y: 60}},
	}}}
	var buf bytes.Buffer
	if err := WriteSVG(&buf, d.Plan, opt); err != nil {
		t.Fatal(err)
	}
	svg := buf.String()
	start := strings.Index(svg, `id="reference-contact_mask"`)
	if start < 0 {
		t.Fatal("no reference group in the SVG")
	}
	group := svg[start:]
	group = group[:strings.Index(group, "</g>")]
	if n := strings.Count(group, "<path") + strings.Count(group, "<polygon") + strings.Count(group, "<polyline"); n != 2 {
		t.Errorf("reference group holds %d outlines, want 2:\n%s", n, group)
	}
	if !strings.Contains(svg, "reference layout, not written: contact mask") {
		t.Error("the legend does not name the reference")
	}
}
