package app

import (
	"encoding/json"
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
