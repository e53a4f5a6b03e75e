package planner

import (
	"math"

	"github.com/golang/geo/r2"

	"dimerpath/internal/unionfind"
)

// Absolute placement is rarely what a device needs: a tunnel gap's width
// and a window's place relative to its island are. Features coupled by a
// relative tolerance are written inside one drift window (their facing
// strokes next to each other, no registration between them), so that
// relative drift is what limits them; when the two are written in
// different process steps, the later registers locally on the earlier.

// couplingWork is one coupled pair as the builder works on it.
type couplingWork struct {
	Coupling
	sa, sb int // the facing strokes (indices into builder.strokes), -1 if a side has none
}

// couplings collects the variant's tunnel gaps and declared couplings and
// finds, for each, the facing strokes of its two regions: the pair of
// strokes, one of each, nearest to each other.
func (b *builder) couplings() []couplingWork {
	byRegion := map[string][]int{}
	for i, s := range b.strokes {
		byRegion[s.Region] = append(byRegion[s.Region], i)
	}
	var out []couplingWork
	add := func(kind CouplingKind, a, c string, tol float64) {
		sa, sc := b.facing(byRegion[a], byRegion[c])
		cw := couplingWork{Coupling: Coupling{Kind: kind, A: a, B: c, ToleranceNM: tol}, sa: sa, sb: sc}
		out = append(out, cw)
	}
	for _, g := range b.lay.Variant.TunnelGaps {
		tol := g.ToleranceNM
		if tol <= 0 {
			tol = b.lay.Rules.TunnelGapToleranceNM
		}
		add(CoupledGap, g.A, g.B, tol)
	}
	for _, c := range b.lay.Variant.Couplings {
		add(CoupledPlacement, c.A, c.B, c.ToleranceNM)
	}
	return out
}

// facing returns the stroke of as and the stroke of bs nearest to each
// other (-1, -1 when either has none). O(|as|·|bs|·path points).
func (b *builder) facing(as, bs []int) (int, int) {
	best, ba, bb := math.Inf(1), -1, -1
	for _, i := range as {
		for _, j := range bs {
			if d := pathDistance(b.strokes[i].Path, b.strokes[j].Path); d < best {
				best, ba, bb = d, i, j
			}
		}
	}
	return ba, bb
}

// pathDistance returns the least distance between two polylines (a
// single point is a polyline of one point).
func pathDistance(p, q []r2.Point) float64 {
	best := math.Inf(1)
	segs := func(path []r2.Point, fn func(a, b r2.Point)) {
		if len(path) == 1 {
			fn(path[0], path[0])
		}
		for i := 0; i+1 < len(path); i++ {
			fn(path[i], path[i+1])
		}
	}
	segs(p, func(a, b r2.Point) {
		segs(q, func(c, d r2.Point) {
			best = math.Min(best, segmentDistance(a, b, c, d))
		})
	})
	return best
}

// segmentDistance returns the least distance between segments ab and cd.
func segmentDistance(a, b, c, d r2.Point) float64 {
	if segmentsCross(a, b, c, d) {
		return 0
	}
	return math.Min(math.Min(pointSegment(a, c, d), pointSegment(b, c, d)), math.Min(pointSegment(c, a, b), pointSegment(d, a, b)))
}

func pointSegment(p, a, b r2.Point) float64 {
	ab := b.Sub(a)
	l2 := ab.Dot(ab)
	if l2 == 0 {
		return p.Sub(a).Norm()
	}
	t := math.Max(0, math.Min(1, p.Sub(a).Dot(ab)/l2))
	return p.Sub(a.Add(ab.Mul(t))).Norm()
}

func segmentsCross(a, b, c, d r2.Point) bool {
	d1 := b.Sub(a).Cross(c.Sub(a))
	d2 := b.Sub(a).Cross(d.Sub(a))
	d3 := d.Sub(c).Cross(a.Sub(c))
	d4 := d.Sub(c).Cross(b.Sub(c))
	return d1*d2 < 0 && d3*d4 < 0
}

// joinBlocks reorders one step's writing order so that the facing strokes
// of every coupling whose two sides both lie in the step stand next to
// each other, at the place of the latest of them (so dopant windows stay
// last), and marks the jobs inside each block joined to the one before.
// Couplings sharing a stroke form one block. It returns the new order
// and, for each stroke index in the order, whether it is joined.
func joinBlocks(order []int, pairs [][2]int) ([]int, map[int]bool) {
	if len(pairs) == 0 {
		return order, nil
	}
	pos := map[int]int{}
	for k, i := range order {
		pos[i] = k
	}
	// Blocks: union of pairs sharing strokes, over positions.
	uf := unionfind.New(len(order))
	inBlock := map[int]bool{}
	for _, p := range pairs {
		ka, oka := pos[p[0]]
		kb, okb := pos[p[1]]
		if !oka || !okb {
			continue
		}
		uf.Union(ka, kb)
		inBlock[ka], inBlock[kb] = true, true
	}
	members := map[int][]int{} // root -> positions, ascending
	for k := range order {
		if inBlock[k] {
			r := uf.Find(k)
			members[r] = append(members[r], k)
		}
	}
	last := map[int]int{} // position of a block's latest member -> root
	for r, ks := range members {
		last[ks[len(ks)-1]] = r
	}
	out := make([]int, 0, len(order))
	joined := map[int]bool{}
	for k, i := range order {
		if r, ok := last[k]; ok {
			for n, m := range members[r] {
				out = append(out, order[m])
				if n > 0 {
					joined[order[m]] = true
				}
			}
			continue
		}
		if inBlock[k] {
			continue
		}
		out = append(out, i)
	}
	return out, joined
}
