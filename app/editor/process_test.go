package editor_test

import (
	"errors"
	"math"
	"slices"
	"strings"
	"testing"

	"dimerpath/app/editor"
	"dimerpath/app/editor/editortest"
	"dimerpath/lattice"
	"dimerpath/lattice/design"
)

// regionIndex returns the index of the current variant's region name.
func regionIndex(t *testing.T, s *editor.Session, name string) int {
	t.Helper()
	for i, r := range s.Variant().Regions {
		if r.Name == name {
			return i
		}
	}
	t.Fatalf("no region %q", name)
	return -1
}

// refused fails unless err is an edit the design's rules refused with a
// message containing want.
func refused(t *testing.T, what string, err error, want string) {
	t.Helper()
	var e *editor.EditError
	if !errors.As(err, &e) || !errors.Is(err, design.ErrInvalid) || !strings.Contains(err.Error(), want) {
		t.Errorf("%s = %v, want a refusal by the design's rules saying %q", what, err, want)
	}
}

// Issue 11: the species the design can deliver are those of its window
// templates, the built-in ones first, then a lab's own.
func TestSpeciesAreTheTemplates(t *testing.T) {
	s := editortest.Demo(t)
	if got, want := s.Species(), []string{"P", "As"}; !slices.Equal(got, want) {
		t.Errorf("Species() = %v, want %v", got, want)
	}
	d := editortest.TinyDesign()
	w := lattice.PhosphineWindow
	w.Name, w.Species = "Sb-window", "Sb"
	d.WindowTemplates = append(d.WindowTemplates, w)
	s2, err := editor.NewSession(d, "")
	if err != nil {
		t.Fatal(err)
	}
	if got, want := s2.Species(), []string{"P", "As", "Sb"}; !slices.Equal(got, want) {
		t.Errorf("with an Sb template Species() = %v, want %v", got, want)
	}
}

// Issue 11 §1: the design's dopant (that of regions naming none) is
// editable, checked by the design's rules, and undone.
func TestSetDesignDopant(t *testing.T) {
	s := editortest.Demo(t)
	if got := s.DesignDopant(); got != design.DefaultDopant {
		t.Fatalf("demo's dopant %q, want the default %q", got, design.DefaultDopant)
	}
	if err := s.SetDesignDopant("As"); err != nil {
		t.Fatal(err)
	}
	lead := s.Variant().Regions[regionIndex(t, s, "source-lead")]
	if got := s.Design().DopantOf(&lead); got != "As" {
		t.Errorf("a lead naming no species receives %q, want As", got)
	}
	if !strings.Contains(s.UndoLabel(), "dopant") {
		t.Errorf("undo label %q", s.UndoLabel())
	}
	refused(t, `SetDesignDopant("Xe")`, s.SetDesignDopant("Xe"), "species of no window template")
	if got := s.DesignDopant(); got != "As" {
		t.Errorf("a refused dopant left %q", got)
	}
	s.Undo()
	if got := s.Design().Dopant; got != "" {
		t.Errorf("after undo the design's dopant is %q, want none named", got)
	}
	s.Redo()
	if got := s.Design().Dopant; got != "As" {
		t.Errorf("after redo %q", got)
	}
	// Choosing the dopant the design already has is no edit.
	label := s.UndoLabel()
	if err := s.SetDesignDopant("As"); err != nil || s.UndoLabel() != label {
		t.Errorf("setting the same dopant: %v, undo label %q (was %q)", err, s.UndoLabel(), label)
	}
}

// Issue 11 §1: a region without dopant names the step it is written in;
// only such a region may, and only a step some template's species has.
// Giving it a dopant again forgets the step.
func TestSetRegionLithographyStep(t *testing.T) {
	s := editortest.Demo(t)
	i := regionIndex(t, s, "gate-donor")
	refused(t, "a step for a region with a dopant", s.SetRegionLithographyStep(i, "As"), "only a region without dopant")
	if err := s.SetRegionSpecies(i, design.NoDopant); err != nil {
		t.Fatal(err)
	}
	if err := s.SetRegionLithographyStep(i, "As"); err != nil {
		t.Fatal(err)
	}
	if got := s.Variant().Regions[i].LithographyStep; got != "As" {
		t.Fatalf("lithography step %q, want As", got)
	}
	refused(t, "a step no template's species has", s.SetRegionLithographyStep(i, "Ge"), "no process step takes it")
	s.Undo()
	if r := s.Variant().Regions[i]; r.LithographyStep != "" || r.Species != design.NoDopant {
		t.Errorf("after undo species %q step %q, want none and the first step", r.Species, r.LithographyStep)
	}
	s.Redo()
	if got := s.Variant().Regions[i].LithographyStep; got != "As" {
		t.Errorf("after redo %q", got)
	}
	if err := s.SetRegionSpecies(i, "P"); err != nil {
		t.Fatalf("giving the region a dopant again: %v", err)
	}
	if r := s.Variant().Regions[i]; r.Species != "P" || r.LithographyStep != "" {
		t.Errorf("species %q step %q, want P and no step named", r.Species, r.LithographyStep)
	}
	s.Undo()
	if r := s.Variant().Regions[i]; r.Species != design.NoDopant || r.LithographyStep != "As" {
		t.Errorf("undo of the dopant: species %q step %q", r.Species, r.LithographyStep)
	}
}

// Issue 11 §4: couplings of relative placement are added with a
// tolerance the two regions already hold, edited, removed, refused by
// the design's rules where they are wrong, and undone.
func TestCouplings(t *testing.T) {
	s := editortest.Demo(t)
	v := func() *design.Variant { return s.Variant() }
	if n := len(v().Couplings); n != 1 {
		t.Fatalf("demo has %d couplings, want 1", n)
	}
	// The island's tolerance is the AP default (0.2 nm, design rules),
	// the gate's the FE or auto default: the new coupling takes the
	// tighter.
	if err := s.AddCoupling("donor-P", "sensor-island"); err != nil {
		t.Fatal(err)
	}
	c := v().Couplings[1]
	if c.A != "donor-P" || c.B != "sensor-island" {
		t.Errorf("coupling %+v", c)
	}
	rs := s.Design().EffectiveRules()
	pi, si := v().Regions[regionIndex(t, s, "donor-P")], v().Regions[regionIndex(t, s, "sensor-island")]
	if want := math.Min(pi.Tolerance(rs), si.Tolerance(rs)); c.ToleranceNM != want || want <= 0 {
		t.Errorf("new coupling's tolerance %g, want the tighter region's %g", c.ToleranceNM, want)
	}
	refused(t, "the same pair again", s.AddCoupling("sensor-island", "donor-P"), "also declared")
	refused(t, "a region with itself", s.AddCoupling("donor-P", "donor-P"), "two different regions")
	refused(t, "a region the variant lacks", s.AddCoupling("donor-P", "nowhere"), "names no region")

	if err := s.SetCouplingTolerance(1, 0.4); err != nil {
		t.Fatal(err)
	}
	if err := s.SetCouplingTolerance(1, 0.45); err != nil {
		t.Fatal(err)
	}
	if got := v().Couplings[1].ToleranceNM; got != 0.45 {
		t.Errorf("tolerance %g", got)
	}
	for _, bad := range []float64{0, -1, math.NaN(), math.Inf(1)} {
		refused(t, "coupling tolerance", s.SetCouplingTolerance(1, bad), "more than 0")
	}
	// Typing 0.4 then 0.45 is one edit.
	s.Undo()
	if got := v().Couplings[1].ToleranceNM; got != c.ToleranceNM {
		t.Errorf("after one undo the tolerance is %g, want the first %g", got, c.ToleranceNM)
	}
	s.RemoveCoupling(0)
	if n := len(v().Couplings); n != 1 || v().Couplings[0].B != "sensor-island" {
		t.Errorf("after removing the demo's coupling: %+v", v().Couplings)
	}
	s.Undo()
	if n := len(v().Couplings); n != 2 || v().Couplings[0].B != "donor-As" {
		t.Errorf("after undoing the removal: %+v", v().Couplings)
	}
	s.Undo()
	if n := len(v().Couplings); n != 1 {
		t.Errorf("after undoing the addition %d couplings, want 1", n)
	}
	if err := s.SetCouplingTolerance(5, 1); err == nil {
		t.Error("SetCouplingTolerance of no coupling: no error")
	}
}

// A coupled region can be renamed and deleted: its couplings follow the
// rename and go with it (before, the rules refused the rename because
// the coupling named a region the variant no longer had).
func TestCouplingsFollowTheirRegions(t *testing.T) {
	s := editortest.Demo(t)
	i := regionIndex(t, s, "donor-P")
	if err := s.RenameRegion(i, "donor-P1"); err != nil {
		t.Fatalf("renaming a coupled region: %v", err)
	}
	if c := s.Variant().Couplings[0]; c.A != "donor-P1" || c.B != "donor-As" {
		t.Errorf("after the rename the coupling is %+v", c)
	}
	s.Undo()
	if c := s.Variant().Couplings[0]; c.A != "donor-P" {
		t.Errorf("after undo %+v", c)
	}
	s.DeleteRegions(regionIndex(t, s, "donor-As"))
	if n := len(s.Variant().Couplings); n != 0 {
		t.Errorf("a coupling to a deleted region stays: %+v", s.Variant().Couplings)
	}
	if err := s.Design().Validate(); err != nil {
		t.Errorf("after deleting a coupled region: %v", err)
	}
	s.Undo()
	if n := len(s.Variant().Couplings); n != 1 {
		t.Errorf("undoing the deletion brings %d couplings back, want 1", n)
	}
	// A duplicated variant has its own couplings.
	k := s.DuplicateVariant(0)
	if err := s.SetCouplingTolerance(0, 0.25); err != nil {
		t.Fatal(err)
	}
	if got := s.Design().Variants[0].Couplings[0].ToleranceNM; got != 0.3 {
		t.Errorf("editing the copy's (variant %d) coupling changed the original's to %g", k, got)
	}
}

// Issue 11 §4: a tunnel gap's width tolerance is editable (0 takes the
// design rule's), checked and undone.
func TestSetTunnelGapTolerance(t *testing.T) {
	s := editortest.Demo(t)
	if got := s.Variant().TunnelGaps[0].ToleranceNM; got != 0 {
		t.Fatalf("demo's gap 0 has its own tolerance %g, want the rule's (0)", got)
	}
	if err := s.SetTunnelGapTolerance(0, 0.1); err != nil {
		t.Fatal(err)
	}
	if got := s.Variant().TunnelGaps[0].ToleranceNM; got != 0.1 {
		t.Errorf("stored %g", got)
	}
	for _, bad := range []float64{-0.1, math.NaN(), 2e4} {
		refused(t, "gap tolerance", s.SetTunnelGapTolerance(0, bad), "between 0")
	}
	s.Undo()
	if got := s.Variant().TunnelGaps[0].ToleranceNM; got != 0 {
		t.Errorf("after undo %g, want 0 (the rule's)", got)
	}
	s.Redo()
	if err := s.SetTunnelGapTolerance(0, 0); err != nil {
		t.Fatal(err)
	}
	if got := s.Variant().TunnelGaps[0].ToleranceNM; got != 0 {
		t.Errorf("setting 0 stored %g, want 0 (the rule's)", got)
	}
	if err := s.SetTunnelGapTolerance(9, 1); err == nil {
		t.Error("SetTunnelGapTolerance of no gap: no error")
	}
}

// The tolerance a region takes without its own is the planner's:
// leads and gates their role's (the profile's 1 nm) in AP work, pads
// theirs (10 nm), the rest their mode's (design rules: AP 0.2, FE 2).
func TestDefaultTolerances(t *testing.T) {
	s := editortest.Demo(t)
	tests := []struct {
		region string
		ap, fe float64
	}{
		{"sensor-island", 0.2, 2},
		{"source-lead", 1, 2},
		{"gate-donor", 1, 2},
		{"pad-source", 10, 10},
	}
	for _, tc := range tests {
		i := regionIndex(t, s, tc.region)
		if got := s.DefaultTolerances(i); got.AP != tc.ap || got.FE != tc.fe || got.SourceAP == "" {
			t.Errorf("%s: default tolerances %+v, want AP %g, FE %g", tc.region, got, tc.ap, tc.fe)
		}
	}
	// A region's own tolerance does not change its default.
	i := regionIndex(t, s, "source-lead")
	if err := s.SetRegionTolerance(i, 0.5); err != nil {
		t.Fatal(err)
	}
	if got := s.DefaultTolerances(i); got.AP != 1 {
		t.Errorf("with its own 0.5 nm the lead's default is %g, want 1", got.AP)
	}
}
