package design

import (
	"bytes"
	"os"
	"strings"
	"testing"
)

// FuzzParse feeds the loader arbitrary bytes: it must return a design or
// an error, never panic, and a design it accepts must save and load back
// unchanged.
func FuzzParse(f *testing.F) {
	demo, err := os.ReadFile("../../assets/demo.json")
	if err != nil {
		f.Fatal(err)
	}
	seeds := []string{
		string(demo),
		minimal,
		string(demo[:len(demo)/3]), // truncated
		"",
		"{",
		"null",
		`{"format": "dimerpath-design", "version": "1"}`,                                                                                     // wrong type
		strings.Replace(minimal, `"width_nm": 200`, `"width_nm": NaN`, 1),                                                                    // NaN
		strings.Replace(minimal, `"height_nm": 200`, `"height_nm": -200`, 1),                                                                 // negative size
		strings.Replace(minimal, `"width_nm": 4`, `"width_nm": Infinity`, 1),                                                                 // infinity
		strings.Replace(minimal, `"role": "lead",`, `"role": "lead", "painted": {"sites": 1000000000, "rows": [[0, 1, 0, 1000000000]]},`, 1), // 10^9 sites
		strings.Replace(minimal, `"role": "lead",`, `"role": "lead", "painted": {"sites": 4, "rows": [[0, 3, 10, 4]]}, "erased": {"rows": [[0, 3, 11, 1]]},`, 1),
		strings.Replace(minimal, `[[10, 10], [60, 60]]`, `[[10, 10], [60, 60], [1e308, -1e308]]`, 1),
		`{"format": "dimerpath-design", "version": 1, "name": "t", "field": {"width_nm": 50, "height_nm": 50},
		  "terraces": [{"name": "a", "rows": "x"}, {"name": "b", "step_from": "a", "boundary_nm": [[25, 0], [50, 0], [50, 50], [25, 50]]}],
		  "variants": [{"name": "v", "regions": [{"name": "w", "role": "donor", "species": "P",
		    "shapes": [{"kind": "array", "array": {"of": {"kind": "window", "template": "P", "points_nm": [[5, 5]]}, "cols": 4, "rows": 3, "pitch_dimers": 5, "pitch_rows": 3}}]}]}]}`,
	}
	for _, s := range seeds {
		f.Add([]byte(s))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		d, err := Parse("fuzz.json", data)
		if err != nil {
			if d != nil {
				t.Fatalf("Parse returned both a design and an error")
			}
			return
		}
		// An accepted design lays out, checks, and round-trips.
		if _, err := Check(d, ""); err != nil {
			t.Fatalf("accepted design does not check: %v", err)
		}
		out, err := Marshal(d)
		if err != nil {
			t.Fatal(err)
		}
		back, err := Parse("fuzz.json", out)
		if err != nil {
			t.Fatalf("saved design does not load: %v\n%s", err, out)
		}
		again, _ := Marshal(back)
		if !bytes.Equal(out, again) {
			t.Fatalf("save -> load -> save changed the file:\n%s\n---\n%s", out, again)
		}
	})
}
