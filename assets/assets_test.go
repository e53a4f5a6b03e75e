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

// TestDemoAPRegionsHoldWholeDimers: every region of the demo that may be
// written atom by atom (any mode but fe) has its edges between dimers and
// between rows, as a designer snapping to the lattice draws it, so each
// of its runs of sites starts and ends on a dimer boundary (site index
// 2·dimer + side: even start, even end). A half dimer would need a
// single-site dwell that the device does not ask for.
func TestDemoAPRegionsHoldWholeDimers(t *testing.T) {
	d, err := design.Parse(DemoName, DemoDesign)
	if err != nil {
		t.Fatal(err)
	}
	for _, v := range d.VariantNames() {
		l, err := d.Lay(v)
		if err != nil {
			t.Fatal(err)
		}
		for _, rl := range l.Regions {
			if rl.Region.EffectiveMode() == design.ModeFE {
				continue
			}
			for run := range rl.Sites.Runs() {
				if run.Start%2 != 0 || run.End()%2 != 0 {
					t.Errorf("%s: region %q holds half a dimer: run of sites %d..%d on terrace %d row %d", v, rl.Region.Name, run.Start, run.End()-1, run.Terrace, run.Row)
					break
				}
			}
		}
	}
}
