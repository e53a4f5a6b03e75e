package design

import (
	"fmt"
	"math"

	"dimerpath/lattice"
)

// MaxSurveyRowTiltDeg is how far a survey terrace's rows may run from the
// field's x or y axis for DesignTerraces to turn it into a design
// terrace, whose rows run along an axis exactly: 1° over a 100 nm
// terrace puts its far end 1.7 nm off the lattice.
const MaxSurveyRowTiltDeg = 1.0

// DesignTerraces turns the survey's terraces into design terraces laid on
// the field where the survey sits. The largest becomes the terrace
// without a boundary (the rest of the field), its rows along the field
// axis nearest its rows and its offset at the dimer the analysis placed.
// Every other terrace joined to it by the survey's steps (up_from) gets
// its outline in the field, step_from the terrace it was reached from and
// step "up" or "down" as the survey's heights say; its offset is the
// antiphase registry (none or half a row spacing across its rows) nearer
// the dimer the analysis placed. A terrace no step joins keeps its own
// rows and offset. names are "survey 1", "survey 2", ... in that order.
//
// It fails when the survey has no terraces or their rows run more than
// MaxSurveyRowTiltDeg from an axis of the field (turn the survey first:
// rotation_deg).
func (s *Survey) DesignTerraces() ([]Terrace, error) {
	n := len(s.Terraces)
	if n == 0 {
		return nil, fmt.Errorf("the survey found no terraces")
	}
	rowsOf := func(i int) (lattice.RowDirection, error) {
		a := math.Mod(s.Terraces[i].RowsDeg+s.RotationDeg, 180)
		if a < 0 {
			a += 180
		}
		dir, off := lattice.RowsAlongX, math.Min(a, 180-a)
		if d := math.Abs(a - 90); d < off {
			dir, off = lattice.RowsAlongY, d
		}
		if off > MaxSurveyRowTiltDeg {
			return 0, fmt.Errorf("the rows of survey terrace %d run %.2f° from the field's %s axis, more than %g°: turn the survey (rotation_deg) so that its rows run along x or y",
				i+1, off, dir, MaxSurveyRowTiltDeg)
		}
		return dir, nil
	}
	// Neighbours by the survey's steps, with the direction seen from each.
	type edge struct {
		to int
		up bool // the step from this terrace to `to` goes up
	}
	adj := make([][]edge, n)
	for i, t := range s.Terraces {
		if t.UpFrom != nil && *t.UpFrom >= 0 && *t.UpFrom < n && *t.UpFrom != i {
			j := *t.UpFrom
			adj[j] = append(adj[j], edge{i, true})
			adj[i] = append(adj[i], edge{j, false})
		}
	}
	area := func(i int) float64 {
		p := s.Terraces[i].PolygonNM
		a := 0.0
		for k := range p {
			q := p[(k+1)%len(p)]
			a += p[k][0]*q[1] - q[0]*p[k][1]
		}
		return math.Abs(a) / 2
	}
	base := 0
	for i := 1; i < n; i++ {
		if area(i) > area(base) {
			base = i
		}
	}
	// Breadth first from the base, then any terrace no step reaches.
	order, parent, up := []int{}, make([]int, n), make([]bool, n)
	seen := make([]bool, n)
	for _, root := range append([]int{base}, seqN(n)...) {
		if seen[root] {
			continue
		}
		seen[root], parent[root] = true, -1
		for q := []int{root}; len(q) > 0; q = q[1:] {
			i := q[0]
			order = append(order, i)
			for _, e := range adj[i] {
				if !seen[e.to] {
					seen[e.to], parent[e.to], up[e.to] = true, i, e.up
					q = append(q, e.to)
				}
			}
		}
	}
	name := map[int]string{}
	lat := map[int]lattice.Terrace{}
	var out []Terrace
	for k, i := range order {
		t := s.Terraces[i]
		name[i] = fmt.Sprintf("survey %d", k+1)
		dimer := s.ToField(point(t.DimerNM))
		dt := Terrace{Name: name[i]}
		if k > 0 {
			for _, p := range t.PolygonNM {
				q := s.ToField(point(p))
				dt.Boundary = append(dt.Boundary, [2]float64{q.X, q.Y})
			}
		}
		var lt lattice.Terrace
		if p := parent[i]; p >= 0 {
			dir := lattice.StepDown
			if up[i] {
				dir = lattice.StepUp
			}
			dt.StepFrom, dt.Step = name[p], dir.String()
			lt = lat[p].AcrossStep(dir)
			// The step fixes the lattice up to the antiphase registry:
			// take the one nearer the measured dimer.
			_, across := lt.Rows.Split(dimer.Sub(lt.Offset))
			half := lattice.RowSpacing / 2
			if k := math.Round(across / half); math.Mod(math.Abs(k), 2) == 1 {
				extra := lt.Rows.Join(0, half)
				dt.OffsetNM = [2]float64{extra.X, extra.Y}
				lt.Offset = lt.Offset.Add(extra)
			}
		} else {
			rows, err := rowsOf(i)
			if err != nil {
				return nil, err
			}
			dt.Rows = rows.String()
			dt.OffsetNM = [2]float64{dimer.X, dimer.Y}
			lt = lattice.Terrace{Rows: rows, Offset: dimer}
		}
		if _, err := rowsOf(i); err != nil {
			return nil, err
		}
		lat[i] = lt
		out = append(out, dt)
	}
	return out, nil
}

func seqN(n int) []int {
	s := make([]int, n)
	for i := range s {
		s[i] = i
	}
	return s
}
