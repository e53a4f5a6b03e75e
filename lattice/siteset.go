package lattice

import (
	"iter"
	"math"
	"math/bits"

	"github.com/golang/geo/r2"
)

// SiteSet is a set of H sites stored as one bitset per dimer row: bit i of
// row r on terrace t is the site with in-row Index i. A full 1 µm x 1 µm
// field (about 6.8 million sites) takes under 1 MB, and union, difference
// and counting work a 64-bit word at a time.
//
// The zero value is an empty set ready to use. A SiteSet is not safe for
// concurrent mutation.
type SiteSet struct {
	terraces [][]RowBits // [terrace][row]
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

func (s *SiteSet) row(terrace, row int, grow bool) *RowBits {
	if terrace < 0 || row < 0 {
		panic("lattice: negative site address")
	}
	if grow && (terrace >= MaxTerraces || row >= MaxRows) {
		panic("lattice: site address beyond MaxTerraces or MaxRows")
	}
	if terrace >= len(s.terraces) {
		if !grow {
			return nil
		}
		s.terraces = append(s.terraces, make([][]RowBits, terrace+1-len(s.terraces))...)
	}
	rows := s.terraces[terrace]
	if row >= len(rows) {
		if !grow {
			return nil
		}
		rows = append(rows, make([]RowBits, row+1-len(rows))...)
		s.terraces[terrace] = rows
	}
	return &rows[row]
}

func (r *RowBits) ensure(words int) {
	if words > MaxRowIndex/64 {
		panic("lattice: site index beyond MaxRowIndex")
	}
	if len(*r) < words {
		*r = append(*r, make([]uint64, words-len(*r))...)
	}
}

// Add inserts the site. It panics on a negative address or a side other
// than 0 or 1.
func (s *SiteSet) Add(site Site) {
	i := site.Index()
	if site.Dimer < 0 || site.Side < 0 || site.Side > 1 {
		panic("lattice: invalid site address " + site.String())
	}
	r := s.row(site.Terrace, site.Row, true)
	r.ensure(i/64 + 1)
	(*r)[i/64] |= 1 << (uint(i) % 64)
}

// Remove deletes the site if present.
func (s *SiteSet) Remove(site Site) {
	if site.Dimer < 0 || site.Terrace < 0 || site.Row < 0 || site.Side < 0 || site.Side > 1 {
		return
	}
	r := s.row(site.Terrace, site.Row, false)
	i := site.Index()
	if r == nil || i/64 >= len(*r) {
		return
	}
	(*r)[i/64] &^= 1 << (uint(i) % 64)
}

// Contains reports whether the site is in the set.
func (s *SiteSet) Contains(site Site) bool {
	if site.Dimer < 0 || site.Terrace < 0 || site.Row < 0 || site.Side < 0 || site.Side > 1 {
		return false
	}
	r := s.row(site.Terrace, site.Row, false)
	i := site.Index()
	if r == nil || i/64 >= len(*r) {
		return false
	}
	return (*r)[i/64]&(1<<(uint(i)%64)) != 0
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
	r := s.row(terrace, row, true)
	r.ensure((to-1)/64 + 1)
	setRange(*r, from, to, true)
}

// RemoveRun deletes the sites with in-row indices [from, to) of one row.
func (s *SiteSet) RemoveRun(terrace, row, from, to int) {
	if terrace < 0 || row < 0 {
		return
	}
	r := s.row(terrace, row, false)
	if r == nil {
		return
	}
	from = max(from, 0)
	to = min(to, len(*r)*64)
	if to <= from {
		return
	}
	setRange(*r, from, to, false)
}

// setRange sets or clears bits [from, to) of w, which must be long enough.
func setRange(w []uint64, from, to int, on bool) {
	setPattern(w, from, to, ^uint64(0), on)
}

// setPattern sets or clears the bits [from, to) of w that are also set in
// the repeating 64-bit pattern, a word at a time; w must be long enough.
func setPattern(w []uint64, from, to int, pattern uint64, on bool) {
	fw, tw := from/64, (to-1)/64
	for k := fw; k <= tw; k++ {
		mask := pattern
		if k == fw {
			mask &= ^uint64(0) << (uint(from) % 64)
		}
		if k == tw {
			mask &= ^uint64(0) >> (63 - uint(to-1)%64)
		}
		if on {
			w[k] |= mask
		} else {
			w[k] &^= mask
		}
	}
}

// sidePattern[side] has the bits of one side's sites: even in-row
// indices are side 0, odd ones side 1.
var sidePattern = [2]uint64{0x5555555555555555, 0xAAAAAAAAAAAAAAAA}

// setStrided sets (on) or clears the side-`side` sites of dimers
// d0..d1 (inclusive) of one row, a word at a time.
func (s *SiteSet) setStrided(terrace, row, d0, d1, side int, on bool) {
	from, to := 2*d0+side, 2*d1+side+1
	if d0 < 0 || to <= from {
		if d0 < 0 {
			panic("lattice: negative site address")
		}
		return
	}
	if !on {
		if terrace < 0 || row < 0 {
			return
		}
		r := s.row(terrace, row, false)
		if r == nil {
			return
		}
		to = min(to, len(*r)*64)
		if to > from {
			setPattern(*r, from, to, sidePattern[side], false)
		}
		return
	}
	r := s.row(terrace, row, true)
	r.ensure((to-1)/64 + 1)
	setPattern(*r, from, to, sidePattern[side], true)
}

// Union adds every site of o to s and returns s.
func (s *SiteSet) Union(o *SiteSet) *SiteSet {
	for t, rows := range o.terraces {
		for r, bitsO := range rows {
			if len(bitsO) == 0 {
				continue
			}
			dst := s.row(t, r, true)
			dst.ensure(len(bitsO))
			for k, w := range bitsO {
				(*dst)[k] |= w
			}
		}
	}
	return s
}

// UnionOf returns a new set holding every site of the given sets (nil
// sets count as empty). Each row is allocated once, as long as the
// longest of that row among the sets, so the cost is one pass over the
// sets' words: cheaper than Union into an empty set when rows grow set
// by set.
func UnionOf(sets ...*SiteSet) *SiteSet {
	u := &SiteSet{}
	for _, o := range sets {
		if o == nil {
			continue
		}
		for len(u.terraces) < len(o.terraces) {
			u.terraces = append(u.terraces, nil)
		}
		for t, rows := range o.terraces {
			if len(rows) > len(u.terraces[t]) {
				u.terraces[t] = append(u.terraces[t], make([]RowBits, len(rows)-len(u.terraces[t]))...)
			}
		}
	}
	// Row lengths first, then one allocation per row.
	for t, rows := range u.terraces {
		for r := range rows {
			n := 0
			for _, o := range sets {
				if o != nil && t < len(o.terraces) && r < len(o.terraces[t]) {
					n = max(n, len(o.terraces[t][r]))
				}
			}
			if n > 0 {
				rows[r] = make(RowBits, n)
			}
		}
	}
	for _, o := range sets {
		if o == nil {
			continue
		}
		for t, rows := range o.terraces {
			for r, w := range rows {
				dst := u.terraces[t][r]
				for k, x := range w {
					dst[k] |= x
				}
			}
		}
	}
	return u
}

// Difference removes every site of o from s and returns s.
func (s *SiteSet) Difference(o *SiteSet) *SiteSet {
	for t, rows := range s.terraces {
		if t >= len(o.terraces) {
			break
		}
		for r := range rows {
			if r >= len(o.terraces[t]) {
				break
			}
			a, b := rows[r], o.terraces[t][r]
			for k := 0; k < len(a) && k < len(b); k++ {
				a[k] &^= b[k]
			}
		}
	}
	return s
}

// Intersect keeps only the sites of s that are also in o and returns s.
func (s *SiteSet) Intersect(o *SiteSet) *SiteSet {
	for t, rows := range s.terraces {
		for r := range rows {
			a := rows[r]
			var b RowBits
			if t < len(o.terraces) && r < len(o.terraces[t]) {
				b = o.terraces[t][r]
			}
			for k := range a {
				if k < len(b) {
					a[k] &= b[k]
				} else {
					a[k] = 0
				}
			}
		}
	}
	return s
}

// Intersects reports whether s and o share at least one site.
func (s *SiteSet) Intersects(o *SiteSet) bool {
	for t, rows := range s.terraces {
		if t >= len(o.terraces) {
			return false
		}
		for r, a := range rows {
			if r >= len(o.terraces[t]) {
				break
			}
			b := o.terraces[t][r]
			for k := 0; k < len(a) && k < len(b); k++ {
				if a[k]&b[k] != 0 {
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
	for _, rows := range s.terraces {
		for _, r := range rows {
			for _, w := range r {
				n += bits.OnesCount64(w)
			}
		}
	}
	return n
}

// IsEmpty reports whether the set holds no site.
func (s *SiteSet) IsEmpty() bool {
	for _, rows := range s.terraces {
		for _, r := range rows {
			for _, w := range r {
				if w != 0 {
					return false
				}
			}
		}
	}
	return true
}

// Clone returns an independent copy of s.
func (s *SiteSet) Clone() *SiteSet {
	c := &SiteSet{terraces: make([][]RowBits, len(s.terraces))}
	for t, rows := range s.terraces {
		c.terraces[t] = make([]RowBits, len(rows))
		for r, b := range rows {
			if len(b) > 0 {
				c.terraces[t][r] = append(RowBits(nil), b...)
			}
		}
	}
	return c
}

// Equal reports whether s and o hold the same sites.
func (s *SiteSet) Equal(o *SiteSet) bool {
	word := func(x *SiteSet, t, r, k int) uint64 {
		if t < len(x.terraces) && r < len(x.terraces[t]) && k < len(x.terraces[t][r]) {
			return x.terraces[t][r][k]
		}
		return 0
	}
	for _, pair := range [2][2]*SiteSet{{s, o}, {o, s}} {
		a, b := pair[0], pair[1]
		for t, rows := range a.terraces {
			for r, w := range rows {
				for k := range w {
					if w[k] != word(b, t, r, k) {
						return false
					}
				}
			}
		}
	}
	return true
}

// Row returns the sites of one row as a bitset, bit i for in-row index
// i, or nil. It aliases the set's storage: read it, do not keep or
// change it.
func (s *SiteSet) Row(terrace, row int) RowBits {
	if terrace < 0 || row < 0 || terrace >= len(s.terraces) || row >= len(s.terraces[terrace]) {
		return nil
	}
	return s.terraces[terrace][row]
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
	return len(s.terraces[terrace])
}

// All yields every site in row order: by terrace, then row, then in-row
// index.
func (s *SiteSet) All() iter.Seq[Site] {
	return func(yield func(Site) bool) {
		for t, rows := range s.terraces {
			for r, w := range rows {
				for k, word := range w {
					for word != 0 {
						b := bits.TrailingZeros64(word)
						word &= word - 1
						if !yield(SiteAt(t, r, k*64+b)) {
							return
						}
					}
				}
			}
		}
	}
}

// Runs yields the maximal runs of consecutive sites in row order.
func (s *SiteSet) Runs() iter.Seq[Run] {
	return func(yield func(Run) bool) {
		for t, rows := range s.terraces {
			for r, w := range rows {
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
	n := len(w) * 64
	i := nextBit(w, 0, true)
	for i < n {
		j := nextBit(w, i, false)
		if !f(i, j) {
			return false
		}
		i = nextBit(w, j, true)
	}
	return true
}

// nextBit returns the first index >= from whose bit equals on, or
// len(w)*64 if none.
func nextBit(w RowBits, from int, on bool) int {
	n := len(w) * 64
	if from >= n {
		return n
	}
	k := from / 64
	word := w[k]
	if !on {
		word = ^word
	}
	word &= ^uint64(0) << (uint(from) % 64)
	for {
		if word != 0 {
			return k*64 + bits.TrailingZeros64(word)
		}
		k++
		if k == len(w) {
			return n
		}
		word = w[k]
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
	for t, rows := range s.terraces {
		if t >= len(surf.Terraces) {
			break
		}
		lo, hi := math.MaxInt, -1
		rlo, rhi := -1, -1
		for r, w := range rows {
			first := nextBit(w, 0, true)
			if first == len(w)*64 {
				continue
			}
			if rlo < 0 {
				rlo = r
			}
			rhi = r
			lo = min(lo, first)
			for k := len(w) - 1; k >= 0; k-- {
				if w[k] != 0 {
					hi = max(hi, k*64+63-bits.LeadingZeros64(w[k]))
					break
				}
			}
		}
		if rlo < 0 {
			continue
		}
		b = b.Union(corner(Site{Terrace: t, Row: rlo, Dimer: lo >> 1, Side: 0}, Site{Terrace: t, Row: rhi, Dimer: hi >> 1, Side: 1}))
	}
	return b
}
