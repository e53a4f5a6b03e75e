package lattice

import (
	"iter"
	"math"
	"math/bits"

	"github.com/golang/geo/r2"
)

// SiteSet is a set of H sites stored as one bitset per dimer row: bit i of
// row r on terrace t is the site with in-row Index i. A terrace stores
// its rows from the first row it was given on, and a row its words from
// the first word it was given on (RowBits), so a set far from the
// field's origin does not hold the zeros before it. A full 1 µm x 1 µm
// field (about 6.8 million sites) takes under 1 MB, and union,
// difference and counting work a 64-bit word at a time.
//
// The zero value is an empty set ready to use. A SiteSet is not safe for
// concurrent mutation.
type SiteSet struct {
	terraces []terraceRows // [terrace]
}

// terraceRows is the stored rows of one terrace: rows[j] is row first+j.
type terraceRows struct {
	first int
	rows  []RowBits
}

// end returns one more than the terrace's last stored row (0 when it
// stores none).
func (tr *terraceRows) end() int {
	if len(tr.rows) == 0 {
		return 0
	}
	return tr.first + len(tr.rows)
}

// at returns the row, or the empty row when it is not stored.
func (tr *terraceRows) at(row int) RowBits {
	if j := row - tr.first; uint(j) < uint(len(tr.rows)) {
		return tr.rows[j]
	}
	return RowBits{}
}

// grow makes the terrace store rows [lo, hi) (lo < hi), keeping its rows;
// as RowBits.ensure, growth either way costs amortised O(rows).
func (tr *terraceRows) grow(lo, hi int) {
	n := len(tr.rows)
	switch {
	case n == 0:
		tr.first, tr.rows = lo, make([]RowBits, hi-lo)
	case lo >= tr.first && hi <= tr.first+n:
	case lo >= tr.first:
		tr.rows = append(tr.rows, make([]RowBits, hi-tr.first-n)...)
	default:
		start, end := max(0, min(lo, tr.first-n)), max(hi, tr.first+n)
		rows := make([]RowBits, end-start)
		copy(rows[tr.first-start:], tr.rows)
		tr.first, tr.rows = start, rows
	}
}

// Run is a maximal run of consecutive sites on one row: indices
// Start..Start+Len-1.
type Run struct {
	Terrace, Row int
	Start, Len   int
}

// End returns the index one past the run's last site.
func (r Run) End() int { return r.Start + r.Len }

// NewSiteSet returns an empty set.
func NewSiteSet() *SiteSet { return &SiteSet{} }

// terrace returns terrace t's rows, adding storage for the terrace when
// grow is set, or nil.
func (s *SiteSet) terrace(t int, grow bool) *terraceRows {
	if t >= len(s.terraces) {
		if !grow {
			return nil
		}
		if t >= MaxTerraces {
			panic("lattice: site address beyond MaxTerraces or MaxRows")
		}
		s.terraces = append(s.terraces, make([]terraceRows, t+1-len(s.terraces))...)
	}
	return &s.terraces[t]
}

func (s *SiteSet) row(terrace, row int, grow bool) *RowBits {
	if terrace < 0 || row < 0 {
		panic("lattice: negative site address")
	}
	if grow && (terrace >= MaxTerraces || row >= MaxRows) {
		panic("lattice: site address beyond MaxTerraces or MaxRows")
	}
	tr := s.terrace(terrace, grow)
	if tr == nil {
		return nil
	}
	if j := row - tr.first; uint(j) < uint(len(tr.rows)) {
		return &tr.rows[j]
	}
	if !grow {
		return nil
	}
	tr.grow(row, row+1)
	return &tr.rows[row-tr.first]
}

// Add inserts the site. It panics on a negative address or a side other
// than 0 or 1.
func (s *SiteSet) Add(site Site) {
	i := site.Index()
	if site.Dimer < 0 || site.Side < 0 || site.Side > 1 {
		panic("lattice: invalid site address " + site.String())
	}
	r := s.row(site.Terrace, site.Row, true)
	r.ensure(i>>6, i>>6+1)
	r.words[i>>6-r.off] |= 1 << (uint(i) % 64)
}

// Remove deletes the site if present.
func (s *SiteSet) Remove(site Site) {
	if site.Dimer < 0 || site.Terrace < 0 || site.Row < 0 || site.Side < 0 || site.Side > 1 {
		return
	}
	r := s.row(site.Terrace, site.Row, false)
	i := site.Index()
	if r == nil || !r.Contains(i) {
		return
	}
	r.words[i>>6-r.off] &^= 1 << (uint(i) % 64)
}

// Contains reports whether the site is in the set.
func (s *SiteSet) Contains(site Site) bool {
	if site.Dimer < 0 || site.Terrace < 0 || site.Row < 0 || site.Side < 0 || site.Side > 1 {
		return false
	}
	return s.Row(site.Terrace, site.Row).Contains(site.Index())
}

// AddRun inserts the sites with in-row indices [from, to) of one row.
// It panics on a negative address.
func (s *SiteSet) AddRun(terrace, row, from, to int) {
	if from < 0 {
		panic("lattice: negative site address")
	}
	if to <= from {
		return
	}
	s.row(terrace, row, true).setPattern(from, to, ^uint64(0), true)
}

// RemoveRun deletes the sites with in-row indices [from, to) of one row.
func (s *SiteSet) RemoveRun(terrace, row, from, to int) {
	if terrace < 0 || row < 0 {
		return
	}
	if r := s.row(terrace, row, false); r != nil {
		r.setPattern(from, to, ^uint64(0), false)
	}
}

// sidePattern[side] has the bits of one side's sites: even in-row
// indices are side 0, odd ones side 1.
var sidePattern = [2]uint64{0x5555555555555555, 0xAAAAAAAAAAAAAAAA}

// setStrided sets (on) or clears the side-`side` sites of dimers
// d0..d1 (inclusive) of one row, a word at a time.
func (s *SiteSet) setStrided(terrace, row, d0, d1, side int, on bool) {
	from, to := 2*d0+side, 2*d1+side+1
	if d0 < 0 {
		panic("lattice: negative site address")
	}
	if to <= from {
		return
	}
	if !on {
		if terrace < 0 || row < 0 {
			return
		}
		if r := s.row(terrace, row, false); r != nil {
			r.setPattern(from, to, sidePattern[side], false)
		}
		return
	}
	s.row(terrace, row, true).setPattern(from, to, sidePattern[side], true)
}

// Union adds every site of o to s and returns s.
func (s *SiteSet) Union(o *SiteSet) *SiteSet {
	for t := range o.terraces {
		otr := &o.terraces[t]
		for j, w := range otr.rows {
			if w = w.trimmed(); len(w.words) == 0 {
				continue
			}
			dst := s.row(t, otr.first+j, true)
			dst.ensure(w.off, w.off+len(w.words))
			d := dst.words[w.off-dst.off:]
			for k, x := range w.words {
				d[k] |= x
			}
		}
	}
	return s
}

// UnionOf returns a new set holding every site of the given sets (nil
// sets count as empty). Each terrace's words take one allocation, each
// row as long as the stored span of its sites among the sets, so the
// cost is one pass over the sets' words: cheaper than Union into an
// empty set when rows grow set by set.
func UnionOf(sets ...*SiteSet) *SiteSet {
	nt := 0
	for _, o := range sets {
		if o != nil {
			nt = max(nt, len(o.terraces))
		}
	}
	u := &SiteSet{terraces: make([]terraceRows, nt)}
	var ends []int // per row of a terrace, one past its last word
	for t := range u.terraces {
		// The rows' range, then each row's word range, then one
		// allocation for the terrace's words.
		lo, hi := math.MaxInt, 0
		for _, o := range sets {
			if o != nil && t < len(o.terraces) && len(o.terraces[t].rows) > 0 {
				lo, hi = min(lo, o.terraces[t].first), max(hi, o.terraces[t].end())
			}
		}
		if lo >= hi {
			continue
		}
		utr := &u.terraces[t]
		utr.first, utr.rows = lo, make([]RowBits, hi-lo)
		ends = append(ends[:0], make([]int, hi-lo)...)
		total := 0
		for j := range utr.rows {
			wlo, whi := math.MaxInt, 0
			for _, o := range sets {
				if o == nil || t >= len(o.terraces) {
					continue
				}
				if w := o.terraces[t].at(lo + j).trimmed(); len(w.words) > 0 {
					wlo, whi = min(wlo, w.off), max(whi, w.off+len(w.words))
				}
			}
			if wlo < whi {
				utr.rows[j].off, ends[j] = wlo, whi
				total += whi - wlo
			}
		}
		buf := make([]uint64, total)
		for j := range utr.rows {
			if n := ends[j] - utr.rows[j].off; n > 0 {
				// Capped, so a row that grows later reallocates
				// instead of running into the next row's words.
				utr.rows[j].words, buf = buf[:n:n], buf[n:]
			}
		}
		for _, o := range sets {
			if o == nil || t >= len(o.terraces) {
				continue
			}
			otr := &o.terraces[t]
			for j, w := range otr.rows {
				w = w.trimmed()
				if len(w.words) == 0 {
					continue
				}
				dst := &utr.rows[otr.first+j-lo]
				d := dst.words[w.off-dst.off:]
				for k, x := range w.words {
					d[k] |= x
				}
			}
		}
	}
	return u
}

// Difference removes every site of o from s and returns s.
func (s *SiteSet) Difference(o *SiteSet) *SiteSet {
	for t := range s.terraces {
		if t >= len(o.terraces) {
			break
		}
		str, otr := &s.terraces[t], &o.terraces[t]
		for j := range str.rows {
			a, b := str.rows[j], otr.at(str.first+j)
			lo, hi := max(a.off, b.off), min(a.off+len(a.words), b.off+len(b.words))
			for k := lo; k < hi; k++ {
				a.words[k-a.off] &^= b.words[k-b.off]
			}
		}
	}
	return s
}

// Intersect keeps only the sites of s that are also in o and returns s.
func (s *SiteSet) Intersect(o *SiteSet) *SiteSet {
	for t := range s.terraces {
		str := &s.terraces[t]
		var otr terraceRows
		if t < len(o.terraces) {
			otr = o.terraces[t]
		}
		for j := range str.rows {
			a, b := str.rows[j], otr.at(str.first+j)
			for k := range a.words {
				a.words[k] &= b.word(a.off + k)
			}
		}
	}
	return s
}

// Intersects reports whether s and o share at least one site.
func (s *SiteSet) Intersects(o *SiteSet) bool {
	for t := range min(len(s.terraces), len(o.terraces)) {
		str, otr := &s.terraces[t], &o.terraces[t]
		for j, a := range str.rows {
			b := otr.at(str.first + j)
			lo, hi := max(a.off, b.off), min(a.off+len(a.words), b.off+len(b.words))
			for k := lo; k < hi; k++ {
				if a.words[k-a.off]&b.words[k-b.off] != 0 {
					return true
				}
			}
		}
	}
	return false
}

// Count returns the number of sites in the set.
func (s *SiteSet) Count() int {
	n := 0
	for t := range s.terraces {
		n += s.CountTerrace(t)
	}
	return n
}

// IsEmpty reports whether the set holds no site.
func (s *SiteSet) IsEmpty() bool {
	for _, tr := range s.terraces {
		for _, w := range tr.rows {
			if !w.IsEmpty() {
				return false
			}
		}
	}
	return true
}

// Clone returns an independent copy of s. The copy stores only the rows
// and words from the first to the last holding a site, each terrace's
// words in one allocation.
func (s *SiteSet) Clone() *SiteSet {
	c := &SiteSet{terraces: make([]terraceRows, len(s.terraces))}
	for t, tr := range s.terraces {
		j0, j1, total := len(tr.rows), 0, 0
		for j, w := range tr.rows {
			if n := len(w.trimmed().words); n > 0 {
				j0, j1, total = min(j0, j), j+1, total+n
			}
		}
		if j0 >= j1 {
			continue
		}
		ctr := &c.terraces[t]
		ctr.first, ctr.rows = tr.first+j0, make([]RowBits, j1-j0)
		buf := make([]uint64, total)
		for j, w := range tr.rows[j0:j1] {
			w = w.trimmed()
			n := copy(buf, w.words)
			ctr.rows[j] = RowBits{off: w.off, words: buf[:n:n]}
			buf = buf[n:]
		}
	}
	return c
}

// Equal reports whether s and o hold the same sites.
func (s *SiteSet) Equal(o *SiteSet) bool {
	for _, pair := range [2][2]*SiteSet{{s, o}, {o, s}} {
		a, b := pair[0], pair[1]
		for t := range a.terraces {
			atr := &a.terraces[t]
			for j, w := range atr.rows {
				other := b.Row(t, atr.first+j)
				for k, x := range w.words {
					if x != other.word(w.off+k) {
						return false
					}
				}
			}
		}
	}
	return true
}

// Row returns the sites of one row as a bitset, bit i for in-row index
// i; it is empty for a row the set does not store. It aliases the set's
// storage: read it, do not keep or change it.
func (s *SiteSet) Row(terrace, row int) RowBits {
	if terrace < 0 || terrace >= len(s.terraces) {
		return RowBits{}
	}
	return s.terraces[terrace].at(row)
}

// TerraceCount returns one more than the highest terrace index the set
// has storage for.
func (s *SiteSet) TerraceCount() int { return len(s.terraces) }

// RowCount returns one more than the highest row of the terrace the set
// has storage for.
func (s *SiteSet) RowCount(terrace int) int {
	if terrace < 0 || terrace >= len(s.terraces) {
		return 0
	}
	return s.terraces[terrace].end()
}

// RowRange returns the rows [first, end) of the terrace the set stores:
// every row of the terrace holding a site lies in it; first == end when
// the set stores none.
func (s *SiteSet) RowRange(terrace int) (first, end int) {
	if terrace < 0 || terrace >= len(s.terraces) || len(s.terraces[terrace].rows) == 0 {
		return 0, 0
	}
	tr := &s.terraces[terrace]
	return tr.first, tr.end()
}

// All yields every site in row order: by terrace, then row, then in-row
// index.
func (s *SiteSet) All() iter.Seq[Site] {
	return func(yield func(Site) bool) {
		for t, tr := range s.terraces {
			for j, w := range tr.rows {
				for k, word := range w.words {
					for word != 0 {
						b := bits.TrailingZeros64(word)
						word &= word - 1
						if !yield(SiteAt(t, tr.first+j, (w.off+k)*64+b)) {
							return
						}
					}
				}
			}
		}
	}
}

// RunCount returns the number of runs Runs yields.
func (s *SiteSet) RunCount() int {
	n := 0
	for _, tr := range s.terraces {
		for _, w := range tr.rows {
			n += w.RunCount()
		}
	}
	return n
}

// Runs yields the maximal runs of consecutive sites in row order.
func (s *SiteSet) Runs() iter.Seq[Run] {
	return func(yield func(Run) bool) {
		for t, tr := range s.terraces {
			for j, w := range tr.rows {
				r := tr.first + j
				if !eachRun(w, func(start, end int) bool {
					return yield(Run{Terrace: t, Row: r, Start: start, Len: end - start})
				}) {
					return
				}
			}
		}
	}
}

// eachRun calls f(start, end) for each maximal run of set bits of w, and
// reports whether it ran to the end.
func eachRun(w RowBits, f func(start, end int) bool) bool {
	n := w.End()
	i := nextBit(w, w.Start(), true)
	for i < n {
		j := nextBit(w, i, false)
		if !f(i, j) {
			return false
		}
		i = nextBit(w, j, true)
	}
	return true
}

// nextBit returns the first index >= from (from at least w.Start())
// whose bit equals on, or w.End() if none.
func nextBit(w RowBits, from int, on bool) int {
	n := w.End()
	if from >= n {
		return n
	}
	k := from>>6 - w.off
	word := w.words[k]
	if !on {
		word = ^word
	}
	word &= ^uint64(0) << (uint(from) % 64)
	for {
		if word != 0 {
			return (w.off+k)*64 + bits.TrailingZeros64(word)
		}
		k++
		if k == len(w.words) {
			return n
		}
		word = w.words[k]
		if !on {
			word = ^word
		}
	}
}

// Bounds returns the smallest field rectangle, in nm, that holds the
// positions of every site of the set on surf; it is empty for an empty
// set.
func (s *SiteSet) Bounds(surf *Surface) r2.Rect {
	return s.bounds(surf, func(first, last Site) r2.Rect {
		return r2.RectFromPoints(surf.Position(first), surf.Position(last))
	})
}

// CellBounds returns the bounding box, in field nm, of the cells (see
// Surface.SiteCell) of the set's sites on surf: the extent of the area
// they write, so a rectangle snapped to cell edges has itself as its
// CellBounds. It is empty for an empty set.
func (s *SiteSet) CellBounds(surf *Surface) r2.Rect {
	return s.bounds(surf, func(first, last Site) r2.Rect {
		return surf.SiteCell(first).Union(surf.SiteCell(last))
	})
}

// bounds unions, over the set's terraces, the rectangle corner gives for
// the terrace's two extreme sites: side 0 of the lowest dimer on the
// first row and side 1 of the highest dimer on the last row. Side 0 is
// the low side across the row, so these are the corners of the box (a
// loose bound by at most one side's offset when that side is absent).
func (s *SiteSet) bounds(surf *Surface, corner func(first, last Site) r2.Rect) r2.Rect {
	b := r2.EmptyRect()
	for t, tr := range s.terraces {
		if t >= len(surf.Terraces) {
			break
		}
		lo, hi := math.MaxInt, -1
		rlo, rhi := -1, -1
		for j, w := range tr.rows {
			first, last := w.extent(^uint64(0))
			if first < 0 {
				continue
			}
			if rlo < 0 {
				rlo = tr.first + j
			}
			rhi = tr.first + j
			lo, hi = min(lo, first), max(hi, last)
		}
		if rlo < 0 {
			continue
		}
		b = b.Union(corner(Site{Terrace: t, Row: rlo, Dimer: lo >> 1, Side: 0}, Site{Terrace: t, Row: rhi, Dimer: hi >> 1, Side: 1}))
	}
	return b
}
