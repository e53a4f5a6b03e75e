package editor_test

import (
	"testing"

	"github.com/golang/geo/r2"

	"dimerpath/app/editor"
	"dimerpath/app/editor/editortest"
	"dimerpath/planner"
)

// Issue 10 §3: a site outside every region that clears above the stray
// limit is shown on the lattice, where it is, while its plan is current.
func TestStraySitesMarkedOnTheLattice(t *testing.T) {
	s := editortest.Tiny(t)
	p := editortest.HandPlan(s)
	at := r2.Point{X: 61.5, Y: 42.25}
	p.Coverage.OK, p.Coverage.OverLimit = false, 1
	p.Coverage.StraySites = []planner.StraySite{{At: at, Probability: 0.03, Region: "lead", Stroke: 0}}
	s.SetPlan(p, s.Variant().Name, s.Token())
	marked := func() bool {
		for _, m := range s.Scene(editor.SceneOptions{Findings: true}).Marks {
			if m.At == at && m.Error {
				return true
			}
		}
		return false
	}
	if !marked() {
		t.Fatal("the plan's stray site is not marked on the lattice")
	}
	if sc := s.Scene(editor.SceneOptions{}); len(sc.Marks) != 0 {
		t.Errorf("marks drawn with findings off: %v", sc.Marks)
	}
	// An edit makes the plan stale: its stray sites are no longer shown.
	s.SetTool(editor.ToolFiducial)
	s.Click(r2.Point{X: 150, Y: 150}, 1)
	if marked() {
		t.Error("a stale plan's stray site is still marked")
	}
}
