package app

import (
	"bytes"
	"encoding/csv"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"dimerpath/export"
	"dimerpath/planner"
)

// goldenPlan is the plan file of export's synthetic SET fixture.
const goldenPlan = "../export/testdata/set.plan.json"

func TestExportPlanFileToEveryFormat(t *testing.T) {
	want, err := export.ReadPlanFile(goldenPlan)
	if err != nil {
		t.Fatal(err)
	}
	dir := t.TempDir()
	for _, name := range []string{"plan.pdf", "plan.svg", "plan.json", "actions.csv"} {
		out := filepath.Join(dir, name)
		// Flags after the file argument, and before it.
		for _, args := range [][]string{
			{"export", goldenPlan, "-o", out, "--paper", "letter", "--date", "2026-03-14"},
			{"export", "-o", out, goldenPlan},
		} {
			_, errs, code := runMain(t, args...)
			if code != ExitOK {
				t.Fatalf("%v: exit %d, stderr:\n%s", args, code, errs)
			}
			// The caution comes first, before the file is written.
			if !strings.HasPrefix(errs, planner.Caution+"\n") || !strings.Contains(errs, "wrote "+out) {
				t.Errorf("%v: stderr does not start with the caution and report the file:\n%s", args, errs)
			}
		}
		data, err := os.ReadFile(out)
		if err != nil {
			t.Fatal(err)
		}
		switch filepath.Ext(name) {
		case ".pdf":
			if !bytes.HasPrefix(data, []byte("%PDF-")) {
				t.Errorf("%s is not a PDF", name)
			}
		case ".svg":
			if !bytes.Contains(data, []byte(`<svg xmlns="http://www.w3.org/2000/svg"`)) {
				t.Errorf("%s is not an SVG", name)
			}
		case ".json":
			got, err := export.ReadPlanJSON(bytes.NewReader(data))
			if err != nil {
				t.Fatal(err)
			}
			if len(got.Actions) != len(want.Actions) || got.TotalS != want.TotalS {
				t.Errorf("re-exported plan: %d actions, %g s; want %d, %g s", len(got.Actions), got.TotalS, len(want.Actions), want.TotalS)
			}
		case ".csv":
			rows, err := csv.NewReader(bytes.NewReader(data)).ReadAll()
			if err != nil {
				t.Fatal(err)
			}
			if len(rows) != len(want.Actions)+1 {
				t.Errorf("%d CSV rows for %d actions", len(rows)-1, len(want.Actions))
			}
		}
	}
}

func TestExportRefuses(t *testing.T) {
	dir := t.TempDir()
	existing := filepath.Join(dir, "old.pdf")
	if err := os.WriteFile(existing, []byte("old"), 0o644); err != nil {
		t.Fatal(err)
	}
	broken := writeFile(t, "broken.json", `{"format": "dimerpath-plan", "version": 2, "strokes": [{"id": 3}]}`)
	for _, tc := range []struct {
		name string
		args []string
		msg  string
	}{
		{"no output", []string{"export", goldenPlan}, "-o FILE is required"},
		{"no input", []string{"export", "-o", existing}, "want one design or plan file"},
		{"unknown extension", []string{"export", goldenPlan, "-o", filepath.Join(dir, "plan.docx")}, `unknown export format ".docx"`},
		{"no extension", []string{"export", goldenPlan, "-o", filepath.Join(dir, "plan")}, "no extension"},
		{"bad paper", []string{"export", goldenPlan, "-o", existing, "--paper", "a3"}, `unknown paper size "a3"`},
		{"bad date", []string{"export", goldenPlan, "-o", existing, "--date", "14/03/2026"}, "want YYYY-MM-DD"},
		{"missing file", []string{"export", filepath.Join(dir, "none.json"), "-o", existing}, "no such file"},
		{"planning flag on a plan", []string{"export", goldenPlan, "-o", existing, "--variant", "B"}, "--variant applies only when planning"},
		{"broken plan", []string{"export", broken, "-o", existing}, "broken.json:1:1: missing fields caution, design"},
		{"output directory missing", []string{"export", goldenPlan, "-o", filepath.Join(dir, "nodir", "x.pdf")}, "nodir"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			_, errs, code := runMain(t, tc.args...)
			if code != ExitFailure || !strings.Contains(errs, tc.msg) {
				t.Errorf("exit %d, stderr %q; want %d and %q", code, errs, ExitFailure, tc.msg)
			}
		})
	}
	if data, _ := os.ReadFile(existing); string(data) != "old" {
		t.Errorf("a refused export changed %s", existing)
	}
	if entries, _ := os.ReadDir(dir); len(entries) != 1 {
		t.Errorf("refused exports left files: %v", entries)
	}
}

func TestExportDemoDesign(t *testing.T) {
	dir := t.TempDir()
	a, b := filepath.Join(dir, "a.json"), filepath.Join(dir, "b.json")
	for _, out := range []string{a, b} {
		_, errs, code := runMain(t, "export", "../assets/demo.json", "-o", out, "--variant", "gap-12-source", "--seed", "7")
		if code != ExitOK {
			t.Fatalf("exit %d, stderr:\n%s", code, errs)
		}
		// The caution, then the report of the file.
		c, w := strings.Index(errs, planner.Caution), strings.Index(errs, "wrote "+out)
		if c < 0 || w < c {
			t.Errorf("stderr order wrong:\n%s", errs)
		}
	}
	da, _ := os.ReadFile(a)
	db, _ := os.ReadFile(b)
	if len(da) == 0 || !bytes.Equal(da, db) {
		t.Error("the same design, variant, profile and seed gave different plan files")
	}
	p, err := export.ReadPlanFile(a)
	if err != nil {
		t.Fatal(err)
	}
	if p.Variant != "gap-12-source" || p.Seed != 7 || len(p.Segments) == 0 {
		t.Errorf("plan of variant %q, seed %d, %d segments", p.Variant, p.Seed, len(p.Segments))
	}
	// The low-temperature preset drifts less: no more segments than at
	// room temperature.
	lt := filepath.Join(dir, "lt.json")
	if _, errs, code := runMain(t, "export", "../assets/demo.json", "-o", lt, "--variant", "gap-12-source", "--profile", "lt"); code != ExitOK {
		t.Fatalf("--profile lt: exit %d\n%s", code, errs)
	}
	q, err := export.ReadPlanFile(lt)
	if err != nil {
		t.Fatal(err)
	}
	if len(q.Segments) > len(p.Segments) || q.Profile == p.Profile {
		t.Errorf("lt profile %q: %d segments, rt %q: %d", q.Profile, len(q.Segments), p.Profile, len(p.Segments))
	}
	for _, tc := range []struct {
		args []string
		msg  string
	}{
		{[]string{"--variant", "nope"}, `no variant "nope"`},
		{[]string{"--profile", filepath.Join(dir, "missing.json")}, "missing.json"},
	} {
		args := append([]string{"export", "../assets/demo.json", "-o", filepath.Join(dir, "x.pdf")}, tc.args...)
		if _, errs, code := runMain(t, args...); code != ExitFailure || !strings.Contains(errs, tc.msg) {
			t.Errorf("%v: exit %d, stderr %q; want %q", tc.args, code, errs, tc.msg)
		}
	}
	if _, err := os.Stat(filepath.Join(dir, "x.pdf")); !os.IsNotExist(err) {
		t.Error("a refused export wrote its file")
	}
}
