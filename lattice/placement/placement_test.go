package placement

import (
	"context"
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"github.com/golang/geo/r2"

	"dimerpath/lattice"
	"dimerpath/lattice/design"
)

// testDesign is a 200 x 200 nm field with one AP region (a 6 x 2 nm
// island with a phosphine window beside it) and a survey of 60 x 60 nm
// at (40, 40) with the given defects (survey frame) and a step edge.
func testDesign(t testing.TB, defects []design.SurveyDefect, steps []design.SurveyStep) *design.Design {
	t.Helper()
	d := &design.Design{
		Format: design.FormatName, Version: design.FormatVersion, Name: "placement test",
		Field:    design.Field{WidthNM: 200, HeightNM: 200},
		Terraces: []design.Terrace{{Name: "T", Rows: "x"}},
		Variants: []design.Variant{{Name: "v", Regions: []design.Region{
			{Name: "island", Role: design.RoleDevice, Mode: design.ModeAP, Shapes: []design.Shape{
				{Kind: design.ShapeRect, Points: [][2]float64{{60.1, 60.1}, {66.1, 62.1}}},
			}},
			{Name: "donor", Role: design.RoleDonor, Mode: design.ModeAP, Species: "P", Shapes: []design.Shape{
				{Kind: design.ShapeWindow, Points: [][2]float64{{63, 65}}, Template: "P"},
			}},
			{Name: "pad", Role: design.RolePad, Mode: design.ModeFE, Shapes: []design.Shape{
				{Kind: design.ShapeRect, Points: [][2]float64{{150, 150}, {190, 190}}},
			}},
		}}},
		Survey: &design.Survey{OffsetNM: [2]float64{40, 40}, SizePx: [2]int{400, 400}, ScaleNMPerPx: [2]float64{0.15, 0.15}, Defects: defects, Steps: steps},
	}
	if err := d.Validate(); err != nil {
		t.Fatal(err)
	}
	return d
}

// TestSearchMatchesBruteForce measures every translation of the core in
// a box exactly (the same measure Search ends with) and checks that
// Search's best placement is as good as the best of all, within a
// dimer cell's worth of the grid's approximation.
func TestSearchMatchesBruteForce(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 12))
	for trial := 0; trial < 4; trial++ {
		var defects []design.SurveyDefect
		for k := 0; k < 12; k++ {
			defects = append(defects, design.SurveyDefect{AtNM: [2]float64{60 * rng.Float64(), 60 * rng.Float64()}, Kind: design.DefectBright, SizeNM: 0.5 + rng.Float64()})
		}
		steps := []design.SurveyStep{{PolylineNM: [][2]float64{{45 + 5*rng.Float64(), 0}, {40 + 10*rng.Float64(), 60}}}}
		d := testDesign(t, defects, steps)
		l, err := d.Lay("")
		if err != nil {
			t.Fatal(err)
		}
		box := r2.RectFromPoints(r2.Point{X: 45, Y: 45}, r2.Point{X: 80, Y: 80})
		_, best, err := Search(context.Background(), l, Options{Box: box, Best: 3})
		if err != nil {
			t.Fatal(err)
		}
		if len(best) == 0 {
			t.Fatal("no placement")
		}
		// Brute force over every translation keeping the core in the box.
		c, _ := newCore(l, nil)
		sc := newScene(l, d.Survey, d.Survey.Outline(), box, 50)
		top := math.Inf(-1)
		for rows := -30; rows <= 30; rows++ {
			for dimers := -60; dimers <= 60; dimers++ {
				p := sc.measure(c, dimers, rows)
				if p.StepClearanceNM > 0 { // inside the box and the survey
					top = math.Max(top, p.MarginNM)
				}
			}
		}
		t.Logf("trial %d: best margin %.3f nm, brute force %.3f nm", trial, best[0].MarginNM, top)
		if best[0].MarginNM < top-0.05 {
			t.Errorf("trial %d: Search's best margin %.3f nm, brute force finds %.3f nm", trial, best[0].MarginNM, top)
		}
		for i := 1; i < len(best); i++ {
			if best[i].MarginNM > best[i-1].MarginNM {
				t.Errorf("placements out of order: %v", best)
			}
		}
	}
}

func TestSearchRefuses(t *testing.T) {
	d := testDesign(t, nil, nil)
	d.Survey = nil
	l, _ := d.Lay("")
	if _, _, err := Search(context.Background(), l, Options{}); err != ErrNoSurvey {
		t.Errorf("without a survey: %v", err)
	}
	d = testDesign(t, nil, nil)
	l, _ = d.Lay("")
	if _, _, err := Search(context.Background(), l, Options{Regions: []string{"nope"}}); err == nil {
		t.Error("unknown region accepted")
	}
	if _, _, err := Search(context.Background(), l, Options{Box: r2.RectFromPoints(r2.Point{X: 61, Y: 61}, r2.Point{X: 62, Y: 62})}); err == nil {
		t.Error("a box smaller than the core accepted")
	}
}

// Applying a placement moves the core's sites by exactly its lattice
// vector (the laid-out sites of the moved design equal the old ones
// shifted by Dimers and Rows), leaves the pad where it was, and the moved
// design measures as the placement said.
func TestMovedRegions(t *testing.T) {
	d := testDesign(t, []design.SurveyDefect{{AtNM: [2]float64{23.5, 21.6}, Kind: design.DefectDark, SizeNM: 0.8}}, nil)
	l, err := d.Lay("")
	if err != nil {
		t.Fatal(err)
	}
	// Paint one site by hand just beyond the island, so painted sets move
	// too.
	for run := range l.Regions[0].Sites.Runs() {
		d.Variants[0].Regions[0].Painted = lattice.NewSiteSet()
		d.Variants[0].Regions[0].Painted.AddRun(run.Terrace, run.Row, run.End()+4, run.End()+5)
		break
	}
	if l, err = d.Lay(""); err != nil {
		t.Fatal(err)
	}
	_, best, err := Search(context.Background(), l, Options{Best: 1})
	if err != nil || len(best) != 1 {
		t.Fatal(best, err)
	}
	p := best[0]
	if p.Dimers == 0 && p.Rows == 0 {
		t.Fatal("the best placement does not move: the test needs a move")
	}
	idx, regions, err := Moved(l, nil, p)
	if err != nil {
		t.Fatal(err)
	}
	if len(idx) != 2 || idx[0] != 0 || idx[1] != 1 {
		t.Fatalf("moved regions %v, want the island and the donor window", idx)
	}
	before := []*lattice.SiteSet{l.Regions[0].Sites, l.Regions[1].Sites, l.Regions[2].Sites}
	moved := *d
	moved.Variants = []design.Variant{d.Variants[0]}
	moved.Variants[0].Regions = slices.Clone(d.Variants[0].Regions)
	for k, i := range idx {
		moved.Variants[0].Regions[i] = regions[k]
	}
	if d.Variants[0].Regions[0].Shapes[0].Points[0] != [2]float64{60.1, 60.1} {
		t.Fatal("Moved changed the design it was given")
	}
	lm, err := moved.Lay("")
	if err != nil {
		t.Fatal(err)
	}
	for i, want := range []*lattice.SiteSet{moved2(before[0], p), moved2(before[1], p), before[2]} {
		if !lm.Regions[i].Sites.Equal(want) {
			t.Errorf("region %d: moved sites differ from the old ones shifted by %d dimers, %d rows", i, p.Dimers, p.Rows)
		}
	}
	again, _, err := Search(context.Background(), lm, Options{Best: 1})
	if err != nil || math.Abs(again.MarginNM-p.MarginNM) > 1e-9 {
		t.Errorf("moved design measures margin %g, the placement said %g (%v)", again.MarginNM, p.MarginNM, err)
	}
}

func moved2(s *lattice.SiteSet, p Placement) *lattice.SiteSet { return moved(s, 0, p.Dimers, p.Rows) }
