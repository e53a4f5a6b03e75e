// Package unionfind keeps a partition of the integers 0..n-1 into
// disjoint sets (a disjoint-set forest, Galler & Fischer 1964, with path
// halving), for the checks that join touching regions and the exporters
// that cluster nearby strokes.
package unionfind

// Sets is a partition of 0..len-1; element i's parent is Sets[i], and a
// root is its own parent.
type Sets []int

// New returns n singleton sets.
func New(n int) Sets {
	s := make(Sets, n)
	for i := range s {
		s[i] = i
	}
	return s
}

// Find returns the root of i's set, halving the path on the way.
func (s Sets) Find(i int) int {
	for s[i] != i {
		s[i] = s[s[i]]
		i = s[i]
	}
	return i
}

// Union joins the sets of a and b and reports whether they were apart.
// The smaller root index becomes the root, so the result does not depend
// on the order of the calls that built the same partition.
func (s Sets) Union(a, b int) bool {
	ra, rb := s.Find(a), s.Find(b)
	if ra == rb {
		return false
	}
	s[max(ra, rb)] = min(ra, rb)
	return true
}
