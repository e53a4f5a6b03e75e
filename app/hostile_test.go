package app

import (
	"bytes"
	"encoding/json"
	"flag"
	"fmt"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"dimerpath/internal/atomicfile"
)

const demoDesign = "../assets/demo.json"

// writeJSON writes v as JSON to a file in a temporary directory.
func writeJSON(t *testing.T, name string, v any) string {
	t.Helper()
	data, err := json.Marshal(v)
	if err != nil {
		t.Fatal(err)
	}
	return writeFile(t, name, string(data))
}

// Issue 16, through the command line: each case is refused with one
// short message that names the file and the field, and exit status 2.
func TestCommandsRefuseHostileInput(t *testing.T) {
	profile := func(fields map[string]any) string {
		fields["format"], fields["version"] = "dimerpath-profile", 1
		return writeJSON(t, "p.json", fields)
	}
	plan := filepath.Join(t.TempDir(), "plan.json")
	if _, errs, code := runMain(t, "export", demoDesign, "-o", plan, "--date", "2026-03-14"); code != ExitOK {
		t.Fatalf("export: %s", errs)
	}
	planText, _ := os.ReadFile(plan)
	nanPlan := writeFile(t, "nan.plan.json", strings.Replace(string(planText), `"total_s": `, `"total_s": NaN, "x": `, 1))
	// The line of total_s in the plan file, where the reader must point.
	totalLine := strings.Count(string(planText[:strings.Index(string(planText), `"total_s": `)]), "\n") + 1
	noLF := writeFile(t, "nolf.csv", "bias_v"+strings.Repeat("x", 1<<20))
	// 8 MB of short lines: 2·10^6 points, more than order takes (it
	// tried to order them, or 16·10^6 in 64 MiB, until memory ran out).
	shortLines := writeFile(t, "short.csv", strings.Repeat("1,2\n", maxOrderLines+1))
	dir := t.TempDir()
	outDir := filepath.Join(dir, "out.pdf")
	os.Mkdir(outDir, 0o755)
	cases := []struct {
		name string
		args []string
		want string
	}{
		{"settle of 1e306 s", []string{"plan", demoDesign, "--profile", profile(map[string]any{"settle_s": 1e306})}, "p.json:1:42: settle_s = 1e+306: must be from 0 to 3600 s"},
		{"writing at 1e-600 nm/s", []string{"plan", demoDesign, "--profile", profile(map[string]any{"limits": map[string]any{"max_speed_nm_per_s": 0},
			"ap": map[string]any{"current_a": 1e-300, "line_dose_c_per_cm": 1e300}})}, "ap.current_a = 1e-300: must be from 1 fA to 1 µA"},
		{"overlap 0.999999999", []string{"plan", demoDesign, "--profile", profile(map[string]any{"fe": map[string]any{"overlap": 0.999999999}})}, "fe.overlap = 0.999999999: must be from 0 to 0.95"},
		{"settle 1e305 on the PDF path", []string{"export", demoDesign, "-o", filepath.Join(dir, "s.pdf"), "--profile", profile(map[string]any{"settle_s": 1e305})}, "settle_s = 1e+305"},
		{"NaN in a profile", []string{"plan", demoDesign, "--profile", writeFile(t, "nan.json", `{"format": "dimerpath-profile", "version": 1, "settle_s": NaN}`)}, "nan.json:1:59: settle_s: NaN is not a finite number"},
		{"a plan with a NaN total", []string{"export", nanPlan, "-o", filepath.Join(dir, "n.pdf")}, fmt.Sprintf("nan.plan.json:%d:14: total_s: NaN is not a finite number", totalLine)},
		{"order of too many short lines", []string{"order", shortLines, "--kicks", "1"}, "short.csv: more than 2000000 lines, the limit for an item file"},
		{"calibrate without line breaks", []string{"calibrate", noLF, "-o", filepath.Join(dir, "p.json")}, "nolf.csv:1: line longer than 64 KiB, the limit"},
		{"-o a directory", []string{"export", demoDesign, "-o", outDir}, "-o " + outDir + " is a directory"},
		{"-o in a missing directory", []string{"export", demoDesign, "-o", filepath.Join(dir, "none", "x.pdf")}, "x.pdf: the directory " + filepath.Join(dir, "none") + " does not exist"},
		{"a rectangle to 1e19 nm", []string{"plan", writeFile(t, "far.json", strings.Replace(mustRead(t, demoDesign), `[[989.840, 994.257], [1009.810, 1005.778]]`, `[[989.840, 994.257], [1e19, 1005.778]]`, 1))},
			"lies beyond ±10000 nm, farther out than the largest field reaches"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			out, errs, code := runMain(t, c.args...)
			if code != ExitFailure || !strings.Contains(errs, c.want) {
				t.Errorf("exit %d, stderr %q; want %d and %q", code, errs, ExitFailure, c.want)
			}
			if len(errs) > 1000 || out != "" {
				t.Errorf("%d bytes on stderr, %d on stdout", len(errs), len(out))
			}
		})
	}
	if entries, _ := os.ReadDir(dir); len(entries) != 1 {
		t.Errorf("refused commands left files: %v", entries)
	}
}

func mustRead(t *testing.T, path string) string {
	t.Helper()
	data, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	return string(data)
}

// Huge times that the profile's ranges allow print as durations, and the
// JSON summary holds them (issue 16: "-153722867280912930 h", "+Inf %",
// "json: unsupported value: +Inf").
func TestHugeLegalTimes(t *testing.T) {
	prof := writeJSON(t, "slow.json", map[string]any{"format": "dimerpath-profile", "version": 1,
		"drift": map[string]any{"registration_s": 86400, "verification_s": 86400, "rate_nm_per_min": 100}, "tolerance_ap_nm": 0.05, "mode_switch_s": 86400})
	out, errs, code := runMain(t, "plan", demoDesign, "--profile", prof)
	if code != ExitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, bad := range []string{"Inf", "NaN", "-1", "–"} {
		if strings.Contains(out, bad) {
			t.Errorf("summary holds %q:\n%s", bad, out)
		}
	}
	if !strings.Contains(out, " h ") {
		t.Errorf("no duration in hours in the summary:\n%s", out)
	}
	js, errs, code := runMain(t, "plan", demoDesign, "--profile", prof, "--json")
	var v map[string]any
	if code != ExitOK || json.Unmarshal([]byte(js), &v) != nil || !(v["total_s"].(float64) > 1e6) {
		t.Errorf("plan --json: exit %d, %s, total %v", code, errs, v["total_s"])
	}
}

// A panic in a command becomes exit status 3 and one line that says it
// is a bug and where the details are; the details file holds the stack.
func TestPanicIsABugReport(t *testing.T) {
	dir := t.TempDir()
	saved := bugReportDir
	bugReportDir = func() string { return dir }
	defer func() { bugReportDir = saved }()
	Register(&Command{Name: "test-panic", Usage: "test-panic", Summary: "panics (a test)", Flags: func(*flag.FlagSet) func(Env, []string) int {
		return func(Env, []string) int {
			var m map[string]int
			m["boom"]++ // a nil map: a bug
			return ExitOK
		}
	}})
	defer delete(commands, "test-panic")
	out, errs, code := runMain(t, "test-panic", "some", "args")
	if code != ExitBug || out != "" || strings.Count(errs, "\n") != 1 {
		t.Fatalf("exit %d, stdout %q, stderr %q; want %d and one line", code, out, errs, ExitBug)
	}
	files, _ := filepath.Glob(filepath.Join(dir, "bug-*.txt"))
	if len(files) != 1 || !strings.Contains(errs, "this is a bug in dimerpath") || !strings.Contains(errs, files[0]) {
		t.Fatalf("stderr %q does not name the report %v", errs, files)
	}
	report, _ := os.ReadFile(files[0])
	for _, want := range []string{"command: dimerpath test-panic some args", "assignment to entry in nil map", "hostile_test.go"} {
		if !bytes.Contains(report, []byte(want)) {
			t.Errorf("report lacks %q:\n%s", want, report)
		}
	}
}

// The export's temporary files are recognisable and a killed export's
// are gone after the next one (the killing itself is tested in
// internal/atomicfile).
func TestExportCleansStaleFiles(t *testing.T) {
	dir := t.TempDir()
	stale := filepath.Join(dir, ".plan.pdf.dimerpath-unfinished-999999999-1")
	os.WriteFile(stale, []byte("half"), 0o644)
	if !atomicfile.IsTemp(filepath.Base(stale)) {
		t.Fatal("not recognised as a temporary file")
	}
	if _, errs, code := runMain(t, "export", demoDesign, "-o", filepath.Join(dir, "plan.csv")); code != ExitOK {
		t.Fatal(errs)
	}
	if _, err := os.Stat(stale); !os.IsNotExist(err) {
		t.Errorf("the stale file of a dead process is still there")
	}
}
