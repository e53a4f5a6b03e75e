package gui

import (
	"strings"
	"testing"

	"dimerpath/app/editor/editortest"
	"dimerpath/lattice/design"
)

// Issue 11: the session model's design fields are edited in the panels:
// the design's dopant (Design tab), a region's dopant and the step a
// region without dopant is written in, its tunnel gaps' width
// tolerance and its couplings (Regions panel). The widgets only pass
// the user's choice to the session (tested in app/editor).
func TestProcessFieldsInThePanels(t *testing.T) {
	u, _ := newTestUI(t, editortest.Demo(t))
	s := u.Session

	// The design's dopant.
	u.marks.dopant.SetSelected(design.DopantLabel("As"))
	if got := s.Design().Dopant; got != "As" {
		t.Fatalf("choosing As in the Design tab set the dopant %q", got)
	}
	s.Undo()
	if got := u.marks.dopant.Selected; got != design.DopantLabel("P") {
		t.Errorf("after undo the Design tab shows %q", got)
	}

	// A region without dopant names its step; the choice shows only then.
	lead := -1
	for i, r := range s.Variant().Regions {
		if r.Name == "gate-donor" {
			lead = i
		}
	}
	s.Select(lead)
	p := u.regions
	if !p.step.Disabled() || p.step.Selected != "P step (its dopant's)" {
		t.Errorf("a region with a dopant offers the step %q (disabled %v)", p.step.Selected, p.step.Disabled())
	}
	if want := "design default (P)"; p.species.Selected != want {
		t.Errorf("the gate shows dopant %q, want %q", p.species.Selected, want)
	}
	if got := p.tol.PlaceHolder; got != "default 1 AP, 2 FE" {
		t.Errorf("an auto gate's empty tolerance says %q, want the planner's role and mode defaults", got)
	}
	p.species.SetSelected(design.DopantLabel(design.NoDopant))
	if p.step.Disabled() || p.step.Selected != "first step" {
		t.Fatalf("a region without dopant: step %q (disabled %v)", p.step.Selected, p.step.Disabled())
	}
	p.step.SetSelected("As step")
	if r := s.Variant().Regions[lead]; r.Species != design.NoDopant || r.LithographyStep != "As" {
		t.Errorf("region species %q step %q, want none written in the As step", r.Species, r.LithographyStep)
	}

	// The island's tunnel gaps: a tolerance typed is the gap's; empty is
	// the rule's.
	island := -1
	for i, r := range s.Variant().Regions {
		if r.Name == "sensor-island" {
			island = i
		}
	}
	s.Select(island)
	if n := len(p.gapRows.rows); n != 2 {
		t.Fatalf("the island shows %d tunnel gaps, want 2", n)
	}
	row := p.gapRows.rows[0]
	if !strings.HasPrefix(row.tol.PlaceHolder, "rule's ") {
		t.Errorf("placeholder %q", row.tol.PlaceHolder)
	}
	row.tol.SetText("0.1")
	if got := s.Variant().TunnelGaps[row.index].ToleranceNM; got != 0.1 {
		t.Errorf("typed 0.1, the gap's tolerance is %g", got)
	}
	if p.gapRows.rows[0] != row {
		t.Error("typing a tolerance rebuilt the row (the field would lose the focus)")
	}
	row.tol.SetText("-1")
	if p.msg.Hidden || !strings.Contains(p.msg.Text, "tolerance_nm") && !strings.Contains(p.msg.Text, "between 0") {
		t.Errorf("a negative tolerance: message %q (hidden %v)", p.msg.Text, p.msg.Hidden)
	}
	if row.tol.Text != "-1" {
		t.Errorf("the refused value was overwritten with %q while typing", row.tol.Text)
	}
	s.Undo()
	if row.tol.Text != "" {
		t.Errorf("after undo the field shows %q, want empty (the rule's)", row.tol.Text)
	}

	// A coupling is added from the island, its tolerance edited.
	p.addCouple.SetSelected("donor-P")
	cs := s.Variant().Couplings
	if len(cs) != 2 || cs[1].A != "sensor-island" || cs[1].B != "donor-P" {
		t.Fatalf("couplings %+v", cs)
	}
	if n := len(p.couplings.rows); n != 1 || p.couplings.rows[0].label.Text != "Placement coupled to donor-P" {
		t.Fatalf("coupling rows %d", n)
	}
	p.couplings.rows[0].tol.SetText("0.35")
	if got := s.Variant().Couplings[1].ToleranceNM; got != 0.35 {
		t.Errorf("coupling tolerance %g, want 0.35", got)
	}
	s.Undo()
	s.Undo()
	if n := len(s.Variant().Couplings); n != 1 || len(p.couplings.rows) != 0 {
		t.Errorf("after undoing the coupling: %d couplings, %d rows", n, len(p.couplings.rows))
	}
}
