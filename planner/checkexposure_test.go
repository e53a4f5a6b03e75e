package planner

import (
	"context"
	"fmt"
	"strings"
	"testing"

	"dimerpath/lattice/design"
)

// TestCheckExposureAgreesWithPlan: the over-clearing rule that check
// runs finds a site over the stray limit exactly when the plan's
// coverage check does (issue 10 §3: a design that passes check never
// fails its plan's coverage), on the same strokes.
func TestCheckExposureAgreesWithPlan(t *testing.T) {
	cases := []struct {
		name string
		d    *design.Design
		edit func(*Profile)
	}{
		{"small design, default profile", smallDesign(), func(*Profile) {}},
		{"small design, AP footprint σ 0.4 nm", smallDesign(), func(p *Profile) { p.AP.SigmaNM = 0.4 }},
		{"small design, dwell footprint σ 0.5 nm", smallDesign(), func(p *Profile) { p.Dwell.SigmaNM = 0.5 }},
		{"small design, stray limit 1e-6", smallDesign(), func(p *Profile) { p.StrayLimit = 1e-6 }},
	}
	failing := 0
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			prof := DefaultProfile()
			c.edit(&prof)
			lay, err := c.d.Lay("")
			if err != nil {
				t.Fatal(err)
			}
			fs, err := CheckExposure(context.Background(), lay, prof)
			if err != nil {
				t.Fatal(err)
			}
			p, err := Build(context.Background(), lay, prof, Options{Seed: 1, MonteCarloRuns: 20})
			if err != nil {
				t.Fatal(err)
			}
			if (len(fs) > 0) == p.Coverage.OK {
				t.Fatalf("check finds %d over-clearing finding(s), the plan's coverage OK = %v (%d over the limit)", len(fs), p.Coverage.OK, p.Coverage.OverLimit)
			}
			n := 0
			for _, f := range fs {
				if f.Rule != RuleOverclearing || f.Severity != design.SeverityError || !strings.Contains(f.Message, "outside every region clear with more than") {
					t.Errorf("finding %v", f)
				}
				var k int
				if _, err := fmt.Sscan(f.Message, &k); err == nil {
					n += k
				}
			}
			if n != p.Coverage.OverLimit {
				t.Errorf("findings count %d sites over the limit, the plan %d", n, p.Coverage.OverLimit)
			}
			if len(fs) > 0 {
				failing++
				t.Logf("%s", fs[0])
			}
		})
	}
	if failing == 0 {
		t.Error("no case over-clears: the test shows nothing")
	}
}
