package export

import (
	"bytes"
	"flag"
	"os"
	"path/filepath"
	"testing"

	"dimerpath/export/internal/planfixture"
)

var update = flag.Bool("update", false, "rewrite the golden files in testdata/")

// TestPlanJSONGolden pins the plan file's layout: a change to the format
// shows up as a diff of testdata/set.plan.json (go test ./export -run
// Golden -update rewrites it; review the diff, and bump PlanVersion if an
// older reader would misread the new file).
func TestPlanJSONGolden(t *testing.T) {
	var buf bytes.Buffer
	if err := WritePlanJSON(&buf, planfixture.SET().Plan, "dimerpath test"); err != nil {
		t.Fatal(err)
	}
	path := filepath.Join("testdata", "set.plan.json")
	if *update {
		if err := os.WriteFile(path, buf.Bytes(), 0o644); err != nil {
			t.Fatal(err)
		}
	}
	want, err := os.ReadFile(path)
	if err != nil {
		t.Fatal(err)
	}
	if !bytes.Equal(buf.Bytes(), want) {
		t.Errorf("WritePlanJSON(SET fixture) differs from %s; run with -update if the change is meant", path)
	}
	// The golden file reads back.
	if _, err := ReadPlanFile(path); err != nil {
		t.Errorf("ReadPlanFile(%s): %v", path, err)
	}
}
