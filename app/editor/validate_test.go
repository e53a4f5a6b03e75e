package editor_test

import (
	"errors"
	"math"
	"strings"
	"testing"

	"github.com/golang/geo/r2"

	"dimerpath/app/editor"
	"dimerpath/app/editor/editortest"
	"dimerpath/lattice/design"
)

// TestEditsFollowTheDesignRules makes edits that the design file's own
// rules (design.Design.Validate) refuse: each is refused with the
// rules' message, wraps design.ErrInvalid, and leaves the design and
// the undo history as they were.
func TestEditsFollowTheDesignRules(t *testing.T) {
	cases := []struct {
		name string
		edit func(s *editor.Session) error
		want string // part of the design rules' message
	}{
		{"empty region name", func(s *editor.Session) error { return s.RenameRegion(0, "  ") }, "missing"},
		{"region name in use", func(s *editor.Session) error { return s.RenameRegion(0, "lead") }, `"lead" is also the name of regions[0]`},
		{"negative tolerance", func(s *editor.Session) error { return s.SetRegionTolerance(0, -1) }, "must be between 0"},
		{"tolerance NaN", func(s *editor.Session) error { return s.SetRegionTolerance(0, math.NaN()) }, "must be between 0"},
		{"tolerance beyond any field", func(s *editor.Session) error { return s.SetRegionTolerance(0, 1e9) }, "must be between 0"},
		{"species without a template", func(s *editor.Session) error { return s.SetRegionSpecies(0, "Sb") }, `"Sb" is the species of no window template`},
		{"role unknown", func(s *editor.Session) error { return s.SetRegionRole(0, "spare") }, `"spare" is not a role`},
		{"empty design name", func(s *editor.Session) error { return s.SetDesignName("") }, "missing"},
		{"gap to itself", func(s *editor.Session) error { return s.AddTunnelGap("island", "island") }, "a gap needs two different regions"},
		{"gap to nowhere", func(s *editor.Session) error { return s.AddTunnelGap("island", "nowhere") }, `"nowhere" names no region of variant "A"`},
		{"gap declared twice", func(s *editor.Session) error {
			if err := s.AddTunnelGap("island", "lead"); err != nil {
				return nil // fails the case: this first one is allowed
			}
			return s.AddTunnelGap("lead", "island")
		}, "is also declared as tunnel_gaps[0]"},
		{"variant name in use", func(s *editor.Session) error { return s.RenameVariant(1, "A") }, `"A" is also the name of variants[0]`},
		{"the last variant", func(s *editor.Session) error {
			if err := s.DeleteVariant(1); err != nil {
				return nil
			}
			return s.DeleteVariant(0)
		}, "a design needs at least one variant"},
		{"fiducial outside the field", func(s *editor.Session) error { return s.SetFiducial(0, "F1", r2.Point{X: 500, Y: 1}) }, "lies outside the 200 x 200 nm field"},
		{"fiducial without a name", func(s *editor.Session) error { return s.SetFiducial(0, "", r2.Point{X: 5, Y: 5}) }, "missing"},
		{"terrace rows", func(s *editor.Session) error { return s.SetTerrace(0, "T0", "z", r2.Point{}) }, `"z"`},
		{"terrace offset", func(s *editor.Session) error { return s.SetTerrace(0, "T0", "x", r2.Point{X: math.Inf(1)}) }, "is not finite"},
		// The painted lead runs along row 100, dimers 100-129: a terrace
		// drawn over it would take its sites off terrace 0, and a design
		// with sites off the surface cannot be saved.
		{"terrace over painted sites", func(s *editor.Session) error {
			_, err := s.AddTerrace([]r2.Point{{X: 30, Y: 60}, {X: 60, Y: 60}, {X: 60, Y: 90}, {X: 30, Y: 90}})
			return err
		}, "sites do not exist on the surface"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			s := editortest.Tiny(t)
			err := c.edit(s)
			if err == nil {
				t.Fatal("the edit was accepted")
			}
			var ee *editor.EditError
			if !errors.As(err, &ee) || !errors.Is(err, design.ErrInvalid) {
				t.Fatalf("error %v (%T) is not an EditError wrapping design.ErrInvalid", err, err)
			}
			if !strings.Contains(err.Error(), c.want) {
				t.Errorf("error %q lacks the rules' %q", err, c.want)
			}
			if verr := s.Design().Validate(); verr != nil {
				t.Errorf("the refused edit left a design the rules refuse: %v", verr)
			}
		})
	}
}

// TestRefusedEditChangesNothing: a refused edit leaves the design's file
// form, its dirty state and its undo history exactly as they were.
func TestRefusedEditChangesNothing(t *testing.T) {
	s := editortest.Tiny(t)
	s.RenameRegion(1, "lead wire")
	before, _ := design.Marshal(s.Design())
	label := s.UndoLabel()
	changes := 0
	s.OnChange = func(editor.Change) { changes++ }
	if err := s.RenameRegion(0, "lead wire"); err == nil {
		t.Fatal("a name in use was accepted")
	}
	after, _ := design.Marshal(s.Design())
	if string(after) != string(before) || s.UndoLabel() != label || changes != 0 {
		t.Errorf("the refused rename changed the design %v, the undo label to %q (was %q), notified %d times",
			string(after) != string(before), s.UndoLabel(), label, changes)
	}
	s.Undo()
	if got := s.Variant().Regions[1].Name; got != "lead" {
		t.Errorf("undo after the refused edit gave region 1 the name %q, want lead", got)
	}
}

// TestEditsAllowedDespiteOldProblems: an edit is refused only for the
// problems it brings, not for ones the design already had.
func TestEditsAllowedDespiteOldProblems(t *testing.T) {
	s := editortest.Tiny(t)
	// A problem the edit has nothing to do with: a fiducial off the field
	// (as a hand-edited file or an older version might leave it).
	s.Design().Fiducials[0].AtNM = [2]float64{-5, 20}
	if err := s.RenameRegion(0, "sensor island"); err != nil {
		t.Fatalf("renaming a region was refused for the fiducial: %v", err)
	}
	if err := s.SetRegionTolerance(0, 0.5); err != nil {
		t.Fatalf("a tolerance was refused for the fiducial: %v", err)
	}
}
