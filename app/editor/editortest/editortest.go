// Package editortest holds small invented designs, sessions and a plan
// written by hand, shared by the tests of the editor, the renderer and
// the widgets. The designs are a scenario of our own for tests only.
package editortest

import (
	"math"
	"testing"

	"github.com/golang/geo/r2"

	"dimerpath/app/editor"
	"dimerpath/lattice"
	"dimerpath/lattice/design"
	"dimerpath/planner"
)

// TinyDesign is a small invented design for tests: a 200 nm field on one
// terrace, a fiducial, and two variants, each with a rectangular island
// and a painted lead.
func TinyDesign() *design.Design {
	d := editor.NewDesign()
	d.Name = "tiny"
	d.Field = design.Field{WidthNM: 200, HeightNM: 200}
	d.Fiducials = []design.Fiducial{{Name: "F1", AtNM: [2]float64{20, 20}}}
	lead := lattice.NewSiteSet()
	lead.AddRun(0, 100, 200, 260) // 30 dimers on row 100
	d.Variants = []design.Variant{
		{Name: "A", Regions: []design.Region{
			{Name: "island", Role: design.RoleDevice, Mode: design.ModeAuto,
				Shapes: []design.Shape{{Kind: design.ShapeRect, Points: [][2]float64{{90, 90}, {110, 110}}}}},
			{Name: "lead", Role: design.RoleLead, Mode: design.ModeAP, Painted: lead},
		}},
		{Name: "B", Regions: []design.Region{
			{Name: "island", Role: design.RoleDevice, Mode: design.ModeAuto,
				Shapes: []design.Shape{{Kind: design.ShapeRect, Points: [][2]float64{{80, 80}, {120, 120}}}}},
		}},
	}
	return d
}

// Tiny opens TinyDesign in a new session.
func Tiny(t testing.TB) *editor.Session {
	t.Helper()
	s, err := editor.NewSession(TinyDesign(), "")
	if err != nil {
		t.Fatal(err)
	}
	return s
}

// Demo opens the built-in demo design in a new session.
func Demo(t testing.TB) *editor.Session {
	t.Helper()
	d, err := editor.DemoDesign()
	if err != nil {
		t.Fatal(err)
	}
	s, err := editor.NewSession(d, "")
	if err != nil {
		t.Fatal(err)
	}
	return s
}

// IslandWithTwoRects is the tiny design's variant A with a second
// rectangle added to the island, away from the first.
func IslandWithTwoRects(t testing.TB) *editor.Session {
	t.Helper()
	s := Tiny(t)
	s.Select(0)
	s.SetTool(editor.ToolRect)
	s.Press(r2.Point{X: 130, Y: 130})
	s.Drag(r2.Point{X: 140, Y: 140})
	s.Release(r2.Point{X: 140, Y: 140})
	if n := len(s.Variant().Regions[0].Shapes); n != 2 {
		t.Fatalf("island has %d shapes, want 2", n)
	}
	s.SetTool(editor.ToolSelect)
	return s
}

// TwoCloseWindows is the tiny design with two phosphine windows on one
// row with no intact dimer between them, which the window-spacing rule
// refuses (at least one intact dimer between windows, the default).
func TwoCloseWindows(t testing.TB) *editor.Session {
	d := TinyDesign()
	s, err := editor.NewSession(d, "")
	if err != nil {
		t.Fatal(err)
	}
	surf := s.Surface()
	s.SetTool(editor.ToolWindow)
	s.Select()
	s.Click(surf.DimerCentre(0, 150, 100), 1)
	s.Click(surf.DimerCentre(0, 150, 103), 1) // dimers 99-101 and 102-104: touching
	return s
}

// HandPlan is a plan written out by hand for the tiny design: two AP
// strokes along row 50, one per segment, registering on fiducial F1. It
// stands in for the planner's output so these tests check only how the
// GUI shows a plan, not what the planner computes.
func HandPlan(s *editor.Session) *planner.Plan {
	surf := s.Surface()
	a, b := surf.DimerCentre(0, 50, 10), surf.DimerCentre(0, 50, 40)
	c, d := surf.DimerCentre(0, 60, 10), surf.DimerCentre(0, 60, 40)
	f := r2.Point{X: 20, Y: 20}
	return &planner.Plan{
		Design: "tiny", Variant: s.Variant().Name, Profile: "hand",
		Conditions: []planner.Conditions{{Mode: design.ModeAP, LineWidthNM: 0.8}},
		Strokes: []planner.Stroke{
			{ID: 0, Region: "lead", Mode: design.ModeAP, Kind: planner.StrokeLine, Path: []r2.Point{a, b}, Segment: 0, Window: -1},
			{ID: 1, Region: "lead", Mode: design.ModeAP, Kind: planner.StrokeLine, Path: []r2.Point{c, d}, Segment: 1, Window: -1},
		},
		Segments: []planner.Segment{
			{Index: 0, Fiducial: "F1", FiducialAt: f, Strokes: []int{0}},
			{Index: 1, Fiducial: "F1", FiducialAt: f, Strokes: []int{1}},
		},
		Actions: []planner.Action{
			{Kind: planner.ActRegister, Stroke: -1, From: f, To: f},
			{Kind: planner.ActMove, Stroke: -1, From: f, To: a},
			{Kind: planner.ActWrite, Stroke: 0, From: a, To: b},
			{Kind: planner.ActMove, Stroke: -1, From: b, To: c},
			{Kind: planner.ActWrite, Stroke: 1, Segment: 1, From: c, To: d},
		},
		Breakdown: planner.Breakdown{APWriteS: 3000, TravelS: 600, RegistrationS: 120},
		TotalS:    3720, P10S: 3500, P50S: 3700, P90S: 4100,
		Yield: planner.Yield{Windows: 2, All: 0.4, MeanGood: 1.26, Distribution: []float64{0.14, 0.46, 0.4}, DevicesPerPerfect: 2.5,
			All68: [2]float64{0.33, 0.47}, All95: [2]float64{0.26, 0.54},
			Log10All68: [2]float64{math.Log10(0.33), math.Log10(0.47)}, Log10All95: [2]float64{math.Log10(0.26), math.Log10(0.54)}},
		Coverage: planner.Coverage{OK: true},
	}
}
