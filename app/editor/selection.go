package editor

import (
	"slices"

	"github.com/golang/geo/r2"
)

// Selection returns the selected regions of the current variant,
// primary first.
func (s *Session) Selection() []int { return s.sel }

// Active returns the primary selected region, the one tools paint into,
// or -1.
func (s *Session) Active() int {
	if len(s.sel) == 0 {
		return -1
	}
	return s.sel[0]
}

// Select makes regions the selection (primary first); out-of-range
// indices are dropped.
func (s *Session) Select(regions ...int) {
	n := len(s.Variant().Regions)
	var sel []int
	for _, i := range regions {
		if i >= 0 && i < n && !slices.Contains(sel, i) {
			sel = append(sel, i)
		}
	}
	s.sel = sel
	s.shapeSel = nil
	s.notify(ChangeSelection | ChangeSites)
}

// RegionAt returns the topmost region of the current variant holding
// the site nearest p, or -1.
func (s *Session) RegionAt(p r2.Point) int {
	site, _, ok := s.surf.Snap(p)
	if !ok {
		return -1
	}
	for i := len(s.Variant().Regions) - 1; i >= 0; i-- {
		if s.RegionSites(i).Contains(site) {
			return i
		}
	}
	return -1
}
