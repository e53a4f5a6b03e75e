package planner

import (
	"cmp"
	"fmt"
	"math"
	"slices"

	"github.com/golang/geo/r1"
	"github.com/golang/geo/r2"

	"dimerpath/lattice"
	"dimerpath/lattice/design"
)

// CoverageRegion is one region as the coverage check sees it: its name
// (matched against Stroke.Region) and its sites.
type CoverageRegion struct {
	Name  string
	Sites *lattice.SiteSet
}

// coverageNeglect is the share of the clearing dose below which one
// stroke segment's contribution to a site is left out of the sum.
const coverageNeglect = 0.01

// coverageExamples is the number of uncovered and overcleared sites the
// check describes in Coverage.Issues.
const coverageExamples = 6

// CheckCoverage proves, independently of how the strokes were made, that
// they clear every site of the regions and nothing outside them beyond
// the edge allowance. It rasterises the strokes' footprints from their
// geometry alone: each straight piece of a stroke's path delivers the
// mode's dose passes·λ with a Gaussian footprint of the width model's σ,
// so a site at along-distance s and across-distance d from a piece of
// length L gets (passes·λ/λ_thr)·exp(-d²/2σ²)·[Φ((L-s)/σ) - Φ(-s/σ)] of
// the clearing dose, summed over every piece of every stroke (pieces
// below 1 % of it are neglected); a site clears at 1 or more. This is
// exactly the width model for a long line: it clears out to w(λ)/2. A
// dwell clears the one site it is parked on (within 0.05 nm).
//
// A painted site that does not clear is uncovered. A cleared site that
// lies in no region is overcleared unless a site of a region whose
// strokes dose it lies within that stroke mode's EdgeAllowanceNM.
//
// The sum is never taken site by site over a region: a range of sites
// (site lines x dimers of one terrace) is bounded from the pieces that
// reach it (a piece parallel or square to the rows is a product of two
// one-peaked factors; a slanted one is bounded by the range's corners),
// classified at once when the bounds agree, and halved along the side
// that leaves them furthest apart otherwise, down to single sites dosed
// exactly. Only sites near a clearing edge are dosed one by one, and the
// sites of a decided range are visited a 64-bit word at a time (a
// cleared range only when it holds an unpainted site, a range known to
// hold no painted site never). Bounds of slanted pieces bracket Φ and
// the Gaussian from tables, which keeps them rigorous; sites are dosed
// with the exact functions. Cost: O(pieces · depth + sites near clearing
// edges + words of the painted rows + overclearing candidates).
func CheckCoverage(surf *lattice.Surface, regions []CoverageRegion, strokes []Stroke, prof Profile) Coverage {
	ck := newCoverageCheck(surf, regions, strokes, &prof)
	ck.run()
	return ck.cov
}

type coverageCheck struct {
	surf     *lattice.Surface
	prof     *Profile
	regions  []CoverageRegion
	strokes  []Stroke
	region   []int // stroke -> region index, -1 when unknown
	painted  *lattice.SiteSet
	dwelled  *lattice.SiteSet
	pieces   [][]piece       // per terrace
	grid     *terraceGrid    // nil on a one-terrace surface
	exist    []rowDimers     // terrace -> the dimers of each row that exist
	allowed  []rowSpans      // [region·terraces + terrace]: allowed spans per row
	rows     []regionExtents // [region·terraces + terrace]: run extents per row
	arena    []float64       // cached factors of decide's nested ranges
	ptrs     []*piece        // active lists of decide's nested ranges
	spanBuf  []r1.Interval   // scratch for allowedSpans
	spanBuf2 []r1.Interval
	slab     []r1.Interval // storage of the cached span lists
	cov      Coverage
	nUnc     int
	nOver    int
}

func newCoverageCheck(surf *lattice.Surface, regions []CoverageRegion, strokes []Stroke, prof *Profile) *coverageCheck {
	ck := &coverageCheck{surf: surf, prof: prof, regions: regions, strokes: strokes,
		dwelled: lattice.NewSiteSet(),
		exist:   make([]rowDimers, len(surf.Terraces)), allowed: make([]rowSpans, len(regions)*len(surf.Terraces)), rows: make([]regionExtents, len(regions)*len(surf.Terraces))}
	for t := range surf.Terraces {
		ck.exist[t] = rowDimers{dimers: make([][]lattice.DimerRange, surf.RowCount(t)), done: make([]bool, surf.RowCount(t))}
	}
	byName := map[string]int{}
	sets := make([]*lattice.SiteSet, len(regions))
	for i, r := range regions {
		byName[r.Name] = i
		sets[i] = r.Sites
	}
	ck.painted = lattice.UnionOf(sets...)
	if len(surf.Terraces) > 1 {
		ck.grid = newTerraceGrid(surf)
	}
	ck.pieces = make([][]piece, len(surf.Terraces))
	ck.region = make([]int, len(strokes))
	for i := range strokes {
		st := &strokes[i]
		ri, ok := byName[st.Region]
		if !ok {
			ri = -1
		}
		ck.region[i] = ri
		if st.Kind == StrokeDwell {
			if len(st.Path) > 0 {
				if site, d, ok := surf.Snap(st.Path[0]); ok && d <= 0.05 {
					ck.dwelled.Add(site)
				}
			}
			continue
		}
		m := prof.AP
		if st.Mode == design.ModeFE {
			m = prof.FE
		}
		ratio := float64(max(st.Passes, 1)) * m.LineDoseCPerCm / m.Width.ThresholdDoseCPerCm
		sigma := m.Width.SigmaNM
		if ratio <= coverageNeglect || !(sigma > 0) {
			continue
		}
		reach := sigma * math.Sqrt(2*math.Log(ratio/coverageNeglect))
		for k := 0; k+1 < len(st.Path); k++ {
			a, b := st.Path[k], st.Path[k+1]
			if a == b {
				continue
			}
			for t := range surf.Terraces {
				if ck.grid != nil && !ck.grid.reaches(t, a, b) {
					continue
				}
				ck.pieces[t] = append(ck.pieces[t], makePiece(surf, t, int32(i), a, b, ratio, sigma, reach))
			}
		}
	}
	return ck
}

// lineY is the across coordinate of site line l: the sites of side l%2
// of row l/2. It rises with l, since the two sides of a row lie 2·HOffset
// apart, less than a row spacing.
func lineY(l int) float64 { return lattice.SiteAcross(l/2, l%2) }

// siteRect is a range of sites of one terrace: site lines [l0, l1), dimers
// [d0, d1), bounded by the box [u0, u1] x [y0, y1] (which holds them and
// may be larger).
type siteRect struct {
	t              int
	l0, l1, d0, d1 int
	u0, u1, y0, y1 float64
	bare           bool // known to hold no painted site (so its parts hold none)
}

func (ck *coverageCheck) run() {
	ck.cov.Sites = ck.painted.Count()
	for t := range ck.surf.Terraces {
		rows, dimers := ck.surf.RowCount(t), ck.surf.DimerCount(t)
		// Everything anything reaches: the painted sites and the pieces'
		// boxes, as site lines and dimers.
		l0, l1, d0, d1 := 2*rows, 0, dimers, 0
		for r := 0; r < ck.painted.RowCount(t) && r < rows; r++ {
			for side := 0; side < 2; side++ {
				if first, last := ck.painted.Row(t, r).DimerExtent(lattice.SideOf(side)); first >= 0 {
					l0, l1 = min(l0, 2*r+side), max(l1, 2*r+side+1)
					d0, d1 = min(d0, first), max(d1, last+1)
				}
			}
		}
		for i := range ck.pieces[t] {
			p := &ck.pieces[t][i]
			l0 = min(l0, max(0, int(math.Floor((p.yLo+lattice.HOffset)/lattice.RowSpacing))*2))
			l1 = max(l1, min(2*rows, (int(math.Ceil((p.yHi-lattice.HOffset)/lattice.RowSpacing))+1)*2))
			d0 = min(d0, max(0, int(math.Floor(p.uLo/lattice.DimerPitch))))
			d1 = max(d1, min(dimers, int(math.Ceil(p.uHi/lattice.DimerPitch))+1))
		}
		if l1 <= l0 || d1 <= d0 {
			continue
		}
		all := make([]*piece, len(ck.pieces[t]))
		for i := range ck.pieces[t] {
			all[i] = &ck.pieces[t][i]
		}
		root := siteRect{t: t, l0: l0, l1: l1, d0: d0, d1: d1,
			u0: lattice.DimerAlong(d0), u1: lattice.DimerAlong(d1 - 1), y0: lineY(l0), y1: lineY(l1 - 1)}
		fu0, fu1, fy0, fy1 := ck.factors(all, root)
		ck.decide(root, all, fu0, fu1, fy0, fy1)
	}
	// A dwell on a site outside every region.
	for site := range ck.dwelled.All() {
		if !ck.painted.Contains(site) {
			ck.over(site, -1, math.Inf(1), nil)
		}
	}
	ck.cov.Uncovered, ck.cov.Overcleared = ck.nUnc, ck.nOver
	ck.cov.OK = ck.nUnc == 0 && ck.nOver == 0
}

// decide classifies every site of r: it bounds the dose over r's box
// from the pieces that reach it (each parallel or square piece is a
// product of a one-peaked factor along and one across; a slanted piece's
// along and across distances are linear, so they are bounded by the
// box's corners), classifies all of r at once when the bounds agree, and
// otherwise halves r across its longer side, down to single sites dosed
// exactly. The factor slices hold each piece's factors at r's box edges,
// so a halving computes only those at the new edge.
func (ck *coverageCheck) decide(r siteRect, all []*piece, gu0, gu1, gy0, gy1 []float64) {
	if ck.grid != nil && !ck.grid.holds(ck.surf, r) {
		return // no site of this terrace in r: nothing to cover or overclear
	}
	// Keep the pieces that reach r's box.
	atop, ptop := len(ck.arena), len(ck.ptrs)
	defer func() { ck.arena, ck.ptrs = ck.arena[:atop], ck.ptrs[:ptop] }()
	active, fu0, fu1, fy0, fy1 := all, gu0, gu1, gy0, gy1
	keep := 0
	for _, p := range all {
		if p.uLo <= r.u1 && p.uHi >= r.u0 && p.yLo <= r.y1 && p.yHi >= r.y0 {
			keep++
		}
	}
	if keep < len(all) {
		ck.grow(4 * keep)
		b := ck.arena[atop:]
		fu0, fu1, fy0, fy1 = b[:keep], b[keep:2*keep], b[2*keep:3*keep], b[3*keep:4*keep]
		for i, p := range all {
			if p.uLo <= r.u1 && p.uHi >= r.u0 && p.yLo <= r.y1 && p.yHi >= r.y0 {
				k := len(ck.ptrs) - ptop
				ck.ptrs = append(ck.ptrs, p)
				fu0[k], fu1[k], fy0[k], fy1[k] = gu0[i], gu1[i], gy0[i], gy1[i]
			}
		}
		active = ck.ptrs[ptop:]
	}
	if r.l1-r.l0 == 1 && r.d1-r.d0 == 1 {
		ck.leaf(r, active)
		return
	}
	lo, hi := 0.0, 0.0
	best, who := 0.0, int32(-1)
	for i, p := range active {
		var plo, phi float64
		if p.kind != pieceSlanted {
			ul, uh := unimodal(fu0[i], fu1[i], r.u0, r.u1, p.uPeak(), p.uTop)
			yl, yh := unimodal(fy0[i], fy1[i], r.y0, r.y1, p.yPeak(), p.yTop)
			plo, phi = p.ratio*ul*yl, p.ratio*uh*yh
		} else {
			plo, phi = p.slantedBounds(r)
		}
		lo += plo
		hi += phi
		if plo > best {
			best, who = plo, p.stroke
		}
	}
	switch {
	case lo >= 1:
		ck.classifyRect(r, active, true, lo, who)
		return
	case hi < 1:
		if !r.bare {
			ck.classifyRect(r, active, false, hi, who)
		}
		return
	}
	// Undecided, but nothing here matters: no painted site, and every site
	// within the edge allowance of a region dosing it (cleared or not,
	// such a site is tolerated). FE edges are mostly this.
	if !r.bare && !ck.paintedIn(r) {
		r.bare = true
	}
	if r.bare && ck.tolerated(r, active) {
		return
	}
	// Halve the side that leaves the bounds furthest apart: the gap the
	// along factors leave against the gap the across factors leave. The
	// halves share the new edge, so one new factor per piece serves both.
	gapU, gapY := 0.0, 0.0
	for i, p := range active {
		if p.kind == pieceSlanted {
			continue
		}
		ul, uh := min(fu0[i], fu1[i]), max(fu0[i], fu1[i])
		yl, yh := min(fy0[i], fy1[i]), max(fy0[i], fy1[i])
		gapU += p.ratio * (uh - ul) * yh
		gapY += p.ratio * uh * (yh - yl)
	}
	a, b := r, r
	n := len(active)
	top := len(ck.arena)
	ck.grow(n)
	fm := ck.arena[top : top+n]
	splitU := gapU > gapY || (gapU == gapY && r.u1-r.u0 >= r.y1-r.y0)
	if (splitU && r.d1-r.d0 > 1) || r.l1-r.l0 == 1 {
		mid := (r.d0 + r.d1) / 2
		us := lattice.DimerEdge(mid)
		a.d1, a.u1 = mid, us
		b.d0, b.u0 = mid, us
		for i, p := range active {
			if p.kind != pieceSlanted {
				fm[i] = p.uFactor(us)
			}
		}
		ck.decide(a, active, fu0, fm, fy0, fy1)
		ck.decide(b, active, fm, fu1, fy0, fy1)
		return
	}
	mid := (r.l0 + r.l1) / 2
	ys := (lineY(mid-1) + lineY(mid)) / 2
	a.l1, a.y1 = mid, ys
	b.l0, b.y0 = mid, ys
	for i, p := range active {
		if p.kind != pieceSlanted {
			fm[i] = p.yFactor(ys)
		}
	}
	ck.decide(a, active, fu0, fu1, fy0, fm)
	ck.decide(b, active, fu0, fu1, fm, fy1)
}

// grow lengthens the arena by n values (not cleared: callers write
// every value they read).
func (ck *coverageCheck) grow(n int) {
	ck.arena = slices.Grow(ck.arena, n)[:len(ck.arena)+n]
}

// lineSides returns the sides of row's sites that r's site lines hold.
func lineSides(r siteRect, row int) lattice.Sides {
	switch {
	case 2*row < r.l0:
		return lattice.Side1
	case 2*row+1 >= r.l1:
		return lattice.Side0
	}
	return lattice.BothSides
}

// paintedIn reports whether r holds a painted site.
func (ck *coverageCheck) paintedIn(r siteRect) bool {
	// A row at a time: both sides' bits where r holds both lines.
	for row := r.l0 / 2; row <= (r.l1-1)/2; row++ {
		w := ck.painted.Row(r.t, row)
		if w == nil {
			continue
		}
		if w.Any(2*r.d0, 2*r.d1, lineSides(r, row)) {
			return true
		}
	}
	return false
}

// leaf doses the one site of r exactly.
func (ck *coverageCheck) leaf(r siteRect, active []*piece) {
	row, side := r.l0/2, r.l0%2
	site := lattice.Site{Terrace: r.t, Row: row, Dimer: r.d0, Side: side}
	u, y := lattice.DimerAlong(r.d0), lineY(r.l0)
	sum, best, who := 0.0, 0.0, int32(-1)
	for _, p := range active {
		e := p.at(u, y)
		sum += e
		if e > best {
			best, who = e, p.stroke
		}
	}
	ck.classify(site, ck.painted.Row(r.t, row), ck.existDimers(r.t, row), sum, who, active)
}

// classifyRect classifies every site of r as cleared or not, line by
// line (see classifyRange).
func (ck *coverageCheck) classifyRect(r siteRect, active []*piece, cleared bool, e float64, who int32) {
	if cleared && (!ck.unpaintedIn(r) || ck.tolerated(r, active)) {
		return // painted sites clear, and the rest (if any) are within the allowance
	}
	for l := r.l0; l < r.l1; l++ {
		row := rowLine{t: r.t, r: l / 2, side: l % 2, pw: ck.painted.Row(r.t, l/2)}
		ck.classifyRange(&row, active, r.d0, r.d1, cleared, e, who)
	}
}

// rowLine is the line of one side's sites of one row.
type rowLine struct {
	t, r, side int
	pw         lattice.RowBits // the row's painted sites
}

// classifyRange classifies every site of dimers [d0, d1) of a row line
// as cleared or not: a painted site not cleared is uncovered, an existing
// unpainted site cleared may be overcleared. Only those sites are
// visited, a word at a time; for a cleared range only the dimers that
// exist on the row's terrace (existDimers) are looked at.
func (ck *coverageCheck) classifyRange(row *rowLine, active []*piece, d0, d1 int, cleared bool, e float64, who int32) {
	if !cleared {
		from, to := 2*d0+row.side, 2*(d1-1)+row.side+1
		if !row.pw.Any(from, to, lattice.SideOf(row.side)) {
			return // nothing painted here to be uncovered
		}
		ck.classifyWords(row, active, d0, d1, false, e, who, nil)
		return
	}
	exist := ck.existDimers(row.t, row.r)
	for _, dr := range exist {
		if lo, hi := max(dr.Lo, d0), min(dr.Hi, d1); lo < hi {
			ck.classifyWords(row, active, lo, hi, true, e, who, exist)
		}
	}
}

// unpaintedIn reports whether r holds an existing site that is not
// painted.
func (ck *coverageCheck) unpaintedIn(r siteRect) bool {
	for row := r.l0 / 2; row <= (r.l1-1)/2; row++ {
		sides := lineSides(r, row)
		w := ck.painted.Row(r.t, row)
		for _, dr := range ck.existDimers(r.t, row) {
			if lo, hi := max(dr.Lo, r.d0), min(dr.Hi, r.d1); lo < hi && !w.All(2*lo, 2*hi, sides) {
				return true
			}
		}
	}
	return false
}

// classifyWords classifies the painted sites (not cleared) or the
// unpainted sites (cleared) of dimers [d0, d1) of a row line, a word at a
// time; for cleared ones those dimers all exist (exist is the row's
// existDimers).
func (ck *coverageCheck) classifyWords(row *rowLine, active []*piece, d0, d1 int, cleared bool, e float64, who int32, exist []lattice.DimerRange) {
	from, to := 2*d0+row.side, 2*(d1-1)+row.side+1 // in-row indices [from, to)
	sides := lattice.SideOf(row.side)
	if !cleared {
		// Painted sites: uncovered when not cleared.
		for i := range row.pw.Sites(from, to, sides) {
			if exist == nil {
				exist = ck.existDimers(row.t, row.r)
			}
			ck.classify(lattice.SiteAt(row.t, row.r, i), row.pw, exist, e, who, active)
		}
		return
	}
	// Unpainted sites: overcleared candidates. They are usually within
	// the edge allowance of the region dosing them most: look that up
	// once for the row.
	var allowed []r1.Interval
	haveAllowed := false
	for i := range row.pw.Gaps(from, to, sides) {
		site := lattice.SiteAt(row.t, row.r, i)
		if !haveAllowed {
			allowed, haveAllowed = ck.allowedFor(who, row.t, row.r), true
		}
		if inSpans(allowed, lattice.DimerAlong(site.Dimer)) {
			continue
		}
		ck.classify(site, row.pw, exist, e, who, active)
	}
}

func (ck *coverageCheck) classify(site lattice.Site, pw lattice.RowBits, exist []lattice.DimerRange, e float64, who int32, active []*piece) {
	painted := pw.Contains(site.Index())
	cleared := e >= 1
	if painted {
		if !cleared && !ck.dwelled.Contains(site) {
			ck.nUnc++
			if ck.nUnc <= coverageExamples {
				ck.cov.Issues = append(ck.cov.Issues, fmt.Sprintf("uncovered: site %v of region %q at %s gets %.2f of the clearing dose",
					site, ck.regionOf(site), fmtPoint(ck.surf.Position(site)), ck.doseAt(site, active)))
			}
		}
		return
	}
	if !cleared || !holdsDimer(exist, site.Dimer) {
		return
	}
	ck.over(site, who, e, active)
}

// doseAt returns the site's dose share summed exactly over the pieces
// (those that reach the range it was classified in): the value an issue
// quotes, where the classification itself may have used a bound.
func (ck *coverageCheck) doseAt(site lattice.Site, active []*piece) float64 {
	u, y := lattice.DimerAlong(site.Dimer), lineY(2*site.Row+site.Side)
	sum := 0.0
	for _, p := range active {
		sum += p.at(u, y)
	}
	return sum
}

// over records a cleared site outside every region unless a region
// whose strokes dose it lies within that mode's edge allowance.
func (ck *coverageCheck) over(site lattice.Site, who int32, e float64, active []*piece) {
	var tried [8]int
	nTried := 0
	try := func(si int32) bool {
		ri := ck.region[si]
		if ri < 0 {
			return false
		}
		for _, x := range tried[:nTried] {
			if x == ri {
				return false
			}
		}
		if nTried < len(tried) {
			tried[nTried] = ri
			nTried++
		}
		allow := ck.prof.AP.EdgeAllowanceNM
		if ck.strokes[si].Mode == design.ModeFE {
			allow = ck.prof.FE.EdgeAllowanceNM
		}
		return allow > 0 && ck.near(ri, site, allow)
	}
	if who >= 0 && try(who) {
		return
	}
	for _, c := range active {
		if try(c.stroke) {
			return
		}
	}
	name := "?"
	if who >= 0 && ck.region[who] >= 0 {
		name = ck.regions[ck.region[who]].Name
	}
	ck.nOver++
	if ck.nOver <= coverageExamples {
		what := "a dwell"
		if !math.IsInf(e, 1) {
			what = fmt.Sprintf("%.2f of the clearing dose", ck.doseAt(site, active))
		}
		ck.cov.Issues = append(ck.cov.Issues, fmt.Sprintf("overcleared: site %v at %s, outside every region and beyond the edge allowance of region %q, gets %s",
			site, fmtPoint(ck.surf.Position(site)), name, what))
	}
}

// rowDimers caches the dimer ranges of each row that exist, computed on
// first use.
type rowDimers struct {
	dimers [][]lattice.DimerRange
	done   []bool
}

func (ck *coverageCheck) regionOf(site lattice.Site) string {
	for _, r := range ck.regions {
		if r.Sites != nil && r.Sites.Contains(site) {
			return r.Name
		}
	}
	return "?"
}

// existDimers returns the dimer ranges of row r of terrace t that exist
// (Surface.RowDimers), computed once per row.
func (ck *coverageCheck) existDimers(t, r int) []lattice.DimerRange {
	e := &ck.exist[t]
	if !e.done[r] {
		e.dimers[r], e.done[r] = ck.surf.RowDimers(nil, t, r), true
	}
	return e.dimers[r]
}

// holdsDimer reports whether dimer d lies in one of the sorted, disjoint
// ranges.
func holdsDimer(rs []lattice.DimerRange, d int) bool {
	i, _ := slices.BinarySearchFunc(rs, d, func(r lattice.DimerRange, d int) int { return cmp.Compare(r.Hi-1, d) })
	return i < len(rs) && rs[i].Lo <= d
}

func fmtPoint(p r2.Point) string { return fmt.Sprintf("(%.2f, %.2f) nm", p.X, p.Y) }
