package planner

import (
	"cmp"
	"fmt"
	"math"
	"slices"
	"sort"

	"github.com/golang/geo/r2"

	"dimerpath/lattice"
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
// lies in no region is overcleared when no site of the region of the
// stroke that gives it the most dose lies within that mode's
// EdgeAllowanceNM.
//
// The sum is worked out row by row and range by range: over a range of a
// row the dose of each piece is bounded (a piece along the row varies
// only through its along factor, which has one maximum; other pieces are
// bounded by their nearest approach), the whole range is classified at
// once when the bounds agree, and it is halved otherwise, down to single
// sites dosed exactly. So only sites near the clearing edge are dosed one
// by one, and the painted and unpainted sites of a decided range are
// visited a 64-bit word at a time. Cost: O(rows reached · log + sites near
// clearing edges + uncovered or overcleared candidates).
func CheckCoverage(surf *lattice.Surface, regions []CoverageRegion, strokes []Stroke, prof Profile) Coverage {
	ck := newCoverageCheck(surf, regions, strokes, &prof)
	ck.run()
	return ck.cov
}

type contrib struct {
	lo, hi float64 // along interval where the piece gives at least the neglect share
	// A piece parallel to the row gives peak·[Φ((umax-u)/σ) - Φ((umin-u)/σ)]
	// at along position u; a piece square to it gives
	// peak·exp(-(u-umin)²/2σ²) (umin is where it crosses the row line);
	// other pieces are evaluated from their geometry.
	parallel   bool
	square     bool
	peak       float64
	umin, umax float64
	// A slanted piece of length L: at along position u of the row line,
	// the site lies s0+u·ds along the piece and x0+u·dx across it.
	L, s0, ds, x0, dx float64
	stroke            int32
	piece             int32 // the piece runs from Path[piece] to Path[piece+1]
}

type coverageCheck struct {
	surf    *lattice.Surface
	prof    *Profile
	regions []CoverageRegion
	strokes []Stroke
	region  []int // stroke -> region index, -1 when unknown
	ratio   []float64
	sigma   []float64
	painted *lattice.SiteSet
	dwelled *lattice.SiteSet
	lines   [][][2][]contrib // [terrace][row][side]
	grid    *terraceGrid     // nil on a one-terrace surface
	allowed map[allowKey][]span
	rows    map[[2]int][][]span // region, terrace -> row -> run extents
	arena   []float64           // scratch along factors for decide
	ptrs    []*contrib          // scratch active lists for decide
	cov     Coverage
	nUnc    int
	nOver   int
}

func newCoverageCheck(surf *lattice.Surface, regions []CoverageRegion, strokes []Stroke, prof *Profile) *coverageCheck {
	ck := &coverageCheck{surf: surf, prof: prof, regions: regions, strokes: strokes,
		painted: lattice.NewSiteSet(), dwelled: lattice.NewSiteSet()}
	byName := map[string]int{}
	for i, r := range regions {
		byName[r.Name] = i
		if r.Sites != nil {
			ck.painted.Union(r.Sites)
		}
	}
	if len(surf.Terraces) > 1 {
		ck.grid = newTerraceGrid(surf)
	}
	ck.allowed = map[allowKey][]span{}
	ck.rows = map[[2]int][][]span{}
	ck.lines = make([][][2][]contrib, len(surf.Terraces))
	for t := range surf.Terraces {
		ck.lines[t] = make([][2][]contrib, surf.RowCount(t))
	}
	ck.region = make([]int, len(strokes))
	ck.ratio = make([]float64, len(strokes))
	ck.sigma = make([]float64, len(strokes))
	for i := range strokes {
		st := &strokes[i]
		ri, ok := byName[st.Region]
		if !ok {
			ri = -1
		}
		ck.region[i] = ri
		m := prof.AP
		if st.Mode == FE {
			m = prof.FE
		}
		ck.ratio[i] = float64(max(st.Passes, 1)) * m.LineDoseCPerCm / m.Width.ThresholdDoseCPerCm
		ck.sigma[i] = m.Width.SigmaNM
		if st.Kind == StrokeDwell {
			if len(st.Path) > 0 {
				if site, d, ok := surf.Snap(st.Path[0]); ok && d <= 0.05 {
					ck.dwelled.Add(site)
				}
			}
			continue
		}
		for p := 0; p+1 < len(st.Path); p++ {
			ck.addPiece(i, p)
		}
	}
	return ck
}

// terraceAxes returns p's along-row and across-row coordinates on
// terrace t, relative to the terrace's lattice offset.
func terraceAxes(surf *lattice.Surface, t int, p r2.Point) (along, across float64) {
	tr := &surf.Terraces[t]
	q := p.Sub(tr.Offset)
	if tr.Rows == lattice.RowsAlongY {
		return q.Y, q.X
	}
	return q.X, q.Y
}

func (ck *coverageCheck) addPiece(si, p int) {
	st := &ck.strokes[si]
	a, b := st.Path[p], st.Path[p+1]
	if a == b {
		return
	}
	ratio, sigma := ck.ratio[si], ck.sigma[si]
	if ratio <= coverageNeglect || !(sigma > 0) {
		return
	}
	reach := sigma * math.Sqrt(2*math.Log(ratio/coverageNeglect))
	for t := range ck.surf.Terraces {
		if part, ok := ck.grid.near(t, a, b); ok {
			ck.addPart(si, p, t, a, b, part, reach)
		}
	}
}

// addPart adds the contributions of the part [τ0, τ1] (as fractions of
// the piece a→b) of one stroke piece to the rows of terrace t it reaches.
func (ck *coverageCheck) addPart(si, p, t int, a, b r2.Point, part [2]float64, reach float64) {
	ratio, sigma := ck.ratio[si], ck.sigma[si]
	alA, acA := terraceAxes(ck.surf, t, a)
	alB, acB := terraceAxes(ck.surf, t, b)
	pa := a.Add(b.Sub(a).Mul(part[0]))
	pb := a.Add(b.Sub(a).Mul(part[1]))
	palA, pacA := terraceAxes(ck.surf, t, pa)
	palB, pacB := terraceAxes(ck.surf, t, pb)
	lo := math.Min(pacA, pacB) - reach - lattice.HOffset
	hi := math.Max(pacA, pacB) + reach + lattice.HOffset
	r0 := max(0, int(math.Ceil(lo/lattice.RowSpacing)))
	r1 := min(len(ck.lines[t])-1, int(math.Floor(hi/lattice.RowSpacing)))
	parallel := math.Abs(acA-acB) < 1e-9
	square := math.Abs(alA-alB) < 1e-9
	umin, umax := math.Min(alA, alB), math.Max(alA, alB)
	vmin, vmax := math.Min(acA, acB), math.Max(acA, acB)
	for r := r0; r <= r1; r++ {
		for side := 0; side < 2; side++ {
			y := float64(r) * lattice.RowSpacing
			if side == 0 {
				y -= lattice.HOffset
			} else {
				y += lattice.HOffset
			}
			c := contrib{stroke: int32(si), piece: int32(p), umin: umin, umax: umax}
			if parallel {
				d := y - acA
				c.parallel = true
				c.peak = ratio * math.Exp(-d*d/(2*sigma*sigma))
				if c.peak < coverageNeglect {
					continue
				}
				// Beyond an end the dose is at most peak·Φ(-s/σ) ≤
				// peak·exp(-s²/2σ²)/2, below the neglect share past smax.
				smax := 0.0
				if c.peak > 2*coverageNeglect {
					smax = sigma * math.Sqrt(2*math.Log(c.peak/(2*coverageNeglect)))
				}
				c.lo, c.hi = umin-smax, umax+smax
			} else if square {
				// The piece crosses the row line's across coordinate y
				// at along position alA; along the row its dose is a
				// Gaussian bump there.
				c.square = true
				c.umin = alA
				c.peak = ratio * (normalCDF((vmax-y)/sigma) - normalCDF((vmin-y)/sigma))
				if c.peak < coverageNeglect {
					continue
				}
				h := sigma * math.Sqrt(2*math.Log(c.peak/coverageNeglect))
				c.lo, c.hi = alA-h, alA+h
			} else {
				c.lo, c.hi = math.Min(palA, palB)-reach, math.Max(palA, palB)+reach
				// The row line in field coordinates: origin at along 0 and
				// unit vector along the row.
				tr := &ck.surf.Terraces[t]
				origin, along := r2.Point{X: 0, Y: y}, r2.Point{X: 1}
				if tr.Rows == lattice.RowsAlongY {
					origin, along = r2.Point{X: y, Y: 0}, r2.Point{Y: 1}
				}
				origin = origin.Add(tr.Offset)
				ab := b.Sub(a)
				c.L = ab.Norm()
				u := ab.Mul(1 / c.L)
				c.s0, c.ds = origin.Sub(a).Dot(u), along.Dot(u)
				c.x0, c.dx = u.Cross(origin.Sub(a)), u.Cross(along)
			}
			ck.lines[t][r][side] = append(ck.lines[t][r][side], c)
		}
	}
}

func (ck *coverageCheck) run() {
	ck.cov.Sites = ck.painted.Count()
	surf := ck.surf
	var active []*contrib
	for t := range surf.Terraces {
		dimers := surf.DimerCount(t)
		for r := range ck.lines[t] {
			pw := ck.painted.Row(t, r)
			var exist []span
			for side := 0; side < 2; side++ {
				cs := ck.lines[t][r][side]
				first, last := paintedExtent(pw, side)
				if len(cs) == 0 && first < 0 {
					continue
				}
				if exist == nil {
					exist = ck.existSpans(t, r)
				}
				// The stretch of the row that anything reaches.
				lo, hi := math.Inf(1), math.Inf(-1)
				active = active[:0]
				for i := range cs {
					lo, hi = math.Min(lo, cs[i].lo), math.Max(hi, cs[i].hi)
					active = append(active, &cs[i])
				}
				if first >= 0 {
					lo = math.Min(lo, float64(first)*lattice.DimerPitch)
					hi = math.Max(hi, float64(last)*lattice.DimerPitch)
				}
				row := rowLine{t: t, r: r, side: side, pw: pw, exist: exist}
				// Where the row's dimers do not exist there is nothing to
				// cover or to overclear.
				for _, ex := range exist {
					d0 := max(0, int(math.Ceil(math.Max(lo, ex.lo)/lattice.DimerPitch-1e-9)))
					d1 := min(dimers, int(math.Floor(math.Min(hi, ex.hi)/lattice.DimerPitch+1e-9))+1)
					if d1 > d0 {
						ck.decideRange(&row, active, d0, d1)
					}
				}
			}
		}
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

// rowLine is the line of one side's sites of one row.
type rowLine struct {
	t, r, side int
	pw         []uint64 // the row's painted bits
	exist      []span   // where the row's dimers exist on the terrace
}

// alongFactor is Φ((umax-u)/σ) - Φ((umin-u)/σ); where u lies more than
// 8σ beyond one end, that end's term is 0 or 1 to within 1e-15 and is
// not computed.
func alongFactor(c *contrib, sigma, u float64) float64 {
	hi, lo := (c.umax-u)/sigma, (c.umin-u)/sigma
	switch {
	case lo < -8 && hi > 8:
		return 1
	case lo < -8:
		return normalCDF(hi)
	case hi > 8:
		return 1 - normalCDF(lo)
	}
	return normalCDF(hi) - normalCDF(lo)
}

// slantFactor is a slanted piece's along factor at row position u.
func slantFactor(c *contrib, sigma, u float64) float64 {
	s := c.s0 + u*c.ds
	return normalCDF((c.L-s)/sigma) - normalCDF(-s/sigma)
}

// factorAt is the cached along factor of a parallel or slanted piece at
// row position u (square pieces need none).
func factorAt(c *contrib, sigma, u float64) float64 {
	switch {
	case c.parallel:
		return alongFactor(c, sigma, u)
	case c.square:
		return 0
	}
	return slantFactor(c, sigma, u)
}

// decide classifies the sites of dimers [d0, d1) of one row line under
// the active contributions: it bounds the dose over the whole range
// (each parallel piece's along factor is unimodal, so its extremes lie at
// the range's ends or the piece's middle; a slanted piece's across
// distance and along position are linear along the row, so they are
// bounded by the range's ends) and classifies every site at once when the
// bounds agree, else halves the range, down to single dimers dosed
// exactly. f0 and f1 hold each parallel contribution's along factor at
// the first and last dimer, so halving computes only the middle ones.
func (ck *coverageCheck) decide(row *rowLine, all []*contrib, d0, d1 int, u0, u1 float64, g0, g1 []float64) {
	// Keep the contributions that reach this range.
	top := len(ck.arena)
	n := 0
	for _, c := range all {
		if c.lo <= u1 && c.hi >= u0 {
			n++
		}
	}
	var active []*contrib
	var f0, f1 []float64
	if n == len(all) {
		active, f0, f1 = all, g0, g1
	} else {
		ptop := len(ck.ptrs)
		ck.arena = append(ck.arena, make([]float64, 2*n)...)
		f0, f1 = ck.arena[top:top+n], ck.arena[top+n:top+2*n]
		for i, c := range all {
			if c.lo <= u1 && c.hi >= u0 {
				k := len(ck.ptrs) - ptop
				ck.ptrs = append(ck.ptrs, c)
				f0[k], f1[k] = g0[i], g1[i]
			}
		}
		active = ck.ptrs[ptop:]
		defer func() { ck.ptrs = ck.ptrs[:ptop] }()
	}
	defer func() { ck.arena = ck.arena[:top] }()
	if d1-d0 == 1 {
		site := lattice.Site{Terrace: row.t, Row: row.r, Dimer: d0, Side: row.side}
		e, who := ck.siteDose(active, site)
		ck.classify(site, row.pw, row.exist, e, who, active)
		return
	}
	lo, hi := 0.0, 0.0
	best, who := 0.0, int32(-1)
	for i, c := range active {
		sigma := ck.sigma[c.stroke]
		if c.parallel {
			fmin, fmax := math.Min(f0[i], f1[i]), math.Max(f0[i], f1[i])
			if mid := (c.umin + c.umax) / 2; mid > u0 && mid < u1 {
				fmax = alongFactor(c, sigma, mid)
			}
			lo += c.peak * fmin
			hi += c.peak * fmax
			if c.peak*fmin > best {
				best, who = c.peak*fmin, c.stroke
			}
			continue
		}
		if c.square {
			far := math.Max(math.Abs(u0-c.umin), math.Abs(u1-c.umin))
			near := 0.0
			if c.umin < u0 || c.umin > u1 {
				near = math.Min(math.Abs(u0-c.umin), math.Abs(u1-c.umin))
			}
			low := c.peak * math.Exp(-far*far/(2*sigma*sigma))
			lo += low
			hi += c.peak * math.Exp(-near*near/(2*sigma*sigma))
			if low > best {
				best, who = low, c.stroke
			}
			continue
		}
		// Along the row line, a slanted piece's across distance (signed)
		// and along position are linear, so both are bounded by the
		// range's ends, and its along factor, unimodal in s, by its values
		// there or at the piece's middle.
		x0, x1 := c.x0+u0*c.dx, c.x0+u1*c.dx
		dmax := math.Max(math.Abs(x0), math.Abs(x1))
		dmin := math.Min(math.Abs(x0), math.Abs(x1))
		if (x0 < 0) != (x1 < 0) {
			dmin = 0
		}
		fmin, fmax := math.Min(f0[i], f1[i]), math.Max(f0[i], f1[i])
		s0, s1 := c.s0+u0*c.ds, c.s0+u1*c.ds
		if (s0-c.L/2)*(s1-c.L/2) < 0 {
			fmax = normalCDF(c.L/2/sigma) - normalCDF(-c.L/2/sigma)
		}
		ratio := ck.ratio[c.stroke]
		low := ratio * math.Exp(-dmax*dmax/(2*sigma*sigma)) * fmin
		lo += low
		hi += ratio * math.Exp(-dmin*dmin/(2*sigma*sigma)) * fmax
		if low > best {
			best, who = low, c.stroke
		}
	}
	switch {
	case lo >= 1:
		ck.classifyRange(row, active, d0, d1, true, lo, who)
	case hi < 1:
		ck.classifyRange(row, active, d0, d1, false, hi, who)
	default:
		// The halves are bounded over [u0, us] and [us, u1], which hold
		// their sites, so one new along factor per piece serves both.
		mid := (d0 + d1) / 2
		us := (float64(mid) - 0.5) * lattice.DimerPitch
		at := len(ck.arena)
		ck.arena = append(ck.arena, make([]float64, len(active))...)
		fs := ck.arena[at : at+len(active)]
		for i, c := range active {
			fs[i] = factorAt(c, ck.sigma[c.stroke], us)
		}
		ck.decide(row, active, d0, mid, u0, us, f0, fs)
		ck.decide(row, active, mid, d1, us, u1, fs, f1)
	}
}

// decideRange starts decide on dimers [d0, d1).
func (ck *coverageCheck) decideRange(row *rowLine, active []*contrib, d0, d1 int) {
	top := len(ck.arena)
	ck.arena = append(ck.arena, make([]float64, 2*len(active))...)
	f0, f1 := ck.arena[top:top+len(active)], ck.arena[top+len(active):]
	u0, u1 := float64(d0)*lattice.DimerPitch, float64(d1-1)*lattice.DimerPitch
	for i, c := range active {
		f0[i] = factorAt(c, ck.sigma[c.stroke], u0)
		f1[i] = factorAt(c, ck.sigma[c.stroke], u1)
	}
	ck.decide(row, active, d0, d1, u0, u1, f0, f1)
	ck.arena = ck.arena[:top]
}

// classifyRange classifies every site of dimers [d0, d1) of a row line
// as cleared or not: a painted site not cleared is uncovered, an existing
// unpainted site cleared may be overcleared. Only those sites are
// visited, a word at a time.
func (ck *coverageCheck) classifyRange(row *rowLine, active []*contrib, d0, d1 int, cleared bool, e float64, who int32) {
	from, to := 2*d0+row.side, 2*(d1-1)+row.side+1 // bit indices [from, to)
	parity := uint64(0x5555555555555555) << uint(row.side)
	// Cleared unpainted sites are usually within the edge allowance of
	// the region dosing them most: look that up once for the row.
	var allowed []span
	haveAllowed := false
	for k := from / 64; k*64 < to; k++ {
		var word uint64
		if k < len(row.pw) {
			word = row.pw[k]
		}
		target := word & parity // painted sites: uncovered when not cleared
		if cleared {
			target = ^word & parity // unpainted sites: overcleared candidates
		}
		if lo := from - k*64; lo > 0 {
			target &= ^uint64(0) << uint(lo)
		}
		if hi := to - k*64; hi < 64 {
			target &= (1 << uint(hi)) - 1
		}
		for target != 0 {
			b := trailingZeros(target)
			target &= target - 1
			site := lattice.SiteAt(row.t, row.r, k*64+b)
			if cleared {
				u := float64(site.Dimer) * lattice.DimerPitch
				if !inSpans(row.exist, u) {
					continue
				}
				if !haveAllowed {
					allowed, haveAllowed = ck.allowedFor(who, row.t, row.r), true
				}
				if inSpans(allowed, u) {
					continue
				}
			}
			ck.classify(site, row.pw, row.exist, e, who, active)
		}
	}
}

// allowedFor returns the allowed spans (see allowedSpans) on row r of
// terrace t for the region of stroke si, within its mode's edge
// allowance; nil when there is none.
func (ck *coverageCheck) allowedFor(si int32, t, r int) []span {
	if si < 0 || ck.region[si] < 0 {
		return nil
	}
	allow := ck.prof.AP.EdgeAllowanceNM
	if ck.strokes[si].Mode == FE {
		allow = ck.prof.FE.EdgeAllowanceNM
	}
	if allow <= 0 {
		return nil
	}
	ri := ck.region[si]
	key := allowKey{ri, t, r}
	sp, ok := ck.allowed[key]
	if !ok {
		sp = ck.allowedSpans(ri, t, r, allow)
		ck.allowed[key] = sp
	}
	return sp
}

// siteDose sums the active contributions at one site exactly.
func (ck *coverageCheck) siteDose(active []*contrib, site lattice.Site) (float64, int32) {
	u := float64(site.Dimer) * lattice.DimerPitch
	sum, best, who := 0.0, 0.0, int32(-1)
	for _, c := range active {
		var e float64
		switch {
		case c.parallel:
			e = c.peak * alongFactor(c, ck.sigma[c.stroke], u)
		case c.square:
			x := (u - c.umin) / ck.sigma[c.stroke]
			e = c.peak * math.Exp(-x*x/2)
		default:
			sigma := ck.sigma[c.stroke]
			x := (c.x0 + u*c.dx) / sigma
			e = ck.ratio[c.stroke] * math.Exp(-x*x/2) * slantFactor(c, sigma, u)
		}
		sum += e
		if e > best {
			best, who = e, c.stroke
		}
	}
	return sum, who
}

func (ck *coverageCheck) classify(site lattice.Site, pw []uint64, exist []span, e float64, who int32, active []*contrib) {
	i := site.Index()
	painted := i/64 < len(pw) && pw[i/64]&(1<<(uint(i)%64)) != 0
	cleared := e >= 1
	if painted {
		if !cleared && !ck.dwelled.Contains(site) {
			ck.nUnc++
			if ck.nUnc <= coverageExamples {
				ck.cov.Issues = append(ck.cov.Issues, fmt.Sprintf("uncovered: site %v of region %q at %s gets %.2f of the clearing dose",
					site, ck.regionOf(site), fmtPoint(ck.surf.Position(site)), e))
			}
		}
		return
	}
	if !cleared || !inSpans(exist, float64(site.Dimer)*lattice.DimerPitch) {
		return
	}
	ck.over(site, who, e, active)
}

// over records a cleared site outside every region unless a region
// whose strokes dose it lies within that mode's edge allowance.
func (ck *coverageCheck) over(site lattice.Site, who int32, e float64, active []*contrib) {
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
		if ck.strokes[si].Mode == FE {
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
		what := fmt.Sprintf("%.2f of the clearing dose", e)
		if math.IsInf(e, 1) {
			what = "a dwell"
		}
		ck.cov.Issues = append(ck.cov.Issues, fmt.Sprintf("overcleared: site %v at %s, outside every region and beyond the edge allowance of region %q, gets %s",
			site, fmtPoint(ck.surf.Position(site)), name, what))
	}
}

type allowKey struct{ region, t, row int }

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
	key := allowKey{ri, q.Terrace, q.Row}
	sp, ok := ck.allowed[key]
	if !ok {
		sp = ck.allowedSpans(ri, q.Terrace, q.Row, dist)
		ck.allowed[key] = sp
	}
	if inSpans(sp, float64(q.Dimer)*lattice.DimerPitch) {
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
func (ck *coverageCheck) allowedSpans(ri, t, r int, dist float64) []span {
	rows := ck.regionRows(ri, t)
	var sp []span
	k := int(math.Ceil((dist + 2*lattice.HOffset) / lattice.RowSpacing))
	for rr := max(0, r-k); rr <= r+k && rr < len(rows); rr++ {
		dy := math.Max(0, math.Abs(float64(rr-r))*lattice.RowSpacing-2*lattice.HOffset)
		if dy > dist || len(rows[rr]) == 0 {
			continue
		}
		h := math.Sqrt(dist*dist - dy*dy)
		for _, run := range rows[rr] {
			sp = append(sp, span{run.lo - h, run.hi + h})
		}
	}
	slices.SortFunc(sp, func(a, b span) int { return cmp.Compare(a.lo, b.lo) })
	return mergeSorted(sp)
}

// regionRows returns, per row of terrace t, the along extents (dimer
// centres, nm from the terrace offset) of region ri's runs, computed once.
func (ck *coverageCheck) regionRows(ri, t int) [][]span {
	key := [2]int{ri, t}
	if rows, ok := ck.rows[key]; ok {
		return rows
	}
	set := ck.regions[ri].Sites
	rows := make([][]span, set.RowCount(t))
	for run := range set.Runs() {
		if run.Terrace == t {
			rows[run.Row] = append(rows[run.Row], span{float64(run.Start/2) * lattice.DimerPitch, float64((run.End()-1)/2) * lattice.DimerPitch})
		}
	}
	ck.rows[key] = rows
	return rows
}

func mergeSorted(sp []span) []span {
	if len(sp) == 0 {
		return nil
	}
	out := sp[:1]
	for _, s := range sp[1:] {
		last := &out[len(out)-1]
		if s.lo <= last.hi {
			last.hi = math.Max(last.hi, s.hi)
		} else {
			out = append(out, s)
		}
	}
	return out
}

// nearOn reports whether set has a site on terrace t within dist of p.
func (ck *coverageCheck) nearOn(set *lattice.SiteSet, t int, p r2.Point, dist float64) bool {
	al, ac := terraceAxes(ck.surf, t, p)
	r0 := max(0, int(math.Floor((ac-dist-lattice.HOffset)/lattice.RowSpacing)))
	r1 := min(set.RowCount(t)-1, int(math.Ceil((ac+dist+lattice.HOffset)/lattice.RowSpacing)))
	for r := r0; r <= r1; r++ {
		w := set.Row(t, r)
		if w == nil {
			continue
		}
		dy := math.Max(0, math.Abs(ac-float64(r)*lattice.RowSpacing)-lattice.HOffset)
		if dy > dist {
			continue
		}
		h := math.Sqrt(dist*dist - dy*dy)
		d0 := int(math.Ceil((al - h) / lattice.DimerPitch))
		d1 := int(math.Floor((al + h) / lattice.DimerPitch))
		if anyBit(w, max(0, 2*d0), 2*d1+2) {
			return true
		}
	}
	return false
}

// anyBit reports whether any bit in [from, to) of w is set.
func anyBit(w []uint64, from, to int) bool {
	to = min(to, len(w)*64)
	for i := from; i < to; {
		k := i / 64
		word := w[k] >> (uint(i) % 64)
		n := min(64-i%64, to-i)
		if n < 64 {
			word &= (1 << uint(n)) - 1
		}
		if word != 0 {
			return true
		}
		i += n
	}
	return false
}

// paintedExtent returns the first and last dimer with a painted site on
// the given side of a row, or -1, -1.
func paintedExtent(w []uint64, side int) (first, last int) {
	first, last = -1, -1
	mask := uint64(0x5555555555555555) << uint(side)
	for k, word := range w {
		if m := word & mask; m != 0 {
			if first < 0 {
				first = (k*64 + trailingZeros(m)) / 2
			}
			last = (k*64 + 63 - leadingZeros(m)) / 2
		}
	}
	return first, last
}

func (ck *coverageCheck) regionOf(site lattice.Site) string {
	for _, r := range ck.regions {
		if r.Sites != nil && r.Sites.Contains(site) {
			return r.Name
		}
	}
	return "?"
}

// existSpans returns the along-row intervals (relative to the terrace
// offset) where row r's dimer centres lie on terrace t: the field, within
// the terrace's boundary, outside earlier bounded terraces (a terrace
// without a boundary takes what no bounded terrace holds), as
// Surface.TerraceAt decides.
func (ck *coverageCheck) existSpans(t, r int) []span {
	surf := ck.surf
	tr := &surf.Terraces[t]
	across := float64(r) * lattice.RowSpacing
	// The field along this line.
	a0, _ := terraceAxes(surf, t, surf.Field.Lo())
	a1, _ := terraceAxes(surf, t, surf.Field.Hi())
	spans := []span{{math.Min(a0, a1), math.Max(a0, a1)}}
	if len(surf.Terraces) == 1 {
		return spans
	}
	polySpans := func(poly []r2.Point) []span {
		var xs []float64
		for i := range poly {
			p, q := poly[i], poly[(i+1)%len(poly)]
			pa, pc := terraceAxes(surf, t, p)
			qa, qc := terraceAxes(surf, t, q)
			if (pc > across) != (qc > across) {
				xs = append(xs, pa+(across-pc)*(qa-pa)/(qc-pc))
			}
		}
		sort.Float64s(xs)
		var out []span
		for i := 0; i+1 < len(xs); i += 2 {
			out = append(out, span{xs[i], xs[i+1]})
		}
		return out
	}
	bounded := len(tr.Boundary) >= 3
	if bounded {
		spans = intersectSpans(spans, polySpans(tr.Boundary))
	}
	for j := range surf.Terraces {
		if j == t && bounded {
			break
		}
		if j != t && len(surf.Terraces[j].Boundary) >= 3 {
			spans = subtractSpans(spans, polySpans(surf.Terraces[j].Boundary))
		}
	}
	return spans
}

// inSpans reports whether x lies in one of the sorted, disjoint spans
// (to within 1e-9 nm).
func inSpans(sp []span, x float64) bool {
	i := sort.Search(len(sp), func(i int) bool { return sp[i].hi+1e-9 >= x })
	return i < len(sp) && x >= sp[i].lo-1e-9
}

func intersectSpans(a, b []span) []span {
	var out []span
	for _, x := range a {
		for _, y := range b {
			lo, hi := math.Max(x.lo, y.lo), math.Min(x.hi, y.hi)
			if hi > lo {
				out = append(out, span{lo, hi})
			}
		}
	}
	return out
}

func subtractSpans(a, b []span) []span {
	out := a
	for _, y := range b {
		var next []span
		for _, x := range out {
			if y.hi <= x.lo || y.lo >= x.hi {
				next = append(next, x)
				continue
			}
			if y.lo > x.lo {
				next = append(next, span{x.lo, y.lo})
			}
			if y.hi < x.hi {
				next = append(next, span{y.hi, x.hi})
			}
		}
		out = next
	}
	return out
}

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
	for j := 0; j < g.ny; j++ {
		for i := 0; i < g.nx; i++ {
			for _, f := range [][2]float64{{0, 0}, {0.5, 0}, {1, 0}, {0, 0.5}, {0.5, 0.5}, {1, 0.5}, {0, 1}, {0.5, 1}, {1, 1}} {
				p := r2.Point{X: math.Min((float64(i)+f[0])*terraceCellNM, surf.Width()), Y: math.Min((float64(j)+f[1])*terraceCellNM, surf.Height())}
				if t := surf.TerraceAt(p); t >= 0 {
					raw[t][j*g.nx+i] = true
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

// near returns the part [τ0, τ1] of the piece a→b (as fractions of it)
// between its first and last points near terrace t, and false when no
// point is; on a one-terrace surface (nil grid) the whole piece. Cells
// carry a margin of one cell (20 nm), more than any footprint's reach.
func (g *terraceGrid) near(t int, a, b r2.Point) ([2]float64, bool) {
	if g == nil {
		return [2]float64{0, 1}, true
	}
	L := b.Sub(a).Norm()
	steps := max(1, int(math.Ceil(L/(terraceCellNM/2))))
	first, last := -1, -1
	for k := 0; k <= steps; k++ {
		p := a.Add(b.Sub(a).Mul(float64(k) / float64(steps)))
		i, j := int(math.Floor(p.X/terraceCellNM)), int(math.Floor(p.Y/terraceCellNM))
		if i >= 0 && j >= 0 && i < g.nx && j < g.ny && g.cells[t][j*g.nx+i] {
			if first < 0 {
				first = k
			}
			last = k
		}
	}
	if first < 0 {
		return [2]float64{}, false
	}
	return [2]float64{math.Max(0, float64(first-1)/float64(steps)), math.Min(1, float64(last+1)/float64(steps))}, true
}
