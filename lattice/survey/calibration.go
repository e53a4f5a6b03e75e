package survey

import (
	"math"

	"dimerpath/lattice"
)

// Calibration is the image's true geometry measured on the lattice.
//
// The true frame has its origin at the image's lower-left corner and its
// x axis along the image's x axis; the pixel point (u, v) (pixel steps
// from that corner, a pixel's centre at (i+½, j+½)) lies at true position
// Affine·(u, v) nm. One step along x is ScaleNMPerPx[0] nm long; one step
// along y is ScaleNMPerPx[1] nm long and leans from the normal to x by
// SkewDeg towards +x (a skewed scan: the image's axes meet at 90° −
// SkewDeg).
type Calibration struct {
	ScaleNMPerPx [2]float64
	// ScaleSD is the standard uncertainty of ScaleNMPerPx; NaN where the
	// image does not measure it (see Isotropic).
	ScaleSD [2]float64
	SkewDeg float64
	SkewSD  float64
	// Affine maps pixel points to true nm; Affine[1][0] is 0.
	Affine [2][2]float64
	// RowsDeg is the angle from the image's x axis to the dimer rows of
	// each kind of terrace: [0] rows across b1, [1] across b2, in
	// (−90, 90]; RowsSD its uncertainty.
	RowsDeg [2]float64
	RowsSD  float64
	// Isotropic reports that only one lattice direction was seen (one
	// terrace, dimers not resolved): the scale is then taken equal in x
	// and y without skew, and only its mean and the rotation are measured.
	Isotropic bool
	// DimersResolved reports whether the dimer pitch was seen on each kind
	// of terrace.
	DimersResolved [2]bool
	// Peaks is the number of lattice peaks fitted.
	Peaks int
}

// calibrationFromBasis returns the true geometry of an image whose
// lattice has reciprocal basis b (cycles per pixel): b1 and b2 are the
// row frequencies of the two row directions, 1/RowSpacing long on the
// surface and at right angles there. With f = Aᵀ·β for a true frequency
// β and A the pixel-to-true map, A = RowSpacing·R(φ)·[b1; b2], and φ is
// the rotation that puts the image's x axis on the true x axis.
func calibrationFromBasis(b basis) Calibration {
	b1, b2 := b.b1, b.b2
	if b1[0]*b2[1]-b1[1]*b2[0] < 0 {
		b2 = [2]float64{-b2[0], -b2[1]}
	}
	rs := lattice.RowSpacing
	phi := -math.Atan2(b2[0], b1[0])
	s, c := math.Sincos(phi)
	n := [2][2]float64{{rs * b1[0], rs * b1[1]}, {rs * b2[0], rs * b2[1]}}
	var a [2][2]float64
	a[0][0] = c*n[0][0] - s*n[1][0]
	a[0][1] = c*n[0][1] - s*n[1][1]
	a[1][0] = 0 // s*n[0][0] + c*n[1][0] vanishes by the choice of φ
	a[1][1] = s*n[0][1] + c*n[1][1]
	cal := Calibration{
		Affine:         a,
		ScaleNMPerPx:   [2]float64{a[0][0], math.Hypot(a[0][1], a[1][1])},
		SkewDeg:        math.Atan2(a[0][1], a[1][1]) * 180 / math.Pi,
		Isotropic:      !b.measured2,
		DimersResolved: [2]bool{b.dimers1, b.dimers2},
		Peaks:          len(b.peaks),
	}
	// Rows across β1 = (cos φ, sin φ)/RowSpacing run at φ + 90°; rows
	// across β2 at φ.
	deg := phi * 180 / math.Pi
	cal.RowsDeg = [2]float64{lineDeg(deg + 90), lineDeg(deg)}
	return cal
}

// lineDeg reduces the angle of an undirected line into (−90, 90].
func lineDeg(a float64) float64 {
	a = math.Mod(a, 180)
	if a <= -90 {
		a += 180
	}
	if a > 90 {
		a -= 180
	}
	return a
}

// angleDiff returns a − b for line angles, in (−90, 90].
func angleDiff(a, b float64) float64 { return lineDeg(a - b) }

// maxCalibSide bounds the side of the crop the lattice is measured on:
// a 2048-pixel crop holds hundreds of row periods, enough for a few 10⁻⁵
// of the scale, and larger transforms would only cost time.
const maxCalibSide = 2048

// measurement is a first calibration on the lattice: the basis from the
// Hann-windowed spectrum of the image's central crop (of smooth size, at
// most maxCalibSide a side), the peaks placed between bins by the Hann
// rule. finish makes it precise.
type measurement struct {
	g       *grid
	sub     func(q int) float64
	x0, y0  int // the crop
	w, h    int
	data    []float64 // the windowed crop
	peaks   []peak
	b       basis
	nominal [2]float64
}

// measure finds the lattice in the levelled image g, less sub (when not
// nil: a height to take off each pixel). nominal is the nominal pixel
// size (nm, x and y) or zero.
func measure(g *grid, sub func(q int) float64, nominal [2]float64) (*measurement, error) {
	w, h := smoothBelow(min(g.w, maxCalibSide)), smoothBelow(min(g.h, maxCalibSide))
	m := &measurement{g: g, sub: sub, x0: (g.w - w) / 2, y0: (g.h - h) / 2, w: w, h: h, nominal: nominal}
	m.data = windowedData(g, sub, m.x0, m.y0, w, h)
	s := forward2D(m.data, w, h)
	var nomF [2]float64
	if nominal[0] > 0 && nominal[1] > 0 {
		nomF = [2]float64{nominal[0] / lattice.RowSpacing, nominal[1] / lattice.RowSpacing}
	}
	m.peaks = findPeaks(s, 6/float64(min(w, h)), 30, 40)
	b, err := findBasis(m.peaks, nomF, 1/float64(min(w, h)))
	if err != nil {
		return nil, err
	}
	m.b = b
	return m, nil
}

// maxRefined is how many of the lattice's peaks (the strongest) finish
// places by the transform itself.
const maxRefined = 8

// finish places the strongest lattice peaks by the transform itself,
// fits the basis again and measures the uncertainties on the quadrants.
func (m *measurement) finish() (Calibration, basis) {
	var onGrid []peak
	for _, p := range m.peaks {
		if _, _, ok := m.b.index(p.f); ok {
			onGrid = append(onGrid, p)
		}
	}
	// peaks are sorted by power, strongest first.
	refinePeaks(m.data, m.w, m.h, onGrid[:min(len(onGrid), maxRefined)])
	m.b.refine(onGrid)
	cal := calibrationFromBasis(m.b)
	m.quadrantSpread(&cal)
	return cal, m.b
}

// quadrantSpread sets the calibration's uncertainties from the scatter of
// the basis fitted on each quadrant of the image alone (indices kept from
// the whole image's fit, peaks placed by the Hann rule, so that the
// scatter includes that rule's error): SD over the quadrants / √(quadrants), in
// quadrature with a floor for the peak interpolation (0.02 bin on the
// whole image's longest fitted peak).
func (m *measurement) quadrantSpread(cal *Calibration) {
	g, b := m.g, m.b
	qw, qh := smoothBelow(m.w/2), smoothBelow(m.h/2)
	var sx, sy, sk, rot []float64
	if qw >= 32 && qh >= 32 {
		x1, y1 := m.x0+m.w-qw, m.y0+m.h-qh
		for _, o := range [][2]int{{m.x0, m.y0}, {x1, m.y0}, {m.x0, y1}, {x1, y1}} {
			data := windowedData(g, m.sub, o[0], o[1], qw, qh)
			peaks := findPeaks(forward2D(data, qw, qh), 6/float64(min(qw, qh)), 30, 40)
			qb := b
			qb.peaks = nil
			var ls []labelled
			seen1, seen2 := false, false
			for _, p := range peaks {
				m, n, ok := b.index(p.f)
				if !ok || (!b.measured2 && n != 0) {
					continue
				}
				ls = append(ls, labelled{peak: p, m: m, n: n})
			}

			ls = singleSource(ls)
			for _, p := range ls {
				seen1 = seen1 || p.m != 0
				seen2 = seen2 || p.n != 0
			}
			if !seen1 || (b.measured2 && !seen2) {
				continue
			}
			fitBasis(&qb, ls)
			if !qb.measured2 {
				qb.b2 = [2]float64{-qb.b1[1], qb.b1[0]}
			}
			qc := calibrationFromBasis(qb)
			sx = append(sx, qc.ScaleNMPerPx[0])
			sy = append(sy, qc.ScaleNMPerPx[1])
			sk = append(sk, qc.SkewDeg)
			rot = append(rot, angleDiff(qc.RowsDeg[0], cal.RowsDeg[0]))
		}
	}
	longest := 0.0
	for _, p := range b.peaks {
		longest = math.Max(longest, math.Hypot(p.f[0]*float64(m.w), p.f[1]*float64(m.h)))
	}
	floorRel := 0.02 / math.Max(longest, 1)
	floorDeg := floorRel * 180 / math.Pi
	sem := func(v []float64, floor float64) float64 {
		if len(v) < 2 {
			return math.NaN()
		}
		var m, q float64
		for _, x := range v {
			m += x
		}
		m /= float64(len(v))
		for _, x := range v {
			q += (x - m) * (x - m)
		}
		sd := math.Sqrt(q / float64(len(v)-1))
		return math.Hypot(sd/math.Sqrt(float64(len(v))), floor)
	}
	cal.ScaleSD = [2]float64{sem(sx, floorRel*cal.ScaleNMPerPx[0]), sem(sy, floorRel*cal.ScaleNMPerPx[1])}
	cal.SkewSD = sem(sk, floorDeg)
	cal.RowsSD = sem(rot, floorDeg)
	if cal.Isotropic {
		// One direction measures the mean scale only.
		cal.SkewSD = math.NaN()
	}
}
