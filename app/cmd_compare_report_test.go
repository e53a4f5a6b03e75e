package app

import (
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"dimerpath/planner"
)

func TestCompareReport(t *testing.T) {
	dir := t.TempDir()
	pdf, svg := filepath.Join(dir, "cmp.pdf"), filepath.Join(dir, "cmp.svg")
	for _, out := range []string{pdf, svg} {
		_, errs, code := runMain(t, "compare", "../assets/demo.json", "-o", out, "--paper", "letter", "--date", "2026-03-14")
		if code != ExitOK || !strings.Contains(errs, "wrote "+out) {
			t.Fatalf("compare -o %s: exit %d, stderr:\n%s", out, code, errs)
		}
	}
	svgData, _ := os.ReadFile(svg)
	for _, v := range []string{"gap-9", "gap-12-source", `id="breakdown-compare"`} {
		if !strings.Contains(string(svgData), v) {
			t.Errorf("comparison SVG lacks %q", v)
		}
	}
	if _, err := exec.LookPath("pdftotext"); err == nil {
		text, err := exec.Command("pdftotext", pdf, "-").Output()
		if err != nil {
			t.Fatal(err)
		}
		flat := strings.Join(strings.Fields(string(text)), " ")
		for _, want := range []string{planner.Caution, "gap-9", "gap-12-source", "Saturday 14 March 2026"} {
			if !strings.Contains(flat, want) {
				t.Errorf("comparison PDF lacks %q", want)
			}
		}
	}
	// A report format compare does not write is refused before planning.
	for _, bad := range []string{"cmp.csv", "cmp.json", "cmp.png"} {
		out, errs, code := runMain(t, "compare", "../assets/demo.json", "-o", filepath.Join(dir, bad))
		if code != ExitFailure || !strings.Contains(errs, bad) || out != "" {
			t.Errorf("-o %s: exit %d, stderr %q", bad, code, errs)
		}
	}
	if entries, _ := os.ReadDir(dir); len(entries) != 2 {
		t.Errorf("%d files in the directory, want the two reports", len(entries))
	}
}
