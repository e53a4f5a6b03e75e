package app

import (
	"encoding/json"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

func TestPlaceCommand(t *testing.T) {
	code, out, errs := run("place", "../assets/demo.json", "--json", "--best", "3")
	if code != ExitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var r struct {
		Current struct {
			MarginNM *float64 `json:"margin_nm"`
		} `json:"current"`
		Placements []struct {
			MoveNM   [2]float64 `json:"move_nm"`
			Dimers   *int       `json:"dimers"`
			Rows     *int       `json:"rows"`
			MarginNM *float64   `json:"margin_nm"`
			Nearest  []struct {
				Kind  string  `json:"kind"`
				GapNM float64 `json:"gap_nm"`
			} `json:"nearest"`
		} `json:"placements"`
	}
	if err := json.Unmarshal([]byte(out), &r); err != nil {
		t.Fatalf("%v\n%s", err, out)
	}
	if len(r.Placements) != 3 || r.Current.MarginNM == nil {
		t.Fatalf("%d placements, current margin %v:\n%s", len(r.Placements), r.Current.MarginNM, out)
	}
	for i, p := range r.Placements {
		if p.MarginNM == nil || *p.MarginNM < *r.Current.MarginNM || p.Dimers == nil || p.Rows == nil {
			t.Errorf("placement %d %+v is no better than the drawn one (margin %g)", i, p, *r.Current.MarginNM)
		}
	}
	code, out, _ = run("place", "../assets/demo.json", "--regions", "donor-P,donor-As")
	if code != ExitOK || !strings.Contains(out, "best moves by whole lattice vectors") || !strings.Contains(out, "as drawn:") {
		t.Errorf("text output:\n%s", out)
	}
}

func TestPlaceCommandRefuses(t *testing.T) {
	dir := t.TempDir()
	noSurvey := filepath.Join(dir, "plain.json")
	data, err := os.ReadFile("../testdata/designs/floating-gate.json")
	if err != nil {
		t.Fatal(err)
	}
	os.WriteFile(noSurvey, data, 0o644)
	for _, c := range []struct {
		name string
		args []string
		want string
	}{
		{"no survey", []string{noSurvey}, "has no survey"},
		{"unknown region", []string{"../assets/demo.json", "--regions", "nope"}, `no region "nope"`},
		{"bad box", []string{"../assets/demo.json", "--box", "1,2,3"}, "want X0,Y0,X1,Y1"},
		{"box too small", []string{"../assets/demo.json", "--box", "950,990,960,1000"}, "does not fit"},
		{"bad best", []string{"../assets/demo.json", "--best", "0"}, "--best 0"},
	} {
		t.Run(c.name, func(t *testing.T) {
			code, out, errs := run(append([]string{"place"}, c.args...)...)
			if code != ExitFailure || out != "" || !strings.Contains(errs, c.want) {
				t.Errorf("exit %d, stdout %q, stderr %q; want exit 2 and %q", code, out, errs, c.want)
			}
		})
	}
}

// TestSurveyInto puts a survey into a copy of a design and checks that
// the design then holds it and passes its checks.
func TestSurveyInto(t *testing.T) {
	dir := t.TempDir()
	img := writeSurvey(t, dir)
	data, err := os.ReadFile("../testdata/designs/floating-gate.json")
	if err != nil {
		t.Fatal(err)
	}
	des := filepath.Join(dir, "d.json")
	os.WriteFile(des, data, 0o644)
	code, out, errs := run("survey", img, "--into", des, "--at", "900,900", "--rotation", "2")
	if code != ExitOK || !strings.Contains(out, "survey scan.png at (900.00, 900.00) nm, turned 2.000°") {
		t.Fatalf("exit %d: %s%s", code, out, errs)
	}
	again, err := os.ReadFile(des)
	if err != nil || !strings.Contains(string(again), `"survey"`) || !strings.Contains(string(again), `"image": "scan.png"`) {
		t.Fatalf("design not written with its survey: %v\n%.400s", err, again)
	}
	if code, _, errs := run("survey", img, "--at", "1,2"); code != ExitFailure || !strings.Contains(errs, "go with --into") {
		t.Errorf("--at without --into: exit %d, %s", code, errs)
	}
}

// TestSurveyIntoTerraces makes the survey's terraces the design's: the
// synthetic survey has one single-height step, so the design gets two
// terraces, the second a step from the first, up or down as the survey's
// heights say (its up_from), rows turned by 90°; and the tilted image is
// refused when laid 2° off the axes.
func TestSurveyIntoTerraces(t *testing.T) {
	dir := t.TempDir()
	img := writeSurvey(t, dir)
	data, err := os.ReadFile("../testdata/designs/floating-gate.json")
	if err != nil {
		t.Fatal(err)
	}
	des := filepath.Join(dir, "d.json")
	os.WriteFile(des, data, 0o644)
	out := filepath.Join(dir, "out.json")
	if code, _, errs := run("survey", img, "--into", des, "--terraces", "-o", out); code != ExitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	var d struct {
		Terraces []struct {
			Name, Rows, StepFrom, Step string
			Boundary                   [][2]float64 `json:"boundary_nm"`
		} `json:"terraces"`
		Survey struct {
			Terraces []struct {
				UpFrom    *int         `json:"up_from"`
				PolygonNM [][2]float64 `json:"polygon_nm"`
			} `json:"terraces"`
		} `json:"survey"`
	}
	raw, _ := os.ReadFile(out)
	if err := json.Unmarshal(raw, &d); err != nil {
		t.Fatal(err)
	}
	// json's field matching ignores case but not underscores.
	var steps struct {
		Terraces []struct {
			StepFrom string `json:"step_from"`
		} `json:"terraces"`
	}
	json.Unmarshal(raw, &steps)
	if len(d.Terraces) != 2 || len(d.Survey.Terraces) != 2 {
		t.Fatalf("design terraces %+v from survey terraces %+v", d.Terraces, d.Survey.Terraces)
	}
	if steps.Terraces[1].StepFrom != d.Terraces[0].Name || len(d.Terraces[0].Boundary) != 0 || len(d.Terraces[1].Boundary) < 3 {
		t.Errorf("terraces %+v: want the second a step from the first, with an outline", d.Terraces)
	}
	// The base is the larger survey terrace; the other is a step up from
	// it exactly when its up_from names the base.
	area := func(p [][2]float64) float64 {
		a := 0.0
		for k := range p {
			q := p[(k+1)%len(p)]
			a += p[k][0]*q[1] - q[0]*p[k][1]
		}
		return math.Abs(a) / 2
	}
	st := d.Survey.Terraces
	base, other := 0, 1
	if area(st[1].PolygonNM) > area(st[0].PolygonNM) {
		base, other = 1, 0
	}
	want := ""
	switch {
	case st[other].UpFrom != nil && *st[other].UpFrom == base:
		want = "up"
	case st[base].UpFrom != nil && *st[base].UpFrom == other:
		want = "down"
	default:
		t.Fatal("the analysis said neither terrace is up from the other")
	}
	if d.Terraces[1].Step != want {
		t.Errorf("step %q, the survey's heights say %q", d.Terraces[1].Step, want)
	}
	if code, _, errs := run("survey", img, "--into", des, "--terraces", "--at", "900,900", "--rotation", "2", "-o", out); code != ExitFailure || !strings.Contains(errs, "rotation") {
		t.Errorf("rows 7° off the axes: exit %d, %s", code, errs)
	}
}
