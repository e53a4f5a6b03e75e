package lattice

import (
	"cmp"
	"slices"

	"github.com/golang/geo/r1"
)

// Interval lists. Lattice lines are cut into intervals of one coordinate
// (r1.Interval, closed, in nm): an Area's spans on a line, a terrace's
// spans, the along-row extents of a set's runs. A list is normalized
// when it is sorted by Lo and its intervals are disjoint and of positive
// length (Lo < Hi). The list functions treat intervals as sets of
// positive length: an interval that shrinks to a point is dropped.

// NormalizeIntervals sorts s by Lo, merges overlapping or touching
// intervals and drops those of zero length, in place, and returns the
// shortened slice. Complexity O(n log n), O(n) when s is sorted.
func NormalizeIntervals(s []r1.Interval) []r1.Interval {
	s = slices.DeleteFunc(s, func(iv r1.Interval) bool { return !(iv.Lo < iv.Hi) })
	return MergeIntervals(s, 0)
}

// MergeIntervals sorts s by Lo and joins, in place, the intervals that
// overlap or lie within gap of each other, and returns the shortened
// slice. It keeps intervals of zero length. Complexity O(n log n), O(n)
// when s is sorted.
func MergeIntervals(s []r1.Interval, gap float64) []r1.Interval {
	if len(s) < 2 {
		return s
	}
	byLo := func(a, b r1.Interval) int { return cmp.Compare(a.Lo, b.Lo) }
	if !slices.IsSortedFunc(s, byLo) {
		slices.SortFunc(s, byLo)
	}
	out := s[:1]
	for _, iv := range s[1:] {
		last := &out[len(out)-1]
		if iv.Lo <= last.Hi+gap {
			last.Hi = max(last.Hi, iv.Hi)
			continue
		}
		out = append(out, iv)
	}
	return out
}

// IntersectIntervals appends to dst the intersection of the normalized
// lists a and b and returns it. Complexity O(len(a)+len(b)).
func IntersectIntervals(dst, a, b []r1.Interval) []r1.Interval {
	i, j := 0, 0
	for i < len(a) && j < len(b) {
		lo, hi := max(a[i].Lo, b[j].Lo), min(a[i].Hi, b[j].Hi)
		if lo < hi {
			dst = append(dst, r1.Interval{Lo: lo, Hi: hi})
		}
		if a[i].Hi < b[j].Hi {
			i++
		} else {
			j++
		}
	}
	return dst
}

// SubtractIntervals appends to dst the parts of the normalized list a
// outside the normalized list b and returns it. Complexity
// O(len(a)+len(b)).
func SubtractIntervals(dst, a, b []r1.Interval) []r1.Interval {
	j := 0
	for _, iv := range a {
		lo := iv.Lo
		for j < len(b) && b[j].Hi <= lo {
			j++
		}
		k := j
		for k < len(b) && b[k].Lo < iv.Hi {
			if b[k].Lo > lo {
				dst = append(dst, r1.Interval{Lo: lo, Hi: b[k].Lo})
			}
			lo = max(lo, b[k].Hi)
			k++
		}
		if lo < iv.Hi {
			dst = append(dst, r1.Interval{Lo: lo, Hi: iv.Hi})
		}
	}
	return dst
}

// SearchIntervals returns the index of the first interval of the
// normalized list s whose Hi is at least x, or len(s): the only
// interval that may hold x. Complexity O(log n).
func SearchIntervals(s []r1.Interval, x float64) int {
	lo, hi := 0, len(s)
	for lo < hi {
		m := int(uint(lo+hi) >> 1)
		if s[m].Hi >= x {
			hi = m
		} else {
			lo = m + 1
		}
	}
	return lo
}
