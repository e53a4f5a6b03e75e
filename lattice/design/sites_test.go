package design

import (
	"math"
	"strings"
	"testing"

	"dimerpath/lattice"
)

func TestSurfaceAcrossStep(t *testing.T) {
	d := loadDemo(t)
	surf, err := d.Surface()
	if err != nil {
		t.Fatal(err)
	}
	lower, upper := surf.Terraces[0], surf.Terraces[1]
	if lower.Rows != lattice.RowsAlongX || upper.Rows != lattice.RowsAlongY {
		t.Errorf("rows %v, %v; want x then y (turned across the step)", lower.Rows, upper.Rows)
	}
	// The demo's upper terrace is one step up: a/(2√2) across the new
	// rows (the diamond structure; see lattice's
	// TestAcrossStepMatchesDiamondLattice), reduced into one cell.
	shift := upper.Offset.Sub(lower.Offset)
	if dx := math.Mod(shift.X+10*lattice.RowSpacing, lattice.RowSpacing/2); math.Abs(dx-lattice.StepShift) > 1e-9 || math.Abs(math.Remainder(shift.Y, lattice.DimerPitch)) > 1e-9 {
		t.Errorf("step shift %v, want a/(2√2) across the rows (x), whole pitches along (y)", shift)
	}
	d.Terraces[1].Rows = "x"
	if err := d.Validate(); err == nil || !strings.Contains(err.Error(), `rows "x" disagrees with the step from "lower"`) {
		t.Errorf("rows against the step: %v", err)
	}
}

func TestRegionSitesUnionMinusErased(t *testing.T) {
	d := loadDemo(t)
	surf, _ := d.Surface()
	v, _ := d.Variant("gap-9")
	r := v.Region("sensor-island")
	base, err := r.Sites(surf, d.Templates())
	if err != nil {
		t.Fatal(err)
	}
	// 20 nm x 15 rows: dimers 2578..2629 (52) x 15 rows x 2 sides.
	if base.Count() != 52*15*2 {
		t.Errorf("island has %d sites, want %d", base.Count(), 52*15*2)
	}
	r.Painted = lattice.NewSiteSet()
	r.Painted.AddRun(0, 1300, 2*2700, 2*2700+10) // 10 sites away from the rect
	r.Painted.AddRun(0, 1300, 2*2600, 2*2600+4)  // 4 sites inside it already
	r.Erased = lattice.NewSiteSet()
	r.Erased.AddRun(0, 1301, 2*2600, 2*2600+6) // 6 sites of the rect
	got, err := r.Sites(surf, d.Templates())
	if err != nil {
		t.Fatal(err)
	}
	if want := base.Count() + 10 - 6; got.Count() != want {
		t.Errorf("shapes ∪ painted − erased = %d sites, want %d", got.Count(), want)
	}
	r.Painted.AddRun(0, 9999, 0, 2) // beyond the field
	if _, err := r.Sites(surf, d.Templates()); err == nil || !strings.Contains(err.Error(), "2 sites do not exist") {
		t.Errorf("painted sites off the lattice: %v", err)
	}
}

func TestTemplatesAndTolerance(t *testing.T) {
	d := loadDemo(t)
	d.WindowTemplates = []lattice.WindowTemplate{
		{Name: "P", Species: "P", Dimers: 3, Probability: 0.55, Source: "lab, version 1 file"},
		{Name: "P6", Species: "P", Dimers: 6, P0: 0.05, P1: 0.35, P2Plus: 0.6, Source: "lab"},
	}
	ts := d.Templates()
	if ts["P"].P1 != 0.55 || math.Abs(ts["P"].P0-0.45) > 1e-12 || ts["As"].P1 != 0.97 || ts["P6"].P2Plus != 0.6 || len(ts) != 3 {
		t.Errorf("merged templates %v", ts)
	}
	rs := d.EffectiveRules()
	for _, tc := range []struct {
		r    Region
		want float64
	}{
		{Region{Mode: ModeAP}, 0.2}, {Region{Mode: ModeFE}, 2}, {Region{}, 0.2}, {Region{Mode: ModeHybrid}, 0.2},
		{Region{Mode: ModeFE, ToleranceNM: 5}, 5},
	} {
		if got := tc.r.Tolerance(rs); got != tc.want {
			t.Errorf("Tolerance(%+v) = %g, want %g", tc.r, got, tc.want)
		}
	}
}

// An array of 10^5 P windows with room between them passes the spacing
// rules; with a pitch of 3 dimers (touching windows) every neighbour
// pair is found.
func TestWindowArray(t *testing.T) {
	for _, tc := range []struct {
		pitch    int
		findings bool
	}{{5, false}, {3, true}} {
		d := windowArrayDesign(100, 100, tc.pitch)
		fs, err := Check(d, "")
		if err != nil {
			t.Fatal(err)
		}
		if got := countRule(fs, RuleWindowSpacing) > 0; got != tc.findings || len(fs) != countRule(fs, RuleWindowSpacing) {
			t.Errorf("pitch %d: %d findings: %v", tc.pitch, len(fs), fs[:min(3, len(fs))])
		}
		l, _ := d.Lay("")
		if n := len(l.Regions[0].Windows); n != 10000 {
			t.Errorf("%d windows, want 10000", n)
		}
	}
}

func windowArrayDesign(cols, rows, pitch int) *Design {
	return &Design{
		Format: FormatName, Version: FormatVersion, Name: "array",
		Field: Field{WidthNM: 2000, HeightNM: 2000},
		Variants: []Variant{{Name: "A", Regions: []Region{{
			Name: "donors", Role: RoleDonor, Mode: ModeAP, Species: "P",
			Shapes: []Shape{{Kind: ShapeArray, Array: &Array{
				Of:   &Shape{Kind: ShapeWindow, Template: "P", Points: [][2]float64{{10, 10}}},
				Cols: cols, Rows: rows, PitchDimers: pitch, PitchRows: 2,
			}}},
		}}}},
	}
}
