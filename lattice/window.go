package lattice

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

// Window is one placed dopant window: Template.Dimers consecutive dimers
// on one row, starting at FirstDimer.
type Window struct {
	Template   WindowTemplate
	Terrace    int
	Row        int
	FirstDimer int
}

// AddTo adds the window's H sites to set.
func (w Window) AddTo(set *SiteSet) {
	set.AddRun(w.Terrace, w.Row, 2*w.FirstDimer, 2*(w.FirstDimer+w.Template.Dimers))
}
