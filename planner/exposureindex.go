package planner

import (
	"math"
	"slices"

	"github.com/golang/geo/r2"

	"dimerpath/lattice/design"
)

// exposureIndex sums the exposure (see ExposureModel) of every stroke at
// the points the planner asks about one by one (the sites of dopant
// windows and their neighbours). Strokes are kept as straight pieces and
// dwell points in a uniform grid of small cells, each listing the pieces
// whose reach (where a piece's exposure falls below exposureNeglect)
// touches it; only cells near the points of interest (given when the
// index is made) are filled, so strokes far from them cost a look at a
// coarse mask.
type exposureIndex struct {
	nx, ny int
	// block numbers the wanted coarse cells (−1: not wanted); the items
	// listed in fine cell k of block b are items[start[b·B+k]:start[b·B+k+1]]
	// (B = indexCoarse², k = row·indexCoarse + column within the block):
	// indices into segs (≥ 0) or ^dots (< 0), in stroke order.
	block []int32
	cnx   int // coarse cells across
	start []int32
	items []int32
	segs  []expSeg
	dots  []expDot
	own   float64 // exposure of a dwell's own site
	prof  *Profile
}

// expSeg is one straight piece of a line stroke: from a to b (length L,
// unit direction u), all passes; beyond reach across it or beyond its
// ends it gives less than exposureNeglect.
type expSeg struct {
	a, u        r2.Point
	L, reach    float64
	peak, sigma float64
	stroke      int32
}

// expDot is a dwell.
type expDot struct {
	at     r2.Point
	stroke int32
}

// exposureNeglect is the exposure of one piece below which it is left out
// of a sum: 10⁻⁶ clears a site with probability 10⁻⁶.
const exposureNeglect = 1e-6

// indexCellNM is the side of the index's cells, indexCoarse how many of
// them a coarse cell of the mask holds along each axis.
const (
	indexCellNM = 2.0
	indexCoarse = 16
)

// newExposureIndex indexes the strokes around the points of interest
// (within reach of any of them, up to indexCellNM·indexCoarse nm).
func newExposureIndex(strokes []Stroke, prof *Profile, fieldW, fieldH float64, points []r2.Point) *exposureIndex {
	ix := &exposureIndex{prof: prof, own: prof.dwellOwnExposure()}
	ix.nx = max(1, int(math.Ceil(fieldW/indexCellNM)))
	ix.ny = max(1, int(math.Ceil(fieldH/indexCellNM)))
	ix.cnx = ix.nx/indexCoarse + 1
	ix.block = make([]int32, ix.cnx*(ix.ny/indexCoarse+1))
	for i := range ix.block {
		ix.block[i] = -1
	}
	blocks := int32(0)
	for _, p := range points {
		i, j := ix.col(p.X)/indexCoarse, ix.row(p.Y)/indexCoarse
		for dj := -1; dj <= 1; dj++ {
			for di := -1; di <= 1; di++ {
				if ii, jj := i+di, j+dj; ii >= 0 && jj >= 0 && ii < ix.cnx && jj*ix.cnx+ii < len(ix.block) && ix.block[jj*ix.cnx+ii] < 0 {
					ix.block[jj*ix.cnx+ii] = blocks
					blocks++
				}
			}
		}
	}
	lines := map[design.Mode]LineModel{design.ModeAP: prof.Line(design.ModeAP), design.ModeFE: prof.Line(design.ModeFE)}
	dotReach := prof.Dwell.SigmaNM * math.Sqrt(2*math.Log(prof.Dwell.Completion/exposureNeglect))
	// Every piece and dwell, twice: to count each cell's items, then to
	// keep and place them (one allocation for all lists, no map).
	type piece struct {
		a, b        r2.Point
		reach, peak float64
		sigma       float64
		stroke      int32
		item        int32 // index into segs (≥ 0) or ^index into dots
	}
	each := func(f func(p piece)) {
		nseg, ndot := int32(0), int32(0)
		for si := range strokes {
			st := &strokes[si]
			if st.Kind == StrokeDwell {
				if len(st.Path) == 0 {
					continue
				}
				f(piece{a: st.Path[0], b: st.Path[0], reach: dotReach, stroke: int32(si), item: ^ndot})
				ndot++
				continue
			}
			l := lines[st.Mode]
			peak := l.PassPeak * float64(max(st.Passes, 1))
			if !(peak > exposureNeglect) {
				continue
			}
			reach := l.SigmaNM * math.Sqrt(2*math.Log(peak/exposureNeglect))
			for k := 0; k+1 < len(st.Path); k++ {
				a, b := st.Path[k], st.Path[k+1]
				if a == b {
					continue
				}
				f(piece{a: a, b: b, reach: reach, peak: peak, sigma: l.SigmaNM, stroke: int32(si), item: nseg})
				nseg++
			}
		}
	}
	count := make([]int32, int(blocks)*indexCoarse*indexCoarse+1)
	nseg, ndot := 0, 0
	each(func(p piece) {
		if p.item >= 0 {
			nseg++
		} else {
			ndot++
		}
		ix.insert(p.a, p.b, p.reach, func(k int32) { count[k+1]++ })
	})
	ix.segs, ix.dots = make([]expSeg, 0, nseg), make([]expDot, 0, ndot)
	for k := 1; k < len(count); k++ {
		count[k] += count[k-1]
	}
	ix.start = count
	ix.items = make([]int32, count[len(count)-1])
	next := slices.Clone(count[:len(count)-1])
	each(func(p piece) {
		if p.item >= 0 {
			L := p.b.Sub(p.a).Norm()
			ix.segs = append(ix.segs, expSeg{a: p.a, u: p.b.Sub(p.a).Mul(1 / L), L: L, reach: p.reach, peak: p.peak, sigma: p.sigma, stroke: p.stroke})
		} else {
			ix.dots = append(ix.dots, expDot{at: p.a, stroke: p.stroke})
		}
		ix.insert(p.a, p.b, p.reach, func(k int32) { ix.items[next[k]] = p.item; next[k]++ })
	})
	return ix
}

// insert calls add with every wanted cell (see exposureIndex.start) within
// reach of the piece a→b: the cells of its box widened by reach, in wanted
// coarse cells, and within reach of the line through a and b.
func (ix *exposureIndex) insert(a, b r2.Point, reach float64, add func(k int32)) {
	i0, i1 := ix.col(math.Min(a.X, b.X)-reach), ix.col(math.Max(a.X, b.X)+reach)
	j0, j1 := ix.row(math.Min(a.Y, b.Y)-reach), ix.row(math.Max(a.Y, b.Y)+reach)
	ab := b.Sub(a)
	L := ab.Norm()
	half := indexCellNM * math.Sqrt2 / 2 // a cell's centre to its corner
	for cj := j0 / indexCoarse; cj <= j1/indexCoarse; cj++ {
		for ci := i0 / indexCoarse; ci <= i1/indexCoarse; ci++ {
			blk := ix.block[cj*ix.cnx+ci]
			if blk < 0 {
				continue
			}
			for j := max(j0, cj*indexCoarse); j <= min(j1, cj*indexCoarse+indexCoarse-1); j++ {
				for i := max(i0, ci*indexCoarse); i <= min(i1, ci*indexCoarse+indexCoarse-1); i++ {
					if L > 0 {
						c := r2.Point{X: (float64(i) + 0.5) * indexCellNM, Y: (float64(j) + 0.5) * indexCellNM}
						if math.Abs(ab.Cross(c.Sub(a)))/L > reach+half {
							continue
						}
					}
					add(blk*indexCoarse*indexCoarse + int32((j-cj*indexCoarse)*indexCoarse+i-ci*indexCoarse))
				}
			}
		}
	}
}

// cellItems returns the items listed in the cell holding p.
func (ix *exposureIndex) cellItems(p r2.Point) []int32 {
	i, j := ix.col(p.X), ix.row(p.Y)
	ci, cj := i/indexCoarse, j/indexCoarse
	blk := ix.block[cj*ix.cnx+ci]
	if blk < 0 {
		return nil
	}
	k := blk*indexCoarse*indexCoarse + int32((j-cj*indexCoarse)*indexCoarse+i-ci*indexCoarse)
	return ix.items[ix.start[k]:ix.start[k+1]]
}

// col and row return the cell holding x or y, clamped to the index. They
// truncate instead of taking the floor: the two differ only below 0,
// where the clamp makes both 0 (TestExposureIndexCells); math.Floor is a
// call on amd64 and they are asked some 10^8 times at 10^6 windows.
// Dividing by the constant (a power of two) lets
// the compiler multiply by its exact reciprocal.
func (ix *exposureIndex) col(x float64) int {
	return min(max(int(x/indexCellNM), 0), ix.nx-1)
}

func (ix *exposureIndex) row(y float64) int {
	return min(max(int(y/indexCellNM), 0), ix.ny-1)
}

// at returns the exposure at p summed over every stroke: each straight
// piece by lineExposure, each dwell by its linearised neighbour exposure,
// except that a dwell parked on p (within 0.05 nm) gives its own site's
// exposure −ln(1 − completion). most is the stroke that gives the most.
// memo (one per goroutine) keeps Φ beyond fastPhi's table.
func (ix *exposureIndex) at(p r2.Point, memo *recentMemo) (x float64, most int32) {
	most = -1
	best := 0.0
	for _, item := range ix.cellItems(p) {
		var e float64
		var who int32
		if item >= 0 {
			s := &ix.segs[item]
			ap := p.Sub(s.a)
			along, across := ap.Dot(s.u), math.Abs(s.u.Cross(ap))
			if across > s.reach || along < -s.reach || along > s.L+s.reach {
				continue
			}
			// lineExposure from the tables (relative error below 10⁻⁹);
			// slantBand is fastPhi(b) − fastPhi(a) bit for bit without the
			// erfc of a site well inside the piece (a below −8, b above 8).
			e = s.peak * gauss(across, s.sigma) * slantBandMemo((s.L-along)/s.sigma, -along/s.sigma, memo)
			who = s.stroke
		} else {
			d := &ix.dots[^item]
			dist := p.Sub(d.at).Norm()
			if dist <= 0.05 {
				e = ix.own
			} else {
				e = ix.prof.dwellExposure(gauss(dist, ix.prof.Dwell.SigmaNM))
			}
			who = d.stroke
		}
		x += e
		if e > best {
			best, most = e, who
		}
	}
	return x, most
}
