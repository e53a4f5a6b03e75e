package lattice

import (
	"fmt"
	"math"

	"github.com/golang/geo/r2"
)

// WindowTemplate describes a dopant window: the run of consecutive dimers
// on one row that is depassivated so that a precursor molecule can adsorb
// and incorporate a donor. It carries the probabilities that a window
// opened as drawn ends with no donor (P0), exactly one (P1) and two or
// more (P2Plus), which sum to 1, each with its standard uncertainty.
// Templates are data, so a lab can put in its own measured counts or add
// its own window.
type WindowTemplate struct {
	// Name is how shapes refer to the template ("P", "As", or a lab's own).
	Name string `json:"name"`
	// Species is the donor element delivered by the precursor: "P" from
	// phosphine (PH3), "As" from arsine (AsH3).
	Species string `json:"species"`
	// Dimers is the number of consecutive dimers on one row that are
	// opened; the window holds 2·Dimers H sites.
	Dimers int `json:"dimers"`
	// P0, P1 and P2Plus are the probabilities of 0, 1 and 2 or more
	// donors in a window opened as drawn; they sum to 1.
	P0     float64 `json:"p0"`
	P1     float64 `json:"p1"`
	P2Plus float64 `json:"p2plus"`
	// P0SD, P1SD and P2PlusSD are their standard uncertainties (0 when
	// the source gives none).
	P0SD     float64 `json:"p0_sd,omitempty"`
	P1SD     float64 `json:"p1_sd,omitempty"`
	P2PlusSD float64 `json:"p2plus_sd,omitempty"`
	// Probability is the version 1 spelling of P1 (then P0 = 1 − P1 and
	// P2Plus = 0, without uncertainties): read from old design files and
	// turned into P0, P1, P2Plus by Normalized; never written.
	Probability float64 `json:"probability,omitempty"`
	// Source names where the probabilities come from.
	Source string `json:"source,omitempty"`
}

// PhosphineWindow is the single-P window: 3 consecutive dimers on one row
// (6 H sites), with 63 ± 10 % single-donor incorporation for an ideal
// window dosed at room temperature and no window with two (Ivie et al.,
// arXiv 2105.12074, 2021).
var PhosphineWindow = WindowTemplate{
	Name: "P", Species: "P", Dimers: 3,
	P0: 0.37, P1: 0.63, P2Plus: 0, P0SD: 0.10, P1SD: 0.10,
	Source: "Ivie et al., arXiv 2105.12074 (2021): one donor in 63 ± 10 % of ideal 3-dimer windows, two in none",
}

// ArsineWindow is the single-As window: 2 consecutive dimers on one row
// (4 H sites), with 97 ± 2 % single-donor incorporation (Stock et al.,
// arXiv 2311.05752, 2024); the rest is taken as windows left empty. The
// window size is common practice for arsine ("a few dimers" in the
// paper), from memory.
var ArsineWindow = WindowTemplate{
	Name: "As", Species: "As", Dimers: 2,
	P0: 0.03, P1: 0.97, P2Plus: 0, P0SD: 0.02, P1SD: 0.02,
	Source: "Stock et al., arXiv 2311.05752 (2024): one donor in 97 ± 2 %; the 2-dimer window size is from memory",
}

// MaxTemplateDimers is the longest window a template may open.
const MaxTemplateDimers = 64

// BuiltinTemplates returns the built-in window templates, PhosphineWindow
// and ArsineWindow, in that order.
func BuiltinTemplates() []WindowTemplate {
	return []WindowTemplate{PhosphineWindow, ArsineWindow}
}

// Sites returns the number of H sites the window opens, 2·Dimers.
func (t WindowTemplate) Sites() int { return SitesPerDimer * t.Dimers }

// Normalized returns t with a version 1 Probability turned into P0, P1
// and P2Plus (P1 = Probability, P0 = 1 − P1, P2Plus = 0, no
// uncertainties). A template that gives P0, P1 or P2Plus is returned as
// it is (Validate refuses one that gives both spellings).
func (t WindowTemplate) Normalized() WindowTemplate {
	if t.Probability != 0 && t.P0 == 0 && t.P1 == 0 && t.P2Plus == 0 {
		t.P1, t.P0, t.P2Plus = t.Probability, 1-t.Probability, 0
		t.Probability = 0
	}
	return t
}

// TemplateProblem is one bad field of a window template: its JSON field
// name, value and what is wrong.
type TemplateProblem struct {
	Field   string
	Value   any
	Problem string
}

func (p TemplateProblem) Error() string {
	return fmt.Sprintf("%s = %v: %s", p.Field, p.Value, p.Problem)
}

// Problems returns every bad field of t (after Normalized): an empty
// name or species, a dimer count outside 1..MaxTemplateDimers, a
// probability outside [0, 1], probabilities that do not sum to 1 within
// 1e-9, a negative uncertainty, or one too large for a probability of
// that mean (a spread of sd around mean p needs sd² < p·(1−p), the
// largest a beta distribution allows, and sd = 0 at p = 0 or 1).
func (t WindowTemplate) Problems() []TemplateProblem {
	var ps []TemplateProblem
	add := func(field string, v any, format string, args ...any) {
		ps = append(ps, TemplateProblem{Field: field, Value: v, Problem: fmt.Sprintf(format, args...)})
	}
	if t.Name == "" {
		add("name", `""`, "is empty")
	}
	if t.Species == "" {
		add("species", `""`, "is empty")
	}
	if t.Dimers < 1 || t.Dimers > MaxTemplateDimers {
		add("dimers", t.Dimers, "is outside 1..%d", MaxTemplateDimers)
	}
	if t.Probability != 0 {
		add("probability", t.Probability, "is the version 1 spelling of p1: give p0, p1 and p2plus instead, not both")
	}
	probs := []struct {
		name   string
		p, sd  float64
		sdName string
	}{{"p0", t.P0, t.P0SD, "p0_sd"}, {"p1", t.P1, t.P1SD, "p1_sd"}, {"p2plus", t.P2Plus, t.P2PlusSD, "p2plus_sd"}}
	ok := true
	for _, q := range probs {
		if !(q.p >= 0 && q.p <= 1) {
			add(q.name, q.p, "is outside [0, 1]")
			ok = false
			continue
		}
		switch {
		case !(q.sd >= 0) || math.IsInf(q.sd, 0):
			add(q.sdName, q.sd, "must be a finite number, zero or more")
		case q.sd > 0 && q.sd*q.sd >= q.p*(1-q.p):
			add(q.sdName, q.sd, "is too large for %s = %g: a probability's spread needs sd² < p·(1−p) (sd < %.3g)", q.name, q.p, math.Sqrt(q.p*(1-q.p)))
		}
	}
	if sum := t.P0 + t.P1 + t.P2Plus; ok && math.Abs(sum-1) > 1e-9 {
		add("p0 + p1 + p2plus", sum, "must be 1 (within 1e-9)")
	}
	return ps
}

// Validate returns an error naming the first bad field of t (see
// Problems), or nil.
func (t WindowTemplate) Validate() error {
	if ps := t.Problems(); len(ps) > 0 {
		return fmt.Errorf("window template %q: %w", t.Name, ps[0])
	}
	return nil
}

// Window is one placed dopant window: Template.Dimers consecutive dimers
// on one row of one terrace, starting at FirstDimer. A window placed near
// a terrace edge may reach dimers that do not exist on its terrace (see
// Surface.WindowExists); FirstDimer may then be negative. Template is
// shared, never changed through a window: the windows of an array hold
// one template between them (a 10^6-window array held 10^6 copies of
// it, 104 MB more than the pointers). A Window with a nil Template is no
// window (the zero value that lookups return beside ok = false): its
// methods need the template and must not be called on it.
type Window struct {
	Template   *WindowTemplate
	Terrace    int
	Row        int
	FirstDimer int
}

// LastDimer returns the window's last dimer.
func (w Window) LastDimer() int { return w.FirstDimer + w.Template.Dimers - 1 }

// Shifted returns the window moved by dimers along its row and rows
// across it.
func (w Window) Shifted(dimers, rows int) Window {
	w.FirstDimer += dimers
	w.Row += rows
	return w
}

// String formats the window as P@T0:R12:D30-32.
func (w Window) String() string {
	return fmt.Sprintf("%s@T%d:R%d:D%d-%d", w.Template.Name, w.Terrace, w.Row, w.FirstDimer, w.LastDimer())
}

// AddTo adds the window's H sites with a non-negative index to set. It
// does not check that they exist on a surface; Surface.AddWindow does.
func (w Window) AddTo(set *SiteSet) {
	from := max(0, 2*w.FirstDimer)
	to := 2 * (w.FirstDimer + w.Template.Dimers)
	if w.Terrace < 0 || w.Row < 0 || to <= from {
		return
	}
	set.AddRun(w.Terrace, w.Row, from, to)
}

// PlaceWindow returns the window of template t on the terrace and row
// nearest p whose centre is nearest p along the row: for an odd number
// of dimers it is centred on the dimer nearest p. It reports ok = false
// when p lies on no terrace. The window may reach beyond its terrace;
// see WindowExists. The window holds its own copy of t.
func (s *Surface) PlaceWindow(t WindowTemplate, p r2.Point) (w Window, ok bool) {
	ti := s.TerraceAt(p)
	if ti < 0 {
		return Window{}, false
	}
	along, across := s.Frame(ti).ToLocal(p)
	row := clamp(int(math.Round(across/RowSpacing)), 0, s.RowCount(ti)-1)
	first := int(math.Round(along/DimerPitch - float64(t.Dimers-1)/2))
	return Window{Template: &t, Terrace: ti, Row: row, FirstDimer: first}, true
}

// WindowExists reports whether every dimer of w exists on w's terrace
// (in the field and on that terrace).
func (s *Surface) WindowExists(w Window) bool {
	if w.Template == nil || w.Template.Dimers < 1 {
		return false
	}
	for d := w.FirstDimer; d <= w.LastDimer(); d++ {
		if !s.Valid(Site{Terrace: w.Terrace, Row: w.Row, Dimer: d}) {
			return false
		}
	}
	return true
}

// AddWindow adds to set the sites of w that exist on the surface and
// returns how many it added or found there.
func (s *Surface) AddWindow(set *SiteSet, w Window) int {
	n := 0
	for d := w.FirstDimer; d <= w.LastDimer(); d++ {
		if s.PaintDimer(set, w.Terrace, w.Row, d) {
			n += SitesPerDimer
		}
	}
	return n
}

// WindowCentre returns the field position of w's centre in nm: the
// midpoint of its first and last dimer centres.
func (s *Surface) WindowCentre(w Window) r2.Point {
	a := s.DimerCentre(w.Terrace, w.Row, w.FirstDimer)
	b := s.DimerCentre(w.Terrace, w.Row, w.LastDimer())
	return a.Add(b).Mul(0.5)
}
