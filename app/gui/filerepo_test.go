package gui

import (
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/storage"
	"fyne.io/fyne/v2/storage/repository"

	"dimerpath/lattice/design"
)

// The save dialog gets its writer from storage.Writer on the chosen URI
// and hands it to the callback; these tests take the same writer and
// pass it through the callback's code (chosenPath).

func TestFyneFileWriterEmptiesAnExistingFile(t *testing.T) {
	// The behaviour lazyFiles exists for: Fyne's own file repository
	// truncates the file as soon as it hands out the writer.
	newTestUI(t, nil)
	path := filepath.Join(t.TempDir(), "old.json")
	os.WriteFile(path, []byte("old design"), 0o644)
	repo, err := repository.ForScheme("file")
	if err != nil {
		t.Fatal(err)
	}
	lf, ok := repo.(*lazyFiles)
	if !ok {
		t.Fatalf("the file scheme is served by %T, want *lazyFiles after New", repo)
	}
	w, err := lf.base.(repository.WritableRepository).Writer(storage.NewFileURI(path))
	if err != nil {
		t.Fatal(err)
	}
	w.Close()
	if got, _ := os.ReadFile(path); len(got) != 0 {
		t.Skipf("Fyne's file writer no longer truncates (file holds %q); lazyFiles may be unneeded", got)
	}
}

func TestFailedSaveAsKeepsTheOldFile(t *testing.T) {
	u, _ := newTestUI(t, nil)
	path := filepath.Join(t.TempDir(), "kestrel.json")
	if err := u.SaveTo(path); err != nil {
		t.Fatal(err)
	}
	old, _ := os.ReadFile(path)

	// Save As onto the same file, as the dialog does it.
	w, err := storage.Writer(storage.NewFileURI(path))
	if err != nil {
		t.Fatal(err)
	}
	if got, _ := os.ReadFile(path); string(got) != string(old) {
		t.Fatalf("getting the dialog's writer changed the file to %d bytes", len(got))
	}
	chosen, err := chosenPath(w, nil, []string{".json"})
	if err != nil || chosen != path {
		t.Fatalf("chosenPath = %q, %v; want %q", chosen, err, path)
	}
	// The write fails: a fiducial at NaN does not validate.
	u.Session.Design().Fiducials = append(u.Session.Design().Fiducials, design.Fiducial{Name: "bad", AtNM: [2]float64{math.NaN(), 1}})
	if err := u.SaveTo(chosen); err == nil {
		t.Fatal("a design with a NaN fiducial was saved")
	}
	if got, _ := os.ReadFile(path); string(got) != string(old) {
		t.Fatalf("after a failed save the file holds %d bytes, want the old %d", len(got), len(old))
	}
	entries, _ := os.ReadDir(filepath.Dir(path))
	if len(entries) != 1 {
		t.Errorf("the folder holds %d files after the failed save, want the design alone", len(entries))
	}
	// Put right, the save replaces the file.
	u.Session.Design().Fiducials = u.Session.Design().Fiducials[:len(u.Session.Design().Fiducials)-1]
	u.Session.AddRegion("after", design.RoleOther)
	if err := u.SaveTo(chosen); err != nil {
		t.Fatal(err)
	}
	if got, _ := os.ReadFile(path); !strings.Contains(string(got), `"after"`) {
		t.Error("the second save did not write the new design")
	}
}

func TestLazyWriter(t *testing.T) {
	newTestUI(t, nil)
	dir := t.TempDir()
	// Closed unwritten on a new name: no file appears.
	fresh := filepath.Join(dir, "new.pdf")
	w, err := storage.Writer(storage.NewFileURI(fresh))
	if err != nil {
		t.Fatal(err)
	}
	if p, err := chosenPath(w, nil, []string{".pdf"}); err != nil || p != fresh {
		t.Fatalf("chosenPath = %q, %v", p, err)
	}
	if _, err := os.Stat(fresh); !os.IsNotExist(err) {
		t.Errorf("closing an unwritten writer created %s (%v)", fresh, err)
	}
	// Written, it behaves like Fyne's writer: the file is replaced.
	path := filepath.Join(dir, "notes.txt")
	os.WriteFile(path, []byte("a long old text"), 0o644)
	w, _ = storage.Writer(storage.NewFileURI(path))
	if _, err := w.Write([]byte("new")); err != nil {
		t.Fatal(err)
	}
	w.Close()
	if got, _ := os.ReadFile(path); string(got) != "new" {
		t.Errorf("written file holds %q, want \"new\"", got)
	}
	// Listing and reading still work through the wrapper.
	list, err := storage.List(storage.NewFileURI(dir))
	if err != nil || len(list) != 1 {
		t.Errorf("List = %v, %v; want the one file", list, err)
	}
	if ok, _ := storage.CanList(storage.NewFileURI(dir)); !ok {
		t.Error("the folder cannot be listed through the wrapper")
	}
}

func TestChosenPathAddsTheExtension(t *testing.T) {
	newTestUI(t, nil)
	dir := t.TempDir()
	for _, c := range []struct {
		name string
		exts []string
		want string
	}{
		{"plan", []string{".pdf"}, "plan.pdf"},
		{"plan.PDF", []string{".pdf"}, "plan.PDF"},
		{"report.svg", []string{".pdf", ".svg"}, "report.svg"},
		{"report.txt", []string{".pdf", ".svg"}, "report.txt.pdf"},
	} {
		w, err := storage.Writer(storage.NewFileURI(filepath.Join(dir, c.name)))
		if err != nil {
			t.Fatal(err)
		}
		got, err := chosenPath(w, nil, c.exts)
		if err != nil || got != filepath.Join(dir, c.want) {
			t.Errorf("%s with %v: got %q, %v; want %s", c.name, c.exts, got, err, c.want)
		}
	}
	if p, err := chosenPath(nil, nil, nil); p != "" || err != nil {
		t.Errorf("a cancelled dialog gave %q, %v", p, err)
	}
	var _ fyne.URIWriteCloser = (*lazyWriter)(nil)
}
