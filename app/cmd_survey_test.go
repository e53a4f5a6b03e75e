package app

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"dimerpath/lattice/survey"
	"dimerpath/lattice/survey/synth"
)

// writeSurvey renders a small synthetic survey with a step and two
// defects and writes it as a 16-bit PNG without its size.
func writeSurvey(t *testing.T, dir string) string {
	t.Helper()
	p := synth.Params{
		Width: 384, Height: 384, ScaleNM: [2]float64{0.1, 0.1}, RotationDeg: 5,
		NoiseNM: 0.005, Seed: 1,
		Step: &synth.Step{Through: [2]float64{25, 19}, AngleDeg: 80, Up: true},
		Defects: []synth.Defect{
			{Kind: synth.Bright, AtNM: [2]float64{10, 10}, HeightNM: 0.15, SizeNM: 0.9},
			{Kind: synth.Dark, AtNM: [2]float64{32, 28}, HeightNM: 0.08, SizeNM: 0.6},
		},
	}
	im, err := synth.Render(p)
	if err != nil {
		t.Fatal(err)
	}
	top := &survey.Topograph{Width: p.Width, Height: p.Height, Z: make([]float32, len(im.Z)), ZUnitNM: 1}
	for i, v := range im.Z {
		top.Z[i] = float32(v)
	}
	path := filepath.Join(dir, "scan.png")
	f, err := os.Create(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	if err := survey.WritePNG(f, top, 16); err != nil {
		t.Fatal(err)
	}
	return path
}

func TestSurveyCommand(t *testing.T) {
	dir := t.TempDir()
	img := writeSurvey(t, dir)
	code, out, errs := run("survey", img, "--json", "--size", "38.4,38.4")
	if code != ExitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	// The keys the issue names, with their types.
	var r struct {
		Scale    *[2]float64 `json:"scale_nm_per_px"`
		Nominal  *[2]float64 `json:"nominal_nm_per_px"`
		Rotation *float64    `json:"rotation_deg"`
		Skew     *float64    `json:"skew_deg"`
		Terraces []struct {
			Rows    *float64     `json:"rows_deg"`
			Polygon [][2]float64 `json:"polygon_nm"`
			UpFrom  *int         `json:"up_from"`
		} `json:"terraces"`
		Steps []struct {
			Polyline [][2]float64 `json:"polyline_nm"`
		} `json:"steps"`
		Defects []struct {
			At     [2]float64 `json:"at_nm"`
			Kind   string     `json:"kind"`
			Height *float64   `json:"height_nm"`
			Size   *float64   `json:"size_nm"`
		} `json:"defects"`
	}
	if err := json.Unmarshal([]byte(out), &r); err != nil {
		t.Fatalf("%v\n%s", err, out)
	}
	if r.Scale == nil || r.Nominal == nil || r.Rotation == nil || r.Skew == nil {
		t.Fatalf("missing calibration keys:\n%s", out)
	}
	if d := r.Scale[0]/0.1 - 1; d > 0.005 || d < -0.005 || math.Abs(r.Nominal[0]-0.1) > 1e-12 {
		t.Errorf("scale %v nominal %v, want 0.1 nm/px (rendered so)", *r.Scale, *r.Nominal)
	}
	if len(r.Terraces) != 2 || len(r.Steps) != 1 || len(r.Defects) != 2 {
		t.Fatalf("%d terraces, %d steps, %d defects; want 2, 1, 2:\n%s", len(r.Terraces), len(r.Steps), len(r.Defects), out)
	}
	// Exactly one terrace is up from the other.
	ups := 0
	for i, tr := range r.Terraces {
		if tr.UpFrom != nil {
			ups++
			if *tr.UpFrom != 1-i {
				t.Errorf("terrace %d up_from %d", i, *tr.UpFrom)
			}
		}
	}
	if ups != 1 {
		t.Errorf("%d terraces say they are up from another; want 1", ups)
	}
	kinds := map[string]bool{}
	for _, d := range r.Defects {
		kinds[d.Kind] = true
		if d.Height == nil || d.Size == nil {
			t.Errorf("defect %v lacks height or size", d.At)
		}
	}
	if !kinds["bright"] || !kinds["dark"] {
		t.Errorf("defect kinds %v, want one bright and one dark", kinds)
	}
	// Without --size the nominal scale is null; the text form names the
	// calibration's model and the terraces.
	code, out, _ = run("survey", img, "--json")
	if code != ExitOK || !strings.Contains(out, `"nominal_nm_per_px": null`) {
		t.Errorf("without --size: exit %d, nominal not null:\n%.300s", code, out)
	}
	code, out, _ = run("survey", img)
	for _, want := range []string{"measured scale", "CODATA 2018", "terraces (2)", "step edges (1)", "defects (2: 1 bright, 1 dark"} {
		if code != ExitOK || !strings.Contains(out, want) {
			t.Errorf("text output lacks %q:\n%s", want, out)
		}
	}
}

func TestSurveyCommandRefusesBadImages(t *testing.T) {
	dir := t.TempDir()
	write := func(name, data string) string {
		p := filepath.Join(dir, name)
		os.WriteFile(p, []byte(data), 0o644)
		return p
	}
	for _, c := range []struct {
		name string
		args []string
		want string
	}{
		{"ragged", []string{write("ragged.txt", "1 2 3\n4 5\n")}, "ragged.txt:2: lines of the matrix differ in length"},
		{"NaN", []string{write("nan.txt", "1 NaN\n3 4\n")}, "nan.txt:1: height is not a finite number"},
		{"truncated", []string{write("cut.png", "\x89PNG\r\n\x1a\n\x00\x00")}, "cut.png"},
		{"flat", []string{write("flat.txt", strings.Repeat(strings.Repeat("1 ", 64)+"\n", 64))}, "no dimer-row period"},
		{"missing", []string{filepath.Join(dir, "none.png")}, "none.png"},
		{"bad size", []string{write("ok.txt", "1 2\n"), "--size", "10"}, `--size "10"`},
		{"two images", []string{"a.png", "b.png"}, "want one image"},
	} {
		t.Run(c.name, func(t *testing.T) {
			code, out, errs := run(append([]string{"survey"}, c.args...)...)
			if code != ExitFailure || out != "" || !strings.Contains(errs, c.want) {
				t.Errorf("exit %d, stdout %q, stderr %q; want exit 2 and %q", code, out, errs, c.want)
			}
		})
	}
}
