package design

import (
	"fmt"
	"math"
	"slices"
	"strings"

	"dimerpath/lattice"
)

// Difference is one way a variant's layout differs from another's, for
// telling variants apart in a comparison: what (a tunnel gap, a region,
// the dopant windows) and its value in each, as text ("6.91 nm (9.0
// dimer rows across the rows)" against "9.22 nm (12.0 dimer rows across
// the rows)"); a value is "none" where that variant lacks the thing.
type Difference struct {
	What string
	From string // in the variant compared against
	To   string // in this variant
}

// String formats d as "what: from → to".
func (d Difference) String() string { return d.What + ": " + d.From + " → " + d.To }

// Differences lists how l differs from base, two layouts of one design:
// first the declared tunnel gaps (presence, measured width, range, width
// tolerance), then the couplings (presence, tolerance), then each region
// in l's order and those only base has (presence, role, mode, dopant
// and the step of a region without, tolerance, H sites, extent,
// position, sites), then the count of dopant windows by species. Identical layouts give none. Cost:
// a gap measurement per declared gap and a comparison of each region's
// sites.
func Differences(base, l *Layout) []Difference {
	var out []Difference
	add := func(what, from, to string) { out = append(out, Difference{What: what, From: from, To: to}) }

	// Tunnel gaps, by their pair of regions in either order.
	type pair struct{ a, b string }
	key := func(g TunnelGap) pair {
		if g.B < g.A {
			return pair{g.B, g.A}
		}
		return pair{g.A, g.B}
	}
	baseGaps := map[pair]TunnelGap{}
	for _, g := range base.Variant.TunnelGaps {
		baseGaps[key(g)] = g
	}
	seen := map[pair]bool{}
	gapText := func(lay *Layout, g TunnelGap) string {
		a, b := lay.Region(g.A), lay.Region(g.B)
		if a == nil || b == nil {
			return "declared"
		}
		gap := lay.Gap(a, b)
		if math.IsInf(gap.NM, 1) {
			return "a region without sites"
		}
		s := lay.Surface.GapText(gap)
		if g.MinNM > 0 || g.MaxNM > 0 {
			s += fmt.Sprintf(", range %s–%s nm", rangeEnd(g.MinNM), rangeEnd(g.MaxNM))
		}
		if g.ToleranceNM > 0 {
			s += fmt.Sprintf(", width ±%.2f nm", g.ToleranceNM)
		}
		return s
	}
	for _, g := range l.Variant.TunnelGaps {
		k := key(g)
		seen[k] = true
		what := "tunnel gap " + g.A + " – " + g.B
		to := gapText(l, g)
		if bg, ok := baseGaps[k]; !ok {
			add(what, "none", to)
		} else if from := gapText(base, bg); from != to {
			add(what, from, to)
		}
	}
	for _, g := range base.Variant.TunnelGaps {
		if !seen[key(g)] {
			add("tunnel gap "+g.A+" – "+g.B, gapText(base, g), "none")
		}
	}

	// Couplings of relative placement, by their pair in either order.
	baseCouplings := map[pair]Coupling{}
	for _, c := range base.Variant.Couplings {
		baseCouplings[key(TunnelGap{A: c.A, B: c.B})] = c
	}
	coupled := map[pair]bool{}
	for _, c := range l.Variant.Couplings {
		k := key(TunnelGap{A: c.A, B: c.B})
		coupled[k] = true
		what := "coupling " + c.A + " – " + c.B
		to := fmt.Sprintf("±%.2f nm", c.ToleranceNM)
		if bc, ok := baseCouplings[k]; !ok {
			add(what, "none", to)
		} else if from := fmt.Sprintf("±%.2f nm", bc.ToleranceNM); from != to {
			add(what, from, to)
		}
	}
	for _, c := range base.Variant.Couplings {
		if !coupled[key(TunnelGap{A: c.A, B: c.B})] {
			add("coupling "+c.A+" – "+c.B, fmt.Sprintf("±%.2f nm", c.ToleranceNM), "none")
		}
	}

	// Regions, by name.
	for i := range l.Regions {
		r := &l.Regions[i]
		what := "region " + r.Region.Name
		b := base.Region(r.Region.Name)
		if b == nil {
			add(what, "none", regionSummary(l.Surface, r))
			continue
		}
		var from, to []string
		diff := func(name, f, t string) {
			if f != t {
				from, to = append(from, name+" "+f), append(to, name+" "+t)
			}
		}
		diff("role", b.Region.Role.String(), r.Region.Role.String())
		diff("mode", b.Region.EffectiveMode().String(), r.Region.EffectiveMode().String())
		diff("dopant", dopantText(base, b.Region), dopantText(l, r.Region))
		diff("tolerance", fmt.Sprintf("±%.2f nm", b.ToleranceNM), fmt.Sprintf("±%.2f nm", r.ToleranceNM))
		nb, nr := b.Sites.Count(), r.Sites.Count()
		diff("H sites", fmt.Sprint(nb), fmt.Sprint(nr))
		diff("windows", fmt.Sprint(len(b.Windows)), fmt.Sprint(len(r.Windows)))
		diff("extent", extentText(base.Surface, b), extentText(l.Surface, r))
		if len(from) == 0 && !b.Bounds.IsEmpty() && !r.Bounds.IsEmpty() {
			if d := r.Bounds.Center().Sub(b.Bounds.Center()); d.Norm() > 1e-6 {
				from, to = append(from, "where it was"), append(to, fmt.Sprintf("moved by (%+.2f, %+.2f) nm", d.X, d.Y))
			}
		}
		if len(from) == 0 && !b.Sites.Equal(r.Sites) {
			from, to = append(from, "its sites"), append(to, fmt.Sprintf("other sites (%d H sites either way)", nr))
		}
		if len(from) > 0 {
			add(what, strings.Join(from, ", "), strings.Join(to, ", "))
		}
	}
	for i := range base.Regions {
		if b := &base.Regions[i]; l.Region(b.Region.Name) == nil {
			add("region "+b.Region.Name, regionSummary(base.Surface, b), "none")
		}
	}

	// Dopant windows, in all and by species.
	if f, t := windowCounts(base), windowCounts(l); f != t {
		add("dopant windows", f, t)
	}
	return out
}

func rangeEnd(v float64) string {
	if v <= 0 {
		return "rule"
	}
	return fmt.Sprintf("%.2f", v)
}

// dopantText is Design.DopantText of the layout's design (the region's
// own species without one).
func dopantText(l *Layout, r *Region) string {
	if l.Design == nil {
		return (&Design{}).DopantText(r)
	}
	return l.Design.DopantText(r)
}

// extentText is the size of the area a region writes, the bounding box
// of its sites' lattice cells: "19.97 × 11.52 nm".
func extentText(surf *lattice.Surface, r *RegionLayout) string {
	if r.Bounds.IsEmpty() {
		return "empty"
	}
	sz := lattice.NewCellIndex(surf, r.Sites).Bounds().Size()
	return fmt.Sprintf("%.2f × %.2f nm", sz.X, sz.Y)
}

// regionSummary describes a region alone: "device, 1560 H sites, 19.59 ×
// 11.11 nm".
func regionSummary(surf *lattice.Surface, r *RegionLayout) string {
	s := fmt.Sprintf("%s, %d H sites, %s", r.Region.Role, r.Sites.Count(), extentText(surf, r))
	if n := len(r.Windows); n > 0 {
		s += fmt.Sprintf(", %d windows", n)
	}
	return s
}

// windowCounts is "2 (As 1, P 1)": the layout's windows in all and by
// species, species in name order.
func windowCounts(l *Layout) string {
	by := map[string]int{}
	n := 0
	for _, r := range l.Regions {
		for _, w := range r.Windows {
			by[w.Template.Species]++
			n++
		}
	}
	if n == 0 {
		return "0"
	}
	names := make([]string, 0, len(by))
	for s := range by {
		names = append(names, s)
	}
	slices.Sort(names)
	parts := make([]string, len(names))
	for i, s := range names {
		parts[i] = fmt.Sprintf("%s %d", s, by[s])
	}
	return fmt.Sprintf("%d (%s)", n, strings.Join(parts, ", "))
}
