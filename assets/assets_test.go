package assets

import (
	"testing"

	"dimerpath/lattice/design"
)

func TestDemoLoads(t *testing.T) {
	d, err := design.Parse(DemoName, DemoDesign)
	if err != nil {
		t.Fatal(err)
	}
	if len(d.Variants) < 2 || len(d.Fiducials) < 3 || len(d.Terraces) < 2 {
		t.Errorf("demo has %d variants, %d fiducials, %d terraces; want >= 2, 3, 2", len(d.Variants), len(d.Fiducials), len(d.Terraces))
	}
}
