package export

import (
	"context"
	"encoding/json"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"slices"
	"testing"

	"github.com/golang/geo/r2"

	"dimerpath/internal/gdsii"
)

// gdspy returns a Python that imports gdspy (Debian's python3-gdspy, an
// independent GDSII library), or skips the test.
func gdspy(t *testing.T) string {
	t.Helper()
	for _, py := range []string{"/usr/bin/python3", "python3"} {
		if exec.Command(py, "-c", "import gdspy").Run() == nil {
			return py
		}
	}
	t.Skip("python3-gdspy is not installed (make test installs it: apt-get install python3-gdspy): " +
		"the cross-check of GDSII files with an independent library is skipped")
	return ""
}

type gdspySummary struct {
	Tops   []string `json:"tops"`
	Layers map[string]struct {
		Count int        `json:"count"`
		Area  float64    `json:"area"`
		BBox  [4]float64 `json:"bbox"`
	} `json:"layers"`
	Labels []struct {
		Text  string     `json:"text"`
		Layer string     `json:"layer"`
		At    [2]float64 `json:"at"`
	} `json:"labels"`
	Arefs []struct {
		Cell    string `json:"cell"`
		Columns int    `json:"columns"`
		Rows    int    `json:"rows"`
	} `json:"arefs"`
	Polygons []struct {
		Layer string       `json:"layer"`
		XY    [][2]float64 `json:"xy"`
	} `json:"polygons"`
}

func runGdspy(t *testing.T, py, mode, file string) gdspySummary {
	t.Helper()
	out, err := exec.Command(py, filepath.Join("testdata", "gdspy_check.py"), mode, file).Output()
	if err != nil {
		msg := ""
		if ee, ok := err.(*exec.ExitError); ok {
			msg = string(ee.Stderr)
		}
		t.Fatalf("gdspy_check.py %s %s: %v\n%s", mode, file, err, msg)
	}
	var s gdspySummary
	if err := json.Unmarshal(out, &s); err != nil {
		t.Fatalf("gdspy_check.py output: %v", err)
	}
	return s
}

// Every GDSII file dimerpath writes, read by gdspy (python3-gdspy): its
// top structure, per layer the polygon count after expanding AREFs, the
// area and the bounding box, the labels and the arrays are those of
// dimerpath's own layout (sites times cell area, windows, fiducial and
// region names at their chip positions).
func TestGDSReadByGdspy(t *testing.T) {
	py := gdspy(t)
	for _, c := range gdsCases(t) {
		t.Run(c.name, func(t *testing.T) {
			l := lay(t, c.d, c.variant)
			path := filepath.Join(t.TempDir(), "layout.gds")
			sum, err := WriteGDSFile(context.Background(), path, l, GDSOptions{Chip: c.chip})
			if err != nil {
				t.Fatal(err)
			}
			got := runGdspy(t, py, "summary", path)
			lib, err := readGDS(path)
			if err != nil {
				t.Fatal(err)
			}
			if want := []string{lib.Structures[0].Name}; !slices.Equal(got.Tops, want) {
				t.Errorf("gdspy's top structures %v, want %v", got.Tops, want)
			}
			ours, _ := flatStats(t, lib)
			want := expectedAreas(l, DefaultGDSLayers())
			for layer, s := range ours {
				g, ok := got.Layers[layer]
				if !ok {
					t.Errorf("gdspy finds no layer %s", layer)
					continue
				}
				if g.Count != s.count {
					t.Errorf("layer %s: gdspy counts %d polygons, dimerpath wrote %d", layer, g.Count, s.count)
				}
				if tol := 0.71e-3*s.per + 1e-9*want[layer]; math.Abs(g.Area-want[layer]) > tol {
					t.Errorf("layer %s: gdspy's area %.6f nm², the layout's %.6f ± %.3g", layer, g.Area, want[layer], tol)
				}
				gb := r2.RectFromPoints(r2.Point{X: g.BBox[0], Y: g.BBox[1]}, r2.Point{X: g.BBox[2], Y: g.BBox[3]})
				if gb.Lo().Sub(s.box.Lo()).Norm() > 1e-6 || gb.Hi().Sub(s.box.Hi()).Norm() > 1e-6 {
					t.Errorf("layer %s: gdspy's bounding box %v, dimerpath's %v", layer, gb, s.box)
				}
			}
			if len(got.Layers) != len(ours) {
				t.Errorf("gdspy finds %d layers, dimerpath wrote %d", len(got.Layers), len(ours))
			}
			wantLabels := map[string]r2.Point{}
			for _, f := range l.Design.Fiducials {
				wantLabels[f.Name] = c.chip.ToChip(r2.Point{X: f.AtNM[0], Y: f.AtNM[1]})
			}
			for _, r := range l.Regions {
				if !r.Bounds.IsEmpty() {
					wantLabels[r.Region.Name] = c.chip.ToChip(r.Bounds.Center())
				}
			}
			if len(got.Labels) != len(wantLabels) {
				t.Errorf("gdspy finds %d labels, want %d", len(got.Labels), len(wantLabels))
			}
			for _, lab := range got.Labels {
				w, ok := wantLabels[lab.Text]
				if !ok || (r2.Point{X: lab.At[0], Y: lab.At[1]}).Sub(w).Norm() > 1e-3 {
					t.Errorf("gdspy's label %q at %v, want %v", lab.Text, lab.At, w)
				}
			}
			arrays := 0
			for _, a := range got.Arefs {
				arrays += a.Columns * a.Rows
			}
			if len(got.Arefs) != sum.ArrayRefs || arrays != sum.ArrayWindows {
				t.Errorf("gdspy finds %d arrays of %d windows, dimerpath wrote %d of %d", len(got.Arefs), arrays, sum.ArrayRefs, sum.ArrayWindows)
			}
		})
	}
}

func readGDS(path string) (*gdsii.Library, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	return gdsii.Read(f)
}

// A file gdspy writes (a hierarchy with SREFs and AREFs rotated,
// magnified and reflected), flattened by dimerpath, gives gdspy's own
// flattened polygons and labels, to 1e-6 nm.
func TestGdspyFileReadByDimerpath(t *testing.T) {
	py := gdspy(t)
	path := filepath.Join(t.TempDir(), "gdspy.gds")
	want := runGdspy(t, py, "write", path)
	lib, err := readGDS(path)
	if err != nil {
		t.Fatal(err)
	}
	if lib.UserUnit != 1e-3 || lib.MetresPerUnit != 1e-12 {
		t.Errorf("units %g, %g; gdspy wrote 1e-3, 1e-12", lib.UserUnit, lib.MetresPerUnit)
	}
	f, err := lib.Flatten("", gdsii.FlattenOptions{})
	if err != nil {
		t.Fatal(err)
	}
	type poly struct {
		layer string
		xy    [][2]float64
	}
	key := func(p poly) [3]float64 {
		cx, cy := 0.0, 0.0
		for _, v := range p.xy {
			cx += v[0]
			cy += v[1]
		}
		return [3]float64{math.Round(cx / float64(len(p.xy)) * 1e3), math.Round(cy / float64(len(p.xy)) * 1e3), float64(len(p.xy))}
	}
	var ours, theirs []poly
	for _, p := range f.Polygons {
		q := poly{layer: GDSLayer{p.Layer, p.Datatype}.String()}
		for _, v := range p.XY {
			q.xy = append(q.xy, [2]float64{v.X * lib.UserUnit, v.Y * lib.UserUnit})
		}
		ours = append(ours, q)
	}
	for _, p := range want.Polygons {
		theirs = append(theirs, poly{p.Layer, p.XY})
	}
	if len(ours) != len(theirs) {
		t.Fatalf("dimerpath flattens to %d polygons, gdspy to %d", len(ours), len(theirs))
	}
	byKey := func(a, b poly) int {
		ka, kb := key(a), key(b)
		for i := range ka {
			if ka[i] != kb[i] {
				return int(math.Copysign(1, ka[i]-kb[i]))
			}
		}
		return 0
	}
	slices.SortFunc(ours, byKey)
	slices.SortFunc(theirs, byKey)
	for i := range ours {
		o, g := ours[i], theirs[i]
		if o.layer != g.layer || len(o.xy) != len(g.xy) {
			t.Fatalf("polygon %d: dimerpath %s with %d points, gdspy %s with %d", i, o.layer, len(o.xy), g.layer, len(g.xy))
		}
		for j := range o.xy {
			if math.Abs(o.xy[j][0]-g.xy[j][0]) > 1e-6 || math.Abs(o.xy[j][1]-g.xy[j][1]) > 1e-6 {
				t.Fatalf("polygon %d point %d: dimerpath %v, gdspy %v", i, j, o.xy[j], g.xy[j])
			}
		}
	}
	if len(f.Texts) != len(want.Labels) {
		t.Fatalf("dimerpath finds %d labels, gdspy %d", len(f.Texts), len(want.Labels))
	}
	for _, lab := range want.Labels {
		found := false
		for _, tx := range f.Texts {
			at := r2.Point{X: tx.At.X * lib.UserUnit, Y: tx.At.Y * lib.UserUnit}
			if tx.String == lab.Text && at.Sub(r2.Point{X: lab.At[0], Y: lab.At[1]}).Norm() < 1e-6 {
				found = true
			}
		}
		if !found {
			t.Errorf("gdspy's label %q at %v not among dimerpath's", lab.Text, lab.At)
		}
	}
}
