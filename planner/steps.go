package planner

import (
	"fmt"
	"slices"
	"sort"
	"strings"

	"dimerpath/lattice/design"
)

// An open dangling-bond window takes whichever precursor reaches it
// first: the chemistry of hydrogen-resist lithography is selective only
// through the resist (Schofield et al., PRL 91, 136104 (2003): the
// precursor adsorbs on the depassivated sites alone), so two species need
// two lithography steps, each followed by its own dose and an
// incorporation anneal that closes its windows before the next species'
// dose (common practice; Stock et al., arXiv 2311.05752, place arsenic
// in windows opened for it alone).

// stepWork is one lithography step as the builder works on it.
type stepWork struct {
	species string // "" for a step without dopant (a design with none)
	strokes []int  // indices into builder.strokes
	first   int    // the fiducial the step starts from
	order   []int  // writing order (stroke indices): the route's, then the final one (keepForTimeline)
	jobs    []job
	sg      *segmenter
	starts  []int
	kinds   []RegistrationKind
	forced  []int
	seg0    int // index of its first segment in the plan
	// features are its atomic-precision features, verified after their
	// last stroke.
	features []feature
}

// strokeSpecies returns, for every stroke, the species of the step that
// writes it: a window's template species, else its region's dopant; a
// region without dopant is written in the step it names.
func (b *builder) strokeSpecies(windows []Window) []string {
	regionOf := map[string]*regionWork{}
	for _, r := range b.regions {
		regionOf[r.name] = r
	}
	out := make([]string, len(b.strokes))
	for i, s := range b.strokes {
		if s.Window >= 0 {
			out[i] = windows[s.Window].Species
			continue
		}
		out[i] = regionOf[s.Region].dopant
	}
	return out
}

// assignSteps orders the species the strokes need into lithography
// steps (the profile's process.species_order first, any others after in
// name order, with a warning), and puts every stroke in its step. A
// region without dopant goes to the step it names (an error when no step
// of the variant writes that species) or, naming none, to the first.
func (b *builder) assignSteps(windows []Window) ([]*stepWork, error) {
	species := b.strokeSpecies(windows)
	present := map[string]bool{}
	for _, sp := range species {
		if sp != design.NoDopant {
			present[sp] = true
		}
	}
	known := map[string]bool{}
	for _, t := range b.lay.Templates {
		known[t.Species] = true
	}
	var order []string
	for i, sp := range b.prof.Process.SpeciesOrder {
		switch {
		case present[sp]:
			order = append(order, sp)
		case !known[sp]:
			b.warnings = append(b.warnings, fmt.Sprintf("process.species_order[%d] = %q: no window template of the design has this species; ignored", i, sp))
		}
	}
	var rest []string
	for sp := range present {
		if !slices.Contains(order, sp) {
			rest = append(rest, sp)
		}
	}
	sort.Strings(rest)
	if len(rest) > 0 {
		after := "first"
		if len(order) > 0 {
			after = "after " + strings.Join(order, ", ")
		}
		b.warnings = append(b.warnings, fmt.Sprintf("species %s not in the profile's process.species_order: assumed written %s, in name order", strings.Join(rest, ", "), after))
		order = append(order, rest...)
	}
	if len(order) == 0 {
		order = []string{""} // nothing to dope: one lithography step
	}
	steps := make([]*stepWork, len(order))
	index := map[string]int{}
	for i, sp := range order {
		steps[i] = &stepWork{species: sp}
		index[sp] = i
	}
	vi := slices.IndexFunc(b.d.Variants, func(v design.Variant) bool { return v.Name == b.lay.Variant.Name })
	noted := map[string]bool{}
	// Each stroke's step first, then each step's list at its size (grown
	// by appends, the lists of 4·10^6 strokes cost nearly a second).
	stepOf := make([]int32, len(species))
	count := make([]int, len(steps))
	for i, sp := range species {
		k, ok := index[sp]
		if sp == design.NoDopant {
			r := b.regionByName(b.strokes[i].Region)
			named := r.stepNamed
			switch {
			case named == "":
				k = 0
				if len(steps) > 1 && !noted[r.name] {
					noted[r.name] = true
					b.warnings = append(b.warnings, fmt.Sprintf("region %q receives no dopant and names no lithography_step: written in the first step (%s)", r.name, stepName(steps[0].species)))
				}
			default:
				if k, ok = index[named]; !ok {
					var names []string
					for _, s := range steps {
						names = append(names, stepName(s.species))
					}
					return nil, fmt.Errorf("planner: variants[%d].regions[%d].lithography_step = %q: no lithography step of variant %q writes %s (its steps: %s)",
						vi, r.index, named, b.lay.Variant.Name, named, strings.Join(names, ", "))
				}
			}
		}
		stepOf[i] = int32(k)
		count[k]++
	}
	for k, st := range steps {
		if count[k] > 0 {
			st.strokes = make([]int, 0, count[k])
		}
	}
	for i, k := range stepOf {
		steps[k].strokes = append(steps[k].strokes, i)
	}
	return steps, nil
}

// stepName names a lithography step by its species.
func stepName(species string) string {
	if species == "" {
		return "no dopant"
	}
	return species
}

func (b *builder) regionByName(name string) *regionWork {
	for _, r := range b.regions {
		if r.name == name {
			return r
		}
	}
	return nil
}
