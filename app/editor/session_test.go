package editor_test

import (
	"errors"
	"strings"
	"testing"

	"github.com/golang/geo/r2"

	"dimerpath/app/editor"
	"dimerpath/app/editor/editortest"
	"dimerpath/lattice"
	"dimerpath/lattice/design"
)

// sitePos returns the field position of the site.
func sitePos(s *editor.Session, site lattice.Site) r2.Point { return s.Surface().Position(site) }

func TestPaintUndoRedo(t *testing.T) {
	s := editortest.Tiny(t)
	s.SetTool(editor.ToolSite)
	s.Select(1) // lead
	before := s.RegionSites(1).Count()
	a := lattice.Site{Row: 50, Dimer: 10, Side: 0}
	b := lattice.Site{Row: 50, Dimer: 19, Side: 0}
	s.Press(sitePos(s, a))
	s.Drag(sitePos(s, b))
	s.Release(sitePos(s, b))
	// A drag along one side of a row from dimer 10 to 19 paints exactly
	// the 10 sites on that side: sites are sampled at a third of the
	// dimer pitch, so none is skipped and none of the other side is hit
	// (the sides are 2·HOffset apart, more than half a site step).
	if got := s.RegionSites(1).Count() - before; got != 10 {
		t.Fatalf("painted %d sites, want 10", got)
	}
	for d := 10; d <= 19; d++ {
		if !s.RegionSites(1).Contains(lattice.Site{Row: 50, Dimer: d}) {
			t.Errorf("site R50 D%d not painted", d)
		}
	}
	if !s.Dirty() || !s.CanUndo() || s.UndoLabel() != "paint sites" {
		t.Fatalf("after a stroke: dirty %v, can undo %v, label %q", s.Dirty(), s.CanUndo(), s.UndoLabel())
	}
	s.Undo()
	if got := s.RegionSites(1).Count(); got != before {
		t.Fatalf("after undo %d sites, want %d", got, before)
	}
	if s.Dirty() {
		t.Error("undo back to the opened state should be clean")
	}
	s.Redo()
	if got := s.RegionSites(1).Count(); got != before+10 {
		t.Fatalf("after redo %d sites, want %d", got, before+10)
	}
	// The painted sites are in the model, not only on screen.
	if !s.Design().Variants[0].Regions[1].Painted.Contains(b) {
		t.Error("painted site missing from the region's Painted set")
	}
}

func TestStrokeWithoutTargetMakesRegion(t *testing.T) {
	s := editortest.Tiny(t)
	s.SetTool(editor.ToolDimer)
	n := len(s.Variant().Regions)
	p := s.Surface().DimerCentre(0, 20, 20)
	s.Click(p, 1)
	if len(s.Variant().Regions) != n+1 {
		t.Fatalf("regions %d, want %d", len(s.Variant().Regions), n+1)
	}
	if got := s.RegionSites(n).Count(); got != 2 {
		t.Errorf("a dimer click painted %d sites, want 2", got)
	}
	if s.Active() != n {
		t.Errorf("active region %d, want the new one %d", s.Active(), n)
	}
	s.Undo()
	if len(s.Variant().Regions) != n {
		t.Errorf("undo left %d regions, want %d", len(s.Variant().Regions), n)
	}
}

func TestEraserAcrossRegions(t *testing.T) {
	s := editortest.Tiny(t)
	s.SetTool(editor.ToolEraser)
	site := lattice.Site{Row: 100, Dimer: 110, Side: 1} // on the lead
	if !s.RegionSites(1).Contains(site) {
		t.Fatal("test site not on the lead")
	}
	s.Click(sitePos(s, site), 1)
	if s.RegionSites(1).Contains(site) {
		t.Error("site still painted after erasing")
	}
	r := s.Design().Variants[0].Regions[1]
	if r.Painted.Contains(site) || !r.Erased.Contains(site) {
		t.Error("the erased site should leave Painted and join Erased")
	}
	s.Undo()
	if !s.RegionSites(1).Contains(site) {
		t.Error("undo did not restore the erased site")
	}
}

func TestRectangleSnapsToWholeDimers(t *testing.T) {
	s := editortest.Tiny(t)
	s.SetTool(editor.ToolRect)
	s.Select()
	// Corners snap to the nearest cell corner (issue 13: not outward, a
	// 10 nm drag once became 11.52 nm): a point just inside the lower
	// left corner of the cell of row 10, dimer 10 and one just inside the
	// upper right corner of row 13, dimer 19.
	half := r2.Point{X: lattice.DimerPitch / 2, Y: lattice.RowSpacing / 2}
	a := s.Surface().DimerCentre(0, 10, 10).Sub(half).Add(r2.Point{X: 0.05, Y: 0.1})
	b := s.Surface().DimerCentre(0, 13, 19).Add(half).Sub(r2.Point{X: 0.1, Y: 0.05})
	s.Press(a)
	s.Drag(b)
	s.Release(b)
	i := len(s.Variant().Regions) - 1
	sites := s.RegionSites(i)
	// Rows 10..13 (4 rows) x dimers 10..19 (10 dimers) x 2 sites,
	// counted by hand.
	if got := sites.Count(); got != 80 {
		t.Fatalf("rectangle holds %d sites, want 80", got)
	}
	for run := range sites.Runs() {
		if run.Start%2 != 0 || run.Len%2 != 0 {
			t.Errorf("run %+v does not cover whole dimers", run)
		}
	}
	if sh := s.Variant().Regions[i].Shapes; len(sh) != 1 || sh[0].Kind != design.ShapeRect {
		t.Errorf("shapes %+v, want one rect", sh)
	}
}

func TestWindowToolGoesToDonorRegion(t *testing.T) {
	s := editortest.Tiny(t)
	s.SetTool(editor.ToolWindow)
	s.Select(0) // the island is not a donor region
	p := s.Surface().DimerCentre(0, 30, 40)
	s.Click(p, 1)
	s.Click(s.Surface().DimerCentre(0, 30, 50), 1)
	v := s.Variant()
	i := len(v.Regions) - 1
	r := v.Regions[i]
	if r.Role != design.RoleDonor || r.Species != "P" || len(r.Shapes) != 2 {
		t.Fatalf("window region %+v: want a P donor region with 2 windows", r)
	}
	// A phosphine window is 3 dimers, 6 sites (lattice.PhosphineWindow).
	if got := s.RegionSites(i).Count(); got != 12 {
		t.Errorf("two P windows hold %d sites, want 12", got)
	}
	if len(v.Regions[0].Shapes) != 1 {
		t.Error("the island got a window")
	}
}

func TestVariantEdits(t *testing.T) {
	s := editortest.Tiny(t)
	j := s.DuplicateVariant(0)
	if j != 1 || s.VariantIndex() != 1 || s.Variant().Name != "A copy" {
		t.Fatalf("duplicate: index %d, shown %d %q", j, s.VariantIndex(), s.Variant().Name)
	}
	if got, want := s.RegionSites(1).Count(), 60; got != want {
		t.Errorf("copied lead has %d sites, want %d", got, want)
	}
	// Editing the copy leaves the original alone.
	s.SetTool(editor.ToolEraser)
	s.Click(sitePos(s, lattice.Site{Row: 100, Dimer: 110}), 1)
	s.SetVariant(0)
	if got := s.RegionSites(1).Count(); got != 60 {
		t.Errorf("original lead has %d sites after erasing the copy, want 60", got)
	}
	if err := s.RenameVariant(1, "B"); !errors.Is(err, design.ErrInvalid) || !strings.Contains(err.Error(), `"B" is also the name of variants[`) {
		t.Errorf("renaming to a used name: %v, want the design's refusal", err)
	}
	if err := s.RenameVariant(1, "wide gap"); err != nil {
		t.Fatal(err)
	}
	if err := s.DeleteVariant(2); err != nil {
		t.Fatal(err)
	}
	if got := s.VariantNames(); len(got) != 2 || got[1] != "wide gap" {
		t.Errorf("variants %v", got)
	}
	for s.CanUndo() {
		s.Undo()
	}
	if got := s.VariantNames(); len(got) != 2 || got[0] != "A" || got[1] != "B" {
		t.Errorf("after undoing everything: %v, want [A B]", got)
	}
	if s.Dirty() {
		t.Error("undoing everything should be clean")
	}
}

func TestRegionProperties(t *testing.T) {
	s := editortest.Tiny(t)
	if err := s.RenameRegion(0, "lead"); !errors.Is(err, design.ErrInvalid) || !strings.Contains(err.Error(), `"lead" is also the name of regions[`) {
		t.Errorf("duplicate region name: %v", err)
	}
	s.RenameRegion(0, "is")
	s.RenameRegion(0, "isl")
	s.RenameRegion(0, "islet")
	if s.UndoLabel() != "rename region" {
		t.Errorf("undo label %q", s.UndoLabel())
	}
	s.Undo() // typing a name is one edit
	if got := s.Variant().Regions[0].Name; got != "island" {
		t.Errorf("after one undo the name is %q, want island", got)
	}
	if err := s.SetRegionTolerance(0, -1); err == nil {
		t.Error("negative tolerance accepted")
	}
	s.SetRegionMode(0, design.ModeFE)
	s.SetRegionRole(0, design.RolePad)
	s.SetRegionSpecies(0, "As")
	r := s.Variant().Regions[0]
	if r.Mode != design.ModeFE || r.Role != design.RolePad || r.Species != "As" {
		t.Errorf("region %+v", r)
	}
	s.DeleteRegions(0)
	if len(s.Variant().Regions) != 1 || s.Variant().Regions[0].Name != "lead" {
		t.Errorf("after delete: %+v", s.Variant().Regions)
	}
	s.Undo()
	if len(s.Variant().Regions) != 2 || s.RegionSites(0).Count() == 0 {
		t.Error("undo of delete did not bring the island back with its sites")
	}
}

func TestFiducialsAndTerraces(t *testing.T) {
	s := editortest.Tiny(t)
	s.SetTool(editor.ToolFiducial)
	s.Click(r2.Point{X: 150, Y: 150}, 1)
	if n := len(s.Design().Fiducials); n != 2 || s.Design().Fiducials[1].Name != "F2" {
		t.Fatalf("fiducials %+v", s.Design().Fiducials)
	}
	if err := s.SetFiducial(1, "F1", r2.Point{X: 1, Y: 1}); !errors.Is(err, design.ErrInvalid) || !strings.Contains(err.Error(), `"F1" is also the name of fiducials[`) {
		t.Errorf("duplicate fiducial name: %v", err)
	}
	if err := s.SetFiducial(1, "corner", r2.Point{X: 500, Y: 1}); err == nil {
		t.Error("fiducial outside the field accepted")
	}
	s.SetTool(editor.ToolTerrace)
	for _, p := range []r2.Point{{X: 150, Y: 0}, {X: 200, Y: 0}, {X: 200, Y: 200}, {X: 160, Y: 200}} {
		s.Click(p, 1)
	}
	// The tool asks which way the step goes before it adds the terrace,
	// and keeps the outline meanwhile.
	if err := s.FinishPath(); !errors.Is(err, editor.ErrTerraceStep) || !s.Drawing() {
		t.Fatalf("finishing a terrace without its step: %v (still drawing %v)", err, s.Drawing())
	}
	o := s.Opts
	o.TerraceStep = "sideways"
	if err := s.SetOptions(o); err == nil {
		t.Error("terrace step sideways accepted")
	}
	o.TerraceStep = "up"
	if err := s.SetOptions(o); err != nil {
		t.Fatal(err)
	}
	if err := s.FinishPath(); err != nil {
		t.Fatal(err)
	}
	ts := s.Surface().Terraces
	if len(ts) != 2 || ts[1].Rows != lattice.RowsAlongY || s.Design().Terraces[1].Step != "up" {
		t.Fatalf("terraces %+v: want a second terrace with rows along y, a step up", ts)
	}
	// Up and down put the new lattice in two places (lattice's diamond
	// test); the Design tab's choice moves it, and undo moves it back.
	up := ts[0].AcrossStep(lattice.StepUp).Offset
	if ts[1].Offset != up {
		t.Errorf("step up: offset %v, want %v", ts[1].Offset, up)
	}
	if err := s.SetTerraceStep(1, "down"); err != nil {
		t.Fatal(err)
	}
	if got, want := s.Surface().Terraces[1].Offset, ts[0].AcrossStep(lattice.StepDown).Offset; got != want || got == up {
		t.Errorf("step down: offset %v, want %v (not %v)", got, want, up)
	}
	if err := s.SetTerraceStep(1, "left"); !errors.Is(err, design.ErrInvalid) {
		t.Errorf("step left: %v", err)
	}
	if err := s.SetTerraceStep(0, "up"); err == nil {
		t.Error("a step set on the terrace that steps from none")
	}
	s.Undo()
	if got := s.Surface().Terraces[1].Offset; got != up || s.Design().Terraces[1].Step != "up" {
		t.Errorf("undo of the step: offset %v, step %q; want %v, up", got, s.Design().Terraces[1].Step, up)
	}
	if got := s.Surface().TerraceAt(r2.Point{X: 190, Y: 100}); got != 1 {
		t.Errorf("TerraceAt inside the new outline = %d, want 1", got)
	}
	if err := s.SetTerrace(1, "T1", "z", r2.Point{}); err == nil {
		t.Error("row direction z accepted")
	}
	if err := s.DeleteTerrace(0); err == nil {
		t.Error("deleted the terrace that holds the painted lead")
	}
	s.Undo()
	if len(s.Surface().Terraces) != 1 {
		t.Error("undo did not remove the terrace")
	}
}

func TestMarqueeSelectsAndDeleteRemoves(t *testing.T) {
	s := editortest.Tiny(t)
	s.SetTool(editor.ToolSelect)
	// A box around the island (90..110 nm) but not the lead (row 100,
	// x 38..50 nm).
	s.Press(r2.Point{X: 85, Y: 85})
	s.Drag(r2.Point{X: 115, Y: 115})
	if p := s.Preview(); p == nil || !p.Rect {
		t.Error("no marquee preview while dragging")
	}
	s.Release(r2.Point{X: 115, Y: 115})
	if got := s.Selection(); len(got) != 1 || got[0] != 0 {
		t.Fatalf("marquee selected %v, want [0] (the island)", got)
	}
	// Clicking the lead selects it instead; clicking bare lattice clears.
	s.Click(s.Surface().Position(lattice.Site{Row: 100, Dimer: 110}), 1)
	if got := s.Selection(); len(got) != 1 || got[0] != 1 {
		t.Fatalf("click on the lead selected %v, want [1]", got)
	}
	s.Click(r2.Point{X: 180, Y: 20}, 1)
	if len(s.Selection()) != 0 {
		t.Errorf("click on bare lattice left %v selected", s.Selection())
	}
	s.Select(0, 1)
	s.DeleteRegions(s.Selection()...)
	if n := len(s.Variant().Regions); n != 0 {
		t.Errorf("%d regions left after deleting both", n)
	}
	if s.UndoLabel() != "delete 2 regions" {
		t.Errorf("undo label %q", s.UndoLabel())
	}
}
