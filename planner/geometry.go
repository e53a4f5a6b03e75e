package planner

import (
	"cmp"
	"math"
	"math/bits"
	"slices"
	"sort"

	"github.com/golang/geo/r2"

	"dimerpath/lattice"
)

// runSeg is one run of sites as a segment in field nm: the line through
// the run's dimer centres, from its first dimer to its last. along says
// which field axis the segment runs along (0 x, 1 y).
type runSeg struct {
	a, b  r2.Point
	along int
	run   lattice.Run
}

// runSegments returns the runs of set as field segments.
func runSegments(surf *lattice.Surface, set *lattice.SiteSet) []runSeg {
	// About one run per row to start with.
	n := 0
	for t := 0; t < len(surf.Terraces) && t < set.TerraceCount(); t++ {
		for r := 0; r < set.RowCount(t); r++ {
			if len(set.Row(t, r)) > 0 {
				n++
			}
		}
	}
	out := make([]runSeg, 0, n)
	for run := range set.Runs() {
		if run.Terrace >= len(surf.Terraces) {
			continue
		}
		d0, d1 := run.Start/2, (run.End()-1)/2
		a := surf.DimerCentre(run.Terrace, run.Row, d0)
		b := surf.DimerCentre(run.Terrace, run.Row, d1)
		along := 0
		if surf.Terraces[run.Terrace].Rows == lattice.RowsAlongY {
			along = 1
		}
		out = append(out, runSeg{a: a, b: b, along: along, run: run})
	}
	return out
}

func coord(p r2.Point, axis int) float64 {
	if axis == 1 {
		return p.Y
	}
	return p.X
}

func pointOnAxes(along, across float64, axis int) r2.Point {
	if axis == 1 {
		return r2.Point{X: across, Y: along}
	}
	return r2.Point{X: along, Y: across}
}

// span is a closed interval [lo, hi] of one coordinate, in nm.
type span struct{ lo, hi float64 }

func (s span) length() float64 { return s.hi - s.lo }

// chordIndex holds run segments for chord queries along one field
// axis: the rows along that axis sorted by their across coordinate, so a
// query looks only at the rows near its line, and the rows across it.
// Each segment is kept as its key and extent only.
type chordIndex struct {
	along  []chordSeg // rows along axis, by key: the other coordinate
	keys   []float64  // their keys
	across []chordSeg // rows across axis, by key: the coordinate along axis
	buf    []span     // chords' result
}

// chordSeg is one run segment: its line's coordinate (key) and the
// extent of its dimer centres along that line (lo, hi).
type chordSeg struct{ key, lo, hi float64 }

func newChordIndex(segs []runSeg, axis int) *chordIndex {
	ix := &chordIndex{}
	other := 1 - axis
	n := 0
	for _, s := range segs {
		if s.along == axis {
			n++
		}
	}
	ix.along = make([]chordSeg, 0, n)
	ix.across = make([]chordSeg, 0, len(segs)-n)
	for _, s := range segs {
		if s.along == axis {
			a, b := coord(s.a, axis), coord(s.b, axis)
			ix.along = append(ix.along, chordSeg{coord(s.a, other), min(a, b), max(a, b)})
		} else {
			a, b := coord(s.a, other), coord(s.b, other)
			ix.across = append(ix.across, chordSeg{coord(s.a, axis), min(a, b), max(a, b)})
		}
	}
	byKey := func(a, b chordSeg) int { return cmp.Compare(a.key, b.key) }
	slices.SortFunc(ix.along, byKey)
	// Rows across the axis in order along it, so their chords come sorted.
	slices.SortFunc(ix.across, byKey)
	ix.keys = make([]float64, len(ix.along))
	for i, s := range ix.along {
		ix.keys[i] = s.key
	}
	return ix
}

// chords returns the merged intervals, along the index's axis, covered by
// the sites that lie within half of the line where the other coordinate
// equals c; intervals closer than gap are joined. With cells, each site
// counts with the extent of its lattice cell (half a dimer pitch along its
// row, half a row across); without, intervals run between site
// positions.
// The result is valid until the next call.
func (ix *chordIndex) chords(c, half, gap float64, cells bool) []span {
	alongPad, acrossPad := 0.0, lattice.HOffset
	if cells {
		alongPad, acrossPad = lattice.DimerPitch/2, lattice.RowSpacing/2
	}
	sp := ix.buf[:0]
	defer func() { ix.buf = sp[:0] }()
	// Rows along the axis: their sites lie at the row centre ± HOffset.
	lo := sort.SearchFloat64s(ix.keys, c-half-lattice.HOffset)
	for i := lo; i < len(ix.along) && ix.keys[i] <= c+half+lattice.HOffset; i++ {
		s := ix.along[i]
		sp = append(sp, span{s.lo - alongPad, s.hi + alongPad})
	}
	// Rows across the axis meet the line if their extent does.
	for _, s := range ix.across {
		if s.hi+lattice.DimerPitch/2 < c-half || s.lo-lattice.DimerPitch/2 > c+half {
			continue
		}
		sp = append(sp, span{s.key - acrossPad, s.key + acrossPad})
	}
	return mergeSpans(sp, gap)
}

func mergeSpans(sp []span, gap float64) []span {
	if len(sp) == 0 {
		return nil
	}
	if !slices.IsSortedFunc(sp, func(a, b span) int { return cmp.Compare(a.lo, b.lo) }) {
		slices.SortFunc(sp, func(a, b span) int { return cmp.Compare(a.lo, b.lo) })
	}
	out := sp[:1]
	for _, s := range sp[1:] {
		last := &out[len(out)-1]
		if s.lo <= last.hi+gap {
			last.hi = math.Max(last.hi, s.hi)
		} else {
			out = append(out, s)
		}
	}
	return out
}

// erode returns the sites of set whose every lattice neighbour within
// radius r (nm, measured between dimer centres on the same terrace) is
// also in set: the region less a band of width r along its edge. Rows of
// other terraces count as outside. Cost: O(rows·(r/RowSpacing)·runs per
// row).
func erode(set *lattice.SiteSet, r float64) *lattice.SiteSet {
	out := lattice.NewSiteSet()
	kmax := int(r / lattice.RowSpacing)
	type dimerRun struct{ lo, hi int } // whole dimers [lo, hi)
	rowRuns := func(t, row int) []dimerRun {
		var rs []dimerRun
		w := set.Row(t, row)
		if w == nil {
			return nil
		}
		i, n := 0, len(w)*64
		for i < n {
			for i < n && w[i/64]&(1<<(uint(i)%64)) == 0 {
				i++
			}
			j := i
			for j < n && w[j/64]&(1<<(uint(j)%64)) != 0 {
				j++
			}
			if j > i {
				lo, hi := (i+1)/2, j/2
				if hi > lo {
					rs = append(rs, dimerRun{lo, hi})
				}
			}
			i = j
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
				dy := float64(k) * lattice.RowSpacing
				h := math.Sqrt(math.Max(0, r*r-dy*dy))
				m := int(math.Ceil(h/lattice.DimerPitch - 1e-9))
				var next []dimerRun
				other := get(row + k)
				// Dimers d of cur with [d-m, d+m] inside one run of other.
				i := 0
				for _, c := range cur {
					for i < len(other) && other[i].hi <= c.lo {
						i++
					}
					for j := i; j < len(other) && other[j].lo < c.hi; j++ {
						lo := max(c.lo, other[j].lo+m)
						hi := min(c.hi, other[j].hi-m)
						if hi > lo {
							next = append(next, dimerRun{lo, hi})
						}
					}
				}
				cur = next
			}
			for _, c := range cur {
				out.AddRun(t, row, 2*c.lo, 2*c.hi)
			}
		}
	}
	return out
}

func trailingZeros(x uint64) int { return bits.TrailingZeros64(x) }
func leadingZeros(x uint64) int  { return bits.LeadingZeros64(x) }
