package editor

import (
	"slices"

	"dimerpath/lattice"
	"dimerpath/lattice/design"
)

// Undo keeps a list of immutable snapshots of the whole design, one per
// edit, and moves along it. Snapshots share the regions an edit did not
// touch: each live region carries an id that changes whenever the region
// changes, and a snapshot reuses the previous snapshot's copy of every
// region whose id is unchanged. A brush stroke on one region of a large
// design therefore costs a copy of that one region, not of the design.

// regionID names one content of one region; equal ids mean equal
// regions.
type regionID uint64

// snapRegion is a region frozen in a snapshot, with its rasterised
// sites when they were known. Neither is ever changed.
type snapRegion struct {
	region design.Region
	sites  *lattice.SiteSet
	bytes  int
}

// snapshot is one state of the design in the undo history.
type snapshot struct {
	shell   *design.Design // everything but the regions (their slices are nil)
	regions [][]*snapRegion
	ids     [][]regionID
	// variant is the variant shown when the state was made, so that undo
	// shows the user the variant it changes.
	variant  int
	label    string // the edit that led to this state, for "Undo <label>"
	mergeKey string // consecutive edits with the same key merge into one
	bytes    int    // memory held by the regions this snapshot copied
}

// historyLimit bounds the memory the undo history holds; the oldest
// states go first.
const historyLimit = 512 << 20

type history struct {
	states []*snapshot
	pos    int       // index of the current state
	saved  *snapshot // the state last saved to disk, or nil
	bytes  int
}

func (h *history) current() *snapshot {
	if len(h.states) == 0 {
		return nil
	}
	return h.states[h.pos]
}

// push records s as the state after the current one, dropping any redo
// states, or replaces the current state when it was made by an edit
// with the same non-empty merge key.
func (h *history) push(s *snapshot) {
	if cur := h.current(); cur != nil && s.mergeKey != "" && cur.mergeKey == s.mergeKey && h.pos == len(h.states)-1 && h.pos > 0 && h.saved != cur {
		h.bytes -= cur.bytes
		h.states[h.pos] = s
		h.bytes += s.bytes
		return
	}
	if len(h.states) > 0 {
		for _, d := range h.states[h.pos+1:] {
			h.bytes -= d.bytes
		}
		h.states = h.states[:h.pos+1]
	}
	h.states = append(h.states, s)
	h.pos = len(h.states) - 1
	h.bytes += s.bytes
	for h.bytes > historyLimit && len(h.states) > 2 {
		h.bytes -= h.states[0].bytes
		if h.saved == h.states[0] {
			h.saved = nil
		}
		h.states = h.states[1:]
		h.pos--
	}
}

// setBytes is a rough size of a site set in bytes, for the history's
// memory limit.
func setBytes(s *lattice.SiteSet) int {
	if s == nil {
		return 0
	}
	return s.Count()/8 + 64
}

// snapshotOf freezes the live design. Regions whose id matches one in
// prev (and that have not changed since) are shared with it.
func (s *Session) snapshotOf(prev *snapshot, label, key string) *snapshot {
	old := map[regionID]*snapRegion{}
	if prev != nil {
		for v := range prev.ids {
			for i, id := range prev.ids[v] {
				old[id] = prev.regions[v][i]
			}
		}
	}
	shell := cloneDesignShell(s.d)
	snap := &snapshot{shell: shell, variant: s.variant, label: label, mergeKey: key}
	snap.regions = make([][]*snapRegion, len(s.d.Variants))
	snap.ids = make([][]regionID, len(s.d.Variants))
	made := map[regionID]*snapRegion{}
	for v := range s.d.Variants {
		shell.Variants[v].Regions = nil
		snap.ids[v] = append([]regionID(nil), s.ids[v]...)
		snap.regions[v] = make([]*snapRegion, len(s.ids[v]))
		for i, id := range s.ids[v] {
			sr := made[id]
			if sr == nil && !s.fresh[id] {
				sr = old[id]
			}
			if sr == nil {
				r := cloneRegion(s.d.Variants[v].Regions[i])
				sr = &snapRegion{region: r, bytes: setBytes(r.Painted) + setBytes(r.Erased) + 256}
				// The rasterised sites are kept only for regions with shapes:
				// for painted sites alone, rasterising again on undo costs
				// no more than this copy would on every edit.
				if c := s.caches[id]; c != nil && len(r.Shapes) > 0 {
					sr.sites = c.sites.Clone()
					sr.bytes += setBytes(sr.sites)
				}
				snap.bytes += sr.bytes
			}
			made[id] = sr
			snap.regions[v][i] = sr
		}
	}
	clear(s.fresh)
	return snap
}

// restore makes snap the live design.
func (s *Session) restore(snap *snapshot) {
	d := cloneDesignShell(snap.shell)
	ids := make([][]regionID, len(snap.ids))
	for v := range d.Variants {
		ids[v] = append([]regionID(nil), snap.ids[v]...)
		d.Variants[v].Regions = make([]design.Region, len(snap.regions[v]))
		for i, sr := range snap.regions[v] {
			d.Variants[v].Regions[i] = cloneRegion(sr.region)
			if _, ok := s.caches[ids[v][i]]; !ok && sr.sites != nil {
				s.caches[ids[v][i]] = s.newCache(sr.sites.Clone())
			}
		}
	}
	terracesChanged := !sameTerraces(s.d, d)
	s.d, s.ids = d, ids
	clear(s.fresh)
	if terracesChanged {
		s.rebuildSurface()
	}
	s.pruneCaches()
}

// sameTerraces reports whether a and b have the same field and terraces,
// so that rasterised regions of one hold for the other.
func sameTerraces(a, b *design.Design) bool {
	if a.Field != b.Field || len(a.Terraces) != len(b.Terraces) {
		return false
	}
	for i := range a.Terraces {
		x, y := a.Terraces[i], b.Terraces[i]
		if x.Name != y.Name || x.Rows != y.Rows || x.StepFrom != y.StepFrom || x.Step != y.Step || x.OffsetNM != y.OffsetNM || len(x.Boundary) != len(y.Boundary) {
			return false
		}
		for k := range x.Boundary {
			if x.Boundary[k] != y.Boundary[k] {
				return false
			}
		}
	}
	return true
}

// commit records the live design as a new undo state.
func (s *Session) commit(label, key string, c Change) {
	s.hist.push(s.snapshotOf(s.hist.current(), label, key))
	s.pruneCaches()
	s.notify(c | ChangeFile | ChangeHistory | ChangePlan | ChangeFindings)
}

// CanUndo reports whether there is an edit to undo.
func (s *Session) CanUndo() bool { return s.hist.pos > 0 }

// CanRedo reports whether there is an undone edit to redo.
func (s *Session) CanRedo() bool { return s.hist.pos < len(s.hist.states)-1 }

// UndoLabel names the edit Undo would revert, or "".
func (s *Session) UndoLabel() string {
	if !s.CanUndo() {
		return ""
	}
	return s.hist.states[s.hist.pos].label
}

// RedoLabel names the edit Redo would reapply, or "".
func (s *Session) RedoLabel() string {
	if !s.CanRedo() {
		return ""
	}
	return s.hist.states[s.hist.pos+1].label
}

// Undo reverts the last edit and shows the variant it changed.
func (s *Session) Undo() bool {
	if !s.CanUndo() {
		return false
	}
	s.cancelGesture()
	shown := s.hist.states[s.hist.pos].variant
	s.hist.pos--
	s.restore(s.hist.states[s.hist.pos])
	s.afterRestore(shown)
	return true
}

// Redo reapplies the edit last undone.
func (s *Session) Redo() bool {
	if !s.CanRedo() {
		return false
	}
	s.cancelGesture()
	s.hist.pos++
	s.restore(s.hist.states[s.hist.pos])
	s.afterRestore(s.hist.states[s.hist.pos].variant)
	return true
}

func (s *Session) afterRestore(variant int) {
	s.variant = min(max(variant, 0), len(s.d.Variants)-1)
	n := len(s.Variant().Regions)
	s.sel = slices.DeleteFunc(s.sel, func(i int) bool { return i >= n })
	s.shapeSel = nil
	if s.d.Survey == nil || s.defectSel >= len(s.d.Survey.Defects) {
		s.defectSel = -1
	}
	s.ensureCaches()
	s.notify(ChangeAll)
}

// PlanToken identifies the design state a background job started from,
// so its result can be marked stale if the design changed meanwhile.
type PlanToken struct{ state *snapshot }

// Token returns the current design state's token.
func (s *Session) Token() PlanToken { return PlanToken{s.hist.current()} }

// Design assembles the design of the token's state for reading: the
// regions are the state's own, which nothing changes. The zero token
// has none and returns nil.
func (t PlanToken) Design() *design.Design {
	snap := t.state
	if snap == nil {
		return nil
	}
	d := *snap.shell
	d.Variants = slices.Clone(snap.shell.Variants)
	for v := range d.Variants {
		rs := make([]design.Region, len(snap.regions[v]))
		for i, sr := range snap.regions[v] {
			rs[i] = sr.region
		}
		d.Variants[v].Regions = rs
	}
	return &d
}
