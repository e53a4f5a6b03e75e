package design

import (
	"fmt"
	"slices"
	"strings"

	"github.com/golang/geo/r2"

	"dimerpath/internal/unionfind"
	"dimerpath/lattice"
)

// Severity says whether a finding stops a design (SeverityError) or
// only asks for a look (SeverityWarning).
type Severity string

const (
	SeverityError   Severity = "error"
	SeverityWarning Severity = "warning"
)

// The design rules, by the name a Finding carries.
const (
	// RuleWindow: a dopant window lies wholly on one terrace, on whole
	// dimers (no site of it erased), and a donor region holds whole
	// dimers only.
	RuleWindow = "window-lattice"
	// RuleWindowSpacing: at least Rules.WindowGapDimers intact dimers
	// between a window and the next window or written site on its row,
	// and no window or other written site in the facing segment (the
	// window's dimers) of the Rules.WindowFacingRows rows on either side.
	RuleWindowSpacing = "window-spacing"
	// RuleFEKeepOut: field-emission regions keep Rules.FEKeepOutNM from
	// atomic-precision features (see Layout.KeepOutClass).
	RuleFEKeepOut = "fe-keepout"
	// RuleScanField: every shape lies inside the field (its sites beyond
	// are not written) and everything inside the scan field.
	RuleScanField = "scan-field"
	// RuleFloating: every gate and lead region is connected to a pad
	// through touching regions (a galvanic path; a tunnel gap passes no
	// DC current); a device region (an island) may instead hang on
	// declared tunnel gaps to regions so connected.
	RuleFloating = "floating"
	// RuleTunnelGap: each declared tunnel gap is within its range.
	RuleTunnelGap = "tunnel-gap"
	// RuleStepRegistry: a terrace that steps from another says whether
	// the step goes up or down (the two lattices lie 0.27 nm apart).
	RuleStepRegistry = "step-registry"
	// RuleSurfaceClearance: with a survey, dopant windows keep
	// Rules.DefectWindowClearanceNM and other atomic-precision features
	// Rules.DefectClearanceNM from the edge of every defect it found, and
	// no atomic-precision feature crosses one of its step edges.
	RuleSurfaceClearance = "surface-clearance"
)

// Rules lists the rule names in the order Check runs them.
var RuleNames = []string{RuleWindow, RuleWindowSpacing, RuleFEKeepOut, RuleScanField, RuleFloating, RuleTunnelGap, RuleStepRegistry, RuleSurfaceClearance}

// MaxFindingsPerRule caps the findings one rule reports; a last finding
// then says how many more there were.
const MaxFindingsPerRule = 50

// TouchNM is the largest gap, in nm, between the site cells of two
// regions that still counts as touching (electrically connected): less
// than one intact dimer (DimerPitch, 0.384 nm), so one intact dimer or
// row separates, yet enough to bridge the small misfit of the lattices
// where a region meets another across a step edge.
const TouchNM = 0.3

// Finding is one design-rule violation or warning.
type Finding struct {
	Rule     string
	Severity Severity
	// Regions names the regions involved, in the variant's order.
	Regions []string
	// AtNM is where to look, in field nm.
	AtNM    r2.Point
	Message string
}

// String formats the finding as one line:
//
//	error  tunnel-gap  [sensor-island, source-lead]  at (1000.0, 1009.2) nm: ...
func (f Finding) String() string {
	return fmt.Sprintf("%-7s %-14s [%s]  at (%.1f, %.1f) nm: %s", f.Severity, f.Rule, strings.Join(f.Regions, ", "), f.AtNM.X, f.AtNM.Y, f.Message)
}

// HasErrors reports whether any finding is an error.
func HasErrors(fs []Finding) bool {
	return slices.ContainsFunc(fs, func(f Finding) bool { return f.Severity == SeverityError })
}

// Check lays out the named variant of d (empty: the first) and runs
// every design rule on it; see Layout.Check. The error is for a variant
// that cannot be laid out (unknown name, invalid design), not for rule
// violations, which are findings.
func Check(d *Design, variant string) ([]Finding, error) {
	l, err := d.Lay(variant)
	if err != nil {
		return nil, err
	}
	return l.Check(), nil
}

// Check runs every design rule on the layout, in the order of RuleNames,
// with the settings of l.Rules. Gaps between regions are found with a
// grid index over the rectangles of their site runs, so the cost grows
// with the regions' outlines, not their site counts.
func (l *Layout) Check() []Finding {
	c := checker{l: l, index: make([]*lattice.CellIndex, len(l.Regions))}
	c.windowLattice()
	c.windowSpacing()
	c.feKeepOut()
	c.scanField()
	c.floating()
	c.tunnelGaps()
	c.stepRegistry()
	c.surfaceClearance()
	return c.findings
}

// stepRegistry warns about each terrace that steps from another without
// saying up or down: it is laid out as a step down, as version 1 files
// were, which puts every site 0.27 nm (a/2) from where it lies if the
// step goes up. It warns only where a region has sites on that terrace.
func (c *checker) stepRegistry() {
	d := c.l.Design
	if d == nil {
		return
	}
	for ti, t := range d.Terraces {
		if t.StepFrom == "" || t.Step != "" || ti >= len(c.l.Surface.Terraces) {
			continue
		}
		var names []string
		for i := range c.l.Regions {
			if c.l.Regions[i].Sites.CountTerrace(ti) > 0 {
				names = append(names, c.name(i))
			}
		}
		if len(names) == 0 {
			continue
		}
		at := c.l.Surface.Terraces[ti].Offset
		if b := c.l.Surface.Terraces[ti].Boundary; len(b) > 0 {
			at = b[0]
		}
		c.add(RuleStepRegistry, SeverityWarning, at,
			fmt.Sprintf("terrace %q steps from %q without saying up or down: its lattice is taken as one step down; if the step goes up every site lies 0.27 nm elsewhere. Add \"step\": \"up\" or \"down\" to terraces[%d] (in the GUI: Design tab, or the Terrace tool)",
				t.Name, t.StepFrom, ti), names...)
	}
}

type checker struct {
	l        *Layout
	index    []*lattice.CellIndex
	findings []Finding
	counts   map[string]int
}

func (c *checker) add(rule string, sev Severity, at r2.Point, msg string, regions ...string) {
	if c.counts == nil {
		c.counts = map[string]int{}
	}
	c.counts[rule]++
	switch n := c.counts[rule]; {
	case n <= MaxFindingsPerRule:
		c.findings = append(c.findings, Finding{Rule: rule, Severity: sev, Regions: regions, AtNM: at, Message: msg})
	case n == MaxFindingsPerRule+1:
		c.findings = append(c.findings, Finding{Rule: rule, Severity: sev, AtNM: at, Message: fmt.Sprintf("more findings of this rule are not listed (the first %d are)", MaxFindingsPerRule)})
	}
}

func (c *checker) cells(i int) *lattice.CellIndex {
	if c.index[i] == nil {
		c.index[i] = lattice.NewCellIndex(c.l.Surface, c.l.Regions[i].Sites)
	}
	return c.index[i]
}

func (c *checker) name(i int) string { return c.l.Regions[i].Region.Name }

// windowLattice checks that windows lie wholly on one terrace and on
// whole dimers.
func (c *checker) windowLattice() {
	surf := c.l.Surface
	for i, rl := range c.l.Regions {
		before := len(c.findings)
		for _, w := range rl.Windows {
			at := surf.WindowCentre(w)
			if !surf.WindowExists(w) {
				c.add(RuleWindow, SeverityError, at, fmt.Sprintf("window %v reaches off terrace %q: its %d dimers are not all on that terrace inside the field",
					w, surf.Terraces[w.Terrace].Name, w.Template.Dimers), c.name(i))
				continue
			}
			kept := 0
			for i := 2 * w.FirstDimer; i < 2*(w.LastDimer()+1); i++ {
				if rl.Sites.Contains(lattice.SiteAt(w.Terrace, w.Row, i)) {
					kept++
				}
			}
			if kept < w.Template.Sites() {
				c.add(RuleWindow, SeverityError, at, fmt.Sprintf("window %v is not whole: %d of its %d sites are erased", w, w.Template.Sites()-kept, w.Template.Sites()), c.name(i))
			}
		}
		if rl.Region.Role != RoleDonor || len(c.findings) > before {
			continue // a broken window already explains a half dimer
		}
		for run := range rl.Sites.Runs() {
			if run.Start%2 != 0 || run.End()%2 != 0 {
				site := lattice.SiteAt(run.Terrace, run.Row, run.Start)
				if run.Start%2 == 0 {
					site = lattice.SiteAt(run.Terrace, run.Row, run.End()-1)
				}
				c.add(RuleWindow, SeverityError, surf.Position(site), fmt.Sprintf("donor region holds half a dimer at %v: a window opens both H of each dimer", site), c.name(i))
				break
			}
		}
	}
}

type placed struct {
	w      lattice.Window
	region int
}

// windowSpacing checks the gap between windows along a row and the
// facing segments of the neighbouring rows. Windows are grouped by row
// and sorted, so the cost is O(n log n) in the number of windows.
func (c *checker) windowSpacing() {
	rs, surf := c.l.Rules, c.l.Surface
	type rowKey struct{ t, r int }
	byRow := map[rowKey][]placed{}
	for i, rl := range c.l.Regions {
		for _, w := range rl.Windows {
			k := rowKey{w.Terrace, w.Row}
			byRow[k] = append(byRow[k], placed{w, i})
		}
	}
	keys := make([]rowKey, 0, len(byRow))
	for k, ws := range byRow {
		slices.SortFunc(ws, func(a, b placed) int { return a.w.FirstDimer - b.w.FirstDimer })
		keys = append(keys, k)
	}
	slices.SortFunc(keys, func(a, b rowKey) int {
		if a.t != b.t {
			return a.t - b.t
		}
		return a.r - b.r
	})
	all := lattice.NewSiteSet()
	for _, rl := range c.l.Regions {
		all.Union(rl.Sites)
	}
	windowSites := lattice.NewSiteSet()
	for _, ws := range byRow {
		for _, p := range ws {
			p.w.AddTo(windowSites)
		}
	}
	others := all.Difference(windowSites) // sites written that belong to no window
	for _, k := range keys {
		ws := byRow[k]
		for j, p := range ws {
			// Along the row: the next window.
			if j+1 < len(ws) {
				q := ws[j+1]
				if gap := q.w.FirstDimer - p.w.LastDimer() - 1; gap < rs.WindowGapDimers {
					at := surf.WindowCentre(p.w).Add(surf.WindowCentre(q.w)).Mul(0.5)
					what := fmt.Sprintf("%d intact dimers", gap)
					if gap < 0 {
						what = fmt.Sprintf("they overlap by %d dimers", -gap)
					}
					c.add(RuleWindowSpacing, SeverityError, at, fmt.Sprintf("windows %v and %v on one row: %s between them, want at least %d", p.w, q.w, what, rs.WindowGapDimers), c.regionNames(p.region, q.region)...)
				}
			}
			// Along the row: other written sites within the gap.
			for _, d := range gapDimers(p.w, rs.WindowGapDimers) {
				site := lattice.Site{Terrace: p.w.Terrace, Row: p.w.Row, Dimer: d}
				if d < 0 || !(others.Contains(site) || others.Contains(surf.Partner(site))) {
					continue
				}
				owner := c.owner(site)
				c.add(RuleWindowSpacing, SeverityError, surf.DimerCentre(site.Terrace, site.Row, d), fmt.Sprintf("dimer %d next to window %v is written by region %q: keep %d intact dimers beside a window", d, p.w, c.name(owner), rs.WindowGapDimers), c.regionNames(p.region, owner)...)
				break
			}
			// Across: other written sites in the facing segment (the
			// window's own dimers) of the neighbouring rows, both ways.
			c.facingSites(p, others)
			// Across: windows in the facing segment of the next rows up
			// (looking one way finds each pair once).
			for dr := 1; dr <= rs.WindowFacingRows; dr++ {
				other := byRow[rowKey{k.t, k.r + dr}]
				lo, _ := slices.BinarySearchFunc(other, p.w.FirstDimer-lattice.MaxTemplateDimers, func(a placed, first int) int { return a.w.FirstDimer - first })
				for _, q := range other[lo:] {
					if q.w.FirstDimer > p.w.LastDimer() {
						break
					}
					if q.w.LastDimer() < p.w.FirstDimer {
						continue
					}
					at := surf.WindowCentre(p.w).Add(surf.WindowCentre(q.w)).Mul(0.5)
					c.add(RuleWindowSpacing, SeverityError, at, fmt.Sprintf("window %v faces window %v %d row(s) away: keep the facing segment of the next %d row(s) free", q.w, p.w, dr, rs.WindowFacingRows), c.regionNames(p.region, q.region)...)
				}
			}
		}
	}
}

// facingSites reports the first site written outside any window in the
// facing segment of p's window (its own dimers) on the
// Rules.WindowFacingRows rows on either side, nearest row first: a
// written site one intact trough away is as close to the window as a
// written dimer beside it along the row.
func (c *checker) facingSites(p placed, others *lattice.SiteSet) {
	rs, surf := c.l.Rules, c.l.Surface
	from, to := 2*p.w.FirstDimer, 2*(p.w.LastDimer()+1)
	for dr := 1; dr <= rs.WindowFacingRows; dr++ {
		for _, row := range []int{p.w.Row - dr, p.w.Row + dr} {
			for i := range others.Row(p.w.Terrace, row).Sites(from, to, lattice.BothSides) {
				site := lattice.SiteAt(p.w.Terrace, row, i)
				owner := c.owner(site)
				c.add(RuleWindowSpacing, SeverityError, surf.Position(site), fmt.Sprintf("window %v faces sites written by region %q %d row(s) away (row %d, dimer %d): keep the facing segment of the next %d row(s) free of written sites",
					p.w, c.name(owner), dr, row, site.Dimer, rs.WindowFacingRows), c.regionNames(p.region, owner)...)
				return
			}
		}
	}
}

// gapDimers returns the dimers within gap of w along its row.
func gapDimers(w lattice.Window, gap int) []int {
	var ds []int
	for g := 1; g <= gap; g++ {
		ds = append(ds, w.FirstDimer-g, w.LastDimer()+g)
	}
	return ds
}

// owner returns the first region holding the site or its partner.
func (c *checker) owner(site lattice.Site) int {
	for i, rl := range c.l.Regions {
		if rl.Sites.Contains(site) || rl.Sites.Contains(c.l.Surface.Partner(site)) {
			return i
		}
	}
	return 0
}

// regionNames returns the names of the regions, in the variant's order,
// once each.
func (c *checker) regionNames(idx ...int) []string {
	slices.Sort(idx)
	idx = slices.Compact(idx)
	names := make([]string, len(idx))
	for k, i := range idx {
		names[k] = c.name(i)
	}
	return names
}

// KeepOutClass says how the FE keep-out rule sees a region: as a
// field-emission region (fe), an atomic-precision feature (ap), or
// neither. A region with dopant windows, or in mode ap, is AP; a region
// in mode fe, or in mode auto with role pad (clearly wide), is FE; any
// other device or donor region is AP. Auto and hybrid leads, gates and
// other regions are neither: the planner may write them either way, and
// a hybrid region's FE fill stays inside its own AP edge.
func KeepOutClass(rl *RegionLayout) (fe, ap bool) {
	r := rl.Region
	switch m := r.EffectiveMode(); {
	case len(rl.Windows) > 0 || m == ModeAP:
		return false, true
	case m == ModeFE || (m == ModeAuto && r.Role == RolePad):
		return true, false
	case r.Role == RoleDevice || r.Role == RoleDonor:
		return false, true
	}
	return false, false
}

func (c *checker) feKeepOut() {
	keep := c.l.Rules.FEKeepOutNM
	if keep <= 0 {
		return
	}
	var fe, ap []int
	for i := range c.l.Regions {
		isFE, isAP := KeepOutClass(&c.l.Regions[i])
		if isFE {
			fe = append(fe, i)
		}
		if isAP {
			ap = append(ap, i)
		}
	}
	for _, f := range fe {
		for _, a := range ap {
			d, at, ok := c.cells(f).GapWithin(c.cells(a), keep)
			if ok && d < keep {
				c.add(RuleFEKeepOut, SeverityError, at, fmt.Sprintf("field-emission region %q comes %.2f nm from atomic-precision region %q; keep at least %g nm", c.name(f), d, c.name(a), keep), c.regionNames(f, a)...)
			}
		}
	}
}

func (c *checker) scanField() {
	l, surf := c.l, c.l.Surface
	field := surf.Field
	scan := r2.RectFromPoints(r2.Point{}, r2.Point{X: l.Rules.ScanFieldNM[0], Y: l.Rules.ScanFieldNM[1]})
	larger := !scan.Contains(field)
	if larger {
		c.add(RuleScanField, SeverityWarning, field.Hi(), fmt.Sprintf("the %g x %g nm field is larger than the %g x %g nm scan field: everything must still lie inside the scan field",
			field.X.Hi, field.Y.Hi, scan.X.Hi, scan.Y.Hi))
	}
	for i, rl := range l.Regions {
		for si := range rl.Region.Shapes {
			if p, ok := outsidePoint(surf, &rl.Region.Shapes[si], field); ok {
				c.add(RuleScanField, SeverityError, p, fmt.Sprintf("shapes[%d] (%s) reaches outside the field; its sites there are not written", si, rl.Region.Shapes[si].Kind), c.name(i))
			}
		}
		if larger && !rl.Bounds.IsEmpty() && !scan.Contains(rl.Bounds) {
			c.add(RuleScanField, SeverityError, rl.Bounds.Hi(), "the region reaches outside the scan field", c.name(i))
		}
	}
	for _, f := range l.Design.Fiducials {
		if p := point(f.AtNM); !scan.ContainsPoint(p) || !field.ContainsPoint(p) {
			c.add(RuleScanField, SeverityError, p, fmt.Sprintf("fiducial %q lies outside the scan field", f.Name))
		}
	}
}

// outsidePoint returns a point of the shape outside the field, if any.
func outsidePoint(surf *lattice.Surface, sh *Shape, field r2.Rect) (r2.Point, bool) {
	if a, ok := sh.Area(); ok {
		b := a.Bounds()
		if field.Contains(b) {
			return r2.Point{}, false
		}
		// The extent's corner farthest outside.
		p := b.Center()
		if b.X.Lo < field.X.Lo {
			p.X = b.X.Lo
		} else if b.X.Hi > field.X.Hi {
			p.X = b.X.Hi
		}
		if b.Y.Lo < field.Y.Lo {
			p.Y = b.Y.Lo
		} else if b.Y.Hi > field.Y.Hi {
			p.Y = b.Y.Hi
		}
		return p, true
	}
	for _, p := range sh.Points {
		if q := point(p); !field.ContainsPoint(q) {
			return q, true
		}
	}
	if sh.Kind == ShapeArray && sh.Array != nil && sh.Array.Of != nil && len(sh.Array.Of.Points) > 0 {
		a := sh.Array
		p := point(a.Of.Points[0])
		if !field.ContainsPoint(p) {
			return p, true
		}
		site, _, ok := surf.Snap(p)
		if !ok {
			return p, true
		}
		for _, corner := range [][2]int{{a.Cols - 1, 0}, {0, a.Rows - 1}, {a.Cols - 1, a.Rows - 1}} {
			q := site
			q.Dimer += corner[0] * a.PitchDimers
			q.Row += corner[1] * a.PitchRows
			if !surf.Valid(q) {
				return surf.DimerCentre(q.Terrace, q.Row, q.Dimer), true
			}
		}
	}
	return r2.Point{}, false
}

// floating joins touching regions with union-find (a galvanic path)
// and reports each gate or lead region whose group holds no pad, and
// each device region (an island) that neither has such a path nor
// hangs, through declared tunnel gaps, on regions that have one. A
// tunnel gap passes no DC current, so it never connects a lead or a
// gate to a pad.
func (c *checker) floating() {
	n := len(c.l.Regions)
	sets := unionfind.New(n)
	find := sets.Find
	for i := range n {
		if c.l.Regions[i].Sites.IsEmpty() {
			continue
		}
		for j := i + 1; j < n; j++ {
			if c.l.Regions[j].Sites.IsEmpty() || find(i) == find(j) {
				continue
			}
			if _, _, ok := c.cells(i).GapWithin(c.cells(j), TouchNM); ok {
				sets.Union(i, j)
			}
		}
	}
	padGroup := map[int]bool{}
	for i, rl := range c.l.Regions {
		if rl.Region.Role == RolePad && !rl.Sites.IsEmpty() {
			padGroup[find(i)] = true
		}
	}
	// Islands may hang on declared tunnel gaps: a second grouping joins
	// the galvanic groups across them, and a device region passes when
	// its group there holds a pad. viaGap marks galvanic groups some
	// tunnel gap links to another, for the message.
	coupled := unionfind.New(n)
	viaGap := map[int]bool{}
	for i := range n {
		coupled.Union(i, find(i))
	}
	for _, g := range c.l.Variant.TunnelGaps {
		a, b := c.regionIndex(g.A), c.regionIndex(g.B)
		if a < 0 || b < 0 {
			continue
		}
		coupled.Union(a, b)
		viaGap[find(a)], viaGap[find(b)] = true, true
	}
	coupledPad := map[int]bool{}
	for i := range n {
		if padGroup[find(i)] {
			coupledPad[coupled.Find(i)] = true
		}
	}
	for i, rl := range c.l.Regions {
		role := rl.Region.Role
		if role != RoleDevice && role != RoleGate && role != RoleLead {
			continue
		}
		g := find(i)
		if padGroup[g] || (role == RoleDevice && coupledPad[coupled.Find(i)]) {
			continue
		}
		at := rl.Bounds.Center()
		if rl.Bounds.IsEmpty() {
			at = r2.Point{}
		}
		var msg string
		switch {
		case role == RoleDevice:
			msg = "device region is floating: no touching region connects it to a pad, and no tunnel gap couples it to a region that has one"
		case viaGap[g]:
			msg = fmt.Sprintf("%s region is floating: only a tunnel gap links it towards a pad, and a tunnel gap passes no DC current; connect it to a pad through touching regions", role)
		default:
			msg = fmt.Sprintf("%s region is floating: no touching region connects it to a pad", role)
		}
		c.add(RuleFloating, SeverityError, at, msg, c.name(i))
	}
}

func (c *checker) regionIndex(name string) int {
	for i, rl := range c.l.Regions {
		if rl.Region.Name == name {
			return i
		}
	}
	return -1
}

// tunnelGaps measures each declared gap: the least distance between the
// two regions' site cells, so n intact dimer rows measure n·RowSpacing.
func (c *checker) tunnelGaps() {
	rs := c.l.Rules
	for _, g := range c.l.Variant.TunnelGaps {
		a, b := c.regionIndex(g.A), c.regionIndex(g.B)
		if a < 0 || b < 0 {
			continue // Validate reports unknown names
		}
		lo, hi := rs.TunnelGapMinNM, rs.TunnelGapMaxNM
		if g.MinNM > 0 {
			lo = g.MinNM
		}
		if g.MaxNM > 0 {
			hi = g.MaxNM
		}
		names := c.regionNames(a, b)
		if c.l.Regions[a].Sites.IsEmpty() || c.l.Regions[b].Sites.IsEmpty() {
			c.add(RuleTunnelGap, SeverityError, r2.Point{}, "a region of the tunnel gap has no sites", names...)
			continue
		}
		limit := 2*hi + 10
		gap, ok := c.cells(a).SpanWithin(c.cells(b), limit)
		d, at, width := gap.NM, gap.At, c.l.Surface.GapText(gap)
		switch {
		case !ok:
			mid := c.l.Regions[a].Bounds.Center().Add(c.l.Regions[b].Bounds.Center()).Mul(0.5)
			c.add(RuleTunnelGap, SeverityError, mid, fmt.Sprintf("the regions are more than %g nm apart; the tunnel gap must be %.2f–%.2f nm", limit, lo, hi), names...)
		case d <= TouchNM:
			c.add(RuleTunnelGap, SeverityError, at, "the regions touch: there is no tunnel gap", names...)
		case d < lo-1e-9:
			c.add(RuleTunnelGap, SeverityError, at, fmt.Sprintf("tunnel gap %s is narrower than %.2f nm", width, lo), names...)
		case d > hi+1e-9:
			c.add(RuleTunnelGap, SeverityError, at, fmt.Sprintf("tunnel gap %s is wider than %.2f nm", width, hi), names...)
		}
	}
}

// GapNM returns the least distance in nm between the site cells of two
// laid-out regions (0 when they touch or overlap), or +Inf when either
// is empty. It is what the tunnel-gap rule measures (lattice.CellIndex).
func (l *Layout) GapNM(a, b *RegionLayout) float64 {
	return l.Gap(a, b).NM
}

// Gap returns the shortest segment between the site cells of two
// laid-out regions (its NM is +Inf when either is empty), which
// Surface.GapText states in nm and in dimer rows or dimers by its
// direction.
func (l *Layout) Gap(a, b *RegionLayout) lattice.Gap {
	return lattice.NewCellIndex(l.Surface, a.Sites).Span(lattice.NewCellIndex(l.Surface, b.Sites))
}
