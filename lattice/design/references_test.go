package design

import (
	"strings"
	"testing"
)

// References (imported layout overlays) load, save and load back, and
// every bad field is reported at its JSON path.
func TestReferences(t *testing.T) {
	ref := `"references": [{"name": "contacts", "file": "chip.gds", "layers": ["13/2", "12"], "chip_offset_nm": [5000, 7000],
	  "chip_rotation_deg": 90, "polygons_nm": [[[0, 0], [10, 0], [10, 10]]]}],`
	src := strings.Replace(minimal, `"variants"`, ref+`"variants"`, 1)
	d, err := Parse("ref.json", []byte(src))
	if err != nil {
		t.Fatal(err)
	}
	if len(d.References) != 1 || d.References[0].ChipRotationDeg != 90 || len(d.References[0].PolygonsNM[0]) != 3 {
		t.Fatalf("references %+v", d.References)
	}
	data, err := Marshal(d)
	if err != nil {
		t.Fatal(err)
	}
	again, err := Parse("ref.json", data)
	if err != nil || len(again.References) != 1 || again.References[0].Layers[1] != "12" {
		t.Fatalf("reloaded references %+v, %v", again.References, err)
	}

	bad := strings.Replace(minimal, `"variants"`, `"references": [
	  {"name": "a", "layers": ["13/x"], "chip_offset_nm": [0, 0], "polygons_nm": [[[0, 0], [1, 1]]]},
	  {"name": "a", "chip_offset_nm": [0, 0], "polygons_nm": []}],"variants"`, 1)
	_, err = Parse("ref.json", []byte(bad))
	if err == nil {
		t.Fatal("bad references accepted")
	}
	for _, want := range []string{
		`references[0].layers[0]: "13/x" is not a GDSII layer`,
		`references[0].polygons_nm[0]: has 2 points`,
		`references[1].name: "a" is also the name of references[0]`,
	} {
		if !strings.Contains(err.Error(), want) {
			t.Errorf("error %q\nlacks %q", err, want)
		}
	}
}
