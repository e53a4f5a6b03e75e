package editor

import (
	"errors"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"testing"
	"time"

	"dimerpath/internal/jsonfile"
	"dimerpath/planner"
)

func TestRecoveryRoundTrip(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "config")
	d, _ := DemoDesign()
	info := RecoveryInfo{Path: "/home/lab/kestrel.json", SavedAt: time.Date(2026, 3, 14, 9, 26, 53, 0, time.UTC), Design: d.Name}
	if err := WriteRecovery(dir, d, info, SaveDesign); err != nil {
		t.Fatal(err)
	}
	got, gotInfo, err := LoadRecovery(dir)
	if err != nil || got.Name != d.Name || gotInfo != info {
		t.Fatalf("LoadRecovery = %v, %+v, %v", got != nil, gotInfo, err)
	}
	// A lost or broken description still offers the copy, named by the
	// design and dated by the file.
	for _, meta := range []string{"", `{"path": "x", "saved_at": "yesterday", "design": 7}`, strings.Repeat(" ", 100<<10)} {
		os.WriteFile(filepath.Join(dir, RecoveryMetaName), []byte(meta), 0o644)
		got, gotInfo, err := LoadRecovery(dir)
		if err != nil || got.Name != d.Name || gotInfo.Design != d.Name || gotInfo.SavedAt.IsZero() {
			t.Errorf("description %.20q: %+v, %v", meta, gotInfo, err)
		}
	}
	RemoveRecovery(dir)
	if _, found := FindRecovery(dir); found {
		t.Error("recovery copy found after RemoveRecovery")
	}
}

// Issue 13: the recovery copy keeps the working state around the design:
// the variant shown, the view, the last plan's inputs and the profile;
// a description written before these were kept still reads.
func TestRecoveryKeepsTheWorkingState(t *testing.T) {
	dir := filepath.Join(t.TempDir(), "config")
	d, _ := DemoDesign()
	prof := planner.LowTemperatureProfile()
	info := RecoveryInfo{Path: "", SavedAt: time.Date(2026, 3, 14, 9, 26, 53, 0, time.UTC), Design: d.Name, Variant: "gap-12-source",
		View: &RecoveryView{CentreNM: [2]float64{1000, 1009.2}, NMPerPixel: 0.04}, Plan: &RecoveryPlan{Variant: "gap-12-source", Seed: 7}}
	if err := WriteRecovery(dir, d, info, SaveDesign); err != nil {
		t.Fatal(err)
	}
	if err := WriteRecoveryInfo(dir, info, &prof); err != nil {
		t.Fatal(err)
	}
	_, got, err := LoadRecovery(dir)
	if err != nil || got.Variant != info.Variant || got.View == nil || *got.View != *info.View || got.Plan == nil || *got.Plan != *info.Plan {
		t.Fatalf("LoadRecovery = %+v, %v; want %+v", got, err, info)
	}
	if p, ok := LoadRecoveryProfile(dir); !ok || p.Name != prof.Name {
		t.Errorf("recovery profile %q (ok %v), want %q", p.Name, ok, prof.Name)
	}
	old := `{"path": "", "saved_at": "2026-03-14T09:00:00Z", "design": "d"}`
	if in, err := ParseRecoveryInfo("old.json", []byte(old)); err != nil || in.View != nil || in.Plan != nil || in.Variant != "" {
		t.Errorf("a description of before: %+v, %v", in, err)
	}
	RemoveRecovery(dir)
	if _, ok := LoadRecoveryProfile(dir); ok {
		t.Error("the recovery profile outlived RemoveRecovery")
	}
}

func TestParseRecoveryInfoRefuses(t *testing.T) {
	for _, c := range []struct{ in, want string }{
		{`{"path": "", "saved_at": "2026-03-14T09:00:00Z"}`, "meta.json:1:1: design: missing"},
		{`{"path": "", "saved_at": "2026-03-14T09:00:00Z", "design": "d", "Design": "e"}`, `Design: unknown field: names are case-sensitive`},
		{`{"path": "", "saved_at": "soon", "design": "d"}`, `saved_at: parsing time "soon"`},
		{`[]`, "want an object, not a list"},
		{`{"path": "", "saved_at": "2026-03-14T09:00:00Z", "design": "d", "view": {"centre_nm": [1, 2], "nm_per_pixel": 0}}`, "view.nm_per_pixel = 0: must be more than 0"},
	} {
		_, err := ParseRecoveryInfo("meta.json", []byte(c.in))
		if !errors.Is(err, ErrRecoveryMeta) || !strings.Contains(err.Error(), c.want) {
			t.Errorf("ParseRecoveryInfo(%s) = %v, want %q", c.in, err, c.want)
		}
	}
}

// FuzzParseRecoveryInfo: the description the window reads at start-up
// never panics the reader, and what it accepts writes and reads back the
// same.
func FuzzParseRecoveryInfo(f *testing.F) {
	f.Add([]byte(`{"path": "/a/b.json", "saved_at": "2026-03-14T09:26:53Z", "design": "Kestrel"}`))
	f.Add([]byte(`{"path": "", "saved_at": "2026-03-14T09:26:53.123456789+01:00", "design": ""}`))
	f.Add([]byte(`{"saved_at": NaN}`))
	f.Add([]byte(`{"path": "", "saved_at": "2026-03-14T09:26:53Z", "design": "K", "variant": "B", "view": {"centre_nm": [1, 2], "nm_per_pixel": 0.5}, "plan": {"variant": "B", "seed": 3}}`))
	f.Fuzz(func(t *testing.T, data []byte) {
		info, err := ParseRecoveryInfo("f.json", data)
		if err != nil {
			return
		}
		again, err := jsonfile.Marshal(info, jsonfile.Indented) // as WriteRecovery writes it
		if err != nil {
			t.Fatalf("accepted description does not write: %v", err)
		}
		back, err := ParseRecoveryInfo("again.json", again)
		if err != nil || back.Path != info.Path || back.Design != info.Design || !back.SavedAt.Equal(info.SavedAt) || back.Variant != info.Variant ||
			(back.View == nil) != (info.View == nil) || (back.View != nil && *back.View != *info.View) ||
			(back.Plan == nil) != (info.Plan == nil) || (back.Plan != nil && *back.Plan != *info.Plan) {
			t.Fatalf("round trip: %+v -> %+v, %v", info, back, err)
		}
	})
}

// CleanStaleFiles removes what a killed writer left in each directory
// (its process is gone) and keeps a live writer's file and other files.
func TestCleanStaleFiles(t *testing.T) {
	dirs := []string{t.TempDir(), t.TempDir()}
	// No process has id 2^31-2 (Linux's pid_max is at most 2^22).
	dead := ".design.json.dimerpath-unfinished-2147483646-17"
	live := ".plan.pdf.dimerpath-unfinished-" + strconv.Itoa(os.Getpid()) + "-18"
	for _, d := range dirs {
		for _, name := range []string{dead, live, "design.json"} {
			if err := os.WriteFile(filepath.Join(d, name), []byte("x"), 0o644); err != nil {
				t.Fatal(err)
			}
		}
	}
	CleanStaleFiles(dirs[0], "", dirs[1], dirs[0])
	for _, d := range dirs {
		entries, _ := os.ReadDir(d)
		var names []string
		for _, e := range entries {
			names = append(names, e.Name())
		}
		if want := live + " design.json"; strings.Join(names, " ") != want {
			t.Errorf("%s holds %v, want %s", d, names, want)
		}
	}
}
