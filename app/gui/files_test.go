package gui

import (
	"os"
	"path/filepath"
	"testing"

	"dimerpath/lattice"
	"dimerpath/lattice/design"
)

func TestSaveOpenRoundTrip(t *testing.T) {
	u, _ := newTestUI(t, nil)
	u.S.SetTool(ToolSite)
	u.S.Select(1)
	site := lattice.Site{Row: 70, Dimer: 33, Side: 1}
	u.S.Click(u.S.Surface().Position(site), 1)
	want := u.S.RegionSites(1).Count()
	path := filepath.Join(t.TempDir(), "tiny.json")
	if err := u.SaveTo(path); err != nil {
		t.Fatal(err)
	}
	if u.S.Dirty() || u.S.Path() != path {
		t.Errorf("after saving: dirty %v, path %q", u.S.Dirty(), u.S.Path())
	}
	if got := u.recent(); len(got) == 0 || got[0] != path {
		t.Errorf("recent files %v, want %s first", got, path)
	}
	if err := u.OpenPath(path); err != nil {
		t.Fatal(err)
	}
	if got := u.S.RegionSites(1).Count(); got != want {
		t.Errorf("reopened lead has %d sites, want %d", got, want)
	}
	if !u.S.RegionSites(1).Contains(site) {
		t.Error("the painted site did not survive the round trip")
	}
	// A broken file leaves the open design alone.
	bad := filepath.Join(t.TempDir(), "bad.json")
	os.WriteFile(bad, []byte(`{"format": "dimerpath-design", "version": 1, "field": {"width_nm": -5}}`), 0o644)
	if err := u.OpenPath(bad); err == nil {
		t.Error("a design with a negative field opened")
	}
	if u.S.Path() != path {
		t.Errorf("after a failed open the design is %q, want %q", u.S.Path(), path)
	}
}

func TestAutosaveAndRecover(t *testing.T) {
	u, _ := newTestUI(t, nil)
	dir := u.opts.ConfigDir
	if err := u.Autosave(); err != nil {
		t.Fatal(err)
	}
	if _, err := os.Stat(filepath.Join(dir, recoveryName)); err == nil {
		t.Fatal("a clean design was autosaved")
	}
	u.S.AddRegion("late idea", design.RoleOther)
	if err := u.Autosave(); err != nil {
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
	regions := v.S.Variant().Regions
	if got := regions[len(regions)-1].Name; got != "late idea" {
		t.Errorf("recovered design's last region is %q, want the autosaved edit", got)
	}
	if !v.S.Dirty() {
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
