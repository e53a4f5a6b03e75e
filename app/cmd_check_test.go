package app

import (
	"bytes"
	"encoding/json"
	"path/filepath"
	"regexp"
	"strings"
	"testing"

	"dimerpath/planner"
)

func run(args ...string) (code int, stdout, stderr string) {
	var out, errb bytes.Buffer
	code = Main(args, strings.NewReader(""), &out, &errb)
	return code, out.String(), errb.String()
}

func TestCheckCommand(t *testing.T) {
	tests := []struct {
		name     string
		args     []string
		code     int
		stdout   []string
		stderr   []string
		noStdout bool
	}{
		{"demo passes", []string{"check", "../assets/demo.json"}, ExitOK,
			[]string{"2 variant(s) checked (gap-9, gap-12-source): 0 error(s), 0 warning(s)"}, nil, false},
		{"flag before the file", []string{"check", "--variant", "gap-12-source", "../assets/demo.json"}, ExitOK,
			[]string{"1 variant(s) checked (gap-12-source)"}, nil, false},
		{"floating gate", []string{"check", "../testdata/designs/floating-gate.json"}, ExitFindings,
			[]string{"gap-9: error   floating       [gate-island]  at (1100.1, 1000.0) nm: gate region is floating", "1 error(s)"}, nil, false},
		{"unknown variant", []string{"check", "../assets/demo.json", "--variant", "gap-10"}, ExitFailure,
			nil, []string{`has no variant "gap-10" (it has "gap-9", "gap-12-source")`}, true},
		{"malformed", []string{"check", "../testdata/designs/nan-point.json"}, ExitFailure, nil, []string{
			"nan-point.json:10:112: variants[1].regions[1].shapes[0].points_nm[1][0]: NaN is not a finite number",
			"nan-point.json:11:62: variants[1].regions[2].painted.sites: 1000000000 is out of range",
			"nan-point.json:3:43: field.height_nm: -300 must be more than 0",
		}, true},
		{"truncated", []string{"check", "../testdata/designs/truncated.json"}, ExitFailure, nil, []string{"truncated.json: the file ends before the design does"}, true},
		{"missing file", []string{"check", "no-such.json"}, ExitFailure, nil, []string{"no-such.json: no such file"}, true},
		{"no file", []string{"check"}, ExitFailure, nil, []string{"want one design file"}, true},
		{"bad flag", []string{"check", "--colour", "x.json"}, ExitFailure, nil, []string{"flag provided but not defined: -colour"}, true},
		{"help", []string{"check", "--help"}, ExitOK, []string{"Usage: dimerpath check DESIGN.json [--variant NAME]", "Exit status"}, nil, false},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			code, out, errs := run(tc.args...)
			if code != tc.code {
				t.Errorf("exit %d, want %d\nstdout:\n%s\nstderr:\n%s", code, tc.code, out, errs)
			}
			for _, w := range tc.stdout {
				if !strings.Contains(out, w) {
					t.Errorf("stdout lacks %q:\n%s", w, out)
				}
			}
			for _, w := range tc.stderr {
				if !strings.Contains(errs, w) {
					t.Errorf("stderr lacks %q:\n%s", w, errs)
				}
			}
			if tc.noStdout && out != "" {
				t.Errorf("stdout not empty on failure:\n%s", out)
			}
		})
	}
}

func TestInfoCommand(t *testing.T) {
	code, out, errs := run("info", "../assets/demo.json", "--variant", "gap-12-source")
	if code != ExitOK {
		t.Fatalf("exit %d: %s", code, errs)
	}
	for _, w := range []string{
		"Kestrel-7 donor-pair sensor",
		"upper: rows along y, one step up from lower, offset (0.192, 0.000) nm",
		"F-east at (1700, 1000) nm",
		"P: P, 3 dimers (6 H sites), donors taken: one 0.63 ± 0.10, none 0.37 ± 0.10, two or more 0.00",
		"Variant gap-12-source",
		"Dopant     P (phosphine), for the regions that name none",
		// Issue 11: the dopant each region receives (the design's for those
		// naming none) and the tolerance the planner holds it to: leads
		// and gates their role's (1 nm) in AP work, pads theirs (10 nm).
		"sensor-island    device                 AP    P       ±0.20 nm       1560",
		"source-lead      lead                   auto  P       ±1.00/2.00 nm  2478",
		"pad-source       contact pad (pad)      FE    P       ±10.00 nm      3323401",
		"coupling donor-P – donor-As: placement relative to each other ±0.30 nm",
		"tunnel gap sensor-island – source-lead: 9.22 nm (12.0 dimer rows across the rows)",
	} {
		if !strings.Contains(out, w) {
			t.Errorf("info lacks %q:\n%s", w, out)
		}
	}
	if strings.Contains(out, "Variant gap-9") {
		t.Errorf("--variant gap-12-source also printed gap-9")
	}
	if code, _, errs := run("info", "../testdata/designs/truncated.json"); code != ExitFailure || errs == "" {
		t.Errorf("info on a truncated file: exit %d, stderr %q", code, errs)
	}
}

// TestCheckOverclearingAgreesWithPlan: check runs the plan's own
// over-clearing test (issue 10 §3), so with a profile whose stray limit
// the demo's lead ends exceed, check and plan both exit 1 and name the
// same sites' regions; with the default profile both pass.
func TestCheckOverclearingAgreesWithPlan(t *testing.T) {
	prof := planner.DefaultProfile()
	prof.StrayLimit = 1e-6
	strict := filepath.Join(t.TempDir(), "strict.json")
	if err := planner.SaveProfile(strict, prof); err != nil {
		t.Fatal(err)
	}
	code, out, errs := run("check", demoPath, "--variant", "gap-9", "--profile", strict)
	if code != ExitFindings {
		t.Fatalf("check with stray limit 1e-6: exit %d, want %d\n%s%s", code, ExitFindings, out, errs)
	}
	for _, w := range []string{"error   over-clearing  [source-lead]", "error   over-clearing  [drain-lead]", "outside every region clear with more than 0.0001 %"} {
		if !strings.Contains(out, w) {
			t.Errorf("check lacks %q:\n%s", w, out)
		}
	}
	pcode, pout, perrs := run("plan", demoPath, "--variant", "gap-9", "--profile", strict, "--json")
	if pcode != ExitFindings {
		t.Fatalf("plan with stray limit 1e-6: exit %d, want %d: %s", pcode, ExitFindings, perrs)
	}
	var plan struct {
		Coverage struct {
			OverLimit int      `json:"over_limit"`
			Issues    []string `json:"issues"`
		} `json:"coverage"`
	}
	if err := json.Unmarshal([]byte(pout), &plan); err != nil {
		t.Fatal(err)
	}
	if plan.Coverage.OverLimit == 0 || len(plan.Coverage.Issues) == 0 {
		t.Fatalf("the plan finds no stray site: %+v", plan.Coverage)
	}
	// Each issue names the region whose stroke reaches the site.
	region := regexp.MustCompile(`of region "([^"]+)"`)
	for _, is := range plan.Coverage.Issues {
		m := region.FindStringSubmatch(is)
		if m == nil || !strings.Contains(out, "over-clearing  ["+m[1]+"]") {
			t.Errorf("the plan's stray site %q is not in check's findings:\n%s", is, out)
		}
	}
	if code, out, errs := run("check", demoPath, "--profile", "rt"); code != ExitOK || strings.Contains(out, "over-clearing") {
		t.Errorf("check with the rt preset: exit %d\n%s%s", code, out, errs)
	}
	if code, _, errs := run("check", demoPath, "--profile", "no-such-profile.json"); code != ExitFailure || !strings.Contains(errs, "no-such-profile.json") {
		t.Errorf("check with a missing profile: exit %d, stderr %q", code, errs)
	}
}
