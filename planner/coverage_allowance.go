package planner

import (
	"cmp"
	"fmt"
	"math"
	"slices"
	"sync"

	"github.com/golang/geo/r1"
	"github.com/golang/geo/r2"

	"dimerpath/lattice"
	"dimerpath/lattice/design"
)

// The edge allowance: a site outside every region may clear when it lies
// within its mode's EdgeAllowanceNM of a region whose strokes dose it.

// tolerated reports whether every site of r lies within the edge
// allowance of one region whose strokes dose r: with low (each active
// piece's least exposure over r), whose pieces dose every site of r with
// at least exposureNeglect, as siteTolerated asks of a site; without,
// whose pieces reach r's box.
func (ck *coverageCheck) tolerated(r siteRect, active []*piece, low []float64) bool {
	var tried [4]int
	n := 0
next:
	for i, p := range active {
		if low != nil && low[i] < exposureNeglect {
			continue // it may not dose every site of r
		}
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
		allow := ck.allowance(p.stroke)
		if allow <= 0 {
			continue
		}
		u0, u1 := lattice.DimerAlong(r.d0), lattice.DimerAlong(r.d1-1)
		ok := true
		for l := r.l0; l < r.l1 && ok; l++ {
			sp := ck.allowedCached(ri, r.t, l, allow)
			i := firstReaching(sp, u1)
			ok = i < len(sp) && sp[i].Lo-1e-9 <= u0
		}
		if ok {
			return true
		}
	}
	return false
}

// allowedFor returns the allowed spans (see allowedSpans) on site line l
// of terrace t for the region of stroke si, within its mode's edge
// allowance; nil when there is none.
func (ck *coverageCheck) allowedFor(si int32, t, l int) []r1.Interval {
	if si < 0 || ck.region[si] < 0 {
		return nil
	}
	allow := ck.allowance(si)
	if allow <= 0 {
		return nil
	}
	ri := ck.region[si]
	return ck.allowedCached(ri, t, l, allow)
}

// siteTolerated reports whether the site lies within the edge allowance
// of a region whose strokes dose it (a piece of theirs gives it at least
// exposureNeglect): the region of stroke who (the one that doses it
// most) first, then those of the other active pieces.
func (ck *coverageCheck) siteTolerated(site lattice.Site, who int32, active []*piece) bool {
	var tried [8]int
	nTried := 0
	try := func(si int32) bool {
		if si < 0 {
			return false
		}
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
		allow := ck.allowance(si)
		return allow > 0 && ck.near(ri, site, allow)
	}
	if try(who) {
		return true
	}
	u := lattice.DimerAlong(site.Dimer)
	for _, c := range active {
		if e, _ := c.atLine(u, 2*site.Row+site.Side); e >= exposureNeglect && try(c.stroke) {
			return true
		}
	}
	return false
}

// allowance returns the edge allowance of stroke si's mode (nm).
func (ck *coverageCheck) allowance(si int32) float64 {
	if ck.strokes[si].Mode == design.ModeFE {
		return ck.prof.FE.EdgeAllowanceNM
	}
	return ck.prof.AP.EdgeAllowanceNM
}

// rowSpans caches one sorted span list per site line l0 <= l <
// l0+len(spans), computed on first use; the lines outside have none.
type rowSpans struct {
	l0    int
	spans [][]r1.Interval
	done  []bool
	init  bool
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

// allowedCached returns allowedSpans(ri, t, l, dist), computed once per
// site line and region (dist is the same for every call with one
// region's mode). Only the lines within reach of the region's lines
// (allowedSpans' k) can have spans: the cache covers those alone.
func (ck *coverageCheck) allowedCached(ri, t, l int, dist float64) []r1.Interval {
	lines := &ck.allowed[ri*len(ck.surf.Terraces)+t]
	if !lines.init {
		e := ck.regionLines(ri, t)
		n := 0
		if e.n() > 0 {
			k := allowedReach(dist)
			lines.l0 = max(0, e.l0-k)
			n = e.l0 + e.n() + k - lines.l0
		}
		lines.spans, lines.done, lines.init = make([][]r1.Interval, n), make([]bool, n), true
	}
	j := l - lines.l0
	if j < 0 || j >= len(lines.spans) {
		return nil
	}
	if !lines.done[j] {
		lines.spans[j], lines.done[j] = ck.keep(ck.allowedSpans(ri, t, l, dist)), true
	}
	return lines.spans[j]
}

// allowedReach returns how many site lines from a region's line
// allowedSpans looks for it within dist (the lines' across spacing
// alternates, so bound it by whole rows).
func allowedReach(dist float64) int {
	return 2*int(math.Ceil(dist/lattice.RowSpacing)) + 2
}

// near reports whether region ri has a site within dist of the site q
// (between site positions). On q's own terrace it looks the answer up
// in the site line's allowed spans, built once per line and region: the
// along intervals within dist of a region site on the lines within dist.
// Other terraces are searched site line by site line.
func (ck *coverageCheck) near(ri int, q lattice.Site, dist float64) bool {
	set := ck.regions[ri].Sites
	if set == nil {
		return false
	}
	sp := ck.allowedCached(ri, q.Terrace, 2*q.Row+q.Side, dist)
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

// allowedSpans returns the along intervals of site line l of terrace t
// whose sites lie within dist of a site of region ri: the region's
// extents on every site line within dist, each widened by the along
// distance the across distance leaves.
func (ck *coverageCheck) allowedSpans(ri, t, l int, dist float64) []r1.Interval {
	e := ck.regionLines(ri, t)
	// Each line's extents are sorted and disjoint: merge them into the
	// union line by line (a line with every other site painted has an
	// extent per site, so sorting them all would cost more).
	//
	// Lines of one run of equal extents add nothing beyond the run's
	// line nearest l, widened most (site lines lie in order across the
	// rows): that line alone is merged, so a pad's hundreds of equal
	// lines cost one merge.
	acc, next := ck.spanBuf[:0], ck.spanBuf2[:0]
	y := lineY(l)
	k := allowedReach(dist)
	lo, hi := max(e.l0, l-k), min(e.l0+e.n(), l+k+1)
	for ll := lo; ll < hi; {
		end := min(int(e.runEnd[ll-e.l0])+e.l0, hi)
		ext := e.line(ll)
		near := min(max(l, ll), end-1)
		ll = end
		if len(ext) == 0 {
			continue
		}
		dy := math.Abs(lineY(near) - y)
		if dy > dist {
			continue
		}
		next = unionWidened(next[:0], acc, ext, math.Sqrt(dist*dist-dy*dy))
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

// regionLines returns, per site line of terrace t (2·row + side), the
// along extents (dimer centres, nm from the terrace offset) of region
// ri's runs of that side's sites, computed once by the first worker that
// asks (the workers share ck.rows).
func (ck *coverageCheck) regionLines(ri, t int) *regionExtents {
	e := &ck.rows[ri*len(ck.surf.Terraces)+t]
	e.once.Do(func() {
		set := ck.regions[ri].Sites
		if set == nil {
			return
		}
		// Only the region's rows: the lines' extents share one slice,
		// line l's from starts[l-l0] to starts[l-l0+1].
		first, end := set.RowRange(t)
		e.l0 = 2 * first
		e.starts = make([]int32, 2*(end-first)+1)
		// At most one extent per run and side: counted, so the slice
		// is allocated once (a slanted edge has a run per site).
		n := 0
		for r := first; r < end; r++ {
			n += 2 * set.Row(t, r).RunCount()
		}
		e.all = make([]r1.Interval, 0, n)
		for r := first; r < end; r++ {
			w := set.Row(t, r)
			for side := range 2 {
				e.all = appendSideExtents(e.all, w, side)
				e.starts[2*(r-first)+side+1] = int32(len(e.all))
			}
		}
		// The runs of lines with equal extents, from the last line back.
		e.runEnd = make([]int32, e.n())
		for j := e.n() - 1; j >= 0; j-- {
			e.runEnd[j] = int32(j + 1)
			if j+1 < e.n() && slices.Equal(e.line(e.l0+j), e.line(e.l0+j+1)) {
				e.runEnd[j] = e.runEnd[j+1]
			}
		}
	})
	return e
}

// regionExtents caches regionLines for one region and terrace: the
// extents of site lines l0 .. l0+n()-1.
type regionExtents struct {
	once   sync.Once
	l0     int
	starts []int32
	all    []r1.Interval
	// runEnd[l-l0] is one past the last line of the run of lines from
	// l on whose extents equal l's (index relative to l0).
	runEnd []int32
}

// n returns the number of site lines e holds.
func (e *regionExtents) n() int { return max(len(e.starts)-1, 0) }

// line returns the extents of site line l (none outside e's lines).
func (e *regionExtents) line(l int) []r1.Interval {
	if j := l - e.l0; j >= 0 && j < e.n() {
		return e.all[e.starts[j]:e.starts[j+1]]
	}
	return nil
}

// appendSideExtents appends, for each maximal run of a row's sites, the
// along extent of the dimers of its side-side sites, and returns dst.
func appendSideExtents(dst []r1.Interval, w lattice.RowBits, side int) []r1.Interval {
	for start, end := range w.Runs() {
		i0, i1 := start, end-1
		if i0%2 != side {
			i0++
		}
		if i1%2 != side {
			i1--
		}
		if i0 <= i1 {
			dst = append(dst, r1.Interval{Lo: lattice.DimerAlong(i0 / 2), Hi: lattice.DimerAlong(i1 / 2)})
		}
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
		if w.IsEmpty() {
			continue
		}
		for side := range 2 {
			dy := math.Abs(ac - lattice.SiteAcross(r, side))
			if dy > dist {
				continue
			}
			h := math.Sqrt(dist*dist - dy*dy)
			from, to := lattice.DimersIn(r1.Interval{Lo: al - h, Hi: al + h}).Sites()
			if w.Any(from, to, lattice.SideOf(side)) {
				return true
			}
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
	if len(rs) == 1 {
		// Most rows are one range: no search.
		return rs[0].Lo <= d && d < rs[0].Hi
	}
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
