package editor_test

import (
	"bytes"
	"context"
	"testing"

	"dimerpath/app/editor"
	"dimerpath/app/editor/editortest"
	"dimerpath/export"
	"dimerpath/lattice"
	"dimerpath/lattice/design"
	"dimerpath/lattice/design/gdsimport"
)

// Importing a layout is one undoable edit: as a region its sites are
// those the layout's polygons cover (the demo's own pads, written out and
// read back), as a reference it shows on the scene.
func TestImportLayout(t *testing.T) {
	s := editortest.Demo(t)
	l, err := s.Design().Lay(s.Variant().Name)
	if err != nil {
		t.Fatal(err)
	}
	var buf bytes.Buffer
	frame := lattice.ChipFrame{RotationDeg: 180}
	if _, err := export.WriteGDS(context.Background(), &buf, l, export.GDSOptions{Chip: frame}); err != nil {
		t.Fatal(err)
	}
	pads := 0
	for _, r := range l.Regions {
		if r.Region.Role == design.RolePad {
			pads += r.Sites.Count()
		}
	}
	layout, err := gdsimport.Read(bytes.NewReader(buf.Bytes()), "demo.gds", gdsimport.Options{Layers: []gdsimport.Layer{{Layer: 13, Datatype: 2}}})
	if err != nil {
		t.Fatal(err)
	}
	before := len(s.Variant().Regions)
	i, n, err := s.ImportRegion(layout, "pads again", design.RolePad, frame)
	if err != nil {
		t.Fatal(err)
	}
	if n != pads || s.RegionSites(i).Count() != pads || s.Variant().Regions[i].Name != "pads again" {
		t.Errorf("imported region %d with %d sites (%d drawn), want %d", i, n, s.RegionSites(i).Count(), pads)
	}
	if _, _, err := s.ImportRegion(layout, "off", design.RolePad, lattice.ChipFrame{}); err == nil {
		t.Error("a frame that puts the layout off the field was accepted")
	}
	s.Undo()
	if len(s.Variant().Regions) != before {
		t.Errorf("undo left %d regions, want %d", len(s.Variant().Regions), before)
	}

	name := s.ImportReference(layout, "contacts", frame)
	if sc := s.Scene(editor.SceneOptions{}); len(sc.References) != 1 || len(sc.References[0].Polygons) != 6 {
		t.Errorf("scene holds %d references, want one of 6 polygons", len(sc.References))
	}
	if again := s.ImportReference(layout, "contacts", frame); again == name {
		t.Errorf("second reference also named %q", again)
	}
	s.Undo()
	s.Undo()
	if len(s.Design().References) != 0 {
		t.Errorf("undo left %d references", len(s.Design().References))
	}
	s.Redo()
	if got := s.References(); len(got) != 1 || got[0] != "contacts" {
		t.Errorf("redo gives references %v, want [contacts]", got)
	}
}
