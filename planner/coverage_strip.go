package planner

import (
	"math"

	"github.com/golang/geo/r1"

	"dimerpath/lattice"
	"dimerpath/lattice/design"
)

// Strips: where only one FE stroke's lines reach a range of sites (the
// lines and turns of a raster, its combs; a fan's lines and slanted
// turns), every site of the range is that stroke's, and its exposure is
// the sum of the pieces' along factors, shared by all of the range's
// site lines, each times the piece's across factor on the line, plus the
// slanted pieces' terms. At a raster's ends the along factors fall from 1
// to 0 within a few σ, faster than bounds can take two neighbouring sites
// at once, so halving ends in ranges of a few sites each; instead decide
// takes a strip across the ends (up to stripDimers dimers, any number of
// lines) site by site in one loop: no more halvings, the along factors
// looked up once, the row's look-ups once a line, the sums kept for the
// strip. Every site's exposure is the one scan computes (the same pieces
// in the same order), so a site's counts and a stray site's test against
// the limit are the same; only the order in which the sites' terms are
// added differs.

// stripDimers is the widest range taken as a strip: decide narrows a
// raster's end to strips this wide (halving along the dimers, where the
// along factors change), then takes each whole. On the demo
// (instructions per check under cachegrind) 32 did better than 16, 64 or
// 128: wider strips sum more sites that bounds would have taken at once.
// Re-tried after split's nearly flat lines (flatGap) and cuts at the
// along transitions (kneeCut): 32 896 M, 48 902 M, 64 912 M.
const stripDimers = 32

// stripStroke returns the stroke of active's pieces when they are all
// lines (parallel, square or slanted pieces, combs among them) of one FE
// stroke, else -1. AP strokes are left to scan: their expected missed
// sites set the session's repair times, which stay bit for bit as scan
// sums them; dwells too (their own site's exposure is scanLine's).
func (ck *coverageCheck) stripStroke(active []*piece) int32 {
	if len(active) == 0 {
		return -1
	}
	s := active[0].stroke
	for _, p := range active {
		if p.stroke != s || p.kind == pieceDot {
			return -1
		}
	}
	if ck.strokes[s].Mode != design.ModeFE {
		return -1
	}
	return s
}

// strip sums every site of r, whose active pieces are all stroke si's
// lines (see stripStroke), a site line at a time,
// into sums of its own that it adds to the check's at the end. It
// returns false, having added nothing, when a site outside the regions
// clears above the stray limit (or the strip meets more regions than its
// sums hold): then decide halves r as before, so such sites are listed in
// the order they always were (the first MaxStraySites, the first
// examples).
func (ck *coverageCheck) strip(r siteRect, active []*piece, si int32) bool {
	n, np := r.d1-r.d0, len(active)
	atop := len(ck.arena)
	ck.grow(np*n + np + n)
	defer func() { ck.arena = ck.arena[:atop] }()
	buf := ck.arena[atop:]
	fu, amps, x := buf[:np*n], buf[np*n:np*n+np], buf[np*n+np:np*n+np+n]
	if cap(ck.looked) < np {
		ck.looked = make([]bool, np)
	}
	looked := ck.looked[:np]
	clear(looked)
	var sums stripSums
	for l := r.l0; l < r.l1; l++ {
		// The pieces' amplitudes on this line, as scanLine takes them.
		for i, p := range active {
			a := 0.0
			if p.kind == pieceSlanted {
				amps[i] = 0
				continue
			}
			if p.comb != nil {
				sum, _ := p.comb.at(l)
				a = p.amp * sum
			} else {
				a = p.amp * p.yFactorLine(l)
			}
			if !(a > exposureNeglect) {
				a = 0
			} else if !looked[i] {
				p.alongFactors(r.d0, r.d1, fu[i*n:(i+1)*n], ck.tail)
				looked[i] = true
			}
			amps[i] = a
		}
		clear(x)
		y := lineY(l)
		for i, a := range amps {
			if p := active[i]; p.kind == pieceSlanted {
				// As scanLine: the dimers within the piece's reach.
				k0, k1 := p.slantedDimers(r.d0, r.d1, y)
				p.slantedRange(r.d0, k0, k1, y, x, nil, nil, true) // every term is si's
				continue
			}
			if a == 0 {
				continue
			}
			f := fu[i*n : (i+1)*n]
			x := x[:len(f)]
			for k, v := range f {
				x[k] += a * v
			}
		}
		if !ck.countLine(r.t, l, r.d0, x, si, active, &sums) {
			return false
		}
	}
	for k := range sums.n {
		a := ck.accAt(int(sums.ri[k]))
		a.missed += sums.missed[k]
		a.stray += sums.stray[k]
		a.logP += sums.logP[k]
	}
	if sums.strokeMissed != 0 {
		ck.addMissed(si, sums.strokeMissed)
	}
	if sums.strokeStray != 0 {
		ck.addStray(si, sums.strokeStray)
	}
	return true
}

// stripSums are a strip's sums: per region (len(regions): other) and for
// its stroke.
type stripSums struct {
	n                         int
	ri                        [8]int32
	missed, stray, logP       [8]float64
	strokeMissed, strokeStray float64
}

// slot returns the index of region ri's sums, or -1 when they are full.
func (s *stripSums) slot(ri int32) int {
	for k := range s.n {
		if s.ri[k] == ri {
			return k
		}
	}
	if s.n == len(s.ri) {
		return -1
	}
	s.ri[s.n] = ri
	s.n++
	return s.n - 1
}

// countLine counts the sites of dimers [d0, d0+len(x)) of site line l of
// terrace t at exposures x, all of them stroke si's, into sums (see
// scanLine, whose counts it repeats). It returns false when a site
// clears above the stray limit untolerated or the sums are full (see
// strip).
func (ck *coverageCheck) countLine(t, l, d0 int, x []float64, si int32, active []*piece, sums *stripSums) bool {
	row, side := l/2, l%2
	pw := ck.painted.Row(t, row)
	exist := ck.existDimers(t, row)
	// The regions with sites on this line within the strip: most often
	// one (two pads may share rows, never a strip's dimers).
	var regs [8]int32
	var regBits [8]lattice.RowBits
	var regMissed, regLog [8]float64
	nr := 0
	for _, ri := range ck.regionsOnRow(t, row) {
		w := ck.regions[ri].Sites.Row(t, row)
		if !w.Any(2*d0, 2*(d0+len(x)), lattice.SideOf(side)) {
			continue
		}
		if nr == len(regs) {
			return false
		}
		regs[nr], regBits[nr] = ri, w
		nr++
	}
	var allowed []r1.Interval
	looked := false // allowed is looked up at the first site that needs it
	limit := ck.prof.StrayLimit
	var missed, stray, strayX float64
	var ei, ai int // the sites go up in d: holdsDimer's and inSpans's searches, walked
	for k, xi := range x {
		d := d0 + k
		i := 2*d + side
		if pw.Contains(i) {
			if xi >= exposureSure {
				continue
			}
			// missLogPower written out (the compiler does not inline
			// the call), from both tables' cubics side by side.
			var miss, logOK float64
			if t := xi * expSteps; t >= 0 {
				i := int(t)
				f := t - float64(i)
				c := &missLogSpans[i]
				miss = c[0] + f*(c[1]+f*(c[2]+f*c[3]))
				if miss < 1e-4 {
					logOK = -miss - miss*miss/2
				} else if j := i - logOffset; j >= 0 && j < logLast {
					logOK = c[4] + f*(c[5]+f*(c[6]+f*c[7]))
				} else {
					logOK = math.Log1p(-miss)
				}
			} else {
				miss, logOK = missAndLog(xi)
			}
			if nr == 1 {
				regMissed[0] += miss
				regLog[0] += logOK
			} else {
				for j := range nr {
					if regBits[j].Contains(i) {
						regMissed[j] += miss
						regLog[j] += logOK
					}
				}
			}
			if xi > 0 {
				missed += miss
			}
			continue
		}
		if xi <= exposureNone {
			continue
		}
		for ei < len(exist) && exist[ei].Hi <= d {
			ei++
		}
		if ei == len(exist) || exist[ei].Lo > d {
			continue // no dimer here (holdsDimer)
		}
		if !looked {
			allowed, looked = ck.allowedFor(si, t, l), true
		}
		if u := lattice.DimerAlong(d); ai < len(allowed) {
			for ai < len(allowed) && allowed[ai].Hi < u-1e-9 {
				ai++
			}
			if ai < len(allowed) && u >= allowed[ai].Lo-1e-9 {
				continue // within the allowance (inSpans)
			}
		}
		p := clearFast(xi)
		if p > limit {
			if ck.siteTolerated(lattice.Site{Terrace: t, Row: row, Dimer: d, Side: side}, si, active) {
				continue
			}
			return false // an error: see strip
		}
		stray += p
		strayX += xi
	}
	for j, ri := range regs[:nr] {
		if regMissed[j] != 0 || regLog[j] != 0 {
			k := sums.slot(ri)
			if k < 0 {
				return false
			}
			sums.missed[k] += regMissed[j]
			sums.logP[k] += regLog[j]
		}
	}
	sums.strokeMissed += missed
	if stray != 0 || strayX != 0 {
		ri := int32(len(ck.regions))
		if ck.region[si] >= 0 {
			ri = int32(ck.region[si])
		}
		k := sums.slot(ri)
		if k < 0 {
			return false
		}
		sums.stray[k] += stray
		sums.logP[k] -= strayX
		sums.strokeStray += stray
	}
	return true
}

// missLogPower is missAndLog from the tables' power form (missSpans,
// logOKSpans): the same cubics, for sums where no AP stroke's sites are
// (see missSpans).
func missLogPower(x float64) (miss, logOK float64) {
	t := x * expSteps
	if !(t >= 0 && t < expLast) {
		return missAndLog(x)
	}
	i := int(t)
	f := t - float64(i)
	c := &missLogSpans[i]
	miss = c[0] + f*(c[1]+f*(c[2]+f*c[3]))
	if miss < 1e-4 {
		return miss, -miss - miss*miss/2
	}
	if j := i - logOffset; j >= 0 && j < logLast {
		return miss, c[4] + f*(c[5]+f*(c[6]+f*c[7]))
	}
	return miss, math.Log1p(-miss)
}

// missSpans and logOKSpans are missAndLog's exp and log tables with each
// step's cubic Hermite in power form, c0 + f·(c1 + f·(c2 + f·c3)): the
// same cubics, three products instead of the Hermite weights' dozen.
// Strips sum FE strokes' sites only, whose figures may move by rounding,
// and so does scan where no AP stroke reaches its range (missLogPower);
// elsewhere scan keeps missAndLog bit for bit (AP strokes' missed sites
// set the session's repair times).
var missSpans, logOKSpans = powerForm(expSpans), powerForm(logSpans)

// missLogSpans holds, per step of the exp table, missSpans' cubic and
// the log table's cubic of the same step (logOKSpans[i−logOffset], zero
// outside the log table): countLine reads both from one place.
var missLogSpans = func() [][8]float64 {
	t := make([][8]float64, len(missSpans))
	for i := range t {
		copy(t[i][:4], missSpans[i][:])
		if j := i - logOffset; j >= 0 && j < len(logOKSpans) {
			copy(t[i][4:], logOKSpans[j][:])
		}
	}
	return t
}()

// powerForm returns Hermite spans (v0, s0, v1, s1 per step) as the power
// coefficients of the same cubics in the step's fraction.
func powerForm(h hermiteSpans) [][4]float64 {
	p := make([][4]float64, len(h))
	for i, c := range h {
		p[i] = powerCubic(c[0], c[1], c[2], c[3])
	}
	return p
}

// strips switches the strips; tests compare against scan with it off.
var strips = true
