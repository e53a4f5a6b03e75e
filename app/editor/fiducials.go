package editor

import (
	"fmt"
	"slices"
	"strings"

	"github.com/golang/geo/r2"

	"dimerpath/lattice/design"
)

// AddFiducial places a new fiducial mark at p (nm) and returns its index.
func (s *Session) AddFiducial(p r2.Point) int {
	used := map[string]bool{}
	for _, f := range s.d.Fiducials {
		used[f.Name] = true
	}
	name := ""
	for k := len(s.d.Fiducials) + 1; ; k++ {
		if name = fmt.Sprintf("F%d", k); !used[name] {
			break
		}
	}
	s.d.Fiducials = append(s.d.Fiducials, design.Fiducial{Name: name, AtNM: [2]float64{round2(p.X), round2(p.Y)}})
	s.commit("add fiducial "+name, "", ChangeFiducials|ChangeSites)
	return len(s.d.Fiducials) - 1
}

// SetFiducial renames and moves fiducial i. The design's rules refuse an
// empty name, one another fiducial has, and a position outside the
// field.
func (s *Session) SetFiducial(i int, name string, at r2.Point) error {
	if i < 0 || i >= len(s.d.Fiducials) {
		return fmt.Errorf("no fiducial %d", i)
	}
	name = strings.TrimSpace(name)
	old := s.d.Fiducials[i]
	f := design.Fiducial{Name: name, AtNM: [2]float64{at.X, at.Y}}
	if f == old {
		return nil
	}
	return s.validCommit(fmt.Sprintf("set fiducial %s to %q at (%g, %g) nm", old.Name, name, at.X, at.Y), "edit fiducial "+name, fmt.Sprintf("fiducial-%d", i), ChangeFiducials|ChangeSites, func() func() {
		s.d.Fiducials[i] = f
		return func() { s.d.Fiducials[i] = old }
	})
}

// DeleteFiducial removes fiducial i.
func (s *Session) DeleteFiducial(i int) {
	if i < 0 || i >= len(s.d.Fiducials) {
		return
	}
	name := s.d.Fiducials[i].Name
	s.d.Fiducials = slices.Delete(s.d.Fiducials, i, i+1)
	s.commit("delete fiducial "+name, "", ChangeFiducials|ChangeSites)
}
