package editor

import (
	"errors"
	"fmt"
	"io/fs"
	"os"
	"path/filepath"
	"time"

	"dimerpath/internal/atomicfile"
	"dimerpath/internal/jsonfile"
	"dimerpath/lattice/design"
	"dimerpath/planner"
)

// The recovery copy is what the window autosaves so that a crash never
// costs unsaved work: the design (RecoveryName) and, beside it, what it
// is (RecoveryMetaName), both written atomically, the design first. A
// crash at any moment leaves each file either as it was or complete, and
// the design is offered back even when its description is missing or
// broken (a crash between the two writes, a hand-edited file).
const (
	RecoveryName     = "recovery.json"
	RecoveryMetaName = "recovery-meta.json"
	// RecoveryProfileName holds the instrument profile the window was
	// planning with, so the plan can be made again on recovery.
	RecoveryProfileName = "recovery-profile.json"
	// maxRecoveryMetaBytes bounds the description file (a few hundred
	// bytes when dimerpath writes it).
	maxRecoveryMetaBytes = 64 << 10
)

// ErrRecoveryMeta is wrapped by the error of a description that cannot
// be read.
var ErrRecoveryMeta = errors.New("invalid recovery description")

// RecoveryInfo describes the recovery copy and the working state around
// it, so a recovered session resumes where the user was: the variant
// shown, the part of the field in view and the last plan's inputs. Those
// three are empty in a description written before they were kept.
type RecoveryInfo struct {
	// Path is the file the design belongs to, or "" for one never saved.
	Path    string    `json:"path"`
	SavedAt time.Time `json:"saved_at"`
	// Design is the design's name.
	Design string `json:"design"`
	// Variant is the variant shown.
	Variant string `json:"variant,omitempty"`
	// View is the part of the field in view.
	View *RecoveryView `json:"view,omitempty"`
	// Plan is what the plan shown was made with (also when an edit since
	// made it out of date): the recovered session plans its design again
	// with it and the profile in RecoveryProfileName, which gives the
	// same plan for the same design.
	Plan *RecoveryPlan `json:"plan,omitempty"`
}

// RecoveryView is a view of the lattice: its centre (field nm) and its
// scale (nm per device pixel).
type RecoveryView struct {
	CentreNM   [2]float64 `json:"centre_nm"`
	NMPerPixel float64    `json:"nm_per_pixel"`
}

// RecoveryPlan is what a plan was made with besides the design and the
// profile: the variant and the seed.
type RecoveryPlan struct {
	Variant string `json:"variant"`
	Seed    int64  `json:"seed"`
}

// WriteRecovery writes the recovery copy of d into dir with save (an
// atomic design writer, SaveDesign or a test's), then its description.
func WriteRecovery(dir string, d *design.Design, info RecoveryInfo, save func(string, *design.Design) error) error {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return err
	}
	if err := save(filepath.Join(dir, RecoveryName), d); err != nil {
		return err
	}
	meta, err := jsonfile.Marshal(info, jsonfile.Indented)
	if err != nil {
		return err
	}
	return atomicfile.WriteBytes(filepath.Join(dir, RecoveryMetaName), meta, 0o644)
}

// ParseRecoveryInfo reads a recovery description strictly (every field,
// no other, within 64 KiB); name labels errors.
func ParseRecoveryInfo(name string, data []byte) (RecoveryInfo, error) {
	var info RecoveryInfo
	var ps jsonfile.Problems
	if len(data) > maxRecoveryMetaBytes {
		ps.Add(jsonfile.Problem{Message: "the file holds " + jsonfile.Bytes(int64(len(data))) + ", more than a recovery description may", Err: jsonfile.ErrTooLarge})
		return RecoveryInfo{}, ps.Err(name, ErrRecoveryMeta)
	}
	jsonfile.Decode(data, &info, &ps, jsonfile.Options{What: "the recovery description", MaxString: 16 << 10, MaxDepth: 4, Required: true})
	if v := info.View; v != nil && !(v.NMPerPixel > 0) {
		ps.Add(jsonfile.Problem{Path: "view.nm_per_pixel", Value: v.NMPerPixel, Message: "must be more than 0"})
	}
	if err := ps.Err(name, ErrRecoveryMeta); err != nil {
		return RecoveryInfo{}, err
	}
	return info, nil
}

// FindRecovery reports whether dir holds a recovery copy of a design and
// returns its description; a description that is missing or cannot be
// read leaves info empty (but for SavedAt, the copy's time) and found
// true, since the copy itself is what matters (LoadRecovery reads it). It first removes the temporary files
// of writers killed in dir (atomicfile.CleanStale), so that none is left
// after the next start.
func FindRecovery(dir string) (info RecoveryInfo, found bool) {
	atomicfile.CleanStale(dir)
	st, err := os.Stat(filepath.Join(dir, RecoveryName))
	if err != nil || !st.Mode().IsRegular() {
		return RecoveryInfo{}, false
	}
	path := filepath.Join(dir, RecoveryMetaName)
	if data, err := jsonfile.ReadFile(path, maxRecoveryMetaBytes, ErrRecoveryMeta); err == nil {
		info, _ = ParseRecoveryInfo(path, data)
	}
	if info.SavedAt.IsZero() {
		info.SavedAt = st.ModTime()
	}
	return info, true
}

// LoadRecovery reads the recovery copy in dir and its description (empty
// where it cannot be read; the design's own name fills in for a missing
// one).
func LoadRecovery(dir string) (*design.Design, RecoveryInfo, error) {
	info, found := FindRecovery(dir)
	if !found {
		return nil, info, fmt.Errorf("no recovery copy in %s: %w", dir, fs.ErrNotExist)
	}
	d, err := LoadDesign(filepath.Join(dir, RecoveryName))
	if err != nil {
		return nil, info, err
	}
	if info.Design == "" {
		info.Design = d.Name
	}
	return d, info, nil
}

// WriteRecoveryInfo writes the description of the recovery copy alone
// (the working state changed, the design did not), and the profile
// beside it when p is not nil.
func WriteRecoveryInfo(dir string, info RecoveryInfo, p *planner.Profile) error {
	if err := os.MkdirAll(dir, 0o755); err != nil {
		return err
	}
	if p != nil {
		if err := planner.SaveProfile(filepath.Join(dir, RecoveryProfileName), *p); err != nil {
			return err
		}
	}
	meta, err := jsonfile.Marshal(info, jsonfile.Indented)
	if err != nil {
		return err
	}
	return atomicfile.WriteBytes(filepath.Join(dir, RecoveryMetaName), meta, 0o644)
}

// LoadRecoveryProfile reads the profile kept beside the recovery copy;
// ok is false when there is none or it cannot be read.
func LoadRecoveryProfile(dir string) (p planner.Profile, ok bool) {
	p, err := planner.LoadProfile(filepath.Join(dir, RecoveryProfileName))
	return p, err == nil
}

// RemoveRecovery deletes the recovery copy, its description and profile.
func RemoveRecovery(dir string) {
	os.Remove(filepath.Join(dir, RecoveryName))
	os.Remove(filepath.Join(dir, RecoveryMetaName))
	os.Remove(filepath.Join(dir, RecoveryProfileName))
}

// CleanStaleFiles removes, from each directory, the temporary files of
// dimerpath writers that were killed (a save or export cut short), as
// atomicfile.CleanStale does; the window calls it at start-up for the
// directories of its recent files.
func CleanStaleFiles(dirs ...string) {
	seen := map[string]bool{}
	for _, d := range dirs {
		if d == "" || seen[d] {
			continue
		}
		seen[d] = true
		atomicfile.CleanStale(d)
	}
}
