package planner

import (
	"context"
	"strings"
	"testing"

	"dimerpath/lattice/design"
)

func TestBuildEdgeCases(t *testing.T) {
	// A variant with nothing to write plans to zero time.
	empty := testDesign(100, 100, design.Region{Name: "nothing", Role: design.RoleOther, Shapes: []design.Shape{rect(200, 200, 210, 210)}})
	p, err := buildTest(t, empty, "")
	if err != nil {
		t.Fatal(err)
	}
	if p.TotalS != 0 || len(p.Strokes) != 0 || !p.Coverage.OK || p.Yield.All != 1 {
		t.Errorf("empty plan: total %v, %d strokes, coverage %+v, yield %v", p.TotalS, len(p.Strokes), p.Coverage, p.Yield.All)
	}
	// No fiducials: planned at the field centre, with a warning.
	d := testDesign(300, 300, design.Region{Name: "wire", Role: design.RoleDevice, Mode: design.ModeAP, Shapes: []design.Shape{rect(100, 99.5, 200, 100.2)}})
	d.Fiducials = nil
	p, err = buildTest(t, d, "")
	if err != nil {
		t.Fatal(err)
	}
	toCentre := false
	for _, a := range p.Actions {
		toCentre = toCentre || strings.Contains(a.Note, "field-centre")
	}
	if len(p.Segments) == 0 || !toCentre || !strings.Contains(strings.Join(p.Warnings, " "), "no fiducial") {
		t.Errorf("no fiducials: segments %+v, warnings %v", p.Segments, p.Warnings)
	}
	// No drift and no creep: no budget; a lithography step needs a new
	// registration only where the tip is conditioned (after FE work) or
	// field-emission work far from written features starts.
	prof := DefaultProfile()
	prof.Drift.RateNMPerMin, prof.Drift.RateSDNMPerMin = 0, 0
	prof.Registration.Creep.Fraction, prof.Registration.Creep.FractionSD = 0, 0
	p, err = buildVariant(context.Background(), demo(t), "", prof, Options{Seed: 1, MonteCarloRuns: 50})
	if err != nil {
		t.Fatal(err)
	}
	for _, g := range p.Segments {
		if g.BudgetS != 0 {
			t.Errorf("no drift: segment %d has a budget of %v s", g.Index, g.BudgetS)
		}
	}
	if n := len(p.Segments); n > 8 || p.PInTolerance < 0.99 {
		t.Errorf("no drift: %d segments, P(within tolerance) %v", n, p.PInTolerance)
	}
	// Dwell-written windows: each site clears with the dwell's completion
	// (0.99), its neighbours now and then as well.
	prof = DefaultProfile()
	prof.WindowStyle = WindowStyleDwell
	p, err = buildVariant(context.Background(), demo(t), "", prof, Options{Seed: 1, MonteCarloRuns: 50})
	if err != nil {
		t.Fatal(err)
	}
	for _, w := range p.Windows {
		want := 0.63
		if w.Species == "As" {
			want = 0.97
		}
		if open := pow(0.99, w.Sites); abs(w.Probability-want*w.OpenProbability) > 1e-12 || w.OpenProbability > open || w.OpenProbability < 0.95*open {
			t.Errorf("window %+v: want %v × at most 0.99^%d", w, want, w.Sites)
		}
	}
	if !p.Coverage.OK {
		t.Errorf("dwell windows: coverage %+v", p.Coverage)
	}
}

func pow(x float64, n int) float64 {
	r := 1.0
	for range n {
		r *= x
	}
	return r
}

func abs(x float64) float64 {
	if x < 0 {
		return -x
	}
	return x
}
