package placement

import (
	"slices"

	"github.com/golang/geo/r2"

	"dimerpath/lattice"
	"dimerpath/lattice/design"
)

// Moved returns the core's regions (names, or every atomic-precision
// region as Search takes them) of the layout's variant moved by the
// placement: their shapes by p.MoveNM (a whole lattice vector of the
// core's terrace, so every shape lands on the lattice as it was drawn)
// and their painted and erased sites by p.Dimers and p.Rows on that
// terrace. It returns the regions' indices in the variant and the moved
// copies; the layout's design is not changed (the caller puts the copies
// in, as one edit). The other regions, the fan-outs and pads, stay.
func Moved(l *design.Layout, names []string, p Placement) ([]int, []design.Region, error) {
	c, err := newCore(l, names)
	if err != nil {
		return nil, nil, err
	}
	in := map[string]bool{}
	for _, n := range c.names {
		in[n] = true
	}
	var idx []int
	var out []design.Region
	for i := range l.Variant.Regions {
		r := l.Variant.Regions[i]
		if !in[r.Name] {
			continue
		}
		r.Shapes = make([]design.Shape, len(l.Variant.Regions[i].Shapes))
		for k, sh := range l.Variant.Regions[i].Shapes {
			r.Shapes[k] = movedShape(sh, p.MoveNM)
		}
		if r.Painted != nil {
			r.Painted = shifted(r.Painted, c.terrace, p.Dimers, p.Rows)
		}
		if r.Erased != nil {
			r.Erased = shifted(r.Erased, c.terrace, p.Dimers, p.Rows)
		}
		idx = append(idx, i)
		out = append(out, r)
	}
	return idx, out, nil
}

// movedShape returns a copy of sh moved by d (an array's first copy
// moves; its pitch is in lattice steps and stays).
func movedShape(sh design.Shape, d r2.Point) design.Shape {
	sh.Points = slices.Clone(sh.Points)
	for k := range sh.Points {
		sh.Points[k][0] += d.X
		sh.Points[k][1] += d.Y
	}
	if sh.Array != nil {
		a := *sh.Array
		if a.Of != nil {
			of := movedShape(*a.Of, d)
			a.Of = &of
		}
		sh.Array = &a
	}
	return sh
}

// shifted is moved for sets that may hold sites the move takes off the
// lattice's indices (erased sites outside the core): those are dropped.
func shifted(set *lattice.SiteSet, terrace, dimers, rows int) *lattice.SiteSet {
	out := lattice.NewSiteSet()
	for run := range set.Runs() {
		row, from, to := run.Row, run.Start, run.End()
		if run.Terrace == terrace {
			row, from, to = row+rows, from+2*dimers, to+2*dimers
		}
		if row < 0 || to <= 0 {
			continue
		}
		out.AddRun(run.Terrace, row, max(from, 0), to)
	}
	return out
}
