package planner

import (
	"math"

	"github.com/golang/geo/r1"
	"github.com/golang/geo/r2"

	"dimerpath/lattice"
	"dimerpath/lattice/design"
)

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

// rowSpans caches one sorted span list per row, computed on first use.
type rowSpans struct {
	spans [][]r1.Interval
	done  []bool
}

func newRowSpans(rows int) rowSpans {
	return rowSpans{spans: make([][]r1.Interval, rows), done: make([]bool, rows)}
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

// inSpans reports whether x lies in one of the sorted, disjoint spans
// (to within 1e-9 nm).
func inSpans(sp []r1.Interval, x float64) bool {
	i := firstReaching(sp, x)
	return i < len(sp) && x >= sp[i].Lo-1e-9
}

// firstReaching returns the first of the sorted, disjoint spans whose end
// reaches x (to within 1e-9 nm), or len(sp).
func firstReaching(sp []r1.Interval, x float64) int { return lattice.SearchIntervals(sp, x-1e-9) }
