package survey

import (
	"context"
	"fmt"
	"math"
	"math/cmplx"
	"runtime"
	"slices"

	"github.com/golang/geo/r2"

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
	meas, err := measure(g, nil, an.NominalNMPerPx)
	if err != nil {
		return fail(err)
	}
	b := meas.b
	cal := calibrationFromBasis(b)
	if err := ctx.Err(); err != nil {
		return nil, err
	}

	progress("finding terraces", 0.3)
	meanPx := math.Sqrt(cal.ScaleNMPerPx[0] * cal.ScaleNMPerPx[1])
	rowPx := lattice.RowSpacing / meanPx
	segSigma := 1.2 * rowPx
	modelSigma := 2.5 * rowPx
	p := padFor(g.w, g.h, int(math.Ceil(4*modelSigma)))
	spec := forwardRows(p.w, p.h, p.rows(g, nil))
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
	stepDist := distanceToLines(steps, g.w, g.h, cal.Affine)
	if len(steps) > 0 {
		// The lattice is blurred away (its row period is damped 200-fold
		// by a Gaussian of SD 0.4 nm); the blurred step keeps its middle.
		hf := terraceHeights(g, g, comp, len(sg.comps), stepDist)
		blurred := &grid{w: g.w, h: g.h, v: gaussBlur(g.v, g.w, g.h, 0.4/meanPx)}
		refineSteps(steps, heights{blurred, g.w, g.h, hf.plane}, hf.offset, cal.Affine, 0.6)
		blurred = nil
		assignNearSteps(comp, steps, stepDist, g.w, g.h, 1.5)
		stepDist = distanceToLines(steps, g.w, g.h, cal.Affine)
		release(g)
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}

	progress("taking out the lattice", 0.55)
	kindOf := make([]bool, len(comp))
	kinds := 0
	for i, c := range comp {
		kk := sg.comps[c].kind
		kindOf[i] = kk == 1
		kinds |= 1 << kk
	}
	model := latticeModel(g, p, spec, b, kindOf, kinds, modelSigma, nil)
	spec, kindOf = nil, nil
	// The lattice's phase on each terrace, from the model; then the model's
	// array becomes the residual (at 4096 x 4096 pixels each image is
	// 128 MiB).
	phases := make([]phase, len(sg.comps))
	for c := range sg.comps {
		kind := sg.comps[c].kind
		phases[c] = dimerPhase(comp, int32(c), model, g.w, b, kind, cal.DimersResolved[kind])
	}
	r := &grid{w: g.w, h: g.h, v: model}
	for i, v := range g.v {
		r.v[i] = v - r.v[i]
	}
	model = nil
	release(g)
	progress("levelling the terraces", 0.65)
	hf := terraceHeights(g, r, comp, len(sg.comps), stepDist)
	// Scan-line offsets, fitted with the terraces' heights, once the
	// lattice and the plane are out.
	off, _ := lineOffsets(heights{r, g.w, g.h, hf.plane}, comp, len(sg.comps), stepDist)
	for j, o := range off {
		for i := 0; i < g.w; i++ {
			g.v[j*g.w+i] -= o
			r.v[j*g.w+i] -= o
		}
	}
	hf = terraceHeights(g, r, comp, len(sg.comps), stepDist)
	progress("placing the step edges", 0.7)
	// With the lattice and the scan lines' offsets out, the edges are
	// placed again, now to about a pixel.
	if len(steps) > 0 {
		refineSteps(steps, heights{r, g.w, g.h, hf.plane}, hf.offset, cal.Affine, 0.3)
		// The edges moved 0.3 nm at most: the pixels within 1.5 nm of the
		// old ones hold those within 1.2 nm of the new.
		assignNearSteps(comp, steps, stepDist, g.w, g.h, 1.5)
		stepDist = nil
		stepDist = distanceToLines(steps, g.w, g.h, cal.Affine)
		hf = terraceHeights(g, r, comp, len(sg.comps), stepDist)
		release(g)
	}
	// g loses the plane (the terraces keep their heights, for display);
	// r, the residual, loses the plane and the terraces' heights.
	for i := range r.v {
		p := hf.plane(i%g.w, i/g.w)
		g.v[i] -= p
		r.v[i] -= p + hf.offset[comp[i]]
	}
	// The calibration is made precise now. A step's height jump puts a
	// streak through the spectrum, at right angles to the edge; where it
	// crosses a lattice peak (the rows of the upper terrace run along a
	// smooth step edge) it pulls the peak. With the terraces' heights
	// known, the lattice is measured again on the image without them.
	progress("calibrating on the lattice", 0.75)
	final := meas
	if len(sg.comps) > 1 {
		terraceHeight := func(q int) float64 { return hf.offset[comp[q]] }
		if m2, err := measure(g, terraceHeight, an.NominalNMPerPx); err == nil && m2.b.alignTo(b) {
			final = m2
		}
	}
	calF, bF := final.finish()
	bF.alignTo(meas.b) // kinds keep their numbers
	b, cal = bF, calibrationFromBasis(bF)
	cal.ScaleSD, cal.SkewSD, cal.RowsSD = calF.ScaleSD, calF.SkewSD, calF.RowsSD
	an.Calibration = cal
	if an.NominalNMPerPx[0] > 0 {
		for i := range 2 {
			if r := cal.ScaleNMPerPx[i] / an.NominalNMPerPx[i]; r < 0.7 || r > 1.43 {
				an.Notes = append(an.Notes, fmt.Sprintf("the measured scale differs from the nominal by %+.0f %% in %c: check the size given", 100*(r-1), "xy"[i]))
			}
		}
	}
	if cal.Isotropic {
		an.Notes = append(an.Notes, "only one lattice direction is resolved (one terrace, dimers not resolved): the scale is taken equal in x and y, without skew")
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}
	an.ZSource, err = an.heightScale(t, sg, steps, hf, g, r)
	if err != nil {
		return fail(err)
	}
	if err := ctx.Err(); err != nil {
		return nil, err
	}

	progress("finding defects", 0.8)
	found, _ := detectDefects(r, stepDist, nil, cal.Affine, k)
	// The lattice model, a local average, took part of each defect for
	// lattice (and left a faint ring of it round strong ones): it is made
	// again with the defects left out, the lattice round them standing in,
	// and the residual made again from it (the image has its plane and
	// scan lines' offsets out already; the terraces' heights go too).
	var exclude []bool
	if len(found) > 0 {
		progress("finding defects", 0.85)
		exclude = defectMask(found, g.w, g.h, cal.Affine)
		r = nil
		release(g)
		kindOf = make([]bool, len(comp))
		for i, c := range comp {
			kindOf[i] = sg.comps[c].kind == 1
		}
		model := latticeModel(g, p, nil, b, kindOf, kinds, modelSigma, exclude)
		kindOf = nil
		r = &grid{w: g.w, h: g.h, v: model}
		for i, v := range g.v {
			r.v[i] = v - r.v[i] - hf.offset[comp[i]]
		}
		model = nil
		release(g)
	}
	removeStepContrast(r, steps, cal.Affine, exclude)
	found, sd := detectDefects(r, stepDist, exclude, cal.Affine, k)
	an.NoiseNM = sd

	progress("describing terraces", 0.9)
	an.describe(sg, comp, phases, steps, hf, found)
	progress("done", 1)
	return an, nil
}

// pixelTerraces returns the terrace (component) of every pixel: its
// nearest node's. Near a step edge this is refined (assignNearSteps).
func pixelTerraces(sg *segmentation, w, h int) []int32 {
	comp := make([]int32, w*h)
	fx := float64(sg.nx-1) / float64(w)
	fy := float64(sg.ny-1) / float64(h)
	col := make([]int, w)
	for i := range col {
		col[i] = min(sg.nx-1, int(math.Round((float64(i)+0.5)*fx)))
	}
	for j := 0; j < h; j++ {
		row := min(sg.ny-1, int(math.Round((float64(j)+0.5)*fy))) * sg.nx
		for i := 0; i < w; i++ {
			comp[j*w+i] = int32(sg.comp[row+col[i]])
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

// stepReachNM is how far from a step edge distances are measured; every
// use of them (the bands kept out of fits and searches) lies within it.
const stepReachNM = 2.0

// distanceToLines returns every pixel's true distance in nm from the
// nearest step edge, up to stepReachNM (+Inf beyond): each edge's
// segments are visited in turn over the pixels of their bounding box
// widened by the reach, so the cost grows with the edges' length, not the
// image's area.
func distanceToLines(steps []stepLine, w, h int, a [2][2]float64) []float32 {
	d := make([]float32, w*h)
	inf := float32(math.Inf(1))
	for i := range d {
		d[i] = inf
	}
	reachX := stepReachNM/a[0][0] + 1
	reachY := stepReachNM/a[1][1] + 1
	for _, s := range steps {
		for k := 1; k < len(s.line); k++ {
			p, q := s.line[k-1], s.line[k]
			x0 := max(0, int(math.Floor(math.Min(p.x, q.x)-reachX)))
			x1 := min(w-1, int(math.Ceil(math.Max(p.x, q.x)+reachX)))
			y0 := max(0, int(math.Floor(math.Min(p.y, q.y)-reachY)))
			y1 := min(h-1, int(math.Ceil(math.Max(p.y, q.y)+reachY)))
			// The segment in true nm, and each pixel centre.
			px, py := a[0][0]*p.x+a[0][1]*p.y, a[1][1]*p.y
			qx, qy := a[0][0]*q.x+a[0][1]*q.y, a[1][1]*q.y
			dx, dy := qx-px, qy-py
			l2 := dx*dx + dy*dy
			for j := y0; j <= y1; j++ {
				cy := a[1][1] * (float64(j) + 0.5)
				for i := x0; i <= x1; i++ {
					cx := a[0][0]*(float64(i)+0.5) + a[0][1]*(float64(j)+0.5)
					t := 0.0
					if l2 > 0 {
						t = math.Max(0, math.Min(1, ((cx-px)*dx+(cy-py)*dy)/l2))
					}
					e := float32(math.Hypot(cx-px-t*dx, cy-py-t*dy))
					if e <= stepReachNM && e < d[j*w+i] {
						d[j*w+i] = e
					}
				}
			}
		}
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
func terraceHeights(g, r *grid, comp []int32, nc int, stepDist []float32) *heightFit {
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
	// Every other pixel each way on large images: the fit has a handful
	// of unknowns and a quarter of a million pixels pin them down.
	stride := 1
	if g.w*g.h > 1<<19 {
		stride = 2
	}
	for j := 0; j < g.h; j += stride {
		y := float64(j) - hf.cy
		for i := 0; i < g.w; i += stride {
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
func (an *Analysis) describe(sg *segmentation, comp []int32, phases []phase, steps []stepLine, hf *heightFit, found []foundDefect) {
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
		ph := phases[c]
		t.DimerNM = reduceToCorner(toNM(ph.at), a, ph.row, ph.alongKnown)
		t.AlongKnown = ph.alongKnown
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

// phase is where one dimer centre of a terrace's lattice lies, in image
// pixel-edge units, with the row frequency (cycles per pixel) it was
// measured with; alongKnown says whether its place along the rows was
// measured (the dimer pitch resolved) or only across them.
type phase struct {
	at         pt
	row        [2]float64
	alongKnown bool
}

// dimerPhase returns the phase of terrace c from its lattice model at the
// row frequency and, when resolved, the dimer frequency: the lattice is a
// sum of waves A_g·cos(2π g·(p − p0)) with A_g > 0 for a dimer centre p0
// (the dimer is the bright feature of the cell, symmetric about its
// centre), so g·p0 = −arg(Σ L(p)·e^{−2πi g·p})/2π (mod 1).
func dimerPhase(comp []int32, c int32, model []float64, w int, b basis, kind int, resolved bool) phase {
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
	ph := func(f [2]float64) float64 { return -cmplx.Phase(sum(f)) / (2 * math.Pi) }
	pr := ph(row)
	var p pt
	if resolved {
		pd := ph(dimer)
		det := row[0]*dimer[1] - row[1]*dimer[0]
		p = pt{(pr*dimer[1] - pd*row[1]) / det, (row[0]*pd - dimer[0]*pr) / det}
	} else {
		n2 := row[0]*row[0] + row[1]*row[1]
		p = pt{pr * row[0] / n2, pr * row[1] / n2}
	}
	return phase{at: p, row: row, alongKnown: resolved}
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

// release returns freed images to the heap at once on large images (the
// big arrays hold no pointers, so a collection is cheap), so that the
// analysis of a 4096 x 4096 image stays within its memory goal.
func release(g *grid) {
	if g.w*g.h >= 2048*2048 {
		runtime.GC()
	}
}
