package planner

import (
	"math"

	"github.com/golang/geo/r2"

	"dimerpath/lattice"
)

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
