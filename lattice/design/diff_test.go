package design

import (
	"fmt"
	"strings"
	"testing"

	"dimerpath/lattice"
)

// The demo's two variants differ in the source tunnel gap: 9 dimer rows
// (6.91 nm) against 12 (9.22 nm), which shortens the source lead by 3
// rows. The comparison says exactly that, and a variant against itself
// differs in nothing.
func TestDifferencesOfTheDemoVariants(t *testing.T) {
	d := loadDemo(t)
	a, err := d.Lay("gap-9")
	if err != nil {
		t.Fatal(err)
	}
	b, err := d.Lay("gap-12-source")
	if err != nil {
		t.Fatal(err)
	}
	if got := Differences(a, a); len(got) != 0 {
		t.Errorf("a variant against itself: %v", got)
	}
	got := Differences(a, b)
	var lines []string
	for _, g := range got {
		lines = append(lines, g.String())
	}
	want := []string{
		"tunnel gap sensor-island – source-lead: 6.91 nm (9.0 dimer rows across the rows) → 9.22 nm (12.0 dimer rows across the rows)",
		// The lead is 21 dimers (42 sites) wide and 62 rows long; 3 rows
		// shorter, it holds 2604 - 3·42 = 2478 sites.
		fmt.Sprintf("region source-lead: H sites 2604, extent %.2f × %.2f nm → H sites 2478, extent %.2f × %.2f nm",
			21*lattice.DimerPitch, 62*lattice.RowSpacing, 21*lattice.DimerPitch, 59*lattice.RowSpacing),
	}
	if strings.Join(lines, "\n") != strings.Join(want, "\n") {
		t.Errorf("Differences =\n%s\nwant\n%s", strings.Join(lines, "\n"), strings.Join(want, "\n"))
	}
}

// Each kind of change is named once.
func TestDifferencesByKind(t *testing.T) {
	tests := []struct {
		name   string
		change func(d *Design)
		want   string
	}{
		{"region removed", func(d *Design) { removeRegion(d, "gate-island-fan") }, "region gate-island-fan: lead, 90077 H sites, "},
		{"role changed", func(d *Design) { d.Variants[0].Region("gate-donor").Role = RoleLead }, "region gate-donor: role gate → role lead"},
		{"window added", func(d *Design) {
			r := d.Variants[0].Region("donor-As")
			r.Shapes = append(r.Shapes, Shape{Kind: ShapeWindow, Template: "As", Points: [][2]float64{{2450 * lattice.DimerPitch, donorRowY}}})
		}, "dopant windows: 2 (As 1, P 1) → 3 (As 2, P 1)"},
		{"gap undeclared", func(d *Design) { d.Variants[0].TunnelGaps = d.Variants[0].TunnelGaps[:1] }, "tunnel gap sensor-island – drain-lead: 6.91 nm (9.0 dimer rows across the rows) → none"},
		{"gap tolerance", func(d *Design) { d.Variants[0].TunnelGaps[0].ToleranceNM = 0.2 }, "tunnel gap sensor-island – source-lead: 6.91 nm (9.0 dimer rows across the rows) → 6.91 nm (9.0 dimer rows across the rows), width ±0.20 nm"},
		{"coupling tightened", func(d *Design) { d.Variants[0].Couplings[0].ToleranceNM = 0.15 }, "coupling donor-P – donor-As: ±0.30 nm → ±0.15 nm"},
		{"coupling added", func(d *Design) {
			d.Variants[0].Couplings = append(d.Variants[0].Couplings, Coupling{A: "donor-P", B: "sensor-island", ToleranceNM: 0.5})
		}, "coupling donor-P – sensor-island: none → ±0.50 nm"},
		{"coupling removed", func(d *Design) { d.Variants[0].Couplings = nil }, "coupling donor-P – donor-As: ±0.30 nm → none"},
		{"dopant changed", func(d *Design) { d.Variants[0].Region("gate-donor").Species = "As" }, "region gate-donor: dopant P → dopant As"},
		{"no dopant, later step", func(d *Design) {
			r := d.Variants[0].Region("gate-donor")
			r.Species, r.LithographyStep = NoDopant, "As"
		}, "region gate-donor: dopant P → dopant none (As step)"},
		{"region moved", func(d *Design) {
			r := d.Variants[0].Region("gate-island")
			for i := range r.Shapes {
				for k := range r.Shapes[i].Points {
					r.Shapes[i].Points[k][0] += 2 * lattice.DimerPitch
				}
			}
		}, "region gate-island: where it was → moved by (+0.77, +0.00) nm"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			base := loadDemo(t)
			changed := loadDemo(t)
			tc.change(changed)
			a, err := base.Lay("gap-9")
			if err != nil {
				t.Fatal(err)
			}
			b, err := changed.Lay("gap-9")
			if err != nil {
				t.Fatal(err)
			}
			got := Differences(a, b)
			found := false
			for _, g := range got {
				found = found || strings.HasPrefix(g.String(), tc.want)
			}
			if !found {
				t.Errorf("Differences = %v, want one starting %q", got, tc.want)
			}
		})
	}
}
