package app

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"dimerpath/planner"
)

func TestSweepCommand(t *testing.T) {
	dir := t.TempDir()
	pdf := filepath.Join(dir, "sweep.pdf")
	out, errs, code := runMain(t, "sweep", "../assets/demo.json", "--param", "drift.registration_s", "--values", "100,256,600", "-o", pdf, "--date", "2026-03-14")
	if code != ExitOK {
		t.Fatalf("exit %d, stderr:\n%s", code, errs)
	}
	for _, want := range []string{"sweep of drift.registration_s", planner.Caution, "drift.registration_s (s)", "Expected", "P10", "P90", "All windows good"} {
		if !strings.Contains(out, want) {
			t.Errorf("output lacks %q:\n%s", want, out)
		}
	}
	// One row per value, in the order given.
	var rows []string
	for _, l := range strings.Split(out, "\n") {
		f := strings.Fields(l)
		if len(f) > 3 && (f[0] == "100" || f[0] == "256" || f[0] == "600") {
			rows = append(rows, f[0])
		}
	}
	if strings.Join(rows, ",") != "100,256,600" {
		t.Errorf("rows %v, want 100,256,600:\n%s", rows, out)
	}
	if fi, err := os.Stat(pdf); err != nil || fi.Size() == 0 || !strings.Contains(errs, "wrote "+pdf) {
		t.Errorf("report: %v, stderr %q", err, errs)
	}
}

func TestSweepCommandRefusesBadInput(t *testing.T) {
	dir := t.TempDir()
	for _, c := range []struct {
		name string
		args []string
		want []string
	}{
		{"unknown parameter", []string{"--param", "drift", "--values", "1"}, []string{`no parameter "drift"`, "drift.rate_nm_per_min", "ap.current_a"}},
		{"beyond a limit", []string{"--param", "fe.bias_v", "--values", "8,12"}, []string{"fe.bias_v = 12", "limits.max_bias_v = 10 V"}},
		{"not a number", []string{"--param", "settle_s", "--values", "0.5,fast"}, []string{`settle_s = "fast": not a number`}},
		{"no array in the demo", []string{"--param", "array:pads", "--values", "2"}, []string{`no parameter "array:pads"`}},
		{"report format", []string{"--param", "settle_s", "--values", "1", "-o", filepath.Join(dir, "s.csv")}, []string{"s.csv"}},
		{"no parameter lists them", nil, []string{"give --param NAME"}},
	} {
		t.Run(c.name, func(t *testing.T) {
			out, errs, code := runMain(t, append([]string{"sweep", "../assets/demo.json"}, c.args...)...)
			if code != ExitFailure {
				t.Errorf("exit %d, want %d", code, ExitFailure)
			}
			for _, w := range c.want {
				if !strings.Contains(errs, w) {
					t.Errorf("stderr lacks %q:\n%s", w, errs)
				}
			}
			if c.args == nil {
				if !strings.Contains(out, "drift.rate_nm_per_min") || !strings.Contains(out, "0.1") {
					t.Errorf("the parameter list lacks the drift rate and its value:\n%s", out)
				}
			} else if strings.Contains(out, "Expected") {
				t.Errorf("something was planned:\n%s", out)
			}
		})
	}
	if entries, _ := os.ReadDir(dir); len(entries) != 0 {
		t.Errorf("files left: %v", entries)
	}
}
