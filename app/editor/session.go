package editor

import (
	"errors"
	"fmt"
	"math"
	"slices"
	"strings"

	"github.com/golang/geo/r2"

	"dimerpath/app/render"
	"dimerpath/lattice"
	"dimerpath/lattice/design"
	"dimerpath/planner"
)

// Session is the editor's whole state: the design being edited, the
// variant shown, the tool and its options, the selection, the undo
// history, the last plan and design-rule findings. It holds no widget
// and imports no Fyne, so every edit can be tested without a window; the
// widgets are views of it and call its methods.
//
// A Session is used from one goroutine (Fyne's). Background work
// (planning, checks) gets a copy of the design from DesignCopy.
type Session struct {
	d       *design.Design
	path    string // file the design came from or was saved to; "" if none
	variant int

	surf    *lattice.Surface
	surfErr error

	// ids[v][i] names the content of region i of variant v (see
	// history.go); caches holds rasterised sites by id.
	ids    [][]regionID
	fresh  map[regionID]bool
	caches map[regionID]*siteCache
	nextID regionID

	hist history

	Tool Tool
	Opts ToolOptions
	sel  []int // selected regions of the current variant, primary first
	// shapeSel is the selected shape (of the primary selected region),
	// or nil.
	shapeSel *selectedShape

	gesture *gesture
	hoverAt hoverState

	plan        *planner.Plan
	planVariant string
	planState   *snapshot // the history state the plan was made from
	findings    []Finding
	gapWidths   map[[2]string]float64 // tunnel gaps measured by the last check
	findState   *snapshot
	chosen      int // index of the finding chosen in the list, or -1

	// Profile is the instrument profile plans use.
	Profile     planner.Profile
	ProfilePath string

	// OnChange, when set, is told what changed after every method that
	// changes something.
	OnChange func(Change)

	// Err is the last problem an edit or rasterisation reported, for the
	// status bar; edits that fail also return it.
	Err error
}

// Change says which part of the session changed, so views redraw only
// what they show.
type Change uint32

const (
	ChangeSites     Change = 1 << iota // painted sites or shapes: the canvas
	ChangeRegions                      // the region list or a region's properties
	ChangeVariants                     // variant list or the current variant
	ChangeSelection                    // selected regions
	ChangeTool                         // tool or its options
	ChangePlan                         // the plan or its staleness
	ChangeFindings                     // design-rule findings
	ChangeFile                         // path or saved state (title bar)
	ChangeFiducials                    // fiducial marks
	ChangeTerraces                     // field or terraces
	ChangePreview                      // a tool's preview shape
	ChangeHistory                      // undo/redo availability

	ChangeAll Change = 1<<iota - 1
)

// siteCache is one region's rasterised sites and their extent.
type siteCache struct {
	sites  *lattice.SiteSet
	bounds r2.Rect
	stale  bool // bounds need recomputing
}

func (s *Session) newCache(set *lattice.SiteSet) *siteCache {
	return &siteCache{sites: set, stale: true}
}

// NewSession opens d for editing; path is the file it came from, or "".
// It returns an error when d's field or terraces do not make a surface.
func NewSession(d *design.Design, path string) (*Session, error) {
	if d == nil {
		return nil, errors.New("no design")
	}
	if len(d.Variants) == 0 {
		d.Variants = []design.Variant{{Name: "A"}}
	}
	s := &Session{
		d: d, path: path,
		fresh:  map[regionID]bool{},
		caches: map[regionID]*siteCache{},
		Opts:   DefaultToolOptions(),
		chosen: -1,
	}
	s.Profile = defaultProfile()
	s.ids = make([][]regionID, len(d.Variants))
	for v := range d.Variants {
		s.ids[v] = make([]regionID, len(d.Variants[v].Regions))
		for i := range s.ids[v] {
			s.ids[v][i] = s.newID()
		}
	}
	s.rebuildSurface()
	if s.surfErr != nil {
		return nil, s.surfErr
	}
	s.hist.push(s.snapshotOf(nil, "open", ""))
	s.hist.saved = s.hist.current()
	s.ensureCaches()
	return s, nil
}

// NewDesign returns an empty design: a 2 µm x 2 µm field on one terrace
// with one empty variant.
func NewDesign() *design.Design {
	return &design.Design{
		Format: design.FormatName, Version: design.FormatVersion,
		Name:     "untitled",
		Field:    design.Field{WidthNM: 2000, HeightNM: 2000},
		Terraces: []design.Terrace{{Name: "T0", Rows: "x"}},
		Variants: []design.Variant{{Name: "A"}},
	}
}

func (s *Session) newID() regionID {
	s.nextID++
	s.fresh[s.nextID] = true
	return s.nextID
}

func (s *Session) notify(c Change) {
	if s.OnChange != nil {
		s.OnChange(c)
	}
}

func (s *Session) rebuildSurface() {
	s.surf, s.surfErr = surfaceOf(s.d)
}

// Design returns the live design. Callers must not change it: every
// change goes through a Session method so that it can be undone.
func (s *Session) Design() *design.Design { return s.d }

// DesignCopy returns an independent copy of the design, for work done
// in the background while editing goes on.
func (s *Session) DesignCopy() *design.Design { return cloneDesign(s.d) }

// Surface returns the lattice of the design's field and terraces.
func (s *Session) Surface() *lattice.Surface { return s.surf }

// Path returns the file the design was opened from or saved to.
func (s *Session) Path() string { return s.path }

// Dirty reports whether the design has changes not saved to Path.
func (s *Session) Dirty() bool { return s.hist.saved != s.hist.current() }

// MarkSaved records that the current state is what path holds.
func (s *Session) MarkSaved(path string) {
	s.path = path
	s.hist.saved = s.hist.current()
	s.notify(ChangeFile)
}

// MarkUnsaved records that nothing on disk holds the current state (a
// design recovered from the autosave copy).
func (s *Session) MarkUnsaved() {
	s.hist.saved = nil
	s.notify(ChangeFile)
}

// SetProfile makes p the instrument profile plans use; path is the file
// it came from, or "". The plan shown becomes out of date.
func (s *Session) SetProfile(p planner.Profile, path string) {
	s.Profile, s.ProfilePath = p, path
	s.planState = nil
	s.notify(ChangePlan)
}

// Title is the window title: design name, file and an asterisk when
// unsaved.
func (s *Session) Title() string {
	name := s.d.Name
	if name == "" {
		name = "untitled"
	}
	t := name
	if s.path != "" {
		t += " — " + s.path
	}
	if s.Dirty() {
		t = "* " + t
	}
	return t + " — dimerpath"
}

// VariantIndex returns the index of the variant shown.
func (s *Session) VariantIndex() int { return s.variant }

// Variant returns the variant shown (read only).
func (s *Session) Variant() *design.Variant { return &s.d.Variants[s.variant] }

// VariantNames returns the names of all variants in order.
func (s *Session) VariantNames() []string {
	out := make([]string, len(s.d.Variants))
	for i, v := range s.d.Variants {
		out[i] = v.Name
	}
	return out
}

// SetVariant shows variant i. It is not an edit: nothing to undo.
func (s *Session) SetVariant(i int) {
	if i < 0 || i >= len(s.d.Variants) || i == s.variant {
		return
	}
	s.cancelGesture()
	s.variant = i
	s.sel = nil
	s.shapeSel = nil
	s.chosen = -1
	s.ensureCaches()
	s.notify(ChangeVariants | ChangeRegions | ChangeSites | ChangeSelection | ChangePlan | ChangeFindings)
}

// ensureCaches rasterises every region of the current variant that has
// no cached sites.
func (s *Session) ensureCaches() {
	for i := range s.d.Variants[s.variant].Regions {
		s.cacheOf(s.variant, i)
	}
}

// cacheOf returns region i of variant v's cache, rasterising it if
// needed. A region that fails to rasterise shows no sites and sets Err.
func (s *Session) cacheOf(v, i int) *siteCache {
	id := s.ids[v][i]
	if c := s.caches[id]; c != nil {
		return c
	}
	set := lattice.NewSiteSet()
	if s.surf != nil {
		got, err := regionSites(s.surf, s.d, &s.d.Variants[v].Regions[i])
		if err != nil {
			s.Err = err
		} else {
			set = got
		}
	}
	c := s.newCache(set)
	s.caches[id] = c
	return c
}

// pruneCaches drops the caches of region contents no longer live.
func (s *Session) pruneCaches() {
	live := map[regionID]bool{}
	for _, ids := range s.ids {
		for _, id := range ids {
			live[id] = true
		}
	}
	for id := range s.caches {
		if !live[id] {
			delete(s.caches, id)
		}
	}
}

// RegionSites returns the sites of region i of the current variant
// (read only).
func (s *Session) RegionSites(i int) *lattice.SiteSet {
	if i < 0 || i >= len(s.Variant().Regions) {
		return nil
	}
	return s.cacheOf(s.variant, i).sites
}

// RegionBounds returns the field rectangle (nm) of region i's sites.
func (s *Session) RegionBounds(i int) r2.Rect {
	c := s.cacheOf(s.variant, i)
	if c.stale {
		c.bounds = c.sites.Bounds(s.surf)
		c.stale = false
	}
	return c.bounds
}

// touch marks region i of variant v as about to change and returns its
// cache, which the caller may then change in place.
func (s *Session) touch(v, i int) *siteCache {
	old := s.ids[v][i]
	c := s.cacheOf(v, i)
	if s.fresh[old] {
		c.stale = true
		return c
	}
	refs := 0
	for _, ids := range s.ids {
		for _, id := range ids {
			if id == old {
				refs++
			}
		}
	}
	nid := s.newID()
	s.ids[v][i] = nid
	if refs > 1 {
		c = s.newCache(c.sites.Clone())
	} else {
		delete(s.caches, old)
	}
	c.stale = true
	s.caches[nid] = c
	return c
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
	s.ensureCaches()
	s.notify(ChangeAll)
}

// Selection returns the selected regions of the current variant,
// primary first.
func (s *Session) Selection() []int { return s.sel }

// Active returns the primary selected region, the one tools paint into,
// or -1.
func (s *Session) Active() int {
	if len(s.sel) == 0 {
		return -1
	}
	return s.sel[0]
}

// Select makes regions the selection (primary first); out-of-range
// indices are dropped.
func (s *Session) Select(regions ...int) {
	n := len(s.Variant().Regions)
	var sel []int
	for _, i := range regions {
		if i >= 0 && i < n && !slices.Contains(sel, i) {
			sel = append(sel, i)
		}
	}
	s.sel = sel
	s.shapeSel = nil
	s.notify(ChangeSelection | ChangeSites)
}

// RegionAt returns the topmost region of the current variant holding
// the site nearest p, or -1.
func (s *Session) RegionAt(p r2.Point) int {
	site, _, ok := s.surf.Snap(p)
	if !ok {
		return -1
	}
	for i := len(s.Variant().Regions) - 1; i >= 0; i-- {
		if s.RegionSites(i).Contains(site) {
			return i
		}
	}
	return -1
}

// --- Region edits ---

// uniqueRegionName returns base, or base with a number, not yet used in
// the current variant.
func (s *Session) uniqueRegionName(base string) string {
	used := map[string]bool{}
	for _, r := range s.Variant().Regions {
		used[r.Name] = true
	}
	if !used[base] {
		return base
	}
	for k := 2; ; k++ {
		if n := fmt.Sprintf("%s %d", base, k); !used[n] {
			return n
		}
	}
}

// AddRegion appends a region with the given name (made unique) and
// role, selects it and returns its index.
func (s *Session) AddRegion(name string, role design.Role) int {
	i := s.addRegion(name, role)
	s.commit("add region "+s.Variant().Regions[i].Name, "", ChangeRegions|ChangeSelection|ChangeSites)
	return i
}

// addRegion appends a region without committing.
func (s *Session) addRegion(name string, role design.Role) int {
	if strings.TrimSpace(name) == "" {
		name = "region"
	}
	r := design.Region{Name: s.uniqueRegionName(name), Role: role, Mode: design.ModeAuto}
	v := s.Variant()
	v.Regions = append(v.Regions, r)
	s.ids[s.variant] = append(s.ids[s.variant], s.newID())
	i := len(v.Regions) - 1
	s.caches[s.ids[s.variant][i]] = s.newCache(lattice.NewSiteSet())
	s.sel = []int{i}
	s.shapeSel = nil
	return i
}

// DeleteRegions removes the given regions of the current variant.
func (s *Session) DeleteRegions(regions ...int) {
	v := s.Variant()
	var names []string
	del := map[int]bool{}
	for _, i := range regions {
		if i >= 0 && i < len(v.Regions) && !del[i] {
			del[i] = true
			names = append(names, v.Regions[i].Name)
		}
	}
	if len(del) == 0 {
		return
	}
	var keep []design.Region
	var ids []regionID
	for i, r := range v.Regions {
		if !del[i] {
			keep = append(keep, r)
			ids = append(ids, s.ids[s.variant][i])
		}
	}
	v.Regions, s.ids[s.variant] = keep, ids
	// A tunnel gap to a deleted region goes with it.
	v.TunnelGaps = slices.DeleteFunc(slices.Clone(v.TunnelGaps), func(g design.TunnelGap) bool {
		return slices.Contains(names, g.A) || slices.Contains(names, g.B)
	})
	s.sel = nil
	s.shapeSel = nil
	label := "delete region " + names[0]
	if len(names) > 1 {
		label = fmt.Sprintf("delete %d regions", len(names))
	}
	s.commit(label, "", ChangeRegions|ChangeSelection|ChangeSites)
}

// ErrName is returned for an empty or duplicate name.
var ErrName = errors.New("name is empty or already used")

// RenameRegion renames region i; the name must be unique in the variant.
func (s *Session) RenameRegion(i int, name string) error {
	v := s.Variant()
	if i < 0 || i >= len(v.Regions) {
		return fmt.Errorf("no region %d", i)
	}
	name = strings.TrimSpace(name)
	if name == v.Regions[i].Name {
		return nil
	}
	for j, r := range v.Regions {
		if name == "" || (j != i && r.Name == name) {
			return fmt.Errorf("region name %q: %w", name, ErrName)
		}
	}
	s.touch(s.variant, i)
	old := v.Regions[i].Name
	v.Regions[i].Name = name
	// Tunnel gaps name their regions: they follow the rename.
	v.TunnelGaps = slices.Clone(v.TunnelGaps)
	for g := range v.TunnelGaps {
		if v.TunnelGaps[g].A == old {
			v.TunnelGaps[g].A = name
		}
		if v.TunnelGaps[g].B == old {
			v.TunnelGaps[g].B = name
		}
	}
	s.commit("rename region", fmt.Sprintf("rename-region-%d-%d", s.variant, i), ChangeRegions)
	return nil
}

// SetRegionRole sets region i's role in the device.
func (s *Session) SetRegionRole(i int, role design.Role) {
	s.setRegion(i, "role", func(r *design.Region) bool {
		if r.Role == role {
			return false
		}
		r.Role = role
		return true
	})
}

// SetRegionMode sets the write mode asked for region i.
func (s *Session) SetRegionMode(i int, mode design.Mode) {
	s.setRegion(i, "mode", func(r *design.Region) bool {
		if r.Mode == mode {
			return false
		}
		r.Mode = mode
		return true
	})
}

// SetRegionSpecies sets region i's dopant species ("P", "As" or "").
func (s *Session) SetRegionSpecies(i int, species string) {
	s.setRegion(i, "species", func(r *design.Region) bool {
		if r.Species == species {
			return false
		}
		r.Species = species
		return true
	})
}

// SetRegionTolerance sets region i's placement tolerance in nm (0 takes
// the mode's default). It refuses a negative or non-finite value.
func (s *Session) SetRegionTolerance(i int, nm float64) error {
	if !(nm >= 0) || math.IsInf(nm, 0) {
		return fmt.Errorf("tolerance %g nm: must be 0 (the mode's default) or a positive number", nm)
	}
	s.setRegion(i, "tolerance", func(r *design.Region) bool {
		if r.ToleranceNM == nm {
			return false
		}
		r.ToleranceNM = nm
		return true
	})
	return nil
}

func (s *Session) setRegion(i int, what string, f func(*design.Region) bool) {
	v := s.Variant()
	if i < 0 || i >= len(v.Regions) {
		return
	}
	r := v.Regions[i]
	if !f(&r) {
		return
	}
	s.touch(s.variant, i)
	v.Regions[i] = r
	s.commit("set "+what+" of "+r.Name, fmt.Sprintf("%s-%d-%d", what, s.variant, i), ChangeRegions)
}

// SetDesignName renames the design; the name is printed on plans and
// reports and must not be empty.
func (s *Session) SetDesignName(name string) error {
	name = strings.TrimSpace(name)
	if name == "" {
		return fmt.Errorf("design name: %w", ErrName)
	}
	if name == s.d.Name {
		return nil
	}
	s.d.Name = name
	s.commit("rename design", "rename-design", ChangeFile)
	return nil
}

// --- Tunnel gaps ---

// AddTunnelGap declares that regions a and b of the current variant are
// meant to be tunnel-coupled across a gap (an SET island and its
// leads): the checks then measure the gap against the rule's range and
// count the pair as connected.
func (s *Session) AddTunnelGap(a, b string) error {
	v := s.Variant()
	if v.Region(a) == nil || v.Region(b) == nil {
		return fmt.Errorf("tunnel gap %s – %s: both must be regions of variant %s", a, b, v.Name)
	}
	if a == b {
		return fmt.Errorf("tunnel gap %s – %s: a gap needs two different regions", a, b)
	}
	for _, g := range v.TunnelGaps {
		if g.A == a && g.B == b || g.A == b && g.B == a {
			return fmt.Errorf("the tunnel gap %s – %s is already declared", a, b)
		}
	}
	v.TunnelGaps = append(slices.Clone(v.TunnelGaps), design.TunnelGap{A: a, B: b})
	s.commit("declare tunnel gap "+a+" – "+b, "", ChangeRegions)
	return nil
}

// RemoveTunnelGap removes tunnel gap i of the current variant.
func (s *Session) RemoveTunnelGap(i int) {
	v := s.Variant()
	if i < 0 || i >= len(v.TunnelGaps) {
		return
	}
	g := v.TunnelGaps[i]
	v.TunnelGaps = slices.Delete(slices.Clone(v.TunnelGaps), i, i+1)
	s.commit("remove tunnel gap "+g.A+" – "+g.B, "", ChangeRegions)
}

// GapWidth returns the width (nm) of the current variant's tunnel gap
// between a and b measured by the last check, and whether it is known
// and up to date.
func (s *Session) GapWidth(a, b string) (float64, bool) {
	if s.findState != s.hist.current() {
		return 0, false
	}
	w, ok := s.gapWidths[[2]string{a, b}]
	if !ok {
		w, ok = s.gapWidths[[2]string{b, a}]
	}
	return w, ok
}

// --- Variant edits ---

func (s *Session) uniqueVariantName(base string) string {
	used := map[string]bool{}
	for _, v := range s.d.Variants {
		used[v.Name] = true
	}
	if !used[base] {
		return base
	}
	for k := 2; ; k++ {
		if n := fmt.Sprintf("%s %d", base, k); !used[n] {
			return n
		}
	}
}

// DuplicateVariant copies variant i, shows the copy and returns its
// index.
func (s *Session) DuplicateVariant(i int) int {
	if i < 0 || i >= len(s.d.Variants) {
		return -1
	}
	c := cloneVariant(s.d.Variants[i])
	c.Name = s.uniqueVariantName(c.Name + " copy")
	s.d.Variants = slices.Insert(s.d.Variants, i+1, c)
	// The copy's regions share ids, and so caches, with the original
	// until either is edited.
	s.ids = slices.Insert(s.ids, i+1, append([]regionID(nil), s.ids[i]...))
	s.variant = i + 1
	s.sel = nil
	s.shapeSel = nil
	s.commit("duplicate variant "+s.d.Variants[i].Name, "", ChangeAll)
	return i + 1
}

// RenameVariant renames variant i; names must be unique.
func (s *Session) RenameVariant(i int, name string) error {
	if i < 0 || i >= len(s.d.Variants) {
		return fmt.Errorf("no variant %d", i)
	}
	name = strings.TrimSpace(name)
	if name == s.d.Variants[i].Name {
		return nil
	}
	for j, v := range s.d.Variants {
		if name == "" || (j != i && v.Name == name) {
			return fmt.Errorf("variant name %q: %w", name, ErrName)
		}
	}
	s.d.Variants[i].Name = name
	s.commit("rename variant", fmt.Sprintf("rename-variant-%d", i), ChangeVariants)
	return nil
}

// DeleteVariant removes variant i; the last variant cannot be deleted.
func (s *Session) DeleteVariant(i int) error {
	if i < 0 || i >= len(s.d.Variants) {
		return fmt.Errorf("no variant %d", i)
	}
	if len(s.d.Variants) == 1 {
		return errors.New("a design keeps at least one variant")
	}
	name := s.d.Variants[i].Name
	s.d.Variants = slices.Delete(s.d.Variants, i, i+1)
	s.ids = slices.Delete(s.ids, i, i+1)
	if s.variant >= len(s.d.Variants) || s.variant > i {
		s.variant = max(s.variant-1, 0)
	}
	s.sel = nil
	s.shapeSel = nil
	s.ensureCaches()
	s.commit("delete variant "+name, "", ChangeAll)
	return nil
}

// --- Fiducials ---

// AddFiducial places a new fiducial mark at p (nm) and returns its index.
func (s *Session) AddFiducial(p r2.Point) int {
	used := map[string]bool{}
	for _, f := range s.d.Fiducials {
		used[f.Name] = true
	}
	name := ""
	for k := len(s.d.Fiducials) + 1; ; k++ {
		if name = fmt.Sprintf("F%d", k); !used[name] {
			break
		}
	}
	s.d.Fiducials = append(s.d.Fiducials, design.Fiducial{Name: name, AtNM: [2]float64{round2(p.X), round2(p.Y)}})
	s.commit("add fiducial "+name, "", ChangeFiducials|ChangeSites)
	return len(s.d.Fiducials) - 1
}

// SetFiducial renames and moves fiducial i. The name must be unique and
// the position inside the field.
func (s *Session) SetFiducial(i int, name string, at r2.Point) error {
	if i < 0 || i >= len(s.d.Fiducials) {
		return fmt.Errorf("no fiducial %d", i)
	}
	name = strings.TrimSpace(name)
	for j, f := range s.d.Fiducials {
		if name == "" || (j != i && f.Name == name) {
			return fmt.Errorf("fiducial name %q: %w", name, ErrName)
		}
	}
	if !s.surf.Field.ContainsPoint(at) {
		return fmt.Errorf("fiducial %s at (%g, %g) nm: outside the %g x %g nm field", name, at.X, at.Y, s.d.Field.WidthNM, s.d.Field.HeightNM)
	}
	f := design.Fiducial{Name: name, AtNM: [2]float64{at.X, at.Y}}
	if f == s.d.Fiducials[i] {
		return nil
	}
	s.d.Fiducials[i] = f
	s.commit("edit fiducial "+name, fmt.Sprintf("fiducial-%d", i), ChangeFiducials|ChangeSites)
	return nil
}

// DeleteFiducial removes fiducial i.
func (s *Session) DeleteFiducial(i int) {
	if i < 0 || i >= len(s.d.Fiducials) {
		return
	}
	name := s.d.Fiducials[i].Name
	s.d.Fiducials = slices.Delete(s.d.Fiducials, i, i+1)
	s.commit("delete fiducial "+name, "", ChangeFiducials|ChangeSites)
}

// --- Terraces ---

// terracesChanged re-makes the surface after an edit of the field or the
// terraces; every region is rasterised again.
func (s *Session) terracesChanged() error {
	surf, err := surfaceOf(s.d)
	if err != nil {
		return err
	}
	s.surf, s.surfErr = surf, nil
	s.shapeSel = nil
	for v := range s.ids {
		for i := range s.ids[v] {
			s.ids[v][i] = s.newID()
		}
	}
	s.pruneCaches()
	s.ensureCaches()
	return nil
}

// editTerraces applies f to a copy of the terraces and keeps the result
// only if it makes a valid surface.
func (s *Session) editTerraces(label, key string, f func(ts []design.Terrace) []design.Terrace) error {
	old := s.d.Terraces
	cp := slices.Clone(old)
	for i := range cp {
		cp[i].Boundary = slices.Clone(cp[i].Boundary)
	}
	s.d.Terraces = f(cp)
	if err := s.terracesChanged(); err != nil {
		s.d.Terraces = old
		s.rebuildSurface()
		return err
	}
	s.commit(label, key, ChangeTerraces|ChangeSites|ChangeRegions)
	return nil
}

// AddTerrace adds a terrace bounded by poly (nm, 3 or more vertices),
// one single-height step from the terrace under the first vertex: its
// rows turn by 90° and its lattice shifts (design.Terrace.StepFrom).
func (s *Session) AddTerrace(poly []r2.Point) (int, error) {
	if len(poly) < 3 {
		return -1, errors.New("a terrace outline needs at least 3 points")
	}
	from := s.surf.TerraceAt(poly[0])
	if from < 0 {
		return -1, fmt.Errorf("the first point (%.1f, %.1f) nm of a terrace outline must lie on a terrace of the field", poly[0].X, poly[0].Y)
	}
	used := map[string]bool{}
	for _, t := range s.d.Terraces {
		used[t.Name] = true
	}
	name := ""
	for k := len(s.d.Terraces); ; k++ {
		if name = fmt.Sprintf("T%d", k); !used[name] {
			break
		}
	}
	b := make([][2]float64, len(poly))
	for i, p := range poly {
		b[i] = [2]float64{round2(p.X), round2(p.Y)}
	}
	base := s.surf.Terraces[from].Name
	err := s.editTerraces("add terrace "+name, "", func(ts []design.Terrace) []design.Terrace {
		if len(ts) == 0 {
			// A design without terraces is one terrace with rows along
			// x; write it out so the new one can step from it.
			ts = []design.Terrace{{Name: base, Rows: "x"}}
		}
		// Appended, so painted sites keep their terrace indices. The
		// first bounded terrace holding a point wins, so an outline drawn
		// inside another bounded terrace stays under it.
		return append(ts, design.Terrace{Name: name, StepFrom: base, Boundary: b})
	})
	if err != nil {
		return -1, err
	}
	return len(s.d.Terraces) - 1, nil
}

// SetTerrace changes terrace i's name, row direction ("x" or "y") and
// lattice offset (nm). A terrace that steps from another takes its rows
// from it; asking for other rows makes it stand on its own.
func (s *Session) SetTerrace(i int, name, rows string, offset r2.Point) error {
	if i < 0 || i >= len(s.d.Terraces) {
		return fmt.Errorf("no terrace %d", i)
	}
	if rows != "x" && rows != "y" {
		return fmt.Errorf("terrace rows %q: must be x or y", rows)
	}
	name = strings.TrimSpace(name)
	for j, t := range s.d.Terraces {
		if name == "" || (j != i && t.Name == name) {
			return fmt.Errorf("terrace name %q: %w", name, ErrName)
		}
	}
	if math.IsNaN(offset.X) || math.IsNaN(offset.Y) || math.IsInf(offset.X, 0) || math.IsInf(offset.Y, 0) {
		return fmt.Errorf("terrace offset (%g, %g) nm: must be finite", offset.X, offset.Y)
	}
	t := s.d.Terraces[i]
	curRows := s.surf.Terraces[i].Rows.String()
	if t.Name == name && curRows == rows && t.OffsetNM == [2]float64{offset.X, offset.Y} {
		return nil
	}
	old := t.Name
	return s.editTerraces("edit terrace "+name, fmt.Sprintf("terrace-%d", i), func(ts []design.Terrace) []design.Terrace {
		if ts[i].StepFrom != "" && rows != curRows {
			ts[i].StepFrom = ""
		}
		if ts[i].StepFrom == "" {
			ts[i].Rows = rows
		}
		ts[i].Name, ts[i].OffsetNM = name, [2]float64{offset.X, offset.Y}
		for k := range ts {
			if ts[k].StepFrom == old {
				ts[k].StepFrom = name
			}
		}
		return ts
	})
}

// DeleteTerrace removes terrace i. A terrace that holds painted sites of
// any region cannot be deleted (the sites' addresses would be lost), nor
// the last terrace.
func (s *Session) DeleteTerrace(i int) error {
	if i < 0 || i >= len(s.d.Terraces) {
		return fmt.Errorf("no terrace %d", i)
	}
	if len(s.d.Terraces) == 1 {
		return errors.New("a design keeps at least one terrace")
	}
	for _, v := range s.d.Variants {
		for _, r := range v.Regions {
			for _, set := range []*lattice.SiteSet{r.Painted, r.Erased} {
				if set != nil && set.TerraceCount() > i {
					for t := i; t < set.TerraceCount(); t++ {
						for row := 0; row < set.RowCount(t); row++ {
							if render.CountRange(set.Row(t, row), 0, math.MaxInt) > 0 {
								return fmt.Errorf("terrace %s: region %q of variant %q has painted sites on it or a later terrace; erase them first", s.d.Terraces[i].Name, r.Name, v.Name)
							}
						}
					}
				}
			}
		}
	}
	name := s.d.Terraces[i].Name
	return s.editTerraces("delete terrace "+name, "", func(ts []design.Terrace) []design.Terrace {
		return slices.Delete(ts, i, i+1)
	})
}

func round2(v float64) float64 { return math.Round(v*100) / 100 }

// --- Plan and findings ---

// Plan returns the last plan of the current variant and whether it is
// out of date (the design changed since it was made); nil when the
// current variant has not been planned.
func (s *Session) Plan() (p *planner.Plan, stale bool) {
	if s.plan == nil || s.planVariant != s.Variant().Name {
		return nil, false
	}
	return s.plan, s.planState != s.hist.current()
}

// SetPlan records p as the plan of the variant named variant, made from
// the design as it was at the history state from (see PlanToken).
func (s *Session) SetPlan(p *planner.Plan, variant string, from PlanToken) {
	s.plan, s.planVariant, s.planState = p, variant, from.state
	s.notify(ChangePlan | ChangeSites)
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

// Checked reports whether any design-rule check has reported since the
// session opened.
func (s *Session) Checked() bool { return s.findState != nil }

// Findings returns the last design-rule findings of the current variant
// and whether they are out of date.
func (s *Session) Findings() (f []Finding, stale bool) {
	return s.findings, s.findState != s.hist.current()
}

// SetFindings records the findings of a check made at state from.
func (s *Session) SetFindings(f []Finding, from PlanToken) {
	s.SetCheck(CheckResult{Findings: f}, from)
}

// SetCheck records a check's findings and tunnel-gap widths, made at
// state from.
func (s *Session) SetCheck(c CheckResult, from PlanToken) {
	f := c.Findings
	s.findings, s.findState, s.gapWidths = f, from.state, c.GapWidths
	s.chosen = -1
	s.notify(ChangeFindings | ChangeSites)
}

// ChooseFinding marks finding i as the one chosen in the list (-1 for
// none); the canvas draws it emphasised.
func (s *Session) ChooseFinding(i int) {
	if i >= len(s.findings) {
		i = -1
	}
	s.chosen = i
	s.notify(ChangeSites)
}

// FindingBounds returns the field area (nm) to show for finding i.
func (s *Session) FindingBounds(i int) r2.Rect {
	f := s.findings[i]
	if !f.Bounds.IsEmpty() {
		return f.Bounds
	}
	return r2.RectFromPoints(f.At)
}
