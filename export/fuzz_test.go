package export

import (
	"bytes"
	"context"
	"errors"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"dimerpath/lattice/design"
	"dimerpath/planner"
)

// FuzzIsPlanFile checks export's plan-or-design sniffing against the
// plan reader: a file it takes for a plan is never refused as "not a
// plan", one it does not is never read as a plan, and its answer on the
// start of a file holds for the whole file.
func FuzzIsPlanFile(f *testing.F) {
	var buf bytes.Buffer
	WritePlanJSON(&buf, emptyPlan(), "fuzz")
	for _, s := range []string{buf.String(), `{"format": "dimerpath-design", "version": 1}`, `{"total_s": NaN, "format": "dimerpath-plan"}`,
		`{"format": "dimerpath-plan"`, `[{"format": "dimerpath-plan"}]`, `{"a": {"format": "dimerpath-plan"}}`, `{"form\u0061t": "dimerpath-plan", "version": 1}`} {
		f.Add([]byte(s), uint16(len(s)/2))
	}
	f.Fuzz(func(t *testing.T, data []byte, cut uint16) {
		isPlan := IsPlanFile(data)
		_, err := ParsePlan("f.json", data)
		switch {
		case isPlan && errors.Is(err, ErrNotPlan):
			t.Fatalf("taken for a plan, refused as not one: %v", err)
		case !isPlan && err == nil:
			t.Fatalf("not taken for a plan, read as one")
		}
		if head := data[:min(int(cut), len(data))]; IsPlanFile(head) && !isPlan {
			t.Fatalf("the start %q is a plan, the whole file not", head)
		}
	})
}

// fuzzDesign is a small design for FuzzPlanAndExport: a pad, a lead and
// an island with a window, on one terrace.
const fuzzDesign = `{"format": "dimerpath-design", "version": 1, "name": "fuzz",
  "field": {"width_nm": 120, "height_nm": 80},
  "fiducials": [{"name": "F", "at_nm": [10, 10]}],
  "variants": [{"name": "A", "regions": [
    {"name": "pad", "role": "pad", "mode": "fe", "shapes": [{"kind": "rect", "points_nm": [[60, 20], [110, 70]]}]},
    {"name": "lead", "role": "lead", "shapes": [{"kind": "polyline", "width_nm": 3, "points_nm": [[20, 40], [62, 40]]}]},
    {"name": "dot", "role": "donor", "species": "P", "shapes": [{"kind": "window", "template": "P", "points_nm": [[15, 40]]}]}
  ]}]}`

// FuzzPlanAndExport goes past the readers: a parsed design and profile
// are planned and the plan exported in every format. Bounded in size (a
// field of at most 200 nm, so a run stays fast), it must never panic or
// report an internal error, and every plan it makes must have finite
// totals and export, and read back, without error.
func FuzzPlanAndExport(f *testing.F) {
	for _, p := range []string{
		`{"format": "dimerpath-profile", "version": 1}`,
		`{"format": "dimerpath-profile", "version": 1, "base": "lt", "window_style": "dwell", "order": "fe-first"}`,
		`{"format": "dimerpath-profile", "version": 1, "drift": {"rate_nm_per_min": 100}, "tolerance_ap_nm": 0.001, "settle_s": 3600}`,
		`{"format": "dimerpath-profile", "version": 1, "fe": {"overlap": 0.95, "current_a": 1e-6}, "limits": {"max_current_a": 1e-6, "max_speed_nm_per_s": 0}}`,
	} {
		f.Add([]byte(fuzzDesign), []byte(p), uint8(1))
	}
	f.Fuzz(func(t *testing.T, designJSON, profileJSON []byte, seed uint8) {
		if len(designJSON) > 4096 || len(profileJSON) > 4096 {
			return
		}
		d, err := design.Parse("f.json", designJSON)
		if err != nil || d.Field.WidthNM > 200 || d.Field.HeightNM > 200 {
			return
		}
		prof, err := planner.ParseProfile(profileJSON, "p.json")
		if err != nil {
			return
		}
		lay, err := d.Lay("")
		if err != nil {
			return
		}
		p, err := planner.Build(context.Background(), lay, prof, planner.Options{Seed: int64(seed), MonteCarloRuns: 50})
		if errors.Is(err, planner.ErrInternal) {
			t.Fatalf("internal error: %v", err)
		}
		if err != nil {
			return
		}
		for _, x := range []float64{p.TotalS, p.P10S, p.P50S, p.P90S, p.FloorS, p.ByHandS} {
			if math.IsNaN(x) || math.IsInf(x, 0) {
				t.Fatalf("a total is not finite: %v %v %v %v", p.TotalS, p.P10S, p.P50S, p.P90S)
			}
		}
		opt := Options{Pattern: PatternOf(lay)}
		for _, fm := range []Format{FormatJSON, FormatCSV, FormatSVG, FormatPDF} {
			var buf bytes.Buffer
			if err := Write(context.Background(), &buf, fm, p, opt); err != nil {
				t.Fatalf("%s: %v", fm, err)
			}
			if fm == FormatJSON {
				if _, err := ReadPlanJSON(&buf); err != nil {
					t.Fatalf("the plan file does not read back: %v", err)
				}
			}
		}
		if err := WritePlanSummary(&bytes.Buffer{}, p); err != nil {
			t.Fatalf("summary: %v", err)
		}
	})
}

// Issue 16: export read its input whole (1 GiB: 1.07 GB of memory)
// before refusing it. A regular file beyond its kind's limit is now
// refused by its size, unread; a plan is told from a design by its
// format alone.
func TestReadInputLimits(t *testing.T) {
	dir := t.TempDir()
	sparse := func(name, head string) string {
		path := filepath.Join(dir, name)
		f, err := os.Create(path)
		if err != nil {
			t.Fatal(err)
		}
		f.WriteString(head)
		if err := f.Truncate(1 << 30); err != nil {
			t.Skip("no sparse files here:", err)
		}
		f.Close()
		return path
	}
	for _, c := range []struct{ name, head, want string }{
		{"plan.json", `{"format": "dimerpath-plan", "version": 1, "x": "`, "plan.json: the file holds 1 GiB, more than the 512 MiB limit"},
		{"design.json", `{"format": "dimerpath-design", "version": 1, "x": "`, "design.json: the file holds 1 GiB, more than the 64 MiB limit"},
		{"noise.bin", "PK\x03\x04", "noise.bin: the file holds 1 GiB, more than the 64 MiB limit"},
	} {
		_, _, err := ReadInput(sparse(c.name, c.head))
		if !errors.Is(err, ErrTooLarge) || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: %v, want %q", c.name, err, c.want)
		}
	}
	small := filepath.Join(dir, "small.json")
	os.WriteFile(small, []byte(`{"total_s": NaN, "format": "dimerpath-plan"}`), 0o644)
	if _, isPlan, err := ReadInput(small); err != nil || !isPlan {
		t.Errorf("a plan with a NaN total: plan %v, %v", isPlan, err)
	}
}

// FuzzParseGDSLayers checks the layer map reader: it never panics, each
// line of its error names the file and stays short whatever the input
// holds, and a map it accepts has layers and data types GDSII can write
// (0 to 32767) and a positive mark size.
func FuzzParseGDSLayers(f *testing.F) {
	for _, s := range []string{
		`{"format": "dimerpath-gds-layers", "version": 1, "windows": "40/2", "regions": {"pad": "50/0", "pad/ap": "51/7"}, "mark_size_nm": 5}`,
		`{"format": "dimerpath-gds-layers", "version": 1, "field": "4/-1", "regions": {"pads/x": "1"}}`,
		`{"format": "dimerpath-gds-layers", "version": 1, "field": "` + strings.Repeat("9", 900) + `"}`,
		`{"format": "dimerpath-gds-layers", "version": 2, "Windows": "4/0", "mark_size_nm": NaN}`, `[`, ``,
	} {
		f.Add([]byte(s))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		g, err := ParseGDSLayers("map.json", data)
		if err != nil {
			for _, line := range strings.Split(err.Error(), "\n") {
				if !strings.HasPrefix(line, "map.json") || len(line) > 400 {
					t.Fatalf("error line of %d bytes: %.500s", len(line), line)
				}
			}
			return
		}
		layers := []GDSLayer{g.Field, g.ScanField, g.Terraces, g.Fiducials, g.Windows}
		for _, l := range g.Regions {
			layers = append(layers, l)
		}
		for _, l := range layers {
			if l.Layer < 0 || l.Datatype < 0 {
				t.Fatalf("accepted layer %+v", l)
			}
		}
		if !(g.MarkSizeNM > 0 && g.MarkSizeNM <= 10000) {
			t.Fatalf("accepted mark size %v", g.MarkSizeNM)
		}
	})
}
