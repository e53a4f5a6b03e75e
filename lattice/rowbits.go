package lattice

import (
	"iter"
	"math/bits"
)

// RowBits is the sites of one row of a SiteSet as a bitset: bit i (bit
// i%64 of word i/64) is the site with in-row index i = 2·Dimer+Side.
// It stores only the words from its first stored word on (an offset
// beside the words), so a row whose sites start far along the row does
// not hold the zeros before them; indices outside the stored words are
// not in the row. The zero value is an empty row. Its query methods take
// half-open ranges [from, to) of in-row indices and work a 64-bit word at
// a time.
type RowBits struct {
	off   int      // the word index (in-row index / 64) of words[0]
	words []uint64 // words off, off+1, ...
}

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

// Start returns the first in-row index the row stores: every site of the
// row has an index in [Start, End).
func (w RowBits) Start() int { return w.off * 64 }

// End returns the in-row index one past the last the row stores (Start
// for a row without storage).
func (w RowBits) End() int { return (w.off + len(w.words)) * 64 }

// word returns word k (in-row indices 64k..64k+63), zero outside the
// stored words.
func (w RowBits) word(k int) uint64 {
	if j := k - w.off; uint(j) < uint(len(w.words)) {
		return w.words[j]
	}
	return 0
}

// IsEmpty reports whether the row holds no site.
func (w RowBits) IsEmpty() bool {
	for _, x := range w.words {
		if x != 0 {
			return false
		}
	}
	return true
}

// Contains reports whether the row holds the site with in-row index i.
func (w RowBits) Contains(i int) bool {
	// A negative i gives a negative j (off >= 0), which fails the
	// unsigned bound.
	j := i>>6 - w.off
	return uint(j) < uint(len(w.words)) && w.words[j]>>(uint(i)&63)&1 != 0
}

// Count returns the number of the row's sites with in-row indices in
// [from, to).
func (w RowBits) Count(from, to int) int {
	return w.CountSides(from, to, BothSides)
}

// CountSides returns the number of the row's sites of the given sides
// with in-row indices in [from, to).
func (w RowBits) CountSides(from, to int, sides Sides) int {
	from, to = max(from, w.Start()), min(to, w.End())
	if from >= to {
		return 0
	}
	m := sides.mask()
	k0, k1 := from>>6-w.off, (to-1)>>6-w.off
	m0 := m & (^uint64(0) << (uint(from) & 63))
	m1 := m & (^uint64(0) >> (63 - (uint(to-1) & 63)))
	ws := w.words[k0 : k1+1]
	if len(ws) == 1 {
		return bits.OnesCount64(ws[0] & m0 & m1)
	}
	c := bits.OnesCount64(ws[0]&m0) + bits.OnesCount64(ws[len(ws)-1]&m1)
	for _, x := range ws[1 : len(ws)-1] {
		c += bits.OnesCount64(x & m)
	}
	return c
}

// Any reports whether the row holds a site of the given sides with
// in-row index in [from, to).
func (w RowBits) Any(from, to int, sides Sides) bool {
	from, to = max(from, w.Start()), min(to, w.End())
	if from >= to {
		return false
	}
	m := sides.mask()
	for k := from >> 6; k<<6 < to; k++ {
		if w.words[k-w.off]&m&wordMask(k, from, to) != 0 {
			return true
		}
	}
	return false
}

// selectsIn reports whether [from, to) holds an in-row index of the
// given sides.
func selectsIn(from, to int, sides Sides) bool {
	return from < to && sides&BothSides != 0 && (from+1 < to || SideOf(from)&sides != 0)
}

// All reports whether the row holds every site of the given sides with
// in-row index in [from, to); it is true for a range without such
// sites.
func (w RowBits) All(from, to int, sides Sides) bool {
	from = max(from, 0)
	m := sides.mask()
	if m == 0 || from >= to {
		return true
	}
	start, end := w.Start(), w.End()
	if len(w.words) == 0 {
		start, end = to, to
	}
	// A selected index before the first or beyond the last stored word.
	if selectsIn(from, min(to, start), sides) || selectsIn(max(from, end), to, sides) {
		return false
	}
	from, to = max(from, start), min(to, end)
	if from >= to {
		return true
	}
	for k := from >> 6; k<<6 < to; k++ {
		if ^w.words[k-w.off]&m&wordMask(k, from, to) != 0 {
			return false
		}
	}
	return true
}

// extent returns the in-row indices of the row's first and last sites
// whose bits are in m, or -1, -1 when there is none.
func (w RowBits) extent(m uint64) (first, last int) {
	j0 := -1
	for j, word := range w.words {
		if x := word & m; x != 0 {
			j0, first = j, (w.off+j)*64+bits.TrailingZeros64(x)
			break
		}
	}
	if j0 < 0 {
		return -1, -1
	}
	for j := len(w.words) - 1; ; j-- {
		if x := w.words[j] & m; x != 0 {
			return first, (w.off+j)*64 + 63 - bits.LeadingZeros64(x)
		}
	}
}

// DimerExtent returns the first and the last dimer of the row that hold
// a site of the given sides, or -1, -1 when there is none.
func (w RowBits) DimerExtent(sides Sides) (first, last int) {
	f, l := w.extent(sides.mask())
	if f < 0 {
		return -1, -1
	}
	return f / 2, l / 2
}

// RunCount returns the number of maximal runs of consecutive sites of
// the row (what Runs yields), counting each run's first site a word at
// a time.
func (w RowBits) RunCount() int {
	n := 0
	carry := uint64(0) // the previous word's last bit
	for _, x := range w.words {
		n += bits.OnesCount64(x &^ (x<<1 | carry))
		carry = x >> 63
	}
	return n
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
// sides whose sites the row does not hold (outside its stored words,
// every index).
func (w RowBits) Gaps(from, to int, sides Sides) iter.Seq[int] {
	return func(yield func(int) bool) {
		w.each(from, to, sides, false, yield)
	}
}

func (w RowBits) each(from, to int, sides Sides, in bool, yield func(int) bool) {
	from = max(from, 0)
	if in {
		from, to = max(from, w.Start()), min(to, w.End())
	}
	m := sides.mask()
	for k := from >> 6; k<<6 < to; k++ {
		word := w.word(k)
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

// ensure makes the row store words [lo, hi) (word indices, lo < hi),
// keeping its sites. Growth along the row appends (amortised doubling);
// growth back towards index 0 leaves as many spare words before the
// first needed one as the row held, so repeated growth either way costs
// amortised O(words).
func (w *RowBits) ensure(lo, hi int) {
	if hi > MaxRowIndex/64 {
		panic("lattice: site index beyond MaxRowIndex")
	}
	n := len(w.words)
	switch {
	case n == 0:
		w.off, w.words = lo, make([]uint64, hi-lo)
	case lo >= w.off && hi <= w.off+n:
	case lo >= w.off:
		w.words = append(w.words, make([]uint64, hi-w.off-n)...)
	default:
		start, end := max(0, min(lo, w.off-n)), max(hi, w.off+n)
		words := make([]uint64, end-start)
		copy(words[w.off-start:], w.words)
		w.off, w.words = start, words
	}
}

// setPattern sets (on) or clears the bits [from, to) of the row that are
// also set in the repeating 64-bit pattern, a word at a time. Setting
// grows the storage; clearing touches only stored words.
func (w *RowBits) setPattern(from, to int, pattern uint64, on bool) {
	if on {
		w.ensure(from>>6, (to-1)>>6+1)
	} else {
		from, to = max(from, w.Start()), min(to, w.End())
	}
	if from >= to {
		return
	}
	fw, tw := from>>6, (to-1)>>6
	ws := w.words[fw-w.off : tw-w.off+1]
	for j := range ws {
		mask := pattern
		if j == 0 {
			mask &= ^uint64(0) << (uint(from) % 64)
		}
		if j == len(ws)-1 {
			mask &= ^uint64(0) >> (63 - uint(to-1)%64)
		}
		if on {
			ws[j] |= mask
		} else {
			ws[j] &^= mask
		}
	}
}

// trimmed returns the row without its leading and trailing zero words
// (sharing its storage).
func (w RowBits) trimmed() RowBits {
	ws := w.words
	off := w.off
	for len(ws) > 0 && ws[0] == 0 {
		ws, off = ws[1:], off+1
	}
	for len(ws) > 0 && ws[len(ws)-1] == 0 {
		ws = ws[:len(ws)-1]
	}
	if len(ws) == 0 {
		return RowBits{}
	}
	return RowBits{off: off, words: ws}
}

// CountTerrace returns the number of the set's sites on terrace t.
func (s *SiteSet) CountTerrace(t int) int {
	if t < 0 || t >= len(s.terraces) {
		return 0
	}
	n := 0
	for _, r := range s.terraces[t].rows {
		for _, x := range r.words {
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
