package editor_test

import (
	"fmt"

	"dimerpath/app/editor"
	"dimerpath/app/editor/editortest"
)

// A Session edits a design without a window: every edit is checked by
// the design file's own rules and can be undone.
func ExampleSession() {
	s, err := editor.NewSession(editortest.TinyDesign(), "")
	if err != nil {
		panic(err)
	}
	fmt.Println(s.Variant().Regions[1].Name, s.Dirty())
	if err := s.RenameRegion(1, "source"); err != nil {
		panic(err)
	}
	fmt.Println(s.Variant().Regions[1].Name, s.Dirty(), s.UndoLabel())
	// The design's rules refuse a name another region has.
	fmt.Println(s.RenameRegion(1, "island"))
	s.Undo()
	fmt.Println(s.Variant().Regions[1].Name, s.Dirty())
	// Output:
	// lead false
	// source true rename region
	// rename region "source" to "island": "island" is also the name of regions[0]
	// lead false
}
