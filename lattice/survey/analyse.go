package survey

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/cmplx"
	"slices"

	"github.com/golang/geo/r2"

	"dimerpath/internal/edt"
	"dimerpath/lattice"
)

// Options tune Analyse; the zero value takes every default.
type Options struct {
	// SizeNM is the nominal scan size (x, y) in nm; it overrides the
	// file's. Zero keeps the file's, if any.
	SizeNM [2]float64
	// ThresholdSD is the defect threshold in robust SDs of the smoothed
	// residual; 0 takes DefaultThresholdSD.
	ThresholdSD float64
	// MinTerraceNM2 is the smallest terrace reported (nm²); smaller
	// patches join their surroundings. 0 takes DefaultMinTerraceNM2.
	MinTerraceNM2 float64
	// Progress, when not nil, is called with the name of each stage and
	// the share of the work done, 0 to 1.
	Progress func(stage string, done float64)
}

// DefaultMinTerraceNM2 is the smallest terrace Analyse reports: 10 nm²,
// about 4 x 3 nm (an island of a dozen dimers in each direction).
const DefaultMinTerraceNM2 = 10.0

// MinSide is the smallest image Analyse accepts, in pixels.
const MinSide = 32

// Analysis is what Analyse finds in a topograph. Positions are in nm in
// the true frame (see Calibration), from the image's lower-left corner.
type Analysis struct {
	Name          string
	Width, Height int // pixels
	// NominalNMPerPx is the pixel size the file or the caller gave, or
	// zero when neither did.
	NominalNMPerPx [2]float64
	Calibration
	// RotationDeg is the angle from the image's x axis to the dimer rows
	// of the largest terrace, in (−90, 90], with its uncertainty RowsSD.
	RotationDeg float64
	// ZSource says where the heights' scale comes from: "file" (the
	// file's unit), "step" (the image's grey levels scaled so that a
	// single step is a/4 high) or "" (unknown: heights are grey levels).
	ZSource  string
	Terraces []Terrace
	Steps    []Step
	Defects  []Defect
	// NoiseNM is the robust SD of the smoothed residual the defects stand
	// out of (grey levels when ZSource is ""), and ThresholdSD the
	// threshold used.
	NoiseNM     float64
	ThresholdSD float64
	// Notes are remarks for the user (what could not be measured, and
	// why).
	Notes []string
}

// Terrace is one terrace found in the image.
type Terrace struct {
	// RowsDeg is the angle from the image's x axis to its dimer rows, in
	// (−90, 90].
	RowsDeg float64
	// Polygon is its outline, counter-clockwise, following the image's
	// border where it meets it.
	Polygon []r2.Point
	AreaNM2 float64
	// UpFrom is the index of the terrace this one is one step up from
	// (the largest such neighbour), or -1.
	UpFrom int
	// HeightNM is its mean height relative to terrace 0 (in grey levels
	// when the analysis has no height scale).
	HeightNM float64
	// DimerNM is the centre of one dimer of its lattice (row 0, dimer 0:
	// the one nearest the image's lower-left corner along and across the
	// rows); AlongKnown says whether its position along the rows was
	// measured (the dimer pitch resolved) or only across them.
	DimerNM    r2.Point
	AlongKnown bool
}

// Step is a step edge between two terraces.
type Step struct {
	Polyline []r2.Point
	// Terraces are the two terraces it separates; Upper is the index of
	// the higher one in Terraces' order, or -1 when their heights do not
	// tell.
	Terraces [2]int
	Upper    int
	// HeightNM is the height of the upper over the lower terrace.
	HeightNM float64
}

// Defect is a local extreme of the image once the lattice is taken out.
type Defect struct {
	AtNM r2.Point
	// Bright reports a protrusion; otherwise a depression.
	Bright bool
	// HeightNM is the apparent height over the surrounding surface
	// (negative for a depression; grey levels without a height scale).
	HeightNM float64
	// SizeNM is its full width at half maximum.
	SizeNM float64
	// Class is the coarse class by appearance (see ClassOf).
	Class string
	// Terrace is the index of the terrace it lies on.
	Terrace int
	// SignificanceSD is its peak over the residual's SD.
	SignificanceSD float64
}

// Kind returns "bright" or "dark".
func (d Defect) Kind() string {
	if d.Bright {
		return "bright"
	}
	return "dark"
}

// Defect classes by appearance: the sign and size of the feature, not
// its chemistry, which an image alone does not give.
const (
	ClassDanglingBond = "dangling bond"  // bright, up to 1.2 nm across
	ClassAdsorbate    = "adsorbate"      // bright, 1.2–2.5 nm
	ClassCluster      = "cluster"        // bright, wider
	ClassVacancy      = "vacancy"        // dark, up to 1.2 nm
	ClassMissingRows  = "missing dimers" // dark, wider
)

// ClassOf returns the coarse class of a feature by its sign and full
// width at half maximum. The bounds are from memory (a dangling bond on
// Si(100)-2x1:H looks about 1 nm across in filled-state images, a
// missing dimer is a dark spot of one dimer): defaults, not a chemistry.
func ClassOf(bright bool, sizeNM float64) string {
	switch {
	case bright && sizeNM <= 1.2:
		return ClassDanglingBond
	case bright && sizeNM <= 2.5:
		return ClassAdsorbate
	case bright:
		return ClassCluster
	case sizeNM <= 1.2:
		return ClassVacancy
	}
	return ClassMissingRows
}

// ErrNoLattice is returned by Analyse for an image without a dimer-row
// period to calibrate on.
var ErrNoLattice = errNoLattice

// Analyse levels the topograph, calibrates it on the Si(100)-2x1
// lattice, finds its terraces and step edges and the defects that stand
// out once the lattice is taken out. Errors name the file.
func Analyse(ctx context.Context, t *Topograph, opt Options) (*Analysis, error) {
	fail := func(err error) (*Analysis, error) { return nil, &ReadError{File: t.Name, Err: err} }
	if t.Width < MinSide || t.Height < MinSide {
		return fail(fmt.Errorf("image is %d x %d pixels; the analysis needs at least %d x %d", t.Width, t.Height, MinSide, MinSide))
	}
	if len(t.Z) != t.Width*t.Height {
		return fail(fmt.Errorf("%d heights for %d x %d pixels", len(t.Z), t.Width, t.Height))
	}
	for _, v := range t.Z {
		if math.IsNaN(float64(v)) || math.IsInf(float64(v), 0) {
			return fail(ErrNotFinite)
		}
	}
	progress := func(stage string, done float64) {
		if opt.Progress != nil {
			opt.Progress(stage, done)
		}
	}
	k := opt.ThresholdSD
	if k == 0 {
		k = DefaultThresholdSD
	}
	if !(k > 0) || k > 100 {
		return fail(fmt.Errorf("defect threshold %g SD is not in (0, 100]", k))
	}
	minArea := opt.MinTerraceNM2
	if minArea == 0 {
		minArea = DefaultMinTerraceNM2
	}
	size := t.SizeNM
	if opt.SizeNM[0] != 0 || opt.SizeNM[1] != 0 {
		size = opt.SizeNM
	}
	for _, v := range size {
		if v < 0 || math.IsNaN(v) || math.IsInf(v, 0) {
			return fail(fmt.Errorf("nominal size %g x %g nm is not positive", size[0], size[1]))
		}
	}
	an := &Analysis{Name: t.Name, Width: t.Width, Height: t.Height, ThresholdSD: k}
	if size[0] > 0 && size[1] > 0 {
		an.NominalNMPerPx = [2]float64{size[0] / float64(t.Width), size[1] / float64(t.Height)}
	}
	if t.ZUnitNM > 0 {
		an.ZSource = "file"
	}

	progress("levelling", 0)
	g := toGrid(t)
	subtractPlane(g)
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	progress("calibrating on the lattice", 0.1)
	cal, b, err := calibrate(g, an.NominalNMPerPx)
	if err != nil {
		return fail(err)
	}
	if an.NominalNMPerPx[0] > 0 {
		for i := range 2 {
			if r := cal.ScaleNMPerPx[i] / an.NominalNMPerPx[i]; r < 0.7 || r > 1.43 {
				an.Notes = append(an.Notes, fmt.Sprintf("the measured scale differs from the nominal by %+.0f %% in %c: check the size given", 100*(r-1), "xy"[i]))
			}
		}
	}
	an.Calibration = cal
	if cal.Isotropic {
		an.Notes = append(an.Notes, "only one lattice direction is resolved (one terrace, dimers not resolved): the scale is taken equal in x and y, without skew")
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}

	progress("finding terraces", 0.3)
	meanPx := math.Sqrt(cal.ScaleNMPerPx[0] * cal.ScaleNMPerPx[1])
	rowPx := lattice.RowSpacing / meanPx
	segSigma := 1.2 * rowPx
	modelSigma := 2.5 * rowPx
	p := padZero(g, int(math.Ceil(4*modelSigma)))
	spec := forward2D(p.v, p.w, p.h)
	spec.dropLineOffsets()
	pxArea := cal.ScaleNMPerPx[0] * cal.ScaleNMPerPx[1]
	sg := segment(spec, p, b, segSigma, minArea/pxArea)
	if err := ctx.Err(); err != nil {
		return nil, err
	}

	progress("measuring steps", 0.45)
	// The terraces and step edges as the lattice places them, then the
	// edges moved to where the heights jump (the lattice's corrugation
	// averages out in the fit) and the pixels near them given to the
	// terraces on their sides.
	comp := pixelTerraces(sg, g.w, g.h)
	steps := stepLines(sg, cal.Affine)
	stepDist := distanceToLines(steps, g.w, g.h, cal.ScaleNMPerPx)
	if len(steps) > 0 {
		// The lattice is blurred away (its row period is damped 200-fold
		// by a Gaussian of SD 0.4 nm); the blurred step keeps its middle.
		hf := terraceHeights(g, g, comp, len(sg.comps), stepDist)
		y := &grid{w: g.w, h: g.h, v: gaussBlur(g.v, g.w, g.h, 0.4/meanPx)}
		for i := range y.v {
			y.v[i] -= hf.plane(i%g.w, i/g.w)
		}
		refineSteps(steps, y, hf.offset, cal.Affine, 0.6)
		assignNearSteps(comp, steps, stepDist, g.w, g.h, 1.5)
		stepDist = distanceToLines(steps, g.w, g.h, cal.ScaleNMPerPx)
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}

	progress("taking out the lattice", 0.55)
	kindOf := make([]bool, len(comp))
	kinds := 0
	for i, c := range comp {
		k := sg.comps[c].kind
		kindOf[i] = k == 1
		kinds |= 1 << k
	}
	model := latticeModel(p, spec, b, kindOf, kinds, modelSigma)
	p, spec, kindOf = nil, nil, nil
	r := newGrid(g.w, g.h)
	copy(r.v, g.v)
	for _, m := range model {
		for i, v := range m {
			r.v[i] -= v
		}
	}
	heights := terraceHeights(g, r, comp, len(sg.comps), stepDist)
	// Scan-line offsets, fitted with the terraces' heights, once the
	// lattice and the plane are out.
	lev := newGrid(g.w, g.h)
	for i := range lev.v {
		lev.v[i] = r.v[i] - heights.plane(i%g.w, i/g.w)
	}
	off, _ := lineOffsets(lev, comp, len(sg.comps), stepDist)
	lev = nil
	for j, o := range off {
		for i := 0; i < g.w; i++ {
			g.v[j*g.w+i] -= o
			r.v[j*g.w+i] -= o
		}
	}
	heights = terraceHeights(g, r, comp, len(sg.comps), stepDist)
	// With the lattice and the scan lines' offsets out, the edges are
	// placed again, now to about a pixel.
	if len(steps) > 0 {
		y := newGrid(g.w, g.h)
		for i := range y.v {
			y.v[i] = r.v[i] - heights.plane(i%g.w, i/g.w)
		}
		old := stepDist
		refineSteps(steps, y, heights.offset, cal.Affine, 0.3)
		stepDist = distanceToLines(steps, g.w, g.h, cal.ScaleNMPerPx)
		near := make([]float64, len(old))
		for i := range near {
			near[i] = math.Min(old[i], stepDist[i])
		}
		assignNearSteps(comp, steps, near, g.w, g.h, 1.5)
		heights = terraceHeights(g, r, comp, len(sg.comps), stepDist)
	}
	// g loses the plane (the terraces keep their heights, for display);
	// r, the residual, loses the plane and the terraces' heights.
	for i := range r.v {
		p := heights.plane(i%g.w, i/g.w)
		g.v[i] -= p
		r.v[i] -= p + heights.offset[comp[i]]
	}
	// A step's height jump puts a streak through the spectrum, at right
	// angles to the edge; where it crosses a lattice peak (the rows of
	// the upper terrace run along a smooth step edge) it pulls the peak.
	// With the terraces' heights known, the lattice is measured again on
	// the image without them.
	if len(sg.comps) > 1 {
		flat := newGrid(g.w, g.h)
		for i := range flat.v {
			flat.v[i] = g.v[i] - heights.offset[comp[i]]
		}
		if cal2, b2, err := calibrate(flat, an.NominalNMPerPx); err == nil && b2.alignTo(b) {
			cal, b = calibrationFromBasis(b2), b2
			cal.ScaleSD, cal.SkewSD, cal.RowsSD = cal2.ScaleSD, cal2.SkewSD, cal2.RowsSD
			an.Calibration = cal
		}
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	an.ZSource, err = an.heightScale(t, sg, steps, heights, g, r)
	if err != nil {
		return fail(err)
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}

	progress("finding defects", 0.8)
	allowed := make([]bool, len(r.v))
	const border = 2
	for j := border; j < g.h-border; j++ {
		for i := border; i < g.w-border; i++ {
			q := j*g.w + i
			allowed[q] = true
		}
	}
	removeStepContrast(r, steps, cal.Affine)
	found, sd := detectDefects(r, allowed, stepDist, cal.Affine, k)
	an.NoiseNM = sd

	progress("describing terraces", 0.9)
	an.describe(sg, comp, model, b, steps, heights, found)
	progress("done", 1)
	return an, nil
}

// pixelTerraces returns the terrace (component) of every pixel.
func pixelTerraces(sg *segmentation, w, h int) []int32 {
	comp := make([]int32, w*h)
	for j := 0; j < h; j++ {
		for i := 0; i < w; i++ {
			comp[j*w+i] = int32(sg.terraceAt(float64(i)+0.5, float64(j)+0.5))
		}
	}
	return comp
}

// stepLine is a step edge in pixel-edge units with the two terraces it
// separates (components).
type stepLine struct {
	line  []pt
	sides [2]int
}

// stepLines returns the step edges longer than a nanometre, simplified to
// 0.05 nm, with the terraces on each side.
func stepLines(sg *segmentation, a [2][2]float64) []stepLine {
	var out []stepLine
	for _, l := range sg.steps() {
		length := 0.0
		for k := 1; k < len(l); k++ {
			length += trueDist(a, l[k].x-l[k-1].x, l[k].y-l[k-1].y)
		}
		if length < 1 {
			continue
		}
		px := math.Min(a[0][0], a[1][1])
		l = simplify(l, 0.05/px)
		// The sides, from the middle segment's normal.
		mid := len(l) / 2
		if mid == 0 {
			mid = 1
		}
		p0, p1 := l[mid-1], l[mid]
		dx, dy := p1.x-p0.x, p1.y-p0.y
		n := math.Hypot(dx, dy)
		if n == 0 {
			continue
		}
		cx, cy := (p0.x+p1.x)/2, (p0.y+p1.y)/2
		off := sg.xs[1] * 2
		nx, ny := -dy/n*off, dx/n*off
		clampX := func(x float64) float64 { return math.Max(0.01, math.Min(sg.xs[sg.nx-1]-0.01, x)) }
		clampY := func(y float64) float64 { return math.Max(0.01, math.Min(sg.ys[sg.ny-1]-0.01, y)) }
		left := sg.terraceAt(clampX(cx+nx), clampY(cy+ny))
		right := sg.terraceAt(clampX(cx-nx), clampY(cy-ny))
		if left == right {
			continue
		}
		out = append(out, stepLine{line: l, sides: [2]int{left, right}})
	}
	return out
}

// distanceToLines returns every pixel's distance in nm (true, skew left
// out) from the nearest step edge: the edges are drawn into a grid a
// quarter pixel at a time and the grid's exact distance transform taken.
func distanceToLines(steps []stepLine, w, h int, scale [2]float64) []float64 {
	f := make([]float64, w*h)
	for i := range f {
		f[i] = math.Inf(1)
	}
	for _, s := range steps {
		for k := 1; k < len(s.line); k++ {
			a, b := s.line[k-1], s.line[k]
			n := int(math.Ceil(4*math.Hypot(b.x-a.x, b.y-a.y))) + 1
			for q := 0; q <= n; q++ {
				t := float64(q) / float64(n)
				i := int(math.Floor(a.x + t*(b.x-a.x)))
				j := int(math.Floor(a.y + t*(b.y-a.y)))
				if i >= 0 && j >= 0 && i < w && j < h {
					f[j*w+i] = 0
				}
			}
		}
	}
	d := edt.Squared(f, w, h, scale[0], scale[1])
	for i, v := range d {
		d[i] = math.Sqrt(v)
	}
	return d
}

// heightFit is the plane and the terraces' height offsets fitted to the
// levelled image.
type heightFit struct {
	c      [3]float64 // plane: c0 + c1·(i−cx) + c2·(j−cy), pixels
	cx, cy float64
	offset []float64 // per terrace (component); offset[0] = 0
	// fitted reports whether each terrace had pixels to fit.
	fitted []bool
}

func (h *heightFit) plane(i, j int) float64 {
	return h.c[0] + h.c[1]*(float64(i)-h.cx) + h.c[2]*(float64(j)-h.cy)
}

// maxHeightTerraces bounds the terraces whose heights are fitted jointly.
const maxHeightTerraces = 64

// terraceHeights fits z = plane + offset of the pixel's terrace to r (the
// image with the lattice out) by least squares over the pixels more than
// a nanometre from a step edge and within 4 robust SDs of their terrace's
// median (no defects).
func terraceHeights(g, r *grid, comp []int32, nc int, stepDist []float64) *heightFit {
	hf := &heightFit{cx: float64(g.w-1) / 2, cy: float64(g.h-1) / 2, offset: make([]float64, nc), fitted: make([]bool, nc)}
	nt := min(nc, maxHeightTerraces)
	// Each terrace's median and robust SD, from a sample.
	samples := make([][]float64, nt)
	step := max(1, len(r.v)/400000)
	for q := 0; q < len(r.v); q += step {
		if c := int(comp[q]); c < nt && stepDist[q] >= 1 {
			samples[c] = append(samples[c], r.v[q])
		}
	}
	med, sd := make([]float64, nt), make([]float64, nt)
	for c, s := range samples {
		if len(s) > 0 {
			sd[c] = robustSD(s)
			med[c] = median(s)
		}
	}
	n := 3 + nt - 1
	m := make([][]float64, n)
	for i := range m {
		m[i] = make([]float64, n+1)
	}
	count := make([]int, nc)
	for j := 0; j < g.h; j++ {
		y := float64(j) - hf.cy
		for i := 0; i < g.w; i++ {
			q := j*g.w + i
			c := int(comp[q])
			if c >= nt || stepDist[q] < 1 {
				continue
			}
			z := r.v[q]
			if math.Abs(z-med[c]) > 4*sd[c] {
				continue
			}
			count[c]++
			x := float64(i) - hf.cx
			b := [3]float64{1, x, y}
			for u := 0; u < 3; u++ {
				m[u][n] += b[u] * z
				for v := 0; v < 3; v++ {
					m[u][v] += b[u] * b[v]
				}
			}
			if c > 0 {
				k := 2 + c
				m[k][n] += z
				m[k][k]++
				for u := 0; u < 3; u++ {
					m[u][k] += b[u]
					m[k][u] += b[u]
				}
			}
		}
	}
	// A terrace with no usable pixel keeps offset 0 (its row stays out).
	for c := 1; c < nt; c++ {
		if count[c] == 0 {
			m[2+c][2+c] = 1
		}
	}
	if sol, ok := gauss(m); ok {
		copy(hf.c[:], sol[:3])
		for c := 1; c < nt; c++ {
			hf.offset[c] = sol[2+c]
		}
	}
	for c := range hf.fitted {
		hf.fitted[c] = count[c] > 0
	}
	return hf
}

// heightScale settles the heights' unit. Without one from the file, a
// single step (a/4) is the ruler: the heights (g, r, the fit) are scaled
// so that the median step is a/4 high.
func (an *Analysis) heightScale(t *Topograph, sg *segmentation, steps []stepLine, hf *heightFit, g, r *grid) (string, error) {
	if t.ZUnitNM > 0 {
		return "file", nil
	}
	var jumps []float64
	for _, s := range steps {
		a, b := s.sides[0], s.sides[1]
		if hf.fitted[a] && hf.fitted[b] {
			jumps = append(jumps, math.Abs(hf.offset[a]-hf.offset[b]))
		}
	}
	if len(jumps) == 0 || !(median(slices.Clone(jumps)) > 0) {
		an.Notes = append(an.Notes, "the file gives no height scale and the image shows no step to take one from: heights are in grey levels")
		return "", nil
	}
	scale := lattice.StepHeight / median(jumps)
	for _, v := range [][]float64{g.v, r.v, hf.offset, hf.c[:]} {
		for i := range v {
			v[i] *= scale
		}
	}
	an.Notes = append(an.Notes, fmt.Sprintf("heights scaled so that a single step is a/4 = %.4f nm (the file gives no height scale)", lattice.StepHeight))
	return "step", nil
}

// describe fills in the terraces, steps and defects in true nm.
func (an *Analysis) describe(sg *segmentation, comp []int32, model [2][]float64, b basis, steps []stepLine, hf *heightFit, found []foundDefect) {
	a := an.Affine
	toNM := func(p pt) r2.Point { return r2.Point{X: a[0][0]*p.x + a[0][1]*p.y, Y: a[1][1] * p.y} }
	// Terraces by area, largest first.
	order := make([]int, len(sg.comps))
	for i := range order {
		order[i] = i
	}
	slices.SortStableFunc(order, func(x, y int) int { return sg.comps[y].nodes - sg.comps[x].nodes })
	index := make([]int, len(order)) // component -> terrace index
	for ti, c := range order {
		index[c] = ti
	}
	px := math.Min(a[0][0], a[1][1])
	ref := hf.offset[order[0]]
	for _, c := range order {
		kind := sg.comps[c].kind
		t := Terrace{RowsDeg: an.RowsDeg[kind], UpFrom: -1, HeightNM: hf.offset[c] - ref}
		outline := simplify(sg.outline(c), 0.1/px)
		if closed(outline) {
			outline = outline[:len(outline)-1]
		}
		for _, q := range outline {
			t.Polygon = append(t.Polygon, toNM(q))
		}
		t.AreaNM2 = math.Abs(polygonAreaNM(t.Polygon))
		t.DimerNM, t.AlongKnown = dimerPhase(comp, int32(c), model[kind], an.Width, b, kind, an.DimersResolved[kind], a)
		an.Terraces = append(an.Terraces, t)
	}
	an.RotationDeg = an.Terraces[0].RowsDeg
	// Steps, and which side is up.
	type pair struct{ lo, hi int }
	shared := map[pair]float64{}
	for _, s := range steps {
		ta, tb := index[s.sides[0]], index[s.sides[1]]
		st := Step{Terraces: [2]int{ta, tb}, Upper: -1}
		for _, q := range s.line {
			st.Polyline = append(st.Polyline, toNM(q))
		}
		ha, hb := an.Terraces[ta].HeightNM, an.Terraces[tb].HeightNM
		if hf.fitted[s.sides[0]] && hf.fitted[s.sides[1]] && ha != hb {
			st.Upper = ta
			if hb > ha {
				st.Upper = tb
			}
			st.HeightNM = math.Abs(ha - hb)
			lo, hi := ta, tb
			if st.Upper == ta {
				lo, hi = tb, ta
			}
			length := 0.0
			for k := 1; k < len(st.Polyline); k++ {
				length += st.Polyline[k].Sub(st.Polyline[k-1]).Norm()
			}
			shared[pair{lo, hi}] += length
		}
		an.Steps = append(an.Steps, st)
	}
	for ti := range an.Terraces {
		best, bestLen := -1, 0.0
		for pr, l := range shared {
			if pr.hi == ti && (l > bestLen || (l == bestLen && pr.lo < best)) {
				best, bestLen = pr.lo, l
			}
		}
		an.Terraces[ti].UpFrom = best
	}
	for _, f := range found {
		i := min(max(int(f.x), 0), an.Width-1)
		j := min(max(int(f.y), 0), an.Height-1)
		d := Defect{
			AtNM: toNM(pt{f.x, f.y}), Bright: f.height > 0, HeightNM: f.height, SizeNM: f.sizeNM,
			Terrace: index[comp[j*an.Width+i]], SignificanceSD: math.Abs(f.score),
		}
		d.Class = ClassOf(d.Bright, d.SizeNM)
		an.Defects = append(an.Defects, d)
	}
	slices.SortStableFunc(an.Defects, func(x, y Defect) int {
		if x.AtNM.Y != y.AtNM.Y {
			return cmpDesc(y.AtNM.Y, x.AtNM.Y)
		}
		return cmpDesc(y.AtNM.X, x.AtNM.X)
	})
}

func polygonAreaNM(p []r2.Point) float64 {
	var s float64
	for i := range p {
		a, b := p[i], p[(i+1)%len(p)]
		s += a.X*b.Y - b.X*a.Y
	}
	return s / 2
}

// dimerPhase returns the position (true nm) of a dimer centre of terrace
// c from the phases of its lattice model at the row frequency and, when
// resolved, the dimer frequency: the lattice is a sum of waves
// A_g·cos(2π g·(p − p0)) with A_g > 0 for a dimer centre p0 (the dimer is
// the bright feature of the cell, symmetric about its centre), so
// g·p0 = −arg(Σ L(p)·e^{−2πi g·p})/2π (mod 1). The dimer returned is the
// one whose (along, across) position in the terrace's row frame is the
// least non-negative, row 0 and dimer 0 counted from the image's
// lower-left corner.
func dimerPhase(comp []int32, c int32, model []float64, w int, b basis, kind int, resolved bool, a [2][2]float64) (r2.Point, bool) {
	row := b.b1
	dimer := [2]float64{2 * b.b2[0], 2 * b.b2[1]}
	if kind == 1 {
		row = b.b2
		dimer = [2]float64{2 * b.b1[0], 2 * b.b1[1]}
	}
	sum := func(f [2]float64) complex128 {
		var s complex128
		h := len(comp) / w
		step := cmplx.Exp(complex(0, -2*math.Pi*f[0]))
		for j := 0; j < h; j++ {
			e := cmplx.Exp(complex(0, -2*math.Pi*(f[0]*0.5+f[1]*(float64(j)+0.5))))
			base := j * w
			for i := 0; i < w; i++ {
				if comp[base+i] == c {
					s += complex(model[base+i], 0) * e
				}
				e *= step
			}
		}
		return s
	}
	phase := func(f [2]float64) float64 { return -cmplx.Phase(sum(f)) / (2 * math.Pi) }
	pr := phase(row)
	var p [2]float64 // pixel-edge units
	if resolved {
		pd := phase(dimer)
		det := row[0]*dimer[1] - row[1]*dimer[0]
		p = [2]float64{(pr*dimer[1] - pd*row[1]) / det, (row[0]*pd - dimer[0]*pr) / det}
	} else {
		n2 := row[0]*row[0] + row[1]*row[1]
		p = [2]float64{pr * row[0] / n2, pr * row[1] / n2}
	}
	at := r2.Point{X: a[0][0]*p[0] + a[0][1]*p[1], Y: a[1][1] * p[1]}
	// Reduce into the first cell from the corner in the row frame.
	rowsDeg := math.Atan2(0, 1)
	_ = rowsDeg
	return reduceToCorner(at, a, row, resolved), resolved
}

// reduceToCorner moves the dimer centre at (true nm) by whole lattice
// vectors to the least non-negative along and across coordinates: the
// row frame's axes are the directions of the dimer and row frequencies.
func reduceToCorner(at r2.Point, a [2][2]float64, row [2]float64, resolved bool) r2.Point {
	// The row frequency in true units is (A⁻ᵀ) f; its direction is across
	// the rows.
	det := a[0][0] * a[1][1]
	across := r2.Point{X: row[0] / a[0][0], Y: (-a[0][1]*row[0] + a[0][0]*row[1]) / det}
	across = across.Mul(1 / across.Norm())
	along := r2.Point{X: -across.Y, Y: across.X}
	u := at.Dot(along)
	v := at.Dot(across)
	if resolved {
		u = math.Mod(u, lattice.DimerPitch)
		if u < 0 {
			u += lattice.DimerPitch
		}
	} else {
		u = 0
	}
	v = math.Mod(v, lattice.RowSpacing)
	if v < 0 {
		v += lattice.RowSpacing
	}
	return along.Mul(u).Add(across.Mul(v))
}

var _ = errors.New
