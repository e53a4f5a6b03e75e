package gui

import (
	"os"
	"path/filepath"
	"strings"
	"testing"

	"dimerpath/app/editor"
	"dimerpath/lattice"
	"dimerpath/lattice/design"
)

func TestSaveOpenRoundTrip(t *testing.T) {
	u, _ := newTestUI(t, nil)
	u.Session.SetTool(editor.ToolSite)
	u.Session.Select(1)
	site := lattice.Site{Row: 70, Dimer: 33, Side: 1}
	u.Session.Click(u.Session.Surface().Position(site), 1)
	want := u.Session.RegionSites(1).Count()
	path := filepath.Join(t.TempDir(), "tiny.json")
	if err := u.SaveTo(path); err != nil {
		t.Fatal(err)
	}
	if u.Session.Dirty() || u.Session.Path() != path {
		t.Errorf("after saving: dirty %v, path %q", u.Session.Dirty(), u.Session.Path())
	}
	if got := u.recent(); len(got) == 0 || got[0] != path {
		t.Errorf("recent files %v, want %s first", got, path)
	}
	if err := u.OpenPath(path); err != nil {
		t.Fatal(err)
	}
	if got := u.Session.RegionSites(1).Count(); got != want {
		t.Errorf("reopened lead has %d sites, want %d", got, want)
	}
	if !u.Session.RegionSites(1).Contains(site) {
		t.Error("the painted site did not survive the round trip")
	}
	// A broken file leaves the open design alone.
	bad := filepath.Join(t.TempDir(), "bad.json")
	os.WriteFile(bad, []byte(`{"format": "dimerpath-design", "version": 1, "field": {"width_nm": -5}}`), 0o644)
	if err := u.OpenPath(bad); err == nil {
		t.Error("a design with a negative field opened")
	}
	if u.Session.Path() != path {
		t.Errorf("after a failed open the design is %q, want %q", u.Session.Path(), path)
	}
}

func TestAutosaveAndRecover(t *testing.T) {
	u, _ := newTestUI(t, nil)
	dir := u.opts.ConfigDir
	if err := <-u.Autosave(); err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(filepath.Join(dir, recoveryName)); err == nil {
		t.Fatal("a clean design was autosaved")
	}
	u.Session.AddRegion("late idea", design.RoleOther)
	if err := <-u.Autosave(); err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(filepath.Join(dir, recoveryName)); err != nil {
		t.Fatalf("no recovery file after an edit: %v", err)
	}

	// The next start finds it, offers it, and recovers the edit as unsaved.
	v, w := newTestUI(t, nil)
	v.opts.ConfigDir = dir
	v.OfferRecovery()
	if w.Canvas().Overlays().Top() == nil {
		t.Fatal("no recovery prompt")
	}
	if err := v.Recover(); err != nil {
		t.Fatal(err)
	}
	regions := v.Session.Variant().Regions
	if got := regions[len(regions)-1].Name; got != "late idea" {
		t.Errorf("recovered design's last region is %q, want the autosaved edit", got)
	}
	if !v.Session.Dirty() {
		t.Error("a recovered design should count as unsaved")
	}
	// Saving removes the recovery copy.
	if err := v.SaveTo(filepath.Join(t.TempDir(), "kept.json")); err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(filepath.Join(dir, recoveryName)); err == nil {
		t.Error("the recovery copy outlived the save")
	}
}

func TestAutosaveWritesInTheBackgroundOneAtATime(t *testing.T) {
	u, _ := newTestUI(t, nil)
	dir := u.opts.ConfigDir
	u.Session.AddRegion("first idea", design.RoleOther)
	first := u.Session.Token()

	// Hold the recovery files so the first write waits in the background.
	u.recovery.mu.Lock()
	done := u.Autosave()
	if !u.autosaving {
		t.Fatal("Autosave did not start a background write")
	}
	u.Session.AddRegion("second idea", design.RoleOther)
	select {
	case err := <-u.Autosave():
		if err != nil {
			t.Fatal(err)
		}
	default:
		t.Fatal("a second Autosave waited for the first instead of leaving its state to the next tick")
	}
	u.recovery.mu.Unlock()
	if err := <-done; err != nil {
		t.Fatal(err)
	}
	if u.lastAutosave != first {
		t.Fatal("the recovery copy is not recorded as the state it was taken from")
	}
	d, err := editor.LoadDesign(filepath.Join(dir, recoveryName))
	if err != nil {
		t.Fatal(err)
	}
	regions := d.Variants[0].Regions
	if got := regions[len(regions)-1].Name; got != "first idea" {
		t.Errorf("recovery copy ends with %q, want the state when the write began", got)
	}
	// The next tick writes the later state.
	if err := <-u.Autosave(); err != nil {
		t.Fatal(err)
	}
	d, _ = editor.LoadDesign(filepath.Join(dir, recoveryName))
	regions = d.Variants[0].Regions
	if got := regions[len(regions)-1].Name; got != "second idea" {
		t.Errorf("after the next tick the copy ends with %q, want \"second idea\"", got)
	}
}

func TestRemovalVoidsAnEarlierWrite(t *testing.T) {
	var r recoveryFiles
	gen := r.generation()
	removed := false
	r.remove(func() { removed = true })
	wrote := false
	if err := r.write(gen, func() error { wrote = true; return nil }); err != nil {
		t.Fatal(err)
	}
	if !removed || wrote {
		t.Errorf("removed %v, wrote %v: a write begun before a removal must not happen", removed, wrote)
	}
	if err := r.write(r.generation(), func() error { wrote = true; return nil }); err != nil || !wrote {
		t.Errorf("a write after the removal did not happen (%v)", err)
	}
}

// Issue 13: the open-error dialog repeated the path on every line; it
// names the file once, then each problem by line and column.
func TestOpenErrorNamesTheFileOnce(t *testing.T) {
	bad := filepath.Join(t.TempDir(), "bad.json")
	os.WriteFile(bad, []byte(`{"format": "dimerpath-design", "version": 1, "name": "x", "field": {"width_nm": -5, "height_nm": -7}}`), 0o644)
	_, err := editor.LoadDesign(bad)
	if err == nil {
		t.Fatal("a design with a negative field loaded")
	}
	text := openErrorText(bad, err)
	if n := strings.Count(text, bad); n != 1 {
		t.Errorf("the message names the file %d times:\n%s", n, text)
	}
	if !strings.Contains(text, "line 1, column") || !strings.Contains(text, "field.width_nm") {
		t.Errorf("the message lacks the problem's place:\n%s", text)
	}
	missing := filepath.Join(t.TempDir(), "gone.json")
	_, err = editor.LoadDesign(missing)
	if text := openErrorText(missing, err); strings.Count(text, missing) != 1 || !strings.Contains(text, "no such file") {
		t.Errorf("missing file: %q", text)
	}
}
