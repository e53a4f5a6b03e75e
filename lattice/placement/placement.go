// Package placement finds where on a surveyed surface to put a device's
// atomic-precision core: among the translations by whole lattice vectors
// of the core's terrace that keep it inside a box, those that leave the
// most room between it and the survey's defects and step edges.
//
// # Method
//
// The search works on the grid of the terrace's dimer cells (one dimer
// pitch along the rows by one row spacing across). For an obstacle set X
// (defect cells, or step edges and everything outside the survey and the
// box) and the core's cells S, the clearance of the core moved by t is
// the distance from t to the set X − S = {x − s}: so X − S is formed once
// (a binary dilation, by FFT correlation of the two grids) and its exact
// Euclidean distance transform (Felzenszwalb and Huttenlocher, Theory of
// Computing 8, 415 (2012)) gives the clearance of every translation at
// once. The cost grows with the area of the box and of the core's
// extent, not with their product. The best translations on the grid are
// then measured exactly, with the same distances the surface-clearance
// design rule uses.
package placement

import (
	"context"
	"dimerpath/internal/fft2"
	"errors"
	"fmt"
	"math"
	"slices"

	"github.com/golang/geo/r2"

	"dimerpath/internal/edt"
	"dimerpath/lattice"
	"dimerpath/lattice/design"
)

// Options tune Search; the zero value takes every default.
type Options struct {
	// Regions names the regions of the core; empty means every
	// atomic-precision region (design.KeepOutClass).
	Regions []string
	// Box is the field rectangle (nm) the moved core must stay in; empty
	// (or of no area, as the zero value) means the survey's outline's
	// bounding box.
	Box r2.Rect
	// Best is how many placements to return (default 5).
	Best int
	// SeparationNM keeps the placements returned this far apart (default
	// 2 nm), so that they are real alternatives.
	SeparationNM float64
	// ReachNM caps the clearances measured (default 20 nm): beyond it
	// there is room enough, and placements that clear everything by it
	// rank by how little they move the core.
	ReachNM float64
}

// Placement is one translation of the core and what it leaves around it.
// Clearances are in nm, between the cells of the core's sites and the
// edges of defects (their centre less half their width), the step
// edges, and the border of the survey and the box; +Inf where nothing
// is within ReachNM.
type Placement struct {
	// MoveNM is the translation in field nm: Dimers dimer pitches along
	// the terrace's rows and Rows row spacings across them.
	MoveNM       r2.Point
	Dimers, Rows int
	// WindowClearanceNM is the least clearance of the dopant windows to
	// a defect, OtherClearanceNM that of every other core site, and
	// StepClearanceNM that of the core to a step edge or border.
	WindowClearanceNM float64
	OtherClearanceNM  float64
	StepClearanceNM   float64
	// MarginNM is the least of WindowClearance − the rule's window
	// clearance, OtherClearance − its other clearance, and
	// StepClearance: what Search maximises; negative where the core
	// breaks the surface-clearance rule.
	MarginNM float64
	// Nearest are the defects nearest the moved core, nearest first (at
	// most three).
	Nearest []Near
}

// Near is a defect near a placed core.
type Near struct {
	design.FieldDefect
	// GapNM is the clearance between the core and the defect's edge.
	GapNM float64
}

// Errors of Search.
var (
	ErrNoSurvey = errors.New("the design has no survey: add one (dimerpath survey, then the window's Survey panel) or give an image")
	ErrNoCore   = errors.New("no atomic-precision region to place")
)

// MaxGridCells bounds the search grid (box and core together), about a
// 1.5 µm square at lattice resolution.
const MaxGridCells = 1 << 24

// Search returns the current placement of the core (no move) and the
// best translations, best first. It needs the layout's design to hold a
// survey.
func Search(ctx context.Context, l *design.Layout, opt Options) (current Placement, best []Placement, err error) {
	s := l.Design.Survey
	if s == nil {
		return Placement{}, nil, ErrNoSurvey
	}
	if opt.Best <= 0 {
		opt.Best = 5
	}
	if opt.SeparationNM <= 0 {
		opt.SeparationNM = 2
	}
	if opt.ReachNM <= 0 {
		opt.ReachNM = 20
	}
	c, err := newCore(l, opt.Regions)
	if err != nil {
		return Placement{}, nil, err
	}
	box := opt.Box
	outline := s.Outline()
	if box.IsEmpty() || box.X.Length() == 0 || box.Y.Length() == 0 { // the zero Rect is a point
		box = r2.RectFromPoints(outline...)
	}
	box = box.Intersection(l.Surface.Field)
	if box.IsEmpty() {
		return Placement{}, nil, fmt.Errorf("the box lies outside the field")
	}
	sc := newScene(l, s, outline, box, opt.ReachNM)
	current = sc.measure(c, 0, 0)
	cand, err := sc.search(ctx, c, opt)
	if err != nil {
		return current, nil, err
	}
	cand = append(cand, [2]int{0, 0}) // staying put is a placement too
	// Each candidate, measured exactly, climbs to its best neighbour while
	// that is better: the grid's centre-to-centre distances rank
	// translations a cell apart only roughly.
	seen := map[[2]int]Placement{}
	at := func(i, j int) Placement {
		if p, ok := seen[[2]int{i, j}]; ok {
			return p
		}
		p := sc.measure(c, i, j)
		seen[[2]int{i, j}] = p
		return p
	}
	for _, t := range cand {
		p := at(t[0], t[1])
		for step := 0; step < 20; step++ {
			next := p
			for _, d := range [8][2]int{{1, 0}, {-1, 0}, {0, 1}, {0, -1}, {1, 1}, {1, -1}, {-1, 1}, {-1, -1}} {
				if q := at(p.Dimers+d[0], p.Rows+d[1]); q.MarginNM > next.MarginNM {
					next = q
				}
			}
			if next.Dimers == p.Dimers && next.Rows == p.Rows {
				break
			}
			p = next
		}
		best = append(best, p)
	}
	// Best margin first; among equal margins (all clear within the
	// reach), the smallest move.
	slices.SortStableFunc(best, func(a, b Placement) int {
		switch {
		case a.MarginNM > b.MarginNM+1e-9:
			return -1
		case a.MarginNM < b.MarginNM-1e-9:
			return 1
		}
		return cmpFloat(a.MoveNM.Norm(), b.MoveNM.Norm())
	})
	// Keep the best that are far enough apart.
	var kept []Placement
	for _, p := range best {
		far := true
		for _, q := range kept {
			if p.MoveNM.Sub(q.MoveNM).Norm() < opt.SeparationNM {
				far = false
				break
			}
		}
		if far {
			kept = append(kept, p)
			if len(kept) == opt.Best {
				break
			}
		}
	}
	return current, kept, nil
}

// core is the set of sites to place, on one terrace.
type core struct {
	terrace int
	frame   lattice.Frame
	all     *lattice.SiteSet // every core site
	windows *lattice.SiteSet // the dopant windows' sites
	names   []string
}

func newCore(l *design.Layout, names []string) (*core, error) {
	c := &core{all: lattice.NewSiteSet(), windows: lattice.NewSiteSet()}
	want := map[string]bool{}
	for _, n := range names {
		want[n] = true
	}
	for i := range l.Regions {
		rl := &l.Regions[i]
		if len(names) > 0 {
			if !want[rl.Region.Name] {
				continue
			}
			delete(want, rl.Region.Name)
		} else if _, ap := design.KeepOutClass(rl); !ap {
			continue
		}
		c.names = append(c.names, rl.Region.Name)
		c.all = c.all.Union(rl.Sites)
		for _, w := range rl.Windows {
			w.AddTo(c.windows)
		}
	}
	for n := range want {
		return nil, fmt.Errorf("the variant has no region %q", n)
	}
	if c.all.IsEmpty() {
		return nil, ErrNoCore
	}
	// The core moves on the terrace holding most of its sites.
	counts := map[int]int{}
	for run := range c.all.Runs() {
		counts[run.Terrace] += run.Len
	}
	best := -1
	for t, n := range counts {
		if best < 0 || n > counts[best] || (n == counts[best] && t < best) {
			best = t
		}
	}
	c.terrace = best
	c.frame = l.Surface.Frame(best)
	return c, nil
}

// moved returns set shifted by dimers along and rows across its
// terrace's rows (sites on other terraces stay).
func moved(set *lattice.SiteSet, terrace, dimers, rows int) *lattice.SiteSet {
	out := lattice.NewSiteSet()
	for run := range set.Runs() {
		if run.Terrace != terrace {
			out.AddRun(run.Terrace, run.Row, run.Start, run.End())
			continue
		}
		out.AddRun(run.Terrace, run.Row+rows, run.Start+2*dimers, run.End()+2*dimers)
	}
	return out
}

// scene holds the obstacles in the field.
type scene struct {
	l       *design.Layout
	survey  *design.Survey
	defects []design.FieldDefect
	steps   [][]r2.Point
	outline []r2.Point
	box     r2.Rect
	reach   float64
	rules   design.RuleSettings
}

func newScene(l *design.Layout, s *design.Survey, outline []r2.Point, box r2.Rect, reach float64) *scene {
	return &scene{l: l, survey: s, defects: s.FieldDefects(), steps: s.FieldSteps(), outline: outline, box: box, reach: reach, rules: l.Rules}
}

// measure returns the placement of the core moved by (dimers, rows),
// measured exactly: the clearances between the moved sites' cells and the
// defects' edges, the step edges, and the border of the survey and box.
func (sc *scene) measure(c *core, dimers, rows int) Placement {
	surf := sc.l.Surface
	along, across := float64(dimers)*lattice.DimerPitch, float64(rows)*lattice.RowSpacing
	p := Placement{
		MoveNM: c.frame.Rows.Join(along, across), Dimers: dimers, Rows: rows,
		WindowClearanceNM: math.Inf(1), OtherClearanceNM: math.Inf(1), StepClearanceNM: math.Inf(1),
	}
	all := lattice.NewCellIndex(surf, moved(c.all, c.terrace, dimers, rows))
	var win *lattice.CellIndex
	if !c.windows.IsEmpty() {
		win = lattice.NewCellIndex(surf, moved(c.windows, c.terrace, dimers, rows))
	}
	for _, d := range sc.defects {
		if dist, _, ok := all.NearestWithin(d.At, d.RadiusNM+sc.reach); ok {
			gap := math.Max(0, dist-d.RadiusNM)
			p.OtherClearanceNM = math.Min(p.OtherClearanceNM, gap)
			p.Nearest = append(p.Nearest, Near{FieldDefect: d, GapNM: gap})
		}
		if win != nil {
			if dist, _, ok := win.NearestWithin(d.At, d.RadiusNM+sc.reach); ok {
				p.WindowClearanceNM = math.Min(p.WindowClearanceNM, math.Max(0, dist-d.RadiusNM))
			}
		}
	}
	slices.SortStableFunc(p.Nearest, func(a, b Near) int {
		switch {
		case a.GapNM < b.GapNM:
			return -1
		case a.GapNM > b.GapNM:
			return 1
		}
		return 0
	})
	if len(p.Nearest) > 3 {
		p.Nearest = p.Nearest[:3]
	}
	for _, line := range sc.steps {
		for k := 1; k < len(line); k++ {
			if dist, _, ok := all.SegmentWithin(line[k-1], line[k], sc.reach); ok {
				p.StepClearanceNM = math.Min(p.StepClearanceNM, dist)
			}
		}
	}
	// The border: the survey's outline and the box, by their edges; a
	// core that reaches out of either has none.
	b := all.Bounds()
	inside := true
	for _, q := range b.Vertices() {
		inside = inside && lattice.PolygonContains(sc.outline, q) && sc.box.ContainsPoint(q)
	}
	if !inside {
		p.StepClearanceNM = 0
	} else {
		bv := sc.box.Vertices()
		for _, poly := range [][]r2.Point{sc.outline, bv[:]} {
			for k := range poly {
				a, e := poly[k], poly[(k+1)%len(poly)]
				if dist, _, ok := all.SegmentWithin(a, e, sc.reach); ok {
					p.StepClearanceNM = math.Min(p.StepClearanceNM, dist)
				}
			}
		}
	}
	p.MarginNM = math.Min(math.Min(p.WindowClearanceNM-sc.rules.DefectWindowClearanceNM, p.OtherClearanceNM-sc.rules.DefectClearanceNM), p.StepClearanceNM)
	if win == nil {
		p.MarginNM = math.Min(p.OtherClearanceNM-sc.rules.DefectClearanceNM, p.StepClearanceNM)
	}
	return p
}

// grid is the search grid: the terrace's dimer cells, index (i, j) at
// along = (i0+i)·DimerPitch, across = (j0+j)·RowSpacing in its frame.
type grid struct {
	i0, j0 int
	w, h   int
}

func (g grid) cells() int { return g.w * g.h }

// search returns up to many good translations (dimers, rows) on the
// grid, by the margin of the grid's clearances.
func (sc *scene) search(ctx context.Context, c *core, opt Options) ([][2]int, error) {
	f := c.frame
	// The core's cells: dimer and row indices.
	ci0, cj0, ci1, cj1 := math.MaxInt, math.MaxInt, math.MinInt, math.MinInt
	addCells := func(set *lattice.SiteSet, dst *[][2]int) {
		for run := range set.Runs() {
			if run.Terrace != c.terrace {
				continue
			}
			for d := run.Start / 2; d <= (run.End()-1)/2; d++ {
				*dst = append(*dst, [2]int{d, run.Row})
			}
		}
	}
	var allCells, winCells [][2]int
	addCells(c.all, &allCells)
	addCells(c.windows, &winCells)
	for _, q := range allCells {
		ci0, ci1 = min(ci0, q[0]), max(ci1, q[0])
		cj0, cj1 = min(cj0, q[1]), max(cj1, q[1])
	}
	// Translations that keep the core's cells in the box: the box in the
	// frame, as dimer and row indices.
	a0, c0 := f.ToLocal(sc.box.Lo())
	a1, c1 := f.ToLocal(sc.box.Hi())
	alo, ahi := math.Min(a0, a1), math.Max(a0, a1)
	clo, chi := math.Min(c0, c1), math.Max(c0, c1)
	bi0, bi1 := int(math.Ceil(alo/lattice.DimerPitch)), int(math.Floor(ahi/lattice.DimerPitch))
	bj0, bj1 := int(math.Ceil(clo/lattice.RowSpacing)), int(math.Floor(chi/lattice.RowSpacing))
	ti0, ti1 := bi0-ci0, bi1-ci1
	tj0, tj1 := bj0-cj0, bj1-cj1
	if ti1 < ti0 || tj1 < tj0 {
		return nil, fmt.Errorf("the core (%.0f x %.0f nm) does not fit in the box", float64(ci1-ci0+1)*lattice.DimerPitch, float64(cj1-cj0+1)*lattice.RowSpacing)
	}
	// The translation grid, widened by the reach so that obstacles just
	// beyond it count; the obstacle grid covers it plus the core.
	ri, rj := int(math.Ceil(sc.reach/lattice.DimerPitch)), int(math.Ceil(sc.reach/lattice.RowSpacing))
	tg := grid{i0: ti0 - ri, j0: tj0 - rj, w: ti1 - ti0 + 1 + 2*ri, h: tj1 - tj0 + 1 + 2*rj}
	og := grid{i0: tg.i0 + ci0, j0: tg.j0 + cj0, w: tg.w + ci1 - ci0, h: tg.h + cj1 - cj0}
	if og.cells() > MaxGridCells {
		return nil, fmt.Errorf("the box and the core span %d lattice cells, more than the limit of %d: give a smaller box (--box)", og.cells(), MaxGridCells)
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	// Obstacles on the obstacle grid.
	defects := make([]bool, og.cells())
	border := make([]bool, og.cells())
	surf := sc.l.Surface
	for j := 0; j < og.h; j++ {
		for i := 0; i < og.w; i++ {
			p := f.ToField(float64(og.i0+i)*lattice.DimerPitch, float64(og.j0+j)*lattice.RowSpacing)
			if !sc.box.ContainsPoint(p) || !lattice.PolygonContains(sc.outline, p) || surf.TerraceAt(p) != c.terrace {
				border[j*og.w+i] = true
			}
		}
	}
	mark := func(dst []bool, p r2.Point, radius float64) {
		a, b := f.ToLocal(p)
		ic, jc := a/lattice.DimerPitch-float64(og.i0), b/lattice.RowSpacing-float64(og.j0)
		ri, rj := int(math.Ceil(radius/lattice.DimerPitch)), int(math.Ceil(radius/lattice.RowSpacing))
		for j := int(math.Round(jc)) - rj; j <= int(math.Round(jc))+rj; j++ {
			for i := int(math.Round(ic)) - ri; i <= int(math.Round(ic))+ri; i++ {
				if i < 0 || j < 0 || i >= og.w || j >= og.h {
					continue
				}
				da, db := (float64(i)-ic)*lattice.DimerPitch, (float64(j)-jc)*lattice.RowSpacing
				if math.Hypot(da, db) <= radius || (i == int(math.Round(ic)) && j == int(math.Round(jc))) {
					dst[j*og.w+i] = true
				}
			}
		}
	}
	for _, d := range sc.defects {
		mark(defects, d.At, d.RadiusNM)
	}
	for _, line := range sc.steps {
		for k := 1; k < len(line); k++ {
			a, b := line[k-1], line[k]
			n := int(math.Ceil(b.Sub(a).Norm()/0.1)) + 1
			for q := 0; q <= n; q++ {
				mark(border, a.Add(b.Sub(a).Mul(float64(q)/float64(n))), 0)
			}
		}
	}
	// Clearances of every translation: distance from t to X − S, the
	// transforms of each grid made once.
	cr := newCorrelator(og, allCells, tg)
	fDefects, fBorder := cr.transform(defects), cr.transform(border)
	fAll := cr.shape(allCells)
	other := cr.clearance(fDefects, fAll)
	step := cr.clearance(fBorder, fAll)
	var win []float64
	if len(winCells) > 0 {
		win = cr.clearance(fDefects, cr.shape(winCells))
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	// The grid's distances are between cell centres; the rule's between
	// cell edges, about a cell less: the ranking is what counts here.
	type cand struct {
		i, j   int
		margin float64
	}
	var cands []cand
	for j := rj; j < tg.h-rj; j++ {
		for i := ri; i < tg.w-ri; i++ {
			k := j*tg.w + i
			m := math.Min(other[k]-sc.rules.DefectClearanceNM, step[k])
			if win != nil {
				m = math.Min(m, win[k]-sc.rules.DefectWindowClearanceNM)
			}
			cands = append(cands, cand{tg.i0 + i, tg.j0 + j, math.Min(m, sc.reach)})
		}
	}
	slices.SortStableFunc(cands, func(a, b cand) int {
		switch {
		case a.margin > b.margin:
			return -1
		case a.margin < b.margin:
			return 1
		}
		return 0
	})
	// The best grid translations, spread apart, to be measured exactly.
	var out [][2]int
	many := 8 * opt.Best
	for _, cd := range cands {
		far := true
		for _, o := range out {
			if math.Hypot(float64(cd.i-o[0])*lattice.DimerPitch, float64(cd.j-o[1])*lattice.RowSpacing) < opt.SeparationNM {
				far = false
				break
			}
		}
		if far {
			out = append(out, [2]int{cd.i, cd.j})
			if len(out) == many {
				break
			}
		}
	}
	return out, nil
}

// correlator forms X − S = {x − s} on the translation grid tg, for
// obstacles x on the obstacle grid og and core cells s: the translations
// that put a core cell on an obstacle. It correlates the two grids by FFT
// (gonum dsp/fourier), O(n log n) in the grids' size; each grid is
// transformed once and shared.
type correlator struct {
	og, tg   grid
	si0, sj0 int // the least core cell: the shapes' origin
	w, h     int // the transforms' size, padded against wrapping
}

func newCorrelator(og grid, cells [][2]int, tg grid) *correlator {
	c := &correlator{og: og, tg: tg, si0: math.MaxInt, sj0: math.MaxInt}
	si1, sj1 := math.MinInt, math.MinInt
	for _, q := range cells {
		c.si0, si1 = min(c.si0, q[0]), max(si1, q[0])
		c.sj0, sj1 = min(c.sj0, q[1]), max(sj1, q[1])
	}
	c.w, c.h = smooth(og.w+si1-c.si0+1), smooth(og.h+sj1-c.sj0+1)
	return c
}

// transform returns the transform of an obstacle grid.
func (c *correlator) transform(obst []bool) []complex128 {
	a := make([]complex128, c.w*c.h)
	for j := 0; j < c.og.h; j++ {
		for i := 0; i < c.og.w; i++ {
			if obst[j*c.og.w+i] {
				a[j*c.w+i] = 1
			}
		}
	}
	fft2.Transform(a, c.w, c.h, false)
	return a
}

// shape returns the transform of a set of core cells (a subset of the
// cells the correlator was made with), from the shapes' origin.
func (c *correlator) shape(cells [][2]int) []complex128 {
	b := make([]complex128, c.w*c.h)
	for _, q := range cells {
		b[(q[1]-c.sj0)*c.w+q[0]-c.si0] = 1
	}
	fft2.Transform(b, c.w, c.h, false)
	return b
}

// clearance returns, for every translation of tg, its distance in nm to
// X − S (+Inf with none), given the transforms of X and S.
func (c *correlator) clearance(fx, fs []complex128) []float64 {
	a := make([]complex128, len(fx))
	for k := range a {
		a[k] = fx[k] * complex(real(fs[k]), -imag(fs[k])) // correlation: X·conj(S)
	}
	fft2.Transform(a, c.w, c.h, true)
	norm := 1 / float64(c.w*c.h)
	// The correlation at offset (u, v) is Σ_s X(u + s − s0): translation
	// t puts core cell s at s + t, on obstacle-grid index s + t − og0.
	inf := math.Inf(1)
	f := make([]float64, c.tg.cells())
	for j := 0; j < c.tg.h; j++ {
		v := c.tg.j0 + j + c.sj0 - c.og.j0
		for i := 0; i < c.tg.w; i++ {
			u := c.tg.i0 + i + c.si0 - c.og.i0
			f[j*c.tg.w+i] = inf
			if u >= 0 && v >= 0 && u < c.w && v < c.h && real(a[v*c.w+u])*norm > 0.5 {
				f[j*c.tg.w+i] = 0
			}
		}
	}
	d := edt.Squared(f, c.tg.w, c.tg.h, lattice.DimerPitch, lattice.RowSpacing)
	for k, v := range d {
		d[k] = math.Sqrt(v)
	}
	return d
}

// smooth returns the least n' ≥ n whose only prime factors are 2, 3 and
// 5 (the lengths gonum's FFT does fastest).
func smooth(n int) int {
	for m := max(n, 1); ; m++ {
		k := m
		for _, p := range []int{2, 3, 5} {
			for k%p == 0 {
				k /= p
			}
		}
		if k == 1 {
			return m
		}
	}
}

func cmpFloat(a, b float64) int {
	switch {
	case a < b:
		return -1
	case a > b:
		return 1
	}
	return 0
}
