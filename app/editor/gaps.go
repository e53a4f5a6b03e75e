package editor

import (
	"fmt"
	"slices"

	"dimerpath/lattice/design"
)

// AddTunnelGap declares that regions a and b of the current variant are
// meant to be tunnel-coupled across a gap (an SET island and its
// leads): the checks then measure the gap against the rule's range and
// count the pair as connected.
func (s *Session) AddTunnelGap(a, b string) error {
	v := s.Variant()
	if v.Region(a) == nil || v.Region(b) == nil {
		return fmt.Errorf("tunnel gap %s – %s: both must be regions of variant %s", a, b, v.Name)
	}
	if a == b {
		return fmt.Errorf("tunnel gap %s – %s: a gap needs two different regions", a, b)
	}
	for _, g := range v.TunnelGaps {
		if g.A == a && g.B == b || g.A == b && g.B == a {
			return fmt.Errorf("the tunnel gap %s – %s is already declared", a, b)
		}
	}
	v.TunnelGaps = append(slices.Clone(v.TunnelGaps), design.TunnelGap{A: a, B: b})
	s.commit("declare tunnel gap "+a+" – "+b, "", ChangeRegions)
	return nil
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
