package editor

import (
	"errors"
	"fmt"
	"math"
	"strings"

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
	near    float64 // the last click's snapping distance, nm, for previews

	plan        *planner.Plan
	planVariant string
	planState   *snapshot // the history state the plan was made from
	findings    []Finding
	gapWidths   map[[2]string]GapMeasure // tunnel gaps measured by the last check
	findState   *snapshot
	chosen      int // index of the finding chosen in the list, or -1

	// Profile is the instrument profile plans use.
	Profile     planner.Profile
	ProfilePath string

	surveyImg  *SurveyImage // the survey's image, shaded (survey.go)
	placements *Placements  // the last placement search's result
	defectSel  int          // the survey's selected defect, or -1

	// OnChange, when set, is told what changed after every method that
	// changes something.
	OnChange func(Change)

	// Err is the last problem an edit or rasterisation reported, for the
	// status bar; edits that fail also return it.
	Err error
	// Notice is what the last edit did that the user should know of
	// (a region made for a stroke, with the role guessed for it), for
	// the status bar, which clears it.
	Notice string
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
	ChangeSurvey                       // the survey, its image or the placements found

	ChangeAll Change = 1<<iota - 1
)

// NewSession opens d for editing; path is the file it came from, or "".
// It returns an error when d's field or terraces do not make a surface.
func NewSession(d *design.Design, path string) (*Session, error) {
	if d == nil {
		return nil, errors.New("no design")
	}
	if len(d.Variants) == 0 {
		d.Variants = []design.Variant{{Name: "A"}}
	}
	giveColours(d)
	s := &Session{
		d: d, path: path,
		fresh:  map[regionID]bool{},
		caches: map[regionID]*siteCache{},
		Opts:   DefaultToolOptions(),
		chosen: -1, defectSel: -1,
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
// it came from, or "". The plan shown becomes out of date, and the
// regions' default tolerances (DefaultTolerances) may change.
func (s *Session) SetProfile(p planner.Profile, path string) {
	s.Profile, s.ProfilePath = p, path
	s.planState = nil
	s.notify(ChangePlan | ChangeRegions)
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

// SetDesignName renames the design; the name is printed on plans and
// reports, and the design's rules refuse an empty one.
func (s *Session) SetDesignName(name string) error {
	name = strings.TrimSpace(name)
	old := s.d.Name
	if name == old {
		return nil
	}
	return s.validCommit(fmt.Sprintf("rename the design to %q", name), "rename design", "rename-design", ChangeFile, func() func() {
		s.d.Name = name
		return func() { s.d.Name = old }
	})
}

func round2(v float64) float64 { return math.Round(v*100) / 100 }
