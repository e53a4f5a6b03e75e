package editor_test

import (
	"strings"
	"testing"

	"dimerpath/app/editor"
	"dimerpath/app/editor/editortest"
	"dimerpath/lattice/design/designtest"
	"dimerpath/planner"
)

func TestSuggestSweepValues(t *testing.T) {
	d := editortest.Demo(t).Design()
	prof := planner.DefaultProfile()
	params := editor.SweepParameters(d, "", prof)
	byName := map[string]planner.SweepParameter{}
	for _, p := range params {
		byName[p.Name] = p
	}
	for _, c := range []struct{ name, want string }{
		{"drift.rate_nm_per_min", "0.05,0.1,0.2,0.4"},
		{"drift.registration_s", "128,256,512,1024"},
		{"ap.passes", "1,2,3,4"},
		// 5 nA at most twice: 20 nA is beyond the rt preset's 10 nA limit.
		{"fe.current_a", "2.5e-09,5e-09,1e-08"},
		{"drift.verification_s", ""},
	} {
		p, ok := byName[c.name]
		if !ok {
			t.Fatalf("no parameter %q", c.name)
		}
		got := editor.SuggestSweepValues(d, "", prof, p)
		if got != c.want {
			t.Errorf("editor.SuggestSweepValues(%s) = %q, want %q", c.name, got, c.want)
		}
		if got != "" {
			if err := editor.CheckSweep(d, "", prof, c.name, strings.Split(got, ",")); err != nil {
				t.Errorf("the suggested values of %s are refused: %v", c.name, err)
			}
		}
	}
}

func TestSuggestSweepValuesOfAnArray(t *testing.T) {
	d := designtest.WindowArray(100, 40)
	prof := planner.DefaultProfile()
	var arr planner.SweepParameter
	for _, p := range editor.SweepParameters(d, "", prof) {
		if p.Array != nil {
			arr = p
		}
	}
	if arr.Name != "array:donors" {
		t.Fatalf("array parameter %+v", arr)
	}
	if got, want := editor.SuggestSweepValues(d, "", prof, arr), "10x4,30x12,100x40"; got != want {
		t.Errorf("editor.SuggestSweepValues(%s) = %q, want %q", arr.Name, got, want)
	}
}
