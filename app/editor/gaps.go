package editor

import (
	"slices"

	"dimerpath/lattice/design"
)

// AddTunnelGap declares that regions a and b of the current variant are
// meant to be tunnel-coupled across a gap (an SET island and its
// leads): the checks then measure the gap against the rule's range and
// count the pair as connected. The design's rules refuse a gap to a
// region the variant does not have, from a region to itself, or one
// already declared.
func (s *Session) AddTunnelGap(a, b string) error {
	v := s.Variant()
	return s.validCommit("declare tunnel gap "+a+" – "+b, "declare tunnel gap "+a+" – "+b, "", ChangeRegions, func() func() {
		gaps := v.TunnelGaps
		v.TunnelGaps = append(slices.Clone(gaps), design.TunnelGap{A: a, B: b})
		return func() { v.TunnelGaps = gaps }
	})
}

// RemoveTunnelGap removes tunnel gap i of the current variant.
func (s *Session) RemoveTunnelGap(i int) {
	v := s.Variant()
	if i < 0 || i >= len(v.TunnelGaps) {
		return
	}
	g := v.TunnelGaps[i]
	v.TunnelGaps = slices.Delete(slices.Clone(v.TunnelGaps), i, i+1)
	s.commit("remove tunnel gap "+g.A+" – "+g.B, "", ChangeRegions)
}

// GapWidth returns the width of the current variant's tunnel gap
// between a and b measured by the last check, and whether it is known
// and up to date.
func (s *Session) GapWidth(a, b string) (GapMeasure, bool) {
	if s.findState != s.hist.current() {
		return GapMeasure{}, false
	}
	w, ok := s.gapWidths[[2]string{a, b}]
	if !ok {
		w, ok = s.gapWidths[[2]string{b, a}]
	}
	return w, ok
}
