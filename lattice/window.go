package lattice

import (
	"fmt"
	"math"

	"github.com/golang/geo/r2"
)

// WindowTemplate describes a dopant window: the run of consecutive dimers
// on one row that is depassivated so that one precursor molecule can
// adsorb and incorporate a single donor. Templates are data, so a lab can
// edit the probability to its own measured yield or add its own window.
type WindowTemplate struct {
	// Name is how shapes refer to the template ("P", "As", or a lab's own).
	Name string `json:"name"`
	// Species is the donor element delivered by the precursor: "P" from
	// phosphine (PH3), "As" from arsine (AsH3).
	Species string `json:"species"`
	// Dimers is the number of consecutive dimers on one row that are
	// opened; the window holds 2·Dimers H sites.
	Dimers int `json:"dimers"`
	// Probability is the chance that the window takes exactly one donor.
	Probability float64 `json:"probability"`
	// Source names where Probability comes from.
	Source string `json:"source,omitempty"`
}

// PhosphineWindow is the single-P window: 3 consecutive dimers on one row
// (6 H sites), with 63 ± 10 % single-donor incorporation for an ideal
// window dosed at room temperature (Ivie et al., arXiv 2105.12074, 2021).
var PhosphineWindow = WindowTemplate{
	Name: "P", Species: "P", Dimers: 3, Probability: 0.63,
	Source: "Ivie et al., arXiv 2105.12074 (2021): 63 ± 10 %",
}

// ArsineWindow is the single-As window: 2 consecutive dimers on one row
// (4 Si sites), with 97 ± 2 % single-donor incorporation (Stock et al.,
// arXiv 2311.05752, 2024). The window size is common practice for arsine
// ("a few dimers" in the paper), from memory.
var ArsineWindow = WindowTemplate{
	Name: "As", Species: "As", Dimers: 2, Probability: 0.97,
	Source: "Stock et al., arXiv 2311.05752 (2024): 97 ± 2 %",
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

// Validate returns an error naming the first bad field of t: an empty
// name or species, a dimer count outside 1..MaxTemplateDimers, or a
// probability outside [0, 1].
func (t WindowTemplate) Validate() error {
	switch {
	case t.Name == "":
		return fmt.Errorf("window template: name is empty")
	case t.Species == "":
		return fmt.Errorf("window template %q: species is empty", t.Name)
	case t.Dimers < 1 || t.Dimers > MaxTemplateDimers:
		return fmt.Errorf("window template %q: dimers %d is outside 1..%d", t.Name, t.Dimers, MaxTemplateDimers)
	case !(t.Probability >= 0 && t.Probability <= 1):
		return fmt.Errorf("window template %q: probability %g is outside [0, 1]", t.Name, t.Probability)
	}
	return nil
}

// Window is one placed dopant window: Template.Dimers consecutive dimers
// on one row of one terrace, starting at FirstDimer. A window placed near
// a terrace edge may reach dimers that do not exist on its terrace (see
// Surface.WindowExists); FirstDimer may then be negative.
type Window struct {
	Template   WindowTemplate
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
// see WindowExists.
func (s *Surface) PlaceWindow(t WindowTemplate, p r2.Point) (w Window, ok bool) {
	ti := s.TerraceAt(p)
	if ti < 0 {
		return Window{}, false
	}
	along, across := s.Frame(ti).ToLocal(p)
	row := clamp(int(math.Round(across/RowSpacing)), 0, s.RowCount(ti)-1)
	first := int(math.Round(along/DimerPitch - float64(t.Dimers-1)/2))
	return Window{Template: t, Terrace: ti, Row: row, FirstDimer: first}, true
}

// WindowExists reports whether every dimer of w exists on w's terrace
// (in the field and on that terrace).
func (s *Surface) WindowExists(w Window) bool {
	if w.Template.Dimers < 1 {
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
