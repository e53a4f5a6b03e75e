package lattice

import (
	"math"
	"slices"
)

// Span is the half-open interval [Lo, Hi) of a coordinate, in nm. Areas
// report the parts of a lattice line they cover as spans.
type Span struct {
	Lo, Hi float64
}

// IsEmpty reports whether the span holds no point.
func (s Span) IsEmpty() bool { return !(s.Lo < s.Hi) }

// closedSpan returns the span holding [lo, hi] including hi: a closed
// interval written as a half-open one.
func closedSpan(lo, hi float64) Span {
	return Span{Lo: lo, Hi: math.Nextafter(hi, math.Inf(1))}
}

// normalizeSpans sorts spans by Lo and merges overlapping or touching
// ones in place, dropping empty ones. It returns the shortened slice.
func normalizeSpans(s []Span) []Span {
	s = slices.DeleteFunc(s, Span.IsEmpty)
	if len(s) < 2 {
		return s
	}
	slices.SortFunc(s, func(a, b Span) int {
		switch {
		case a.Lo < b.Lo:
			return -1
		case a.Lo > b.Lo:
			return 1
		}
		return 0
	})
	out := s[:1]
	for _, sp := range s[1:] {
		last := &out[len(out)-1]
		if sp.Lo <= last.Hi {
			last.Hi = max(last.Hi, sp.Hi)
			continue
		}
		out = append(out, sp)
	}
	return out
}

// intersectSpans appends to dst the intersection of two normalized span
// lists and returns it. Complexity O(len(a)+len(b)).
func intersectSpans(dst, a, b []Span) []Span {
	i, j := 0, 0
	for i < len(a) && j < len(b) {
		lo, hi := max(a[i].Lo, b[j].Lo), min(a[i].Hi, b[j].Hi)
		if lo < hi {
			dst = append(dst, Span{lo, hi})
		}
		if a[i].Hi < b[j].Hi {
			i++
		} else {
			j++
		}
	}
	return dst
}

// subtractSpans appends to dst the parts of normalized list a outside
// normalized list b and returns it.
func subtractSpans(dst, a, b []Span) []Span {
	j := 0
	for _, sp := range a {
		lo := sp.Lo
		for j < len(b) && b[j].Hi <= lo {
			j++
		}
		k := j
		for k < len(b) && b[k].Lo < sp.Hi {
			if b[k].Lo > lo {
				dst = append(dst, Span{lo, b[k].Lo})
			}
			lo = max(lo, b[k].Hi)
			k++
		}
		if lo < sp.Hi {
			dst = append(dst, Span{lo, sp.Hi})
		}
	}
	return dst
}
