package app

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"dimerpath/internal/gdsii"
)

func TestExportGDS(t *testing.T) {
	dir := t.TempDir()
	out := filepath.Join(dir, "chip.gds")
	code, _, errs := run("export", "../assets/demo.json", "-o", out, "--chip-offset", "5000,-2000", "--chip-rotation", "90")
	if code != ExitOK || !strings.Contains(errs, "wrote "+out) || !strings.Contains(errs, "CAUTION") {
		t.Fatalf("exit %d, stderr:\n%s", code, errs)
	}
	f, err := os.Open(out)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	lib, err := gdsii.Read(f)
	if err != nil {
		t.Fatal(err)
	}
	// The field's corner (0, 0) lands on the chip offset; (2000, 0)
	// turns by 90° onto (5000, 0) in nm, database unit 1 pm.
	field := lib.Structures[0].Boundaries[0].XY
	if field[0] != (gdsii.Point{X: 5_000_000, Y: -2_000_000}) || field[1] != (gdsii.Point{X: 5_000_000, Y: 0}) {
		t.Errorf("field corners %v, want (5000, -2000) and (5000, 0) nm", field[:2])
	}

	for _, c := range []struct {
		args []string
		want string
	}{
		{[]string{"export", "../assets/demo.json", "-o", out, "--chip-offset", "5000"}, "--chip-offset"},
		{[]string{"export", "../assets/demo.json", "-o", out, "--chip-rotation", "NaN"}, "--chip-rotation"},
		{[]string{"export", "../assets/demo.json", "-o", out, "--profile", "lt"}, "--profile does not apply"},
		{[]string{"export", "../assets/demo.json", "-o", filepath.Join(dir, "plan.pdf"), "--chip-rotation", "5"}, "only to a GDSII export"},
		{[]string{"export", "../assets/demo.json", "-o", out, "--layers", filepath.Join(dir, "missing.json")}, "missing.json"},
		{[]string{"export", "../assets/demo.json", "-o", out, "--variant", "nope"}, `no variant "nope"`},
		{[]string{"export", goldenPlan, "-o", out}, "needs the design"},
	} {
		code, _, errs := run(c.args...)
		if code != ExitFailure || !strings.Contains(errs, c.want) {
			t.Errorf("%v: exit %d, stderr %q; want 2 and %q", c.args, code, errs, c.want)
		}
	}
}
