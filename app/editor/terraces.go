package editor

import (
	"errors"
	"fmt"
	"slices"
	"strings"

	"github.com/golang/geo/r2"

	"dimerpath/lattice"
	"dimerpath/lattice/design"
)

// terracesChanged re-makes the surface after an edit of the field or the
// terraces; every region is rasterised again.
func (s *Session) terracesChanged() error {
	surf, err := surfaceOf(s.d)
	if err != nil {
		return err
	}
	s.surf, s.surfErr = surf, nil
	s.shapeSel = nil
	for v := range s.ids {
		for i := range s.ids[v] {
			s.ids[v][i] = s.newID()
		}
	}
	s.pruneCaches()
	s.ensureCaches()
	return nil
}

// editTerraces applies f to a copy of the terraces and keeps the result
// only if the design's rules accept it (names, rows, offsets, outlines,
// and every painted site still on the surface) and it makes a surface.
func (s *Session) editTerraces(label, key string, f func(ts []design.Terrace) []design.Terrace) error {
	old := s.d.Terraces
	cp := slices.Clone(old)
	for i := range cp {
		cp[i].Boundary = slices.Clone(cp[i].Boundary)
	}
	return s.editSurface(label, key, func() func() {
		s.d.Terraces = f(cp)
		return func() { s.d.Terraces = old }
	})
}

// editSurface applies an edit of the surface (terraces or field; apply
// returns its undo) as one undo step, kept only if the design's rules
// accept it and the surface can be made again with every region
// rasterised on it; otherwise it is undone and the error returned.
func (s *Session) editSurface(label, key string, apply func() (undo func())) error {
	var undo func()
	err := s.validEdit(label, func() func() {
		undo = apply()
		return undo
	})
	if err != nil {
		return err
	}
	if err := s.terracesChanged(); err != nil {
		undo()
		s.rebuildSurface()
		return err
	}
	s.commit(label, key, ChangeTerraces|ChangeSites|ChangeRegions)
	return nil
}

// AddTerrace adds a terrace bounded by poly (nm, 3 or more vertices),
// one single-height step from the terrace under the first vertex: its
// rows turn by 90° and its lattice shifts (design.Terrace.StepFrom), up
// or down as Opts.TerraceStep says ("" leaves it unsaid: laid out as a
// step down, and the step-registry rule warns).
func (s *Session) AddTerrace(poly []r2.Point) (int, error) {
	if len(poly) < 3 {
		return -1, errors.New("a terrace outline needs at least 3 points")
	}
	from := s.terraceUnder(poly[0])
	if from < 0 {
		return -1, fmt.Errorf("the first point (%.1f, %.1f) nm of a terrace outline must lie on a terrace of the field", poly[0].X, poly[0].Y)
	}
	used := map[string]bool{}
	for _, t := range s.d.Terraces {
		used[t.Name] = true
	}
	name := ""
	for k := len(s.d.Terraces); ; k++ {
		if name = fmt.Sprintf("T%d", k); !used[name] {
			break
		}
	}
	b := make([][2]float64, len(poly))
	for i, p := range poly {
		b[i] = [2]float64{round2(p.X), round2(p.Y)}
	}
	base := s.surf.Terraces[from].Name
	err := s.editTerraces("add terrace "+name, "", func(ts []design.Terrace) []design.Terrace {
		if len(ts) == 0 {
			// A design without terraces is one terrace with rows along
			// x; write it out so the new one can step from it.
			ts = []design.Terrace{{Name: base, Rows: "x"}}
		}
		// Appended, so painted sites keep their terrace indices. The
		// first bounded terrace holding a point wins, so an outline drawn
		// inside another bounded terrace stays under it.
		return append(ts, design.Terrace{Name: name, StepFrom: base, Step: s.Opts.TerraceStep, Boundary: b})
	})
	if err != nil {
		return -1, err
	}
	return len(s.d.Terraces) - 1, nil
}

// SetTerrace changes terrace i's name, row direction ("x" or "y") and
// lattice offset (nm). A terrace that steps from another takes its rows
// from it; asking for other rows makes it stand on its own. The design's
// rules refuse an empty or used name, rows other than x or y, an offset
// that is not finite, and a change that takes painted sites off the
// surface.
func (s *Session) SetTerrace(i int, name, rows string, offset r2.Point) error {
	if i < 0 || i >= len(s.d.Terraces) {
		return fmt.Errorf("no terrace %d", i)
	}
	name = strings.TrimSpace(name)
	t := s.d.Terraces[i]
	curRows := s.surf.Terraces[i].Rows.String()
	if t.Name == name && curRows == rows && t.OffsetNM == [2]float64{offset.X, offset.Y} {
		return nil
	}
	old := t.Name
	return s.editTerraces("edit terrace "+name, fmt.Sprintf("terrace-%d", i), func(ts []design.Terrace) []design.Terrace {
		if ts[i].StepFrom != "" && rows != curRows {
			ts[i].StepFrom, ts[i].Step = "", ""
		}
		if ts[i].StepFrom == "" {
			ts[i].Rows = rows
		}
		ts[i].Name, ts[i].OffsetNM = name, [2]float64{offset.X, offset.Y}
		for k := range ts {
			if ts[k].StepFrom == old {
				ts[k].StepFrom = name
			}
		}
		return ts
	})
}

// SetTerraceStep says which way the step from the terrace that terrace i
// steps from goes: "up" or "down" (design.Terrace.Step). The lattice of
// the terrace moves by a/(2√2) = 0.192 nm across or along its rows
// (lattice.Terrace.AcrossStep); a change that takes painted sites off
// the surface is refused, as is a terrace that steps from none.
func (s *Session) SetTerraceStep(i int, step string) error {
	if i < 0 || i >= len(s.d.Terraces) {
		return fmt.Errorf("no terrace %d", i)
	}
	t := s.d.Terraces[i]
	if t.StepFrom == "" {
		return fmt.Errorf("terrace %s steps from no other terrace: its lattice is its own (rows and offset)", t.Name)
	}
	if t.Step == step {
		return nil
	}
	return s.editTerraces("step "+step+" to terrace "+t.Name, fmt.Sprintf("terrace-%d", i), func(ts []design.Terrace) []design.Terrace {
		ts[i].Step = step
		return ts
	})
}

// DeleteTerrace removes terrace i. A terrace that holds painted sites of
// any region cannot be deleted (the sites' addresses would be lost), nor
// the last terrace.
func (s *Session) DeleteTerrace(i int) error {
	if i < 0 || i >= len(s.d.Terraces) {
		return fmt.Errorf("no terrace %d", i)
	}
	if len(s.d.Terraces) == 1 {
		return errors.New("a design keeps at least one terrace")
	}
	for _, v := range s.d.Variants {
		for _, r := range v.Regions {
			for _, set := range []*lattice.SiteSet{r.Painted, r.Erased} {
				for t := i; set != nil && t < set.TerraceCount(); t++ {
					if set.CountTerrace(t) > 0 {
						return fmt.Errorf("terrace %s: region %q of variant %q has painted sites on it or a later terrace; erase them first", s.d.Terraces[i].Name, r.Name, v.Name)
					}
				}
			}
		}
	}
	name := s.d.Terraces[i].Name
	return s.editTerraces("delete terrace "+name, "", func(ts []design.Terrace) []design.Terrace {
		return slices.Delete(ts, i, i+1)
	})
}

// SetFieldSize sets the field to w x h nm, one undo step: the surface is
// made again and every region rasterised on it. The design's rules
// refuse a size that is not positive and finite, beyond 10 µm a side, or
// that would leave painted sites off the field; shapes reaching beyond
// it are the scan-field rule's finding, not a refusal.
func (s *Session) SetFieldSize(w, h float64) error {
	old := s.d.Field
	f := design.Field{WidthNM: w, HeightNM: h}
	if f == old {
		return nil
	}
	label := fmt.Sprintf("set the field to %g x %g nm", w, h)
	return s.editSurface(label, "", func() func() {
		s.d.Field = f
		return func() { s.d.Field = old }
	})
}
