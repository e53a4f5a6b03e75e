package design

import (
	"bytes"
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"dimerpath/internal/jsonfile"
	"dimerpath/lattice"
)

// minimal is a small valid design used as the base of the malformed
// cases: one 200 nm field, one variant with a pad and a lead.
const minimal = `{
  "format": "dimerpath-design", "version": 1, "name": "mini",
  "field": {"width_nm": 200, "height_nm": 200},
  "variants": [{"name": "A", "regions": [
    {"name": "pad", "role": "pad", "mode": "fe", "shapes": [{"kind": "rect", "points_nm": [[10, 10], [60, 60]]}]},
    {"name": "lead", "role": "lead", "shapes": [{"kind": "polyline", "width_nm": 4, "points_nm": [[50, 50], [120, 120]]}]}
  ]}]
}`

func TestParseMinimal(t *testing.T) {
	d, err := Parse("mini.json", []byte(minimal))
	if err != nil {
		t.Fatal(err)
	}
	if d.Name != "mini" || len(d.Variants[0].Regions) != 2 {
		t.Errorf("parsed %+v", d)
	}
}

func TestParseRefuses(t *testing.T) {
	tests := []struct {
		name string
		in   string
		want []string // each must appear in the error
	}{
		{"empty", ``, []string{"bad.json: the file ends before the design does"}},
		{"truncated", minimal[:len(minimal)/2], []string{"bad.json: the file ends before the design does"}},
		{"syntax", `{"format": "dimerpath-design",, }`, []string{"bad.json:1:31: not valid JSON"}},
		{"trailing data", minimal + ` {}`, []string{"more data after"}},
		{"not an object", `[1, 2]`, []string{"bad.json:1:1: want an object, not a list"}},
		{"NaN point", strings.Replace(minimal, "[[50, 50], [120, 120]]", "[[50, 50], [NaN, 120]]", 1),
			[]string{"bad.json:6:110: variants[0].regions[1].shapes[0].points_nm[1][0]: NaN is not a finite number"}},
		{"Infinity width", strings.Replace(minimal, `"width_nm": 4`, `"width_nm": -Infinity`, 1),
			[]string{"variants[0].regions[1].shapes[0].width_nm: -Infinity is not a finite number"}},
		{"1e400", strings.Replace(minimal, `"width_nm": 200`, `"width_nm": 1e400`, 1), []string{"field.width_nm: 1e400 is not a finite number"}},
		{"wrong type", strings.Replace(minimal, `"width_nm": 200`, `"width_nm": "200"`, 1), []string{`field.width_nm: want a number, not the string "200"`}},
		{"fraction version", strings.Replace(minimal, `"version": 1`, `"version": 1.5`, 1), []string{"version: 1.5 is not a whole number"}},
		{"unknown field", strings.Replace(minimal, `"name": "mini"`, `"name": "mini", "colour": "red"`, 1), []string{"colour: unknown field"}},
		{"wrong format", strings.Replace(minimal, `"dimerpath-design"`, `"other"`, 1), []string{`format: "other" is not a dimerpath design`}},
		{"newer version", strings.Replace(minimal, `"version": 1`, `"version": 7`, 1), []string{"version: 7 is newer than this program reads"}},
		{"negative size", strings.Replace(minimal, `"height_nm": 200`, `"height_nm": -5`, 1), []string{"field.height_nm: -5 must be more than 0"}},
		{"huge field", strings.Replace(minimal, `"height_nm": 200`, `"height_nm": 1e6`, 1), []string{"field.height_nm: 1e+06 must be more than 0 and at most 10000"}},
		{"point pair", strings.Replace(minimal, `[[10, 10], [60, 60]]`, `[[10, 10, 3], [60, 60]]`, 1), []string{"variants[0].regions[0].shapes[0].points_nm[0]: want 2 numbers, has 3"}},
		{"bad role", strings.Replace(minimal, `"role": "lead"`, `"role": "wire"`, 1), []string{`variants[0].regions[1].role: "wire" is not a role`}},
		{"bad colour", strings.Replace(minimal, `"role": "lead",`, `"role": "lead", "colour": "red",`, 1), []string{`variants[0].regions[1].colour: "red" is not a colour: write #rrggbb`}},
		{"bad kind", strings.Replace(minimal, `"kind": "rect"`, `"kind": "blob"`, 1), []string{`variants[0].regions[0].shapes[0].kind: "blob" is not a shape kind`}},
		{"negative width", strings.Replace(minimal, `"width_nm": 4`, `"width_nm": -4`, 1), []string{"variants[0].regions[1].shapes[0].width_nm: -4 must be more than 0"}},
		{"10^9 painted sites", strings.Replace(minimal, `"role": "lead",`, `"role": "lead", "painted": {"sites": 1000000000, "rows": [[0, 1, 0, 1]]},`, 1),
			[]string{"variants[0].regions[1].painted.sites: 1000000000 is out of range"}},
		{"painted off the field", strings.Replace(minimal, `"role": "lead",`, `"role": "lead", "painted": {"rows": [[0, 5000, 0, 2]]},`, 1),
			[]string{"variants[0].regions[1].painted: 2 sites do not exist on the surface"}},
		{"overlapping runs", strings.Replace(minimal, `"role": "lead",`, `"role": "lead", "painted": {"rows": [[0, 5, 0, 10, 4, 2]]},`, 1),
			[]string{"variants[0].regions[1].painted.rows[0][4]: run starts at 4, inside the previous run"}},
		{"no variants", strings.Replace(minimal, `"variants": [{"name": "A"`, `"variantz": [{"name": "A"`, 1), []string{"variants: missing", "variantz: unknown field"}},
		{"duplicate region", strings.Replace(minimal, `"name": "lead"`, `"name": "pad"`, 1), []string{`variants[0].regions[1].name: "pad" is also the name of regions[0]`}},
		{"unknown template", strings.Replace(minimal, `{"kind": "rect", "points_nm": [[10, 10], [60, 60]]}`, `{"kind": "window", "template": "Sb", "points_nm": [[10, 10]]}`, 1),
			[]string{`variants[0].regions[0].shapes[0].template: "Sb" is not a template ("As", "P")`}},
		{"huge array", strings.Replace(minimal, `{"kind": "rect", "points_nm": [[10, 10], [60, 60]]}`, `{"kind": "array", "array": {"of": {"kind": "site", "points_nm": [[1, 1]]}, "cols": 100000, "rows": 100000, "pitch_dimers": 1, "pitch_rows": 1}}`, 1),
			[]string{"variants[0].regions[0].shapes[0].array: 100000 x 100000 = 10000000000 copies, more than the limit"}},
		// Issue 16: a rectangle to 1e19 nm laid out as nothing and planned
		// with exit status 0.
		{"rect to 1e19 nm", strings.Replace(minimal, `[[10, 10], [60, 60]]`, `[[10, 10], [1e19, 60]]`, 1),
			[]string{"bad.json:5:102: variants[0].regions[0].shapes[0].points_nm[1]: [1e+19, 60] lies beyond ±10000 nm, farther out than the largest field reaches"}},
		{"terrace corner at 1e308 nm", strings.Replace(minimal, `"variants"`, `"terraces": [{"name": "t", "rows": "x", "boundary_nm": [[0, 0], [1e308, 0], [0, 5]]}], "variants"`, 1),
			[]string{"terraces[0].boundary_nm[1]: [1e+308, 0] lies beyond ±10000 nm"}},
		{"template probabilities do not sum to 1", strings.Replace(minimal, `"variants": [`, `"templates": [{"name": "P", "species": "P", "dimers": 3, "p0": 0.3, "p1": 0.63, "p2plus": 0.1}], "variants": [`, 1),
			[]string{"templates[0].p0 + p1 + p2plus: 1.03: must be 1 (within 1e-9)"}},
		{"template spread too large", strings.Replace(minimal, `"variants": [`, `"templates": [{"name": "P", "species": "P", "dimers": 3, "p0": 0.37, "p1": 0.63, "p2plus": 0, "p1_sd": -0.1}], "variants": [`, 1),
			[]string{"templates[0].p1_sd: -0.1: must be a finite number, zero or more"}},
		{"tunnel gap to nowhere", strings.Replace(minimal, `]}]
}`, `], "tunnel_gaps": [{"a": "pad", "b": "island"}]}]
}`, 1), []string{`variants[0].tunnel_gaps[0].b: "island" names no region of variant "A"`}},
		{"tunnel gap declared twice", strings.Replace(minimal, `]}]
}`, `], "tunnel_gaps": [{"a": "pad", "b": "lead"}, {"a": "lead", "b": "pad"}]}]
}`, 1), []string{`variants[0].tunnel_gaps[1]: the gap between "lead" and "pad" is also declared as tunnel_gaps[0]`}},
		{"terrace named twice and one unnamed", strings.Replace(minimal, `"variants"`, `"terraces": [{"name": "t", "rows": "x", "boundary_nm": [[0, 0], [50, 0], [0, 50]]}, {"name": "t", "rows": "x", "boundary_nm": [[60, 60], [90, 60], [60, 90]]}, {"rows": "x", "boundary_nm": [[0, 90], [20, 90], [0, 110]]}], "variants"`, 1),
			[]string{`terraces[1].name: "t" is also the name of terraces[0]`, "terraces[2].name: missing"}},
		{"coupling declared twice and to itself", strings.Replace(minimal, `]}]
}`, `], "couplings": [{"a": "pad", "b": "lead", "tolerance_nm": 1}, {"a": "lead", "b": "pad", "tolerance_nm": 1}, {"a": "pad", "b": "pad", "tolerance_nm": 1}]}]
}`, 1), []string{`variants[0].couplings[1]: the coupling of "lead" and "pad" is also declared as couplings[0]`,
			`variants[0].couplings[2]: a coupling needs two different regions, not "pad" twice`}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			d, err := Parse("bad.json", []byte(tc.in))
			if err == nil {
				t.Fatalf("Parse succeeded: %+v", d)
			}
			if !errors.Is(err, ErrInvalid) {
				t.Errorf("error %v does not wrap ErrInvalid", err)
			}
			for _, w := range tc.want {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("error\n%v\nlacks %q", err, w)
				}
			}
		})
	}
}

// Every problem is reported, not just the first.
func TestParseReportsEveryProblem(t *testing.T) {
	in := strings.NewReplacer(
		`"width_nm": 200`, `"width_nm": NaN`,
		`"role": "lead"`, `"role": 7`,
		`[[50, 50], [120, 120]]`, `[[50, "x"], [120, 120]]`,
	).Replace(minimal)
	_, err := Parse("bad.json", []byte(in))
	var ve *jsonfile.Error
	if !errors.As(err, &ve) {
		t.Fatalf("err = %v", err)
	}
	want := []string{
		"field.width_nm: NaN is not a finite number",
		"variants[0].regions[1].role: want a string, not the number 7",
		`variants[0].regions[1].shapes[0].points_nm[0][1]: want a number, not the string "x"`,
	}
	if len(ve.Problems) != len(want) {
		t.Fatalf("%d problems, want %d:\n%v", len(ve.Problems), len(want), err)
	}
	for i, w := range want {
		if ve.Problems[i].String() != w {
			t.Errorf("problem %d = %q, want %q", i, ve.Problems[i], w)
		}
	}
}

func TestSaveLoadRoundTrip(t *testing.T) {
	d, err := Parse("mini.json", []byte(minimal))
	if err != nil {
		t.Fatal(err)
	}
	surf, _ := d.Surface()
	painted := lattice.NewSiteSet()
	surf.Paint(painted, lattice.RectFromCorners(pt(100, 10), pt(150, 30)))
	erased := lattice.NewSiteSet()
	erased.AddRun(0, 20, 300, 310)
	r := &d.Variants[0].Regions[1]
	r.Painted, r.Erased = painted, erased
	gap := 3
	d.Rules = &Rules{WindowGapDimers: &gap}
	d.WindowTemplates = []lattice.WindowTemplate{{Name: "P", Species: "P", Dimers: 3, P0: 0.45, P1: 0.5, P2Plus: 0.05, P1SD: 0.04, Source: "our lab, run 12"}}

	path := filepath.Join(t.TempDir(), "round.json")
	if err := Save(path, d); err != nil {
		t.Fatal(err)
	}
	back, err := Load(path)
	if err != nil {
		t.Fatal(err)
	}
	a, _ := Marshal(d)
	b, _ := Marshal(back)
	if !bytes.Equal(a, b) {
		t.Errorf("save -> load changed the design:\n%s\n---\n%s", a, b)
	}
	if !back.Variants[0].Regions[1].Painted.Equal(painted) || !back.Variants[0].Regions[1].Erased.Equal(erased) {
		t.Errorf("painted or erased sites changed")
	}
	if *back.Rules.WindowGapDimers != 3 || back.Templates()["P"].P1 != 0.5 || back.Templates()["P"].P1SD != 0.04 {
		t.Errorf("rules or templates changed: %+v", back.Rules)
	}
}

func TestSaveIsAtomicAndRefusesInvalid(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "keep.json")
	if err := os.WriteFile(path, []byte("old content"), 0o644); err != nil {
		t.Fatal(err)
	}
	d, _ := Parse("mini.json", []byte(minimal))
	d.Field.WidthNM = -1
	err := Save(path, d)
	if !errors.Is(err, ErrInvalid) || !strings.Contains(err.Error(), "keep.json: field.width_nm: -1") {
		t.Fatalf("Save of an invalid design: %v", err)
	}
	if got, _ := os.ReadFile(path); string(got) != "old content" {
		t.Errorf("file changed to %q", got)
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 1 {
		t.Errorf("directory holds %d entries, want only the old file", len(entries))
	}
}

// Issue 2: a design of 10^7 sites painted as shapes saves in under 1 MB,
// and so does one whose 10^7 sites are painted by hand (run-length).
func TestTenMillionSitesSaveSmall(t *testing.T) {
	base := func() *Design {
		d, _ := Parse("mini.json", []byte(minimal))
		d.Field = Field{WidthNM: 2000, HeightNM: 2000}
		d.Variants[0].Regions = nil
		return d
	}
	shapes := base()
	for i := range 4 {
		x := float64(i) * 500
		shapes.Variants[0].Regions = append(shapes.Variants[0].Regions, Region{
			Name: "block" + string(rune('A'+i)), Role: RolePad, Mode: ModeFE,
			Shapes: []Shape{{Kind: ShapeRect, Points: [][2]float64{{x, 0}, {x + 480, 2000}}}},
		})
	}
	painted := base()
	surf, _ := painted.Surface()
	set := lattice.NewSiteSet()
	for i := range 4 {
		x := float64(i) * 500
		surf.Paint(set, lattice.RectFromCorners(pt(x, 0), pt(x+480, 2000)))
	}
	painted.Variants[0].Regions = []Region{{Name: "hand", Role: RolePad, Mode: ModeFE, Painted: set}}
	for _, tc := range []struct {
		name string
		d    *Design
	}{{"shapes", shapes}, {"painted", painted}} {
		l, err := tc.d.Lay("")
		if err != nil {
			t.Fatal(err)
		}
		n := 0
		for _, r := range l.Regions {
			n += r.Sites.Count()
		}
		path := filepath.Join(t.TempDir(), "big.json")
		if err := Save(path, tc.d); err != nil {
			t.Fatal(err)
		}
		fi, _ := os.Stat(path)
		if n < 1e7 || fi.Size() >= 1<<20 {
			t.Errorf("%s: %d sites saved in %d bytes; want >= 1e7 sites in < 1 MiB", tc.name, n, fi.Size())
		}
		t.Logf("%s: %d sites in %d bytes", tc.name, n, fi.Size())
	}
}
