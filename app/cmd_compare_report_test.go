package app

import (
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"dimerpath/planner"
)

// Issue 13: two variants that differ in a gap printed two rows that
// looked the same; the table now gives times to the second, each
// variant's coverage check, and what differs from the first variant.
func TestCompareSaysWhatDiffers(t *testing.T) {
	out, errs, code := runMain(t, "compare", "../assets/demo.json")
	if code != ExitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, want := range []string{
		"session (mean)", "As, P", "P(within tolerance)",
		"coverage",
		"What differs from gap-9:",
		"tunnel gap sensor-island – source-lead: 6.91 nm (9.0 dimer rows across the rows) → 9.22 nm (12.0 dimer rows across the rows)",
		"region source-lead: H sites 2604",
	} {
		if !strings.Contains(out, want) {
			t.Errorf("compare output lacks %q:\n%s", want, out)
		}
	}
	if n := strings.Count(out, "passed"); n != 2 {
		t.Errorf("%d coverage results passed, want one per variant:\n%s", n, out)
	}
	// Each variant's session time, P10 and P90 to the second (h:mm:ss),
	// and the two totals, seconds apart, differ on the page.
	clock := regexp.MustCompile(`^\s*(gap-9|gap-12-source)\s+(\d+:\d\d:\d\d)\s+\d+:\d\d:\d\d\s+\d+:\d\d:\d\d\s`)
	totals := map[string]string{}
	for _, l := range strings.Split(out, "\n") {
		if m := clock.FindStringSubmatch(l); m != nil {
			totals[m[1]] = m[2]
		}
	}
	if len(totals) != 2 || totals["gap-9"] == totals["gap-12-source"] {
		t.Errorf("session times %v: want both variants' to the second, and different:\n%s", totals, out)
	}
}

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
		// Issue 13: the report says what differs between the variants
		// and each one's coverage check.
		for _, want := range []string{planner.Caution, "gap-9", "gap-12-source", "Saturday 14 March 2026",
			"What differs from gap-9", "6.91 nm (9.0 dimer rows across the rows)", "9.22 nm (12.0 dimer rows across the rows)", "Coverage check", "passed"} {
			if !strings.Contains(flat, want) {
				t.Errorf("comparison PDF lacks %q", want)
			}
		}
	}
	// A report format compare does not write is refused before planning.
	// Issue 13: the message names what compare writes, not what export
	// writes (-o x.txt suggested ".json or .csv").
	for _, bad := range []string{"cmp.csv", "cmp.json", "cmp.png", "cmp.txt", "cmp"} {
		out, errs, code := runMain(t, "compare", "../assets/demo.json", "-o", filepath.Join(dir, bad))
		if code != ExitFailure || !strings.Contains(errs, bad) || out != "" {
			t.Errorf("-o %s: exit %d, stderr %q", bad, code, errs)
		}
		if !strings.Contains(errs, "this command writes .pdf or .svg") || strings.Contains(errs, ".csv)") || strings.Contains(errs, "or .csv") {
			t.Errorf("-o %s: stderr %q, want it to say compare writes .pdf or .svg, and nothing else", bad, errs)
		}
	}
	if entries, _ := os.ReadDir(dir); len(entries) != 2 {
		t.Errorf("%d files in the directory, want the two reports", len(entries))
	}
}
