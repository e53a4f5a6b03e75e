package planner

import (
	"math"
	"runtime"

	"github.com/golang/geo/r2"

	"dimerpath/lattice"
)

// openWindows sets each window's OpenProbability and Probability from the
// exposure model: the probability that every one of its sites clears,
// that none of its neighbours does (the sites within one row spacing of
// its sites that no region paints: a cleared neighbour makes a bigger
// window than drawn), and that no spurious dangling bond appears along
// its own AP line (the profile's background, counted in full on the
// window: where along a line it lands is not known).
//
// The windows are independent: blocks of openBlock windows run on every
// core (onWorkers), each window's figures the same on any number. It
// returns ctx.Err() when Build's context is done, or a worker's panic as
// an *InternalError.
func (b *builder) openWindows(windows []Window) error {
	if len(windows) == 0 {
		return nil
	}
	surf := b.lay.Surface
	points := make([]r2.Point, len(windows))
	for i, w := range windows {
		points[i] = w.At
	}
	ix := newExposureIndex(b.strokes, &b.prof, surf.Width(), surf.Height(), points)
	painted := b.paintedSites()
	lineNM := make([]float64, len(windows))
	for _, st := range b.strokes {
		if st.Window >= 0 && st.Kind != StrokeDwell {
			lineNM[st.Window] += st.LengthNM * float64(max(st.Passes, 1))
		}
	}
	// Some 4·10^7 sites around 10^6 windows are asked about.
	valid := surf.Validator()
	spurious := b.prof.AP.SpuriousPer100NM / 100
	blocks := (len(windows) + openBlock - 1) / openBlock
	return onWorkers(b.ctx, blocks, min(runtime.GOMAXPROCS(0), blocks), func() func(int) {
		var own []r2.Point
		memo := newTailMemo()
		return func(blk int) {
			for i := blk * openBlock; i < min(len(windows), (blk+1)*openBlock); i++ {
				own = b.openWindow(windows, i, ix, painted, lineNM[i]*spurious, valid, own, memo)
			}
		}
	})
}

// openBlock is the number of windows a worker of openWindows takes at a
// time.
const openBlock = 256

// openWindow sets window i's figures (see openWindows); own is scratch,
// returned for reuse, and memo the worker's (see exposureIndex.at).
func (b *builder) openWindow(windows []Window, i int, ix *exposureIndex, painted *lattice.SiteSet, spuriousN float64,
	valid func(lattice.Site) bool, own []r2.Point, memo *recentMemo) []r2.Point {
	surf := b.lay.Surface
	const reach = lattice.RowSpacing + 1e-9
	w := b.placed[i]
	logP := -spuriousN
	own = own[:0]
	for d := w.FirstDimer; d <= w.LastDimer(); d++ {
		for side := range 2 {
			if site := (lattice.Site{Terrace: w.Terrace, Row: w.Row, Dimer: d, Side: side}); d >= 0 && valid(site) {
				own = append(own, surf.Position(site))
			}
		}
	}
	for row := w.Row - 1; row <= w.Row+1; row++ {
		for d := w.FirstDimer - 2; d <= w.LastDimer()+2; d++ {
			for side := range 2 {
				site := lattice.Site{Terrace: w.Terrace, Row: row, Dimer: d, Side: side}
				if row < 0 || d < 0 || !valid(site) {
					continue
				}
				mine := row == w.Row && d >= w.FirstDimer && d <= w.LastDimer()
				p := surf.Position(site)
				if !mine && (painted.Contains(site) || !within(own, p, reach)) {
					continue
				}
				x, _ := ix.at(p, memo)
				if mine {
					logP += math.Log(ClearProbability(x))
				} else {
					logP -= x
				}
			}
		}
	}
	windows[i].OpenProbability = math.Exp(logP)
	windows[i].Probability = windows[i].OpenProbability * windows[i].P1
	return own
}

// within reports whether p is within r of one of ps. It compares squared
// distances: a square root per site pair was a fifth of opening 10^6
// windows, and reach keeps a margin (1e-9 nm) far beyond their rounding.
func within(ps []r2.Point, p r2.Point, r float64) bool {
	for _, q := range ps {
		dx, dy := q.X-p.X, q.Y-p.Y
		if dx*dx+dy*dy <= r*r {
			return true
		}
	}
	return false
}
