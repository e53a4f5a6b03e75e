package app

import (
	"path/filepath"
	"strings"
	"testing"

	"dimerpath/lattice/design"
)

func TestImportGDS(t *testing.T) {
	dir := t.TempDir()
	gds := filepath.Join(dir, "chip.gds")
	if code, _, errs := run("export", "../assets/demo.json", "-o", gds, "--chip-offset", "5000,7000", "--chip-rotation", "90"); code != ExitOK {
		t.Fatalf("export: exit %d\n%s", code, errs)
	}
	demo, err := design.Load("../assets/demo.json")
	if err != nil {
		t.Fatal(err)
	}
	l, err := demo.Lay("")
	if err != nil {
		t.Fatal(err)
	}
	pads := 0
	for _, r := range l.Regions {
		if r.Region.Role == design.RolePad {
			pads += r.Sites.Count()
		}
	}

	// The pads as a region, the chip frame from two marks.
	out := filepath.Join(dir, "with-pads.json")
	code, _, errs := run("import-gds", gds, "--layer", "13/2", "--as", "region", "--role", "pad", "--name", "pads again",
		"--marks", "F-north=F-north,F-east=F-east", "../assets/demo.json", "-o", out)
	if code != ExitOK || !strings.Contains(errs, "wrote "+out) {
		t.Fatalf("import as region: exit %d\n%s", code, errs)
	}
	d, err := design.Load(out)
	if err != nil {
		t.Fatal(err)
	}
	r := d.Variants[0].Region("pads again")
	if r == nil || r.Role != design.RolePad || r.Painted.Count() != pads {
		t.Fatalf("imported region %+v, want %d pad sites", r, pads)
	}

	// The leads and fan-outs as a reference overlay, the frame given.
	out2 := filepath.Join(dir, "with-ref.json")
	code, _, errs = run("import-gds", gds, "--layer", "12", "--chip-offset", "5000,7000", "--chip-rotation", "90", "../assets/demo.json", "-o", out2)
	if code != ExitOK {
		t.Fatalf("import as reference: exit %d\n%s", code, errs)
	}
	d, err = design.Load(out2)
	if err != nil {
		t.Fatal(err)
	}
	// Layer 12, every data type: the two auto leads (12/0) and the four
	// FE fan-outs (12/2).
	if len(d.References) != 1 || len(d.References[0].PolygonsNM) != 6 || d.References[0].Layers[0] != "12" || d.References[0].ChipRotationDeg != 90 {
		t.Fatalf("%d references, want one of the 6 lead polygons on layer 12", len(d.References))
	}
	// Field coordinates: every reference point lies in the 2 µm field.
	for _, p := range d.References[0].PolygonsNM {
		for _, v := range p {
			if v[0] < 0 || v[0] > 2000 || v[1] < 0 || v[1] > 2000 {
				t.Fatalf("reference point %v is outside the field", v)
			}
		}
	}

	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"import-gds", gds, "../assets/demo.json"}, "--layer is required"},
		{[]string{"import-gds", gds, "--layer", "99", "../assets/demo.json", "-o", out2}, "nothing on layer 99 (the layout has polygons on 1/0"},
		{[]string{"import-gds", gds, "--layer", "13/2", "--as", "region", "../assets/demo.json", "-o", out2}, "needs --role"},
		{[]string{"import-gds", gds, "--layer", "13/2", "--as", "region", "--role", "pad", "--name", "pad-drain", "--chip-offset", "5000,7000", "--chip-rotation", "90", "../assets/demo.json", "-o", out2}, `already has a region "pad-drain"`},
		{[]string{"import-gds", gds, "--layer", "13/2", "--marks", "F-north=F-north,F-east=F-south", "../assets/demo.json", "-o", out2}, "wrong marks"},
		{[]string{"import-gds", gds, "--layer", "13/2", "--marks", "X=F-north,F-east=F-east", "../assets/demo.json", "-o", out2}, `no label "X"`},
		{[]string{"import-gds", gds, "--layer", "13/2", "--as", "region", "--role", "pad", "../assets/demo.json", "-o", out2}, "cover no H site"},
		{[]string{"import-gds", "../assets/demo.json", gds, "--layer", "1"}, "the layout comes first"},
		// -o is checked before any work: the missing layout is not read.
		{[]string{"import-gds", filepath.Join(dir, "missing.gds"), "--layer", "1", "../assets/demo.json", "-o", filepath.Join(dir, "none", "d.json")},
			"d.json: the directory " + filepath.Join(dir, "none") + " does not exist"},
		// --layers (the export's layer map) was accepted and ignored.
		{[]string{"import-gds", gds, "--layer", "1", "--layers", "map.json", "../assets/demo.json", "-o", out2}, "flag provided but not defined: -layers"},
		{[]string{"import-gds", "../export/testdata/set.plan.json", "--layer", "1", "../assets/demo.json", "-o", out2}, "not a GDSII stream"},
	} {
		code, _, errs := run(c.args...)
		if code != ExitFailure || !strings.Contains(errs, c.want) {
			t.Errorf("%v: exit %d, stderr %q; want 2 and %q", c.args[1:], code, errs, c.want)
		}
	}
}
