package planner

import (
	"math"

	"github.com/golang/geo/r2"

	"dimerpath/lattice"
)

// The exposure of one stroke piece at a site, and bounds of it over a
// range of sites (coverage.go's classifier works on these).

// piece is one straight piece of a stroke's path, or a dwell, as seen
// from one terrace: coordinates are along and across that terrace's rows,
// from its lattice offset. A piece parallel to the rows lies at across c
// from along a0 to a1; one square to them at along c from across a0 to
// a1; any other starts at (pu, py) with unit direction (du, dy) and
// length L; a dwell (dot) sits at (pu, py). Its exposure at (u, y) is
// amp times a Gaussian across it and the band of its length along it
// (see lineExposure), or for a dot amp times the 2-D Gaussian.
type piece struct {
	kind      uint8
	stroke    int32
	amp       float64 // exposure on the centre line (a dot: at its centre)
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
	// sReach is a slanted piece's reach for slantedDimers, sQ the ratio
	// exp(−step²) of slantedRange's recurrence, computed once.
	sReach, sQ float64
	// sBand is an FE slanted piece's band along it, band(0, L, σ, s), as
	// a cubic in the fraction f of each node step, c0 + f·(c1 + f·(c2 +
	// f·c3)), between nodes s = sBand.s0 + i·σ/slantSteps (see
	// newBandTable; shared by pieces of one length, footprint and reach,
	// see bandTables): slantedRange takes it with one lookup and three
	// products a dimer instead of two Hermite lookups in Φ's table, where
	// its caller allows (no AP stroke reaches the range: an AP stroke's
	// expected missed sites set the session's repair times, so every site
	// it may write is summed from Φ's table bit for bit, as before). AP
	// strokes' pieces have none (nil). A pointer, not the table's slice
	// and first node inline: 8 bytes a piece rather than 32.
	sBand *bandTable
	// lines caches the across factor at site lines lines0+i (0: not yet),
	// filled on first use: decide and scan meet a piece on each line it
	// reaches many times.
	lines0 int
	lines  []float64
	// cache holds the along factor at the dimers where it is neither 0
	// nor 1 (within 8σ of an end of a parallel piece, of the centre of a
	// square piece or dot), filled on first use: a piece is met on every
	// site line it reaches.
	cache [2]alongCache
	// comb, when not nil, makes the piece a comb (coverage_comb.go): a
	// group of one stroke's parallel or square pieces sharing this
	// piece's along factor, whose across factor is comb's table.
	comb *combLines
}

// alongCache is a piece's along factor at dimers [d0, d0+len(v)).
type alongCache struct {
	d0     int
	v      []float64
	filled bool
}

// alongWindows returns the dimer windows in which the piece's along
// factor is neither 0 nor 1, and the factor outside them (at dimers
// between the windows, for a parallel piece, and beyond them).
func (p *piece) alongWindows() (w [2][2]int, n int) {
	span := func(lo, hi float64) [2]int {
		return [2]int{int(math.Floor(lo / lattice.DimerPitch)), int(math.Ceil(hi/lattice.DimerPitch)) + 1}
	}
	r := 8 * p.sigma
	switch p.kind {
	case pieceParallel:
		if p.a1-p.a0 <= 2*r {
			return [2][2]int{span(p.a0-r, p.a1+r)}, 1
		}
		return [2][2]int{span(p.a0-r, p.a0+r), span(p.a1-r, p.a1+r)}, 2
	case pieceSquare:
		return [2][2]int{span(p.c-r, p.c+r)}, 1
	}
	return [2][2]int{span(p.pu-r, p.pu+r)}, 1
}

// uFactorAt returns uFactor at dimer d's centre (not for slanted
// pieces), from the cache.
func (p *piece) uFactorAt(d int) float64 {
	if p.cache[0].v == nil && !p.cache[0].filled {
		w, n := p.alongWindows()
		for k := range n {
			p.cache[k] = alongCache{d0: w[k][0], v: make([]float64, w[k][1]-w[k][0])}
		}
		p.cache[0].filled = true
	}
	for k := range p.cache {
		c := &p.cache[k]
		if i := d - c.d0; i >= 0 && i < len(c.v) {
			v := c.v[i]
			if v == 0 {
				// 0 marks "not yet": a factor that is truly 0 is met
				// again, at the cost of computing it again (and never
				// stored, so a filled cache is only read: see fillCaches).
				if v = p.uFactor(lattice.DimerAlong(d)); v != 0 {
					c.v[i] = v
				}
			}
			return v
		}
	}
	// Outside the windows: 1 between a parallel piece's two ends, else 0.
	if p.kind == pieceParallel && len(p.cache[1].v) > 0 && d >= p.cache[0].d0+len(p.cache[0].v) && d < p.cache[1].d0 {
		return 1
	}
	return 0
}

// alongRange adds amp times the piece's along factor at dimers [d0, d1)
// to x[k] (k = d − d0), and records in best and who the largest term each
// dimer gets and its stroke (not for slanted pieces or dots): the
// factors come from the cache, filled where missing, and are 0 or 1
// outside its windows.
func (p *piece) alongRange(d0, d1 int, amp, topAmp float64, x, best []float64, who []int32) {
	if p.cache[0].v == nil && !p.cache[0].filled {
		p.uFactorAt(d0) // allocates the windows
	}
	stroke := p.stroke
	d := d0
	// add adds amp·f to the dimers from d up to to.
	add := func(to int, f float64) {
		if e := amp * f; e > 0 && d < to {
			et := topAmp * f
			xs, bs, ws := x[d-d0:to-d0], best[d-d0:to-d0], who[d-d0:to-d0]
			bs, ws = bs[:len(xs)], ws[:len(xs)]
			for k := range xs {
				xs[k] += e
				if et > bs[k] {
					bs[k], ws[k] = et, stroke
				}
			}
		}
		d = max(d, to)
	}
	n := 1
	if len(p.cache[1].v) > 0 {
		n = 2
	}
	for w := range n {
		c := &p.cache[w]
		// Before the window: 0, or 1 between a parallel piece's windows.
		outside := 0.0
		if w == 1 && p.kind == pieceParallel {
			outside = 1
		}
		add(min(c.d0, d1), outside)
		end := min(d1, c.d0+len(c.v))
		if d >= end {
			continue
		}
		vs := c.v[d-c.d0 : end-c.d0]
		xs, bs, ws := x[d-d0:end-d0], best[d-d0:end-d0], who[d-d0:end-d0]
		xs, bs, ws = xs[:len(vs)], bs[:len(vs)], ws[:len(vs)]
		for k, v := range vs {
			if v == 0 {
				if v = p.uFactor(lattice.DimerAlong(d + k)); v != 0 {
					vs[k] = v
				}
			}
			if e := amp * v; e > 0 {
				xs[k] += e
				if et := topAmp * v; et > bs[k] {
					bs[k], ws[k] = et, stroke
				}
			}
		}
		d = end
	}
	add(d1, 0)
}

// alongFactors writes the piece's along factor at dimers [d0, d1) to f
// (not for slanted pieces or dots): the values alongRange adds, from the
// cache (filled where missing, with m: see uFactorMemo), 0 or 1 outside
// its windows.
func (p *piece) alongFactors(d0, d1 int, f []float64, m *recentMemo) {
	if p.cache[0].v == nil && !p.cache[0].filled {
		p.uFactorAt(d0) // allocates the windows
	}
	clear(f)
	c0, c1 := &p.cache[0], &p.cache[1]
	end0 := c0.d0 + len(c0.v)
	if p.kind == pieceParallel && len(c1.v) > 0 {
		// 1 between a parallel piece's two windows.
		for d := max(d0, end0); d < min(d1, c1.d0); d++ {
			f[d-d0] = 1
		}
	}
	from := d0
	for w, c := range []*alongCache{c0, c1} {
		if w == 1 {
			// Where the windows overlap, the first one's value stands.
			from = max(d0, end0)
		}
		a, b := max(from, c.d0), min(d1, c.d0+len(c.v))
		for d := a; d < b; d++ {
			v := c.v[d-c.d0]
			if v == 0 {
				if v = p.uFactorMemo(lattice.DimerAlong(d), m); v != 0 {
					c.v[d-c.d0] = v
				}
			}
			f[d-d0] = v
		}
	}
}

const (
	pieceParallel = iota
	pieceSquare
	pieceSlanted
	pieceDot
)

// band is the unimodal factor Φ((hi-x)/σ) - Φ((lo-x)/σ): the share of a
// Gaussian of width σ centred at x that falls on [lo, hi]. Far beyond an
// end (8σ) that end's term is 0 or 1 to within 1e-15 and is skipped; to
// the right of both ends the upper tail is taken as Φ(−a) − Φ(−b), which
// keeps its digits. The differences are slantBand's: fastPhi's bit for
// bit, its table lookups written out.
func band(lo, hi, sigma, x float64) float64 { return bandMemo(lo, hi, sigma, x, nil) }

// bandMemo is band taking Φ beyond the table from m when m is not nil
// (see newTailMemo): the coverage check meets the sites beyond a piece's
// ends at a few dozen distinct offsets.
func bandMemo(lo, hi, sigma, x float64, m *recentMemo) float64 {
	a, b := (lo-x)/sigma, (hi-x)/sigma
	switch {
	case a < -8 && b > 8:
		return 1
	case a < -8:
		return fastPhiMemo(b, m)
	case b > 8:
		return fastPhiMemo(-a, m)
	case a > 0:
		return slantBandMemo(-a, -b, m)
	}
	return slantBandMemo(b, a, m)
}

// fastPhi returns Φ(x) by cubic Hermite interpolation in a table of Φ
// and its density at steps of 1/phiSteps on [−8, 8] (absolute error below
// 10⁻¹⁰), and from erfc beyond: the coverage check evaluates Φ tens of
// millions of times.
func fastPhi(x float64) float64 { return fastPhiMemo(x, nil) }

// fastPhiMemo is fastPhi taking Φ beyond the table from m when m is not
// nil (the same values).
func fastPhiMemo(x float64, m *recentMemo) float64 {
	t := (x + 8) * phiSteps
	if !(t >= 0 && t < phiLast) {
		if m != nil {
			return m.at(x)
		}
		return normalCDF(x)
	}
	i := int(t)
	c := &phiSpans[i]
	return hermite(t-float64(i), c[0], c[1], c[2], c[3])
}

const phiSteps = 64

// phiValue holds Φ at the table's points, phiSlope its derivative per
// table step (the density over phiSteps).
var phiValue, phiSlope = func() (v, d []float64) {
	n := 16*phiSteps + 1
	v, d = make([]float64, n), make([]float64, n)
	for k := range v {
		x := -8 + float64(k)/phiSteps
		v[k] = normalCDF(x)
		d[k] = math.Exp(-x*x/2) / math.Sqrt(2*math.Pi) / phiSteps
	}
	return v, d
}()

// gauss returns exp(−d²/2σ²), by cubic Hermite interpolation in a table
// at steps of 1/gaussSteps of d/σ up to gaussMax (absolute error below
// 10⁻⁹), 0 beyond.
func gauss(d, sigma float64) float64 {
	t := math.Abs(d/sigma) * gaussSteps
	if !(t < float64(len(gaussValue)-1)) {
		if t != t { // NaN
			return t
		}
		return 0
	}
	i := int(t)
	f := t - float64(i)
	f2 := f * f
	f3 := f2 * f
	return (2*f3-3*f2+1)*gaussValue[i] + (f3-2*f2+f)*gaussSlope[i] + (-2*f3+3*f2)*gaussValue[i+1] + (f3-f2)*gaussSlope[i+1]
}

// gaussMax is where gauss is taken as 0: exp(−40²/2) underflows.
const (
	gaussSteps = 64
	gaussMax   = 40
)

var gaussValue, gaussSlope = func() (v, d []float64) {
	n := gaussMax*gaussSteps + 1
	v, d = make([]float64, n), make([]float64, n)
	for k := range v {
		x := float64(k) / gaussSteps
		v[k] = math.Exp(-x * x / 2)
		d[k] = -x * v[k] / gaussSteps
	}
	return v, d
}()

// uFactor and yFactor split a parallel, square or dot piece's exposure
// into a factor of the along position and one of the across position.
func (p *piece) uFactor(u float64) float64 { return p.uFactorMemo(u, nil) }

// uFactorMemo is uFactor with band's Φ beyond the table from m (see
// bandMemo).
func (p *piece) uFactorMemo(u float64, m *recentMemo) float64 {
	switch p.kind {
	case pieceParallel:
		return bandMemo(p.a0, p.a1, p.sigma, u, m)
	case pieceDot:
		return gauss(u-p.pu, p.sigma)
	}
	return gauss(u-p.c, p.sigma)
}

func (p *piece) yFactor(y float64) float64 {
	if p.comb != nil {
		return p.comb.acrossAt(p.kind, p.sigma, y)
	}
	switch p.kind {
	case pieceParallel:
		return gauss(y-p.c, p.sigma)
	case pieceDot:
		return gauss(y-p.py, p.sigma)
	}
	return band(p.a0, p.a1, p.sigma, y)
}

// yFactorLine returns yFactor at site line l's across position, from
// the piece's small cache of lines.
func (p *piece) yFactorLine(l int) float64 {
	if p.comb != nil {
		s, _ := p.comb.at(l)
		return s
	}
	if p.lines == nil {
		l0 := max(0, int(math.Floor((p.yLo+lattice.HOffset)/lattice.RowSpacing))*2)
		l1 := (int(math.Ceil((p.yHi-lattice.HOffset)/lattice.RowSpacing)) + 1) * 2
		p.lines0, p.lines = l0, make([]float64, max(l1-l0, 1))
	}
	i := l - p.lines0
	if i < 0 || i >= len(p.lines) {
		return p.yFactor(lineY(l))
	}
	if v := p.lines[i]; v != 0 {
		return v
	}
	v := p.yFactor(lineY(l))
	if v != 0 {
		p.lines[i] = v
	}
	return v
}

// fillCaches fills the piece's caches of along factors (uFactorAt) and
// across factors (yFactorLine) with the values the lazy paths would
// store, so that afterwards they are only read: the coverage check's
// workers share the pieces (coverage_pool.go). A factor that is truly 0
// stays unstored, as on the lazy path.
func (p *piece) fillCaches() {
	if p.kind == pieceSlanted {
		return
	}
	if p.cache[0].v == nil && !p.cache[0].filled {
		p.uFactorAt(0) // allocates the windows
	}
	for k := range p.cache {
		c := &p.cache[k]
		for i := range c.v {
			if c.v[i] == 0 {
				c.v[i] = p.uFactor(lattice.DimerAlong(c.d0 + i))
			}
		}
	}
	if p.comb != nil {
		return // its across factor is the comb's table
	}
	p.yFactorLine(0) // allocates the lines
	for i := range p.lines {
		if p.lines[i] == 0 {
			p.lines[i] = p.yFactor(lineY(p.lines0 + i))
		}
	}
}

// uPeak and yPeak are where the factors peak.
func (p *piece) uPeak() float64 {
	switch p.kind {
	case pieceParallel:
		return (p.a0 + p.a1) / 2
	case pieceDot:
		return p.pu
	}
	return p.c
}

func (p *piece) yPeak() float64 {
	switch p.kind {
	case pieceParallel:
		return p.c
	case pieceDot:
		return p.py
	}
	return (p.a0 + p.a1) / 2
}

// atLine returns the piece's exposure at along position u on site line
// l, and the largest single term of it (a comb's largest member's; else
// the exposure itself).
func (p *piece) atLine(u float64, l int) (e, top float64) {
	if p.comb != nil {
		s, t := p.comb.at(l)
		f := p.amp * p.uFactor(u)
		return f * s, f * t
	}
	e = p.at(u, lineY(l))
	return e, e
}

// at returns the piece's exposure at (u, y).
func (p *piece) at(u, y float64) float64 {
	if p.kind != pieceSlanted {
		return p.amp * p.uFactor(u) * p.yFactor(y)
	}
	s := (u-p.pu)*p.du + (y-p.py)*p.dy
	x := (y-p.py)*p.du - (u-p.pu)*p.dy
	return p.amp * gauss(x, p.sigma) * band(0, p.L, p.sigma, s)
}

// slantedDimers returns the range [k0, k1) of dimers d0+k (d0 ≤ d0+k <
// d1) of the site line at y that lie within reach of slanted piece p:
// both its across distance and its along position beyond the ends are
// linear in the dimer, so the range is an intersection of two intervals.
func (p *piece) slantedDimers(d0, d1 int, y float64) (k0, k1 int) {
	reach := p.sReach
	lo, hi := 0.0, float64(d1-d0)
	u0 := lattice.DimerAlong(d0)
	h := lattice.DimerPitch
	// Across: (y−py)·du − (u−pu)·dy; along: (u−pu)·du + (y−py)·dy.
	// Each narrows [lo, hi] to the k with c + k·m in [a, b] (written out:
	// as a closure or a function the compiler did not inline it).
	for w := range 2 {
		c, m, a, b := (y-p.py)*p.du-(u0-p.pu)*p.dy, -h*p.dy, -reach, reach
		if w == 1 {
			c, m, a, b = (u0-p.pu)*p.du+(y-p.py)*p.dy, h*p.du, -reach, p.L+reach
		}
		if m == 0 {
			if c < a || c > b {
				hi = lo
			}
			continue
		}
		ka, kb := (a-c)/m, (b-c)/m
		if ka > kb {
			ka, kb = kb, ka
		}
		lo, hi = math.Max(lo, ka), math.Min(hi, kb)
	}
	if !(hi >= lo) {
		return 0, 0
	}
	return max(0, int(math.Floor(lo))), min(d1-d0, int(math.Ceil(hi))+1)
}

// slantedRange adds slanted piece p's exposure at dimers d0+k, k in [k0,
// k1), of the site line at y to x[k], recording the largest term in best
// and who (see alongRange) unless best is nil (every term is the one
// stroke's). The across distance is linear in k, so its Gaussian follows
// the recurrence g(k+1) = g(k)·r(k), r(k+1) = r(k)·q, re-anchored every
// 16 dimers against rounding; the band along the piece comes from the
// piece's table (sBand) where table is set and the piece has one, else
// (and beyond the table) from slantBand.
func (p *piece) slantedRange(d0, k0, k1 int, y float64, x, best []float64, who []int32, table bool) {
	if k0 >= k1 {
		return
	}
	h := lattice.DimerPitch
	u0 := lattice.DimerAlong(d0 + k0)
	across := ((y-p.py)*p.du - (u0-p.pu)*p.dy) / p.sigma // at k0, in σ
	step := -h * p.dy / p.sigma
	along := (u0-p.pu)*p.du + (y-p.py)*p.dy // at k0, nm
	alongStep := h * p.du
	// The band table's coordinate: node steps from its first node.
	var tab [][4]float64
	s0 := 0.0
	if table && p.sBand != nil {
		tab, s0 = p.sBand.spans, p.sBand.s0
	}
	t0 := (along - s0) * slantSteps / p.sigma
	tStep := alongStep * slantSteps / p.sigma
	q := p.sQ // math.Exp(-step * step), computed once
	// The piece's fields in locals: the loop's stores to x could alias
	// them, so the compiler would load them again on every dimer.
	amp, length, sigma, stroke := p.amp, p.L, p.sigma, p.stroke
	tLast := float64(len(tab)) // 0 without a table
	if best == nil && tab != nil {
		// t is linear in the dimer: inside the table at both ends, it is
		// inside throughout.
		if te := t0 + float64(k1-1-k0)*tStep; min(t0, te) >= 0 && max(t0, te) < tLast {
			slantedRun(x[k0:k1], across, step, q, t0, tStep, amp, tab)
			return
		}
	}
	x = x[:k1]
	var g, r float64
	for k := k0; k < k1; k++ {
		j := k - k0
		if j%16 == 0 {
			a := across + float64(j)*step
			g = math.Exp(-a * a / 2)
			r = math.Exp(-(2*a*step + step*step) / 2)
		}
		var b float64
		if t := t0 + float64(j)*tStep; t >= 0 && t < tLast {
			i := int(t)
			f := t - float64(i)
			c := &tab[i]
			b = c[0] + f*(c[1]+f*(c[2]+f*c[3]))
		} else {
			s := along + float64(j)*alongStep
			b = slantBand((length-s)/sigma, -s/sigma)
		}
		if e := amp * g * b; e > 0 {
			x[k] += e
			if best != nil && e > best[k] {
				best[k], who[k] = e, stroke
			}
		}
		g *= r
		r *= q
	}
}

// slantedRun is slantedRange's loop for a run of dimers xs wholly inside
// the band table and without the largest term's tracking: the same
// values in the same order, in blocks of 16 dimers between the
// recurrence's anchors.
func slantedRun(xs []float64, across, step, q, t0, tStep, amp float64, tab [][4]float64) {
	for j0 := 0; j0 < len(xs); j0 += 16 {
		a := across + float64(j0)*step
		g := math.Exp(-a * a / 2)
		r := math.Exp(-(2*a*step + step*step) / 2)
		block := xs[j0:min(j0+16, len(xs))]
		for jj := range block {
			t := t0 + float64(j0+jj)*tStep
			i := int(t)
			f := t - float64(i)
			c := &tab[i]
			b := c[0] + f*(c[1]+f*(c[2]+f*c[3]))
			if e := amp * g * b; e > 0 {
				block[jj] += e
			}
			g *= r
			r *= q
		}
	}
}

// slantSteps is the number of nodes per σ of a slanted piece's band
// table (a divisor of phiSteps: the nodes fall on the Φ table's). Cubic
// Hermite between exact values and slopes errs by at most
// (1/slantSteps)⁴/384 times the band's largest fourth derivative in σ
// units (2·max|φ‴| < 1.1): 2.7·10⁻⁹ at 32, 1.7·10⁻¹⁰ at 64, plus the
// Φ table's 10⁻¹⁰ at the far end's nodes.
const slantSteps = 32

// newBandTable tabulates the band along a slanted piece of length L,
// footprint σ and reach, band(0, L, σ, s) =
// Φ((L−s)/σ) − Φ(−s/σ), as the cubic Hermite interpolant of its values
// and slopes (φ(s/σ) − φ((L−s)/σ))/σ between nodes σ/slantSteps apart,
// over every along position slantedRange meets: the piece's reach either
// side of it and two dimers more (slantedDimers rounds its range
// outwards by at most one). The nodes sit at s = σ·m/slantSteps (m
// whole), so −s/σ falls on a node of the Φ table (phiValue and phiSlope
// hold Φ and φ there), and (L−s)/σ at the same fraction of a table step
// for every node: its Hermite weights, and those of their derivative,
// are taken once.
func newBandTable(L, sigma, reach float64) bandTable {
	const stride = phiSteps / slantSteps
	margin := reach + 2*lattice.DimerPitch
	m0 := int(math.Ceil(margin / sigma * slantSteps)) // node 0 at s = −m0·σ/slantSteps
	n := int(math.Ceil((L+margin)/sigma*slantSteps)) + m0 + 2
	// Φ table positions: −s/σ at node i is ka0 − stride·i exactly; (L−s)/σ
	// is tb0 − stride·i, whole part kb0 − stride·i, fraction f.
	ka0 := 8*phiSteps + stride*m0
	tb0 := (L/sigma+8)*phiSteps + float64(stride*m0)
	kb0 := int(math.Floor(tb0))
	f := tb0 - float64(kb0)
	f2 := f * f
	f3 := f2 * f
	h00, h10, h01, h11 := 2*f3-3*f2+1, f3-2*f2+f, -2*f3+3*f2, f3-f2
	d00, d10, d01, d11 := 6*f2-6*f, 3*f2-4*f+1, -6*f2+6*f, 3*f2-2*f
	// The band and its slope per node step at node i.
	node := func(i int) (v, d float64) {
		// Φ and φ/phiSteps at −s/σ (beyond the table: 0 or 1 to 10⁻¹⁵).
		pa, da := 0.0, 0.0
		if ka := ka0 - stride*i; ka > phiLast {
			pa = 1
		} else if ka >= 0 {
			pa, da = phiValue[ka], phiSlope[ka]
		}
		pb, db := 0.0, 0.0
		if kb := kb0 - stride*i; kb >= phiLast {
			pb = 1
		} else if kb >= 0 {
			c := &phiSpans[kb]
			pb = h00*c[0] + h10*c[1] + h01*c[2] + h11*c[3]
			db = d00*c[0] + d10*c[1] + d01*c[2] + d11*c[3]
		}
		// b and a fall by stride Φ table steps a node.
		return pb - pa, float64(stride) * (da - db)
	}
	tab := make([][4]float64, n-1)
	v0, s0 := node(0)
	for i := range tab {
		v1, s1 := node(i + 1)
		tab[i] = powerCubic(v0, s0, v1, s1)
		v0, s0 = v1, s1
	}
	return bandTable{-float64(m0) * sigma / slantSteps, tab}
}

// powerCubic returns the cubic Hermite between values v0, v1 with slopes
// s0, s1 (per step) as its coefficients in the step's fraction f: c0 +
// f·(c1 + f·(c2 + f·c3)).
func powerCubic(v0, s0, v1, s1 float64) [4]float64 {
	return [4]float64{v0, s0, 3*(v1-v0) - 2*s0 - s1, 2*(v0-v1) + s0 + s1}
}

// bandTable is a slanted piece's band table: its first node's along
// position and its node steps' cubics (see piece.sBand).
type bandTable struct {
	s0    float64
	spans [][4]float64
}

// bandTables holds the band tables of one check's FE slanted pieces by
// length, footprint and reach: a fan's turns repeat a few lengths (the
// demo's 333 FE slanted pieces have 91 distinct), so most pieces share
// a table. It is filled before the check's workers start and only read
// by them.
type bandTables map[[3]float64]*bandTable

// tabulate gives slanted piece p its band table, made on first need.
func (b bandTables) tabulate(p *piece) {
	k := [3]float64{p.L, p.sigma, p.sReach}
	t, ok := b[k]
	if !ok {
		nt := newBandTable(p.L, p.sigma, p.sReach)
		t = &nt
		b[k] = t
	}
	p.sBand = t
}

// slantBand returns fastPhi(b) − fastPhi(a) for a ≤ b, bit for bit, without
// the erfc that fastPhi takes beyond the table where its value is known:
// above phiOne Φ is 1, and below −phiNil it is under 2⁻⁵⁶, which leaves any
// Φ(b) ≥ ½ unchanged when taken from it (normalCDF, checked in
// TestSlantBandExact). fastPhi's table lookups are written out: the
// compiler inlines hermite, not fastPhi, and slantedRange calls this for
// every dimer.
func slantBand(b, a float64) float64 { return slantBandMemo(b, a, nil) }

// slantBandMemo is slantBand taking Φ beyond the table from m when m is
// not nil (the same values: normalCDF is a pure function).
func slantBandMemo(b, a float64, m *recentMemo) float64 {
	pb := 1.0
	if b < phiOne {
		if t := (b + 8) * phiSteps; t >= 0 && t < phiLast {
			i := int(t)
			c := &phiSpans[i]
			pb = hermite(t-float64(i), c[0], c[1], c[2], c[3])
		} else if m != nil {
			pb = m.at(b)
		} else {
			pb = normalCDF(b)
		}
	}
	if a <= -phiNil && b >= 0 {
		return pb
	}
	pa := 0.0
	if t := (a + 8) * phiSteps; t >= 0 && t < phiLast {
		i := int(t)
		c := &phiSpans[i]
		pa = hermite(t-float64(i), c[0], c[1], c[2], c[3])
	} else if m != nil {
		pa = m.at(a)
	} else {
		pa = normalCDF(a)
	}
	return pb - pa
}

// newTailMemo returns a memo of normalCDF for one goroutine. Opening a
// window asks about the same few offsets beyond fastPhi's table again
// and again (pieces of one length and σ, sites at the same places around
// them: on a window array 8.28σ past a piece's end or before its start),
// and each erfc costs two exponentials.
func newTailMemo() *recentMemo {
	m := newRecentMemo(normalCDF)
	return &m
}

// hermiteSpans holds, per table step, the values and slopes at its two
// ends (v0, s0, v1, s1): one lookup instead of four.
type hermiteSpans [][4]float64

func spansOf(v, d []float64) hermiteSpans {
	h := make(hermiteSpans, len(v)-1)
	for i := range h {
		h[i] = [4]float64{v[i], d[i], v[i+1], d[i+1]}
	}
	return h
}

var phiSpans = spansOf(phiValue, phiSlope)

// phiLast is the last index of the Φ table, as a float.
const phiLast = 16 * phiSteps

// hermite is the cubic Hermite interpolation at fraction f between two
// table points of values v0, v1 and slopes (per step) s0, s1, as fastPhi
// computes it.
func hermite(f, v0, s0, v1, s1 float64) float64 {
	f2 := f * f
	f3 := f2 * f
	return (2*f3-3*f2+1)*v0 + (f3-2*f2+f)*s0 + (-2*f3+3*f2)*v1 + (f3-f2)*s1
}

const (
	phiNil = 8.6
	phiOne = 8.5
)

// makeDot describes a dwell of stroke si at a on terrace t: its
// neighbours get the linearised exposure amp·exp(−d²/2σ²) (see
// Profile.dwellExposure).
func makeDot(surf *lattice.Surface, t int, si int32, a r2.Point, amp, sigma, reach float64) piece {
	u, y := surf.Frame(t).ToLocal(a)
	p := piece{kind: pieceDot, stroke: si, amp: amp, sigma: sigma, pu: u, py: y,
		uLo: u - reach, uHi: u + reach, yLo: y - reach, yHi: y + reach}
	p.uTop, p.yTop = 1, 1
	return p
}

// makePiece describes the piece a→b of stroke si on terrace t.
func makePiece(surf *lattice.Surface, t int, si int32, a, b r2.Point, amp, sigma, reach float64) piece {
	f := surf.Frame(t)
	ua, ya := f.ToLocal(a)
	ub, yb := f.ToLocal(b)
	p := piece{stroke: si, amp: amp, sigma: sigma,
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
		p.sReach = p.sigma * math.Sqrt(2*math.Log(max(p.amp/exposureNeglect, 1)))
		step := -lattice.DimerPitch * p.dy / p.sigma
		p.sQ = math.Exp(-step * step)
		return p
	}
	p.uTop, p.yTop = p.uFactor(p.uPeak()), p.yFactor(p.yPeak())
	return p
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

// slantedBounds bounds a slanted piece's exposure over r's box from its
// corners: along and across distances are linear in the box.
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
	return p.amp * gl * fl, p.amp * gh * fh
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
