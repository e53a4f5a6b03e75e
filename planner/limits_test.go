package planner

import (
	"context"
	"errors"
	"strings"
	"testing"

	"dimerpath/lattice"
	"dimerpath/lattice/design"
)

// Issue 16: profiles that pass validation field by field could still make
// the planner allocate until the machine ran out (a path cut into 2^63
// pieces, 10^11 raster lines). Each count is now checked before the work
// is made, and the error names the fields that drive it.
func TestBuildRefusesAbsurdWork(t *testing.T) {
	pad := testDesign(2000, 2000, design.Region{Name: "pad", Role: design.RolePad, Mode: design.ModeFE, Shapes: []design.Shape{rect(100, 100, 1900, 1900)}})
	cases := []struct {
		name string
		edit func(*Profile)
		want []string
	}{
		// The raster pitch follows the exposure model: at the narrowest
		// footprint (fe.sigma_nm = 0.01 nm) it is still 0.06 nm, 44 000
		// lines across a 2 µm field, so the raster-line limit holds for
		// every valid profile; checkRaster stays as a guard.
		{"a serpentine cut into 10^8 pieces", func(p *Profile) {
			p.FE.CurrentA, p.FE.LineDoseCPerCm = 2e-15, 1e-5 // 2 pm/s
			p.Drift.RateNMPerMin, p.ToleranceFENM = 100, 10  // a 6 s budget
			p.MoveSpeedNMPerS, p.SettleS, p.Limits.MaxSpeedNMPS = 1e6, 0, 0
		}, []string{`pieces of a raster stroke of region "pad" cut at registrations would number`, "more than the limit of 10000",
			"at the planned 100.1 nm/min", "fe.current_a = 2e-15 A over fe.line_dose_c_per_cm = 1e-05 C/cm writes at 0.002 nm/s"}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			p := DefaultProfile()
			c.edit(&p)
			if err := p.Validate(); err != nil {
				t.Fatalf("the profile must pass validation to test the planner's own limits: %v", err)
			}
			_, err := buildVariant(context.Background(), pad, "", p, Options{})
			if !errors.Is(err, ErrTooMuchWork) {
				t.Fatalf("Build = %v, want ErrTooMuchWork", err)
			}
			for _, w := range c.want {
				if !strings.Contains(err.Error(), w) {
					t.Errorf("error %q lacks %q", err, w)
				}
			}
		})
	}
}

func TestCheckRunsCountsWithoutAllocating(t *testing.T) {
	set := lattice.NewSiteSet()
	for i := 0; i < 2*MaxRuns+4; i += 2 {
		set.AddRun(0, i/100000, i%100000, i%100000+1) // every other site: one run each
	}
	err := checkRuns([]string{"dots"}, []*lattice.SiteSet{set})
	if !errors.Is(err, ErrTooMuchWork) || !strings.Contains(err.Error(), `runs of consecutive sites in the variant's regions would number 4e+06`) ||
		!strings.Contains(err.Error(), `region "dots"`) {
		t.Errorf("checkRuns = %v", err)
	}
	if allocs := testing.AllocsPerRun(1, func() { checkRuns([]string{"dots"}, []*lattice.SiteSet{set}) }); allocs > 10 {
		t.Errorf("checkRuns allocated %v times", allocs)
	}
}
