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

// piece is one straight piece of a stroke's path as seen from one
// terrace: coordinates are along and across that terrace's rows, from its
// lattice offset. A piece parallel to the rows lies at across c from
// along a0 to a1; one square to them at along c from across a0 to a1;
// any other starts at (pu, py) with unit direction (du, dy) and length L.
type piece struct {
	kind      uint8
	stroke    int32
	ratio     float64 // delivered dose over the clearing threshold
	sigma     float64
	c, a0, a1 float64
	pu, py    float64
	du, dy, L float64
	uLo, uHi  float64 // the box beyond which the piece gives less than the neglect share
	yLo, yHi  float64
	// uTop and yTop are the along and across factors at their peaks
	// (uPeak, yPeak), and sTop a slanted piece's band at its middle,
	// computed once.
	uTop, yTop, sTop float64
}

const (
	pieceParallel = iota
	pieceSquare
	pieceSlanted
)

// band is the unimodal factor Φ((hi-x)/σ) - Φ((lo-x)/σ): the share of a
// Gaussian of width σ centred at x that falls on [lo, hi]. Far beyond an
// end (8σ) that end's term is 0 or 1 to within 1e-15 and is skipped.
func band(lo, hi, sigma, x float64) float64 {
	a, b := (lo-x)/sigma, (hi-x)/sigma
	switch {
	case a < -8 && b > 8:
		return 1
	case a < -8:
		return normalCDF(b)
	case b > 8:
		return 1 - normalCDF(a)
	}
	return normalCDF(b) - normalCDF(a)
}

func gauss(d, sigma float64) float64 { x := d / sigma; return math.Exp(-x * x / 2) }

// uFactor and yFactor split a parallel or square piece's dose into a
// factor of the along position and one of the across position.
func (p *piece) uFactor(u float64) float64 {
	if p.kind == pieceParallel {
		return band(p.a0, p.a1, p.sigma, u)
	}
	return gauss(u-p.c, p.sigma)
}

func (p *piece) yFactor(y float64) float64 {
	if p.kind == pieceParallel {
		return gauss(y-p.c, p.sigma)
	}
	return band(p.a0, p.a1, p.sigma, y)
}

// uPeak and yPeak are where the factors peak.
func (p *piece) uPeak() float64 {
	if p.kind == pieceParallel {
		return (p.a0 + p.a1) / 2
	}
	return p.c
}

func (p *piece) yPeak() float64 {
	if p.kind == pieceParallel {
		return p.c
	}
	return (p.a0 + p.a1) / 2
}

// at returns the piece's dose share at (u, y).
func (p *piece) at(u, y float64) float64 {
	if p.kind != pieceSlanted {
		return p.ratio * p.uFactor(u) * p.yFactor(y)
	}
	s := (u-p.pu)*p.du + (y-p.py)*p.dy
	x := (y-p.py)*p.du - (u-p.pu)*p.dy
	return p.ratio * gauss(x, p.sigma) * band(0, p.L, p.sigma, s)
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

// makePiece describes the piece a→b of stroke si on terrace t.
func makePiece(surf *lattice.Surface, t int, si int32, a, b r2.Point, ratio, sigma, reach float64) piece {
	f := surf.Frame(t)
	ua, ya := f.ToLocal(a)
	ub, yb := f.ToLocal(b)
	p := piece{stroke: si, ratio: ratio, sigma: sigma,
		uLo: min(ua, ub) - reach, uHi: max(ua, ub) + reach,
		yLo: min(ya, yb) - reach, yHi: max(ya, yb) + reach}
	switch {
	case math.Abs(ya-yb) < 1e-9:
		p.kind, p.c, p.a0, p.a1 = pieceParallel, ya, min(ua, ub), max(ua, ub)
	case math.Abs(ua-ub) < 1e-9:
		p.kind, p.c, p.a0, p.a1 = pieceSquare, ua, min(ya, yb), max(ya, yb)
	default:
		p.kind = pieceSlanted
		p.L = math.Hypot(ub-ua, yb-ya)
		p.pu, p.py, p.du, p.dy = ua, ya, (ub-ua)/p.L, (yb-ya)/p.L
		p.sTop = band(0, p.L, p.sigma, p.L/2)
		return p
	}
	p.uTop, p.yTop = p.uFactor(p.uPeak()), p.yFactor(p.yPeak())
	return p
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

// factors returns each piece's along factor at the box's two along ends
// and its across factor at the two across ends (unused for slanted
// pieces), from the arena.
func (ck *coverageCheck) factors(ps []*piece, r siteRect) (fu0, fu1, fy0, fy1 []float64) {
	n := len(ps)
	top := len(ck.arena)
	ck.grow(4 * n)
	buf := ck.arena[top:]
	fu0, fu1, fy0, fy1 = buf[:n], buf[n:2*n], buf[2*n:3*n], buf[3*n:4*n]
	for i, p := range ps {
		if p.kind == pieceSlanted {
			continue
		}
		fu0[i], fu1[i] = p.uFactor(r.u0), p.uFactor(r.u1)
		fy0[i], fy1[i] = p.yFactor(r.y0), p.yFactor(r.y1)
	}
	return fu0, fu1, fy0, fy1
}

// unimodal bounds a one-peaked factor over [a, b] from its values there
// and the position and value of its peak.
func unimodal(fa, fb, a, b, peak, top float64) (lo, hi float64) {
	lo, hi = min(fa, fb), max(fa, fb)
	if peak > a && peak < b {
		hi = top
	}
	return lo, hi
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

// tolerated reports whether every site of r lies within the edge
// allowance of one region whose strokes dose r.
func (ck *coverageCheck) tolerated(r siteRect, active []*piece) bool {
	var tried [4]int
	n := 0
next:
	for _, p := range active {
		ri := ck.region[p.stroke]
		if ri < 0 {
			continue
		}
		for _, x := range tried[:n] {
			if x == ri {
				continue next
			}
		}
		if n == len(tried) {
			return false
		}
		tried[n] = ri
		n++
		allow := ck.prof.AP.EdgeAllowanceNM
		if ck.strokes[p.stroke].Mode == design.ModeFE {
			allow = ck.prof.FE.EdgeAllowanceNM
		}
		if allow <= 0 {
			continue
		}
		u0, u1 := lattice.DimerAlong(r.d0), lattice.DimerAlong(r.d1-1)
		ok := true
		for row := r.l0 / 2; row <= (r.l1-1)/2 && ok; row++ {
			sp := ck.allowedCached(ri, r.t, row, allow)
			i := firstReaching(sp, u1)
			ok = i < len(sp) && sp[i].Lo-1e-9 <= u0
		}
		if ok {
			return true
		}
	}
	return false
}

// slantedBounds bounds a slanted piece's dose share over r's box from
// its corners: along and across distances are linear in the box.
func (p *piece) slantedBounds(r siteRect) (lo, hi float64) {
	// Along and across distances are linear in (u, y): their extremes
	// over the box are at the corners each coefficient's sign picks.
	ua, ub := r.u0-p.pu, r.u1-p.pu
	ya, yb := r.y0-p.py, r.y1-p.py
	if p.du < 0 {
		ua, ub = ub, ua
	}
	smin, smax := ua*p.du, ub*p.du
	if p.dy >= 0 {
		smin, smax = smin+ya*p.dy, smax+yb*p.dy
	} else {
		smin, smax = smin+yb*p.dy, smax+ya*p.dy
	}
	// x = (y-py)·du - (u-pu)·dy
	xa, xb := r.y0-p.py, r.y1-p.py
	if p.du < 0 {
		xa, xb = xb, xa
	}
	xmin, xmax := xa*p.du, xb*p.du
	if p.dy >= 0 {
		xmin, xmax = xmin-(r.u1-p.pu)*p.dy, xmax-(r.u0-p.pu)*p.dy
	} else {
		xmin, xmax = xmin-(r.u0-p.pu)*p.dy, xmax-(r.u1-p.pu)*p.dy
	}
	dfar := max(math.Abs(xmin), math.Abs(xmax))
	dnear := 0.0
	if xmin > 0 || xmax < 0 {
		dnear = min(math.Abs(xmin), math.Abs(xmax))
	}
	// The band at the ends of the along range, bracketed from tables
	// (the band is one-peaked, so its least value over the range is at an
	// end and its greatest at an end or the peak).
	loMin, hiMin := bandBounds(p.L, p.sigma, smin)
	loMax, hiMax := bandBounds(p.L, p.sigma, smax)
	fl, fh := min(loMin, loMax), max(hiMin, hiMax)
	if p.L/2 > smin && p.L/2 < smax {
		fh = p.sTop
	}
	gl, _ := gaussBounds(dfar / p.sigma)
	_, gh := gaussBounds(dnear / p.sigma)
	return p.ratio * gl * fl, p.ratio * gh * fh
}

// Tables for the bounds of slanted pieces: Φ(x) and exp(-x²/2) at steps
// of 1/boundSteps, so that a bound costs two lookups instead of erfc and
// exp. Both functions are monotone between table points, so the values at
// the points on either side bracket the value between them; the bounds
// stay rigorous and are looser by at most one step's change.
const boundSteps = 128

var phiTable, gaussTable = boundTables()

func boundTables() (phi, gauss []float64) {
	phi = make([]float64, 16*boundSteps+1) // x from -8 to 8
	for k := range phi {
		phi[k] = normalCDF(-8 + float64(k)/boundSteps)
	}
	gauss = make([]float64, 40*boundSteps+1) // x from 0 to 40
	for k := range gauss {
		x := float64(k) / boundSteps
		gauss[k] = math.Exp(-x * x / 2)
	}
	return phi, gauss
}

// bracket returns table indices k, k+1 whose points x0 + k/boundSteps lie
// at or below and at or above x, for x inside the table.
func bracket(x, x0 float64, n int) (int, int) {
	k := min(int((x-x0)*boundSteps), n-1)
	if x0+float64(k)/boundSteps > x {
		k--
	}
	if k+1 < n && x0+float64(k+1)/boundSteps <= x {
		k++
	}
	k = max(k, 0)
	if x0+float64(k)/boundSteps == x {
		return k, k
	}
	return k, min(k+1, n-1)
}

// phiBounds returns lo <= Φ(x) <= hi.
func phiBounds(x float64) (lo, hi float64) {
	t := phiTable
	switch {
	case x <= -8:
		return 0, t[0]
	case x >= 8:
		return t[len(t)-1], 1
	}
	a, b := bracket(x, -8, len(t))
	return t[a], t[b]
}

// gaussBounds returns lo <= exp(-x²/2) <= hi for x >= 0.
func gaussBounds(x float64) (lo, hi float64) {
	t := gaussTable
	if x >= 40 {
		return 0, t[len(t)-1]
	}
	a, b := bracket(x, 0, len(t))
	return t[b], t[a]
}

// bandBounds returns lo <= band(0, L, σ, s) <= hi: the share Φ((L-s)/σ) -
// Φ(-s/σ).
func bandBounds(L, sigma, s float64) (lo, hi float64) {
	bl, bh := phiBounds((L - s) / sigma)
	al, ah := phiBounds(-s / sigma)
	return max(0, bl-ah), min(1, bh-al)
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

// allowedFor returns the allowed spans (see allowedSpans) on row r of
// terrace t for the region of stroke si, within its mode's edge
// allowance; nil when there is none.
func (ck *coverageCheck) allowedFor(si int32, t, r int) []r1.Interval {
	if si < 0 || ck.region[si] < 0 {
		return nil
	}
	allow := ck.prof.AP.EdgeAllowanceNM
	if ck.strokes[si].Mode == design.ModeFE {
		allow = ck.prof.FE.EdgeAllowanceNM
	}
	if allow <= 0 {
		return nil
	}
	ri := ck.region[si]
	return ck.allowedCached(ri, t, r, allow)
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

// rowSpans caches one sorted span list per row, computed on first use.
type rowSpans struct {
	spans [][]r1.Interval
	done  []bool
}

func newRowSpans(rows int) rowSpans {
	return rowSpans{spans: make([][]r1.Interval, rows), done: make([]bool, rows)}
}

// rowDimers caches the dimer ranges of each row that exist, computed on
// first use.
type rowDimers struct {
	dimers [][]lattice.DimerRange
	done   []bool
}

// keep copies sp into the check's span storage, which cached lists share
// (a few allocations in all instead of one per row).
func (ck *coverageCheck) keep(sp []r1.Interval) []r1.Interval {
	if len(sp) > cap(ck.slab)-len(ck.slab) {
		ck.slab = make([]r1.Interval, 0, max(4096, len(sp)))
	}
	start := len(ck.slab)
	ck.slab = append(ck.slab, sp...)
	return ck.slab[start:len(ck.slab):len(ck.slab)]
}

// allowedCached returns allowedSpans(ri, t, r, dist), computed once per
// row and region (dist is the same for every call with one region's
// mode).
func (ck *coverageCheck) allowedCached(ri, t, r int, dist float64) []r1.Interval {
	rows := &ck.allowed[ri*len(ck.surf.Terraces)+t]
	if rows.spans == nil {
		*rows = newRowSpans(ck.surf.RowCount(t))
	}
	if r >= len(rows.spans) {
		return ck.keep(ck.allowedSpans(ri, t, r, dist))
	}
	if !rows.done[r] {
		rows.spans[r], rows.done[r] = ck.keep(ck.allowedSpans(ri, t, r, dist)), true
	}
	return rows.spans[r]
}

// near reports whether region ri has a site within dist of the site q
// (between site positions). On q's own terrace it looks the answer up
// in the row's allowed spans, built once per row and region: the along
// intervals within dist of a region site on the rows within dist. Other
// terraces are searched site by site.
func (ck *coverageCheck) near(ri int, q lattice.Site, dist float64) bool {
	set := ck.regions[ri].Sites
	if set == nil {
		return false
	}
	sp := ck.allowedCached(ri, q.Terrace, q.Row, dist)
	if inSpans(sp, lattice.DimerAlong(q.Dimer)) {
		return true
	}
	if len(ck.surf.Terraces) == 1 {
		return false
	}
	p := ck.surf.Position(q)
	for t := 0; t < set.TerraceCount() && t < len(ck.surf.Terraces); t++ {
		if t != q.Terrace && ck.nearOn(set, t, p, dist) {
			return true
		}
	}
	return false
}

// allowedSpans returns the along intervals of row r of terrace t whose
// dimer centres lie within dist of a site of region ri on the rows of t
// within dist (the across distance counted between row centres less
// twice HOffset, a slight overestimate of nearness by at most HOffset).
func (ck *coverageCheck) allowedSpans(ri, t, r int, dist float64) []r1.Interval {
	rows := ck.regionRows(ri, t)
	// Each row's extents are sorted and disjoint: merge them into the
	// union row by row (a row with every other site painted has a run per
	// site, so sorting them all would cost more).
	acc, next := ck.spanBuf[:0], ck.spanBuf2[:0]
	k := int(math.Ceil((dist + 2*lattice.HOffset) / lattice.RowSpacing))
	for rr := max(0, r-k); rr <= r+k && rr < len(rows); rr++ {
		dy := max(0, lattice.RowAcross(max(rr-r, r-rr))-2*lattice.HOffset)
		if dy > dist || len(rows[rr]) == 0 {
			continue
		}
		next = unionWidened(next[:0], acc, rows[rr], math.Sqrt(dist*dist-dy*dy))
		acc, next = next, acc
	}
	ck.spanBuf, ck.spanBuf2 = acc, next
	return acc
}

// unionWidened appends to dst the union of the sorted, disjoint spans a
// and the sorted spans b each widened by h at both ends, joining spans
// that meet, and returns dst.
func unionWidened(dst, a, b []r1.Interval, h float64) []r1.Interval {
	add := func(s r1.Interval) {
		if n := len(dst); n > 0 && s.Lo <= dst[n-1].Hi {
			dst[n-1].Hi = max(dst[n-1].Hi, s.Hi)
			return
		}
		dst = append(dst, s)
	}
	i, j := 0, 0
	for i < len(a) || j < len(b) {
		if j == len(b) || (i < len(a) && a[i].Lo <= b[j].Lo-h) {
			add(a[i])
			i++
		} else {
			add(r1.Interval{Lo: b[j].Lo - h, Hi: b[j].Hi + h})
			j++
		}
	}
	return dst
}

// regionRows returns, per row of terrace t, the along extents (dimer
// centres, nm from the terrace offset) of region ri's runs, computed once.
func (ck *coverageCheck) regionRows(ri, t int) [][]r1.Interval {
	e := &ck.rows[ri*len(ck.surf.Terraces)+t]
	if e.done {
		return e.rows
	}
	// The rows' extents share one slice, about one run per row (slices
	// of it stay valid when it grows).
	set := ck.regions[ri].Sites
	rows := make([][]r1.Interval, set.RowCount(t))
	all := make([]r1.Interval, 0, len(rows))
	for r := range rows {
		start := len(all)
		all = appendRunExtents(all, set.Row(t, r))
		if len(all) > start {
			rows[r] = all[start:len(all):len(all)]
		}
	}
	e.rows, e.done = rows, true
	return rows
}

// regionExtents caches regionRows for one region and terrace.
type regionExtents struct {
	rows [][]r1.Interval
	done bool
}

// appendRunExtents appends, for each maximal run of a row's sites, the
// along extent of its dimer centres, from its first site's dimer to its
// last site's, and returns dst.
func appendRunExtents(dst []r1.Interval, w lattice.RowBits) []r1.Interval {
	for start, end := range w.Runs() {
		dst = append(dst, r1.Interval{Lo: lattice.DimerAlong(start / 2), Hi: lattice.DimerAlong((end - 1) / 2)})
	}
	return dst
}

// nearOn reports whether set has a site on terrace t within dist of p.
func (ck *coverageCheck) nearOn(set *lattice.SiteSet, t int, p r2.Point, dist float64) bool {
	al, ac := ck.surf.Frame(t).ToLocal(p)
	rowLo := max(0, int(math.Floor((ac-dist-lattice.HOffset)/lattice.RowSpacing)))
	rowHi := min(set.RowCount(t)-1, int(math.Ceil((ac+dist+lattice.HOffset)/lattice.RowSpacing)))
	for r := rowLo; r <= rowHi; r++ {
		w := set.Row(t, r)
		if w == nil {
			continue
		}
		dy := max(0, math.Abs(ac-lattice.RowAcross(r))-lattice.HOffset)
		if dy > dist {
			continue
		}
		h := math.Sqrt(dist*dist - dy*dy)
		from, to := lattice.DimersIn(r1.Interval{Lo: al - h, Hi: al + h}).Sites()
		if w.Any(from, to, lattice.BothSides) {
			return true
		}
	}
	return false
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

// inSpans reports whether x lies in one of the sorted, disjoint spans
// (to within 1e-9 nm).
func inSpans(sp []r1.Interval, x float64) bool {
	i := firstReaching(sp, x)
	return i < len(sp) && x >= sp[i].Lo-1e-9
}

// firstReaching returns the first of the sorted, disjoint spans whose end
// reaches x (to within 1e-9 nm), or len(sp).
func firstReaching(sp []r1.Interval, x float64) int { return lattice.SearchIntervals(sp, x-1e-9) }

func fmtPoint(p r2.Point) string { return fmt.Sprintf("(%.2f, %.2f) nm", p.X, p.Y) }

// terraceGrid marks, in cells of terraceCellNM, where each terrace of a
// many-terrace surface lies (with a one-cell margin), so that a stroke
// piece is only rasterised onto the rows of terraces it comes near.
type terraceGrid struct {
	nx, ny int
	cells  [][]bool // [terrace][cell]
}

const terraceCellNM = 20.0

func newTerraceGrid(surf *lattice.Surface) *terraceGrid {
	g := &terraceGrid{nx: int(math.Ceil(surf.Width()/terraceCellNM)) + 1, ny: int(math.Ceil(surf.Height()/terraceCellNM)) + 1}
	g.cells = make([][]bool, len(surf.Terraces))
	raw := make([][]bool, len(surf.Terraces))
	for t := range raw {
		raw[t] = make([]bool, g.nx*g.ny)
		g.cells[t] = make([]bool, g.nx*g.ny)
	}
	// Each cell is sampled at its corners, edge midpoints and centre:
	// points every half cell, each shared by the cells that meet there.
	sx, sy := 2*g.nx+1, 2*g.ny+1
	at := make([]int, sx*sy)
	for j := range sy {
		for i := range sx {
			p := r2.Point{X: min(float64(i)*(terraceCellNM/2), surf.Width()), Y: min(float64(j)*(terraceCellNM/2), surf.Height())}
			at[j*sx+i] = surf.TerraceAt(p)
		}
	}
	for j := 0; j < g.ny; j++ {
		for i := 0; i < g.nx; i++ {
			for dj := range 3 {
				for di := range 3 {
					if t := at[(2*j+dj)*sx+2*i+di]; t >= 0 {
						raw[t][j*g.nx+i] = true
					}
				}
			}
		}
	}
	for t := range raw {
		for j := 0; j < g.ny; j++ {
			for i := 0; i < g.nx; i++ {
				if !raw[t][j*g.nx+i] {
					continue
				}
				for dj := -1; dj <= 1; dj++ {
					for di := -1; di <= 1; di++ {
						if ii, jj := i+di, j+dj; ii >= 0 && jj >= 0 && ii < g.nx && jj < g.ny {
							g.cells[t][jj*g.nx+ii] = true
						}
					}
				}
			}
		}
	}
	return g
}

// reaches reports whether the piece a→b comes near terrace t: some point
// of it, sampled every half cell, lies in a cell marked for t (cells
// carry a one-cell margin of 20 nm, more than any footprint's reach).
func (g *terraceGrid) reaches(t int, a, b r2.Point) bool {
	L := b.Sub(a).Norm()
	steps := max(1, int(math.Ceil(L/(terraceCellNM/2))))
	for k := 0; k <= steps; k++ {
		p := a.Add(b.Sub(a).Mul(float64(k) / float64(steps)))
		if g.marked(t, int(math.Floor(p.X/terraceCellNM)), int(math.Floor(p.Y/terraceCellNM))) {
			return true
		}
	}
	return false
}

func (g *terraceGrid) marked(t, i, j int) bool {
	return i >= 0 && j >= 0 && i < g.nx && j < g.ny && g.cells[t][j*g.nx+i]
}

// holds reports whether the box of r may hold a site of its terrace.
func (g *terraceGrid) holds(surf *lattice.Surface, r siteRect) bool {
	box := surf.Frame(r.t).FieldRect(r1.Interval{Lo: r.u0, Hi: r.u1}, r1.Interval{Lo: r.y0, Hi: r.y1})
	i0, i1 := int(math.Floor(box.X.Lo/terraceCellNM)), int(math.Floor(box.X.Hi/terraceCellNM))
	j0, j1 := int(math.Floor(box.Y.Lo/terraceCellNM)), int(math.Floor(box.Y.Hi/terraceCellNM))
	for j := max(j0, 0); j <= j1 && j < g.ny; j++ {
		for i := max(i0, 0); i <= i1 && i < g.nx; i++ {
			if g.cells[r.t][j*g.nx+i] {
				return true
			}
		}
	}
	return false
}
