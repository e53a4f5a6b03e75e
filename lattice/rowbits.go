package lattice

import (
	"iter"
	"math/bits"
)

// RowBits is the sites of one row of a SiteSet as a bitset: bit i (bit
// i%64 of word i/64) is the site with in-row index i = 2·Dimer+Side.
// Indices beyond its last word are not in the row; nil is an empty row.
// Its query methods take half-open ranges [from, to) of in-row indices
// and work a 64-bit word at a time.
type RowBits []uint64

// Sides selects the H sites of a row by side in a range query.
type Sides uint8

const (
	Side0     Sides           = 1 << iota // the side-0 sites (even in-row indices)
	Side1                                 // the side-1 sites (odd in-row indices)
	BothSides = Side0 | Side1             // every site
)

// SideOf returns the Sides value selecting the given side, 0 or 1.
func SideOf(side int) Sides { return Side0 << uint(side&1) }

// sideMasks[s] has the bits of the sites Sides s selects in every word.
var sideMasks = [4]uint64{0, 0x5555555555555555, 0xAAAAAAAAAAAAAAAA, ^uint64(0)}

func (s Sides) mask() uint64 { return sideMasks[s&BothSides] }

// wordMask returns the bits of word k (indices 64k..64k+63) that lie in
// [from, to).
func wordMask(k, from, to int) uint64 {
	m := ^uint64(0)
	if lo := from - k*64; lo > 0 {
		m <<= uint(lo)
	}
	if hi := to - k*64; hi < 64 {
		m &= (1 << uint(hi)) - 1
	}
	return m
}

// Contains reports whether the row holds the site with in-row index i.
func (w RowBits) Contains(i int) bool {
	return i >= 0 && i/64 < len(w) && w[i/64]&(1<<(uint(i)%64)) != 0
}

// Count returns the number of the row's sites with in-row indices in
// [from, to).
func (w RowBits) Count(from, to int) int {
	from, to = max(from, 0), min(to, len(w)*64)
	if from >= to {
		return 0
	}
	k0, k1 := from>>6, (to-1)>>6
	m0 := ^uint64(0) << (uint(from) & 63)
	m1 := ^uint64(0) >> (63 - (uint(to-1) & 63))
	if k0 == k1 {
		return bits.OnesCount64(w[k0] & m0 & m1)
	}
	c := bits.OnesCount64(w[k0]&m0) + bits.OnesCount64(w[k1]&m1)
	for k := k0 + 1; k < k1; k++ {
		c += bits.OnesCount64(w[k])
	}
	return c
}

// Any reports whether the row holds a site of the given sides with
// in-row index in [from, to).
func (w RowBits) Any(from, to int, sides Sides) bool {
	from, to = max(from, 0), min(to, len(w)*64)
	m := sides.mask()
	for k := from / 64; k*64 < to; k++ {
		if w[k]&m&wordMask(k, from, to) != 0 {
			return true
		}
	}
	return false
}

// All reports whether the row holds every site of the given sides with
// in-row index in [from, to); it is true for a range without such
// sites.
func (w RowBits) All(from, to int, sides Sides) bool {
	from = max(from, 0)
	m := sides.mask()
	if m == 0 {
		return true
	}
	end := len(w) * 64
	if b := max(from, end); b < to && (b+1 < to || SideOf(b)&sides != 0) {
		return false // a selected index beyond the last word
	}
	to = min(to, end)
	for k := from / 64; k*64 < to; k++ {
		if ^w[k]&m&wordMask(k, from, to) != 0 {
			return false
		}
	}
	return true
}

// DimerExtent returns the first and the last dimer of the row that hold
// a site of the given sides, or -1, -1 when there is none.
func (w RowBits) DimerExtent(sides Sides) (first, last int) {
	m := sides.mask()
	first = -1
	for k, word := range w {
		if x := word & m; x != 0 {
			first = (k*64 + bits.TrailingZeros64(x)) / 2
			break
		}
	}
	if first < 0 {
		return -1, -1
	}
	for k := len(w) - 1; ; k-- {
		if x := w[k] & m; x != 0 {
			return first, (k*64 + 63 - bits.LeadingZeros64(x)) / 2
		}
	}
}

// Runs yields the maximal runs of consecutive sites of the row as their
// in-row index ranges [start, end), in order.
func (w RowBits) Runs() iter.Seq2[int, int] {
	return func(yield func(start, end int) bool) {
		eachRun(w, yield)
	}
}

// Sites yields, in order, the in-row indices in [from, to) of the row's
// sites of the given sides.
func (w RowBits) Sites(from, to int, sides Sides) iter.Seq[int] {
	return func(yield func(int) bool) {
		w.each(from, to, sides, true, yield)
	}
}

// Gaps yields, in order, the in-row indices in [from, to) of the given
// sides whose sites the row does not hold (beyond its last word, every
// index).
func (w RowBits) Gaps(from, to int, sides Sides) iter.Seq[int] {
	return func(yield func(int) bool) {
		w.each(from, to, sides, false, yield)
	}
}

func (w RowBits) each(from, to int, sides Sides, in bool, yield func(int) bool) {
	from = max(from, 0)
	if in {
		to = min(to, len(w)*64)
	}
	m := sides.mask()
	for k := from / 64; k*64 < to; k++ {
		var word uint64
		if k < len(w) {
			word = w[k]
		}
		if !in {
			word = ^word
		}
		x := word & m & wordMask(k, from, to)
		for x != 0 {
			b := bits.TrailingZeros64(x)
			x &= x - 1
			if !yield(k*64 + b) {
				return
			}
		}
	}
}

// CountTerrace returns the number of the set's sites on terrace t.
func (s *SiteSet) CountTerrace(t int) int {
	if t < 0 || t >= len(s.terraces) {
		return 0
	}
	n := 0
	for _, r := range s.terraces[t] {
		for _, x := range r {
			n += bits.OnesCount64(x)
		}
	}
	return n
}

// CountRange returns the number of the set's sites of one row with
// in-row indices in [from, to).
func (s *SiteSet) CountRange(terrace, row, from, to int) int {
	return s.Row(terrace, row).Count(from, to)
}

// WholeDimers returns a new set holding every dimer of which s holds at
// least one site, both sites of each.
func (s *SiteSet) WholeDimers() *SiteSet {
	out := NewSiteSet()
	for run := range s.Runs() {
		out.AddRun(run.Terrace, run.Row, run.Start&^1, (run.End()+1)&^1)
	}
	return out
}
