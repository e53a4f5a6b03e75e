package planner

import (
	"math"
	"math/bits"
	"slices"

	"dimerpath/lattice"
)

// Combs: the pieces of one stroke that share their along factor, summed
// as one piece. An FE raster's lines all run between the same two ends
// (a rectangular pad), and its turns all sit at one of two along
// positions, so its exposure is separable: the along factor of any one of
// them times the sum of their across factors. The coverage check takes
// such a group as one piece whose across factor is that sum, tabulated
// per site line: a site's exposure costs one product instead of one per
// line, and a range's bounds are the exact product of the along factor's
// bounds and the sum's least and greatest value over the range's lines
// (a sparse table), where the pieces one by one bounded each line apart.

// combMin is the fewest pieces grouped into a comb: below it the table
// costs more than it saves.
const combMin = 4

// combs switches the grouping; tests compare against the piece-by-piece
// sum with it off.
var combs = true

// combLines is a comb's across factor per site line l0+i: sum[i] the sum
// of its members' across factors, top[i] the largest one (the term the
// check attributes a site by), with sparse tables of their least and
// greatest values over ranges of lines.
type combLines struct {
	l0        int
	sum, top  []float64
	minS      [][]float64 // minS[k][i]: least sum over lines [i, i+2^k)
	maxS      [][]float64
	maxT      [][]float64
	members   []float64 // c (parallel) or a0, a1 pairs (square) of each member
	memberLen int       // values per member
}

// at returns the comb's across sum and its largest term on site line l.
func (c *combLines) at(l int) (sum, top float64) {
	i := l - c.l0
	if i < 0 || i >= len(c.sum) {
		return 0, 0
	}
	return c.sum[i], c.top[i]
}

// bounds returns the least and greatest across sum and the greatest
// largest term over site lines [l0, l1): lines beyond the table's hold 0.
func (c *combLines) bounds(l0, l1 int) (smin, smax, tmax float64) {
	a, b := max(l0-c.l0, 0), min(l1-c.l0, len(c.sum))
	if a >= b {
		return 0, 0, 0
	}
	k := bits.Len(uint(b-a)) - 1
	e := b - (1 << k)
	smin = min(c.minS[k][a], c.minS[k][e])
	if l0 < c.l0 || l1 > c.l0+len(c.sum) {
		smin = 0
	}
	return smin, max(c.maxS[k][a], c.maxS[k][e]), max(c.maxT[k][a], c.maxT[k][e])
}

// combTables returns the sparse tables of the least and the greatest
// across sum (minS, maxS over sum) and of the greatest largest term (maxT
// over top), level by level in one pass, in one allocation: a comb of
// ~2000 site lines holds three tables of ~11 levels, and building them
// one op call at a time was most of a comb's cost.
func combTables(sum, top []float64) (minS, maxS, maxT [][]float64) {
	n := len(sum)
	levels := bits.Len(uint(n)) // levels k with 2^k <= n
	size := 0
	for k := 1; k < levels; k++ {
		size += n - (1 << k) + 1
	}
	buf := make([]float64, 3*size)
	minS, maxS, maxT = make([][]float64, levels), make([][]float64, levels), make([][]float64, levels)
	minS[0], maxS[0], maxT[0] = sum, sum, top
	for k := 1; k < levels; k++ {
		m, h := n-(1<<k)+1, 1<<(k-1)
		lo, hi, tp := buf[:m:m], buf[m:2*m:2*m], buf[2*m:3*m:3*m]
		buf = buf[3*m:]
		plo, phi, ptp := minS[k-1][:m+h], maxS[k-1][:m+h], maxT[k-1][:m+h]
		for i := range m {
			lo[i] = min(plo[i], plo[i+h])
			hi[i] = max(phi[i], phi[i+h])
			tp[i] = max(ptp[i], ptp[i+h])
		}
		minS[k], maxS[k], maxT[k] = lo, hi, tp
	}
	return minS, maxS, maxT
}

// acrossAt returns the comb's across sum at across position y, from its
// members (for positions between site lines; the hot paths use the
// table).
func (c *combLines) acrossAt(kind uint8, sigma, y float64) float64 {
	s := 0.0
	for i := 0; i < len(c.members); i += c.memberLen {
		if kind == pieceParallel {
			s += gauss(y-c.members[i], sigma)
		} else {
			s += band(c.members[i], c.members[i+1], sigma, y)
		}
	}
	return s
}

// combKey is what the members of a comb share: the along factor
// (parallel: the ends; square: the along position), the amplitude and
// the footprint.
type combKey struct {
	kind          uint8
	a, b, amp, sg float64
}

// groupCombs replaces the parallel and square pieces of one stroke on one
// terrace (ps) that share their along factor by combs, where at least
// combMin of them do; the other pieces stay as they are, in their order.
func groupCombs(ps []piece) []piece {
	if !combs || len(ps) < combMin {
		return ps
	}
	groups := map[combKey][]int{}
	var order []combKey
	for i := range ps {
		p := &ps[i]
		var k combKey
		switch p.kind {
		case pieceParallel:
			k = combKey{p.kind, p.a0, p.a1, p.amp, p.sigma}
		case pieceSquare:
			k = combKey{p.kind, p.c, 0, p.amp, p.sigma}
		default:
			continue
		}
		if _, ok := groups[k]; !ok {
			order = append(order, k)
		}
		groups[k] = append(groups[k], i)
	}
	into := map[int]piece{} // first member -> its comb
	drop := map[int]bool{}
	for _, k := range order {
		g := groups[k]
		if len(g) < combMin {
			continue
		}
		into[g[0]] = makeComb(ps, g)
		for _, i := range g {
			drop[i] = true
		}
	}
	if len(into) == 0 {
		return ps
	}
	out := make([]piece, 0, len(ps)-len(drop)+len(into))
	for i := range ps {
		if c, ok := into[i]; ok {
			out = append(out, c)
		} else if !drop[i] {
			out = append(out, ps[i])
		}
	}
	return out
}

// makeComb builds the comb of pieces ps[g...] (same stroke, kind and
// along factor): its box is the union of theirs, its across table holds
// on each site line the sum of the members whose box reaches the line,
// as the piece-by-piece check sums them.
func makeComb(ps []piece, g []int) piece {
	c := ps[g[0]]
	c.lines, c.cache = nil, [2]alongCache{}
	cl := &combLines{memberLen: 1}
	if c.kind == pieceSquare {
		cl.memberLen = 2
	}
	type member struct{ yLo, yHi, a, b float64 }
	ms := make([]member, len(g))
	for k, i := range g {
		p := &ps[i]
		c.yLo, c.yHi = min(c.yLo, p.yLo), max(c.yHi, p.yHi)
		c.uLo, c.uHi = min(c.uLo, p.uLo), max(c.uHi, p.uHi)
		if c.kind == pieceParallel {
			ms[k] = member{p.yLo, p.yHi, p.c, 0}
			cl.members = append(cl.members, p.c)
		} else {
			ms[k] = member{p.yLo, p.yHi, p.a0, p.a1}
			cl.members = append(cl.members, p.a0, p.a1)
		}
	}
	slices.SortFunc(ms, func(x, y member) int { return cmpFloat(x.yLo, y.yLo) })
	l0 := max(0, int(math.Floor((c.yLo+lattice.HOffset)/lattice.RowSpacing))*2)
	l1 := (int(math.Ceil((c.yHi-lattice.HOffset)/lattice.RowSpacing)) + 1) * 2
	cl.l0 = l0
	cl.sum, cl.top = make([]float64, max(l1-l0, 1)), make([]float64, max(l1-l0, 1))
	// Members in order of their boxes' low edge; those whose box has
	// passed are skipped from the front (a member's box is its position
	// ± the same reach, so their high edges come in the same order).
	first := 0
	for i := range cl.sum {
		y := lineY(l0 + i)
		for first < len(ms) && ms[first].yHi < y {
			first++
		}
		s, t := 0.0, 0.0
		for _, m := range ms[first:] {
			if m.yLo > y {
				break
			}
			if m.yHi < y {
				continue
			}
			var f float64
			if c.kind == pieceParallel {
				f = gauss(y-m.a, c.sigma)
			} else {
				f = band(m.a, m.b, c.sigma, y)
			}
			s += f
			t = max(t, f)
		}
		cl.sum[i], cl.top[i] = s, t
	}
	cl.minS, cl.maxS, cl.maxT = combTables(cl.sum, cl.top)
	c.comb = cl
	// The across peak and its value are not used for a comb (its bounds
	// come from the table); the along ones stay the members'.
	c.yTop = cl.maxS[len(cl.maxS)-1][0]
	for _, v := range cl.maxS[len(cl.maxS)-1] {
		c.yTop = max(c.yTop, v)
	}
	return c
}
