package planner

import (
	"cmp"
	"math"
	"slices"
	"sort"

	"github.com/golang/geo/r1"
	"github.com/golang/geo/r2"

	"dimerpath/lattice"
)

// runSeg is one run of sites as a segment in field nm: the line through
// the run's dimer centres, from its first dimer to its last, along its
// terrace's rows.
type runSeg struct {
	a, b r2.Point
	rows lattice.RowDirection
	run  lattice.Run
}

// runSegments returns the runs of set as field segments.
func runSegments(surf *lattice.Surface, set *lattice.SiteSet) []runSeg {
	// The runs counted first, so the segments take one allocation (a
	// slanted edge has a run per site).
	out := make([]runSeg, 0, set.RunCount())
	for run := range set.Runs() {
		if run.Terrace >= len(surf.Terraces) {
			continue
		}
		d0, d1 := run.Start/2, (run.End()-1)/2
		a := surf.DimerCentre(run.Terrace, run.Row, d0)
		b := surf.DimerCentre(run.Terrace, run.Row, d1)
		out = append(out, runSeg{a: a, b: b, rows: surf.Terraces[run.Terrace].Rows, run: run})
	}
	return out
}

// chordIndex holds run segments for chord queries along lines of one
// field axis (dir: lines along x or along y): the rows along the lines
// sorted by their across coordinate, so a query looks only at the rows
// near its line, and the rows across them. Each segment is kept as its
// key and extent only.
type chordIndex struct {
	along  []chordSeg    // rows along the lines, by key: the across coordinate
	keys   []float64     // their keys
	across []chordSeg    // rows across the lines, by key: the along coordinate
	buf    []r1.Interval // chords' result
	mbuf   []r1.Interval // its rows across, merged
	// blocks bound the extents of the rows across in runs of
	// chordBlockRows, so that a query takes a run that its line meets
	// entirely (or misses entirely) at once; merged holds each run's own
	// merged intervals per (gap, pad) asked for.
	blocks []chordBlock
	merged []chordMerged
}

const chordBlockRows = 32

// chordBlock holds the least and greatest lo and hi of a run of rows.
type chordBlock struct{ minLo, maxLo, minHi, maxHi float64 }

// chordMerged is every block's intervals merged with gap, each row
// across the lines at key ± pad.
type chordMerged struct {
	gap, pad float64
	ivs      [][]r1.Interval
}

// blockMerged returns block b's rows across as intervals key ± pad,
// merged with gap (computed once per gap and pad).
func (ix *chordIndex) blockMerged(b int, gap, pad float64) []r1.Interval {
	var m *chordMerged
	for i := range ix.merged {
		if ix.merged[i].gap == gap && ix.merged[i].pad == pad {
			m = &ix.merged[i]
		}
	}
	if m == nil {
		ix.merged = append(ix.merged, chordMerged{gap: gap, pad: pad, ivs: make([][]r1.Interval, len(ix.blocks))})
		m = &ix.merged[len(ix.merged)-1]
	}
	if m.ivs[b] == nil {
		var mg intervalMerger
		for _, s := range ix.across[b*chordBlockRows : min((b+1)*chordBlockRows, len(ix.across))] {
			mg.push(r1.Interval{Lo: s.key - pad, Hi: s.key + pad}, gap)
		}
		m.ivs[b] = mg.flush()
	}
	return m.ivs[b]
}

// intervalMerger merges intervals given in order of Lo as
// lattice.MergeIntervals does: an interval starting within gap of the
// greatest end so far joins it. Merging parts of a list first and then
// their results gives the same intervals (a merged interval is a
// connected part of the union of the [Lo, Hi+gap]).
type intervalMerger struct {
	out []r1.Interval
	cur r1.Interval
	has bool
}

func (m *intervalMerger) push(iv r1.Interval, gap float64) {
	if m.has && iv.Lo <= m.cur.Hi+gap {
		m.cur.Hi = max(m.cur.Hi, iv.Hi)
		return
	}
	if m.has {
		m.out = append(m.out, m.cur)
	}
	m.cur, m.has = iv, true
}

func (m *intervalMerger) flush() []r1.Interval {
	if m.has {
		m.out = append(m.out, m.cur)
		m.has = false
	}
	return m.out
}

// chordSeg is one run segment: its line's coordinate (key) and the
// extent of its dimer centres along that line (lo, hi).
type chordSeg struct{ key, lo, hi float64 }

func newChordIndex(segs []runSeg, dir lattice.RowDirection) *chordIndex {
	ix := &chordIndex{}
	n := 0
	for _, s := range segs {
		if s.rows == dir {
			n++
		}
	}
	ix.along = make([]chordSeg, 0, n)
	ix.across = make([]chordSeg, 0, len(segs)-n)
	for _, s := range segs {
		au, ac := dir.Split(s.a)
		bu, bc := dir.Split(s.b)
		if s.rows == dir {
			ix.along = append(ix.along, chordSeg{ac, min(au, bu), max(au, bu)})
		} else {
			ix.across = append(ix.across, chordSeg{au, min(ac, bc), max(ac, bc)})
		}
	}
	byKey := func(a, b chordSeg) int { return cmp.Compare(a.key, b.key) }
	slices.SortFunc(ix.along, byKey)
	// Rows across the lines in order along them, so their chords come sorted.
	slices.SortFunc(ix.across, byKey)
	ix.keys = make([]float64, len(ix.along))
	for i, s := range ix.along {
		ix.keys[i] = s.key
	}
	for b := 0; b*chordBlockRows < len(ix.across); b++ {
		run := ix.across[b*chordBlockRows : min((b+1)*chordBlockRows, len(ix.across))]
		blk := chordBlock{minLo: run[0].lo, maxLo: run[0].lo, minHi: run[0].hi, maxHi: run[0].hi}
		for _, s := range run[1:] {
			blk.minLo, blk.maxLo = min(blk.minLo, s.lo), max(blk.maxLo, s.lo)
			blk.minHi, blk.maxHi = min(blk.minHi, s.hi), max(blk.maxHi, s.hi)
		}
		ix.blocks = append(ix.blocks, blk)
	}
	return ix
}

// chords returns the merged intervals, along the index's lines, covered
// by the sites that lie within half of the line at across coordinate c;
// intervals closer than gap are joined. With cells, each site counts with
// the extent of its lattice cell (half a dimer pitch along its row, half
// a row across); without, intervals run between site positions.
// The result is valid until the next call.
func (ix *chordIndex) chords(c, half, gap float64, cells bool) []r1.Interval {
	alongPad, acrossPad := 0.0, lattice.HOffset
	if cells {
		alongPad, acrossPad = lattice.DimerPitch/2, lattice.RowSpacing/2
	}
	sp := ix.buf[:0]
	defer func() { ix.buf = sp[:0] }()
	// Rows along the lines: their sites lie at the row centre ± HOffset.
	lo := sort.SearchFloat64s(ix.keys, c-half-lattice.HOffset)
	for i := lo; i < len(ix.along) && ix.keys[i] <= c+half+lattice.HOffset; i++ {
		s := ix.along[i]
		sp = append(sp, r1.Interval{Lo: s.lo - alongPad, Hi: s.hi + alongPad})
	}
	// Rows across the lines meet the line if their extent does: merged
	// here, in order along the line, a block of rows at once where the
	// line meets every row of it.
	mg := intervalMerger{out: ix.mbuf[:0]}
	for b, blk := range ix.blocks {
		if blk.maxHi+lattice.DimerPitch/2 < c-half || blk.minLo-lattice.DimerPitch/2 > c+half {
			continue // meets none
		}
		if blk.minHi+lattice.DimerPitch/2 >= c-half && blk.maxLo-lattice.DimerPitch/2 <= c+half {
			for _, iv := range ix.blockMerged(b, gap, acrossPad) {
				mg.push(iv, gap)
			}
			continue
		}
		for _, s := range ix.across[b*chordBlockRows : min((b+1)*chordBlockRows, len(ix.across))] {
			if s.hi+lattice.DimerPitch/2 < c-half || s.lo-lattice.DimerPitch/2 > c+half {
				continue
			}
			mg.push(r1.Interval{Lo: s.key - acrossPad, Hi: s.key + acrossPad}, gap)
		}
	}
	ix.mbuf = mg.flush()
	sp = append(sp, ix.mbuf...)
	return lattice.MergeIntervals(sp, gap)
}

// erode returns the sites of set whose every lattice neighbour within
// radius r (nm, measured between dimer centres on the same terrace) is
// also in set: the region less a band of width r along its edge. Rows of
// other terraces count as outside. Cost: O(rows·(r/RowSpacing)·runs per
// row).
func erode(set *lattice.SiteSet, r float64) *lattice.SiteSet {
	out := lattice.NewSiteSet()
	kmax := int(r / lattice.RowSpacing)
	type dimerRun = lattice.DimerRange // whole dimers
	rowRuns := func(t, row int) []dimerRun {
		var rs []dimerRun
		for i, j := range set.Row(t, row).Runs() {
			if lo, hi := (i+1)/2, j/2; hi > lo {
				rs = append(rs, dimerRun{Lo: lo, Hi: hi})
			}
		}
		return rs
	}
	for t := 0; t < set.TerraceCount(); t++ {
		rows := set.RowCount(t)
		cache := make(map[int][]dimerRun)
		get := func(row int) []dimerRun {
			if row < 0 || row >= rows {
				return nil
			}
			if rs, ok := cache[row]; ok {
				return rs
			}
			rs := rowRuns(t, row)
			cache[row] = rs
			return rs
		}
		for row := 0; row < rows; row++ {
			cur := get(row)
			for k := -kmax; k <= kmax && len(cur) > 0; k++ {
				dy := lattice.RowAcross(k)
				h := math.Sqrt(math.Max(0, r*r-dy*dy))
				m := int(math.Ceil(h/lattice.DimerPitch - 1e-9))
				var next []dimerRun
				other := get(row + k)
				// Dimers d of cur with [d-m, d+m] inside one run of other.
				i := 0
				for _, c := range cur {
					for i < len(other) && other[i].Hi <= c.Lo {
						i++
					}
					for j := i; j < len(other) && other[j].Lo < c.Hi; j++ {
						lo := max(c.Lo, other[j].Lo+m)
						hi := min(c.Hi, other[j].Hi-m)
						if hi > lo {
							next = append(next, dimerRun{Lo: lo, Hi: hi})
						}
					}
				}
				cur = next
			}
			for _, c := range cur {
				out.AddRun(t, row, 2*c.Lo, 2*c.Hi)
			}
		}
	}
	return out
}
