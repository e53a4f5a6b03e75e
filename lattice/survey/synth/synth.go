// Package synth renders synthetic STM topographs of the Si(100)-2x1:H
// surface for testing the survey analysis against known truth: dimer
// positions derived from the diamond structure (not from dimerpath's own
// lattice package), a known scale in x and y, rotation, skew and lattice
// phase, a single-height step with the dimer rows turned by 90° and the
// registry the diamond structure gives for a step up or down, defects of
// known position, height and size, Gaussian noise, scan-line offsets and
// a tilted plane.
//
// # Frames
//
// The image's pixel (i, j) counts from the lower-left corner, x right and
// y up; its centre is at (i+½, j+½) pixel steps. The true (surface) frame
// is the one the survey analysis reports in: its origin is the lower-left
// corner of the image and its x axis is the image's x axis, so the pixel
// point (u, v) lies at true position
//
//	( ScaleNM[0]·u + ScaleNM[1]·sin(skew)·v ,  ScaleNM[1]·cos(skew)·v )
//
// nm: one pixel step along x is ScaleNM[0] nm long, one along y is
// ScaleNM[1] nm long and leans from the normal to x by the skew angle
// towards +x.
//
// # Contrast
//
// The apparent height is a filled-state-like picture: a Gaussian on each
// dimer (the dimer bond, elongated across the row), a smaller Gaussian on
// each H site, and a cosine corrugation across the rows, all blurred by a
// Gaussian tip. The amplitudes are invented for tests; only the geometry
// is physics.
package synth

import (
	"fmt"
	"math"
	"math/rand/v2"
)

// siLatticeConstant is the cubic lattice constant of silicon in nm,
// CODATA 2018 (5.431 020 511(89) Å), written here on its own so that the
// generator does not lean on the package it tests.
const siLatticeConstant = 0.5431020511

// stepHeight is one atomic layer of Si(100), a/4 (the spacing of (001)
// planes in the diamond structure).
const stepHeight = siLatticeConstant / 4

// Params describes one synthetic topograph. Lengths are in nm in the true
// frame (see the package comment), angles in degrees counter-clockwise.
type Params struct {
	Width, Height int // pixels
	// ScaleNM is the true length of one pixel step along the image's x
	// and y axes.
	ScaleNM [2]float64
	// SkewDeg: the image's y axis leans from the normal to its x axis by
	// this angle towards +x.
	SkewDeg float64
	// RotationDeg is the angle from the image's x axis to the dimer rows
	// of the base terrace.
	RotationDeg float64
	// PhaseNM is the true position of one dimer centre of the base
	// terrace.
	PhaseNM [2]float64
	// NominalNMPerPx is the pixel size the file claims (the scanner's
	// calibration), for Topograph.SizeNM; zero leaves the size unknown.
	NominalNMPerPx [2]float64
	// Step, when not nil, adds a single-height step.
	Step *Step
	// Defects are added on top of the lattice.
	Defects []Defect
	// NoiseNM is the SD of Gaussian noise per pixel, LineNoiseNM the SD
	// of a random offset per scan line (lines run along x).
	NoiseNM, LineNoiseNM float64
	// TiltNMPerNM is the plane added, dz/dx and dz/dy in the true frame.
	TiltNMPerNM [2]float64
	// Contrast sets the apparent heights; the zero value takes
	// DefaultContrast.
	Contrast Contrast
	// Seed seeds the noise.
	Seed uint64
}

// Step is a straight single-height step edge through Through, running
// at AngleDeg. The terrace to the left of that direction is the other
// terrace, one atomic layer up (Up) or down from the base terrace.
type Step struct {
	Through  [2]float64
	AngleDeg float64
	Up       bool
	// Antiphase picks the other of the two dimer pairings possible on the
	// other terrace (its lattice moves by half a row spacing across its
	// rows); both are the surface's own.
	Antiphase bool
	// WiggleNM and WigglePeriodNM bend the edge into a sine along its
	// length (0: straight).
	WiggleNM, WigglePeriodNM float64
	// Jagged gives each point the height of the terrace of the nearest
	// dimer (on its own side of the line), so that the edge follows the
	// dimers instead of the line.
	Jagged bool
}

// DefectKind says how a defect is drawn.
type DefectKind int

const (
	// Bright is a protrusion (a dangling bond or adsorbate): a Gaussian
	// of HeightNM and full width at half maximum SizeNM added at AtNM.
	Bright DefectKind = iota
	// Dark is a vacancy: the dimers within SizeNM/2 of AtNM are removed
	// and a Gaussian hollow of depth HeightNM and width SizeNM is cut.
	// Render moves AtNM onto the nearest dimer centre of its terrace.
	Dark
)

// Defect is one defect; AtNM is in the true frame.
type Defect struct {
	Kind     DefectKind
	AtNM     [2]float64
	HeightNM float64
	SizeNM   float64
}

// Contrast holds the apparent heights of the lattice's features (nm) and
// their Gaussian widths (SD, nm).
type Contrast struct {
	DimerNM, DimerAlongSD, DimerAcrossSD float64
	HNM, HSD                             float64
	RowNM                                float64 // cosine across the rows, peak amplitude
	TipSD                                float64 // blur of every feature
}

// DefaultContrast is a dimer-resolved filled-state-like picture.
var DefaultContrast = Contrast{DimerNM: 0.06, DimerAlongSD: 0.13, DimerAcrossSD: 0.20, HNM: 0.02, HSD: 0.09, RowNM: 0.02}

// Image is a rendered topograph with its truth.
type Image struct {
	Width, Height int
	// Z holds the heights in nm, Z[j*Width+i], line 0 at the bottom.
	Z []float64
	// Defects are the defects as drawn (dark ones moved onto their dimer),
	// true frame.
	Defects []Defect
	// Terraces holds the base terrace (0) and, with a step, the other
	// terrace (1).
	Terraces []TerraceTruth
}

// TerraceTruth is the lattice of one terrace in the true frame.
type TerraceTruth struct {
	// DimerNM is the position of one dimer centre.
	DimerNM [2]float64
	// RowsDeg is the angle of the dimer rows from the image's x axis, in
	// (−90, 90].
	RowsDeg float64
	// HeightNM is the terrace's height relative to the base terrace.
	HeightNM float64
}

// Affine returns the true position of pixel point (u, v) (pixel units
// from the lower-left corner).
func (p *Params) Affine(u, v float64) (x, y float64) {
	s, c := math.Sincos(p.SkewDeg * math.Pi / 180)
	return p.ScaleNM[0]*u + p.ScaleNM[1]*s*v, p.ScaleNM[1] * c * v
}

// terrace is one terrace's dimer lattice in the true frame.
type terrace struct {
	origin       [2]float64 // a dimer centre
	along        [2]float64 // unit vector along the rows
	across       [2]float64 // unit vector across the rows
	alongPeriod  float64    // dimer pitch
	acrossPeriod float64    // row spacing
	height       float64
	missing      map[[2]int]bool // removed dimers, by (across, along) index
}

// Render draws the topograph p describes. It returns an error for
// parameters that make no image.
func Render(p Params) (*Image, error) {
	if p.Width < 1 || p.Height < 1 || p.Width > 8192 || p.Height > 8192 {
		return nil, fmt.Errorf("synth: image size %d x %d", p.Width, p.Height)
	}
	if !(p.ScaleNM[0] > 0) || !(p.ScaleNM[1] > 0) {
		return nil, fmt.Errorf("synth: scale %v nm/px must be positive", p.ScaleNM)
	}
	c := p.Contrast
	if c == (Contrast{}) {
		c = DefaultContrast
	}
	base := layerLattice(0)
	// The crystal's in-plane frame turns so that the base rows run at
	// RotationDeg; the base dimer centre goes to PhaseNM.
	turn := p.RotationDeg*math.Pi/180 - math.Atan2(base.along[1], base.along[0])
	toTrue := func(q [2]float64) [2]float64 {
		d := [2]float64{q[0] - base.centre[0], q[1] - base.centre[1]}
		s, co := math.Sincos(turn)
		return [2]float64{
			p.PhaseNM[0] + siLatticeConstant*(co*d[0]-s*d[1]),
			p.PhaseNM[1] + siLatticeConstant*(s*d[0]+co*d[1]),
		}
	}
	rot := func(v [2]float64) [2]float64 {
		s, co := math.Sincos(turn)
		return [2]float64{co*v[0] - s*v[1], s*v[0] + co*v[1]}
	}
	mk := func(l crystalLayer, height float64) *terrace {
		return &terrace{
			origin: toTrue(l.centre), along: rot(l.along), across: rot(l.across),
			alongPeriod:  siLatticeConstant * l.alongLen,
			acrossPeriod: siLatticeConstant * l.acrossLen,
			height:       height, missing: map[[2]int]bool{},
		}
	}
	ts := []*terrace{mk(base, 0)}
	if p.Step != nil {
		n := -1
		if p.Step.Up {
			n = 1
		}
		l := layerLattice(n)
		if p.Step.Antiphase {
			l.centre = [2]float64{l.centre[0] + l.pair[0], l.centre[1] + l.pair[1]}
		}
		ts = append(ts, mk(l, float64(n)*stepHeight))
	}
	img := &Image{Width: p.Width, Height: p.Height, Z: make([]float64, p.Width*p.Height)}
	for _, t := range ts {
		img.Terraces = append(img.Terraces, TerraceTruth{DimerNM: t.origin, RowsDeg: lineAngle(t.along), HeightNM: t.height})
	}
	side := func(x, y float64) int { // 0 base, 1 other
		if p.Step == nil {
			return 0
		}
		if p.Step.signedDistance(x, y) > 0 {
			return 1
		}
		return 0
	}
	// Defects: dark ones snap to their dimer and remove the dimers under
	// them.
	type blob struct {
		x, y, amp, sd float64
		dark          bool
	}
	var blobs []blob
	for _, d := range p.Defects {
		if !(d.SizeNM > 0) {
			return nil, fmt.Errorf("synth: defect at %v: size %g nm must be positive", d.AtNM, d.SizeNM)
		}
		sd := d.SizeNM / (2 * math.Sqrt(2*math.Ln2))
		if d.Kind == Dark {
			t := ts[side(d.AtNM[0], d.AtNM[1])]
			k, l := t.cell(d.AtNM[0], d.AtNM[1])
			d.AtNM = t.centre(k, l)
			r := d.SizeNM / 2
			for dk := -3; dk <= 3; dk++ {
				for dl := -6; dl <= 6; dl++ {
					q := t.centre(k+dk, l+dl)
					if math.Hypot(q[0]-d.AtNM[0], q[1]-d.AtNM[1]) <= r+1e-9 || (dk == 0 && dl == 0) {
						t.missing[[2]int{k + dk, l + dl}] = true
					}
				}
			}
			blobs = append(blobs, blob{d.AtNM[0], d.AtNM[1], -d.HeightNM, sd, true})
		} else {
			blobs = append(blobs, blob{d.AtNM[0], d.AtNM[1], d.HeightNM, sd, false})
		}
		img.Defects = append(img.Defects, d)
	}
	blur := func(sd float64) (float64, float64) { // blurred SD and amplitude factor (1-D)
		b := math.Sqrt(sd*sd + c.TipSD*c.TipSD)
		return b, sd / b
	}
	dAlong, fa := blur(c.DimerAlongSD)
	dAcross, fx := blur(c.DimerAcrossSD)
	dimerAmp := c.DimerNM * fa * fx
	hSD, fh := blur(c.HSD)
	hAmp := c.HNM * fh * fh
	rowAmp := c.RowNM * math.Exp(-2*math.Pi*math.Pi*c.TipSD*c.TipSD/(ts[0].acrossPeriod*ts[0].acrossPeriod))
	hOff := hOffset()
	g := func(d, sd float64) float64 { return math.Exp(-d * d / (2 * sd * sd)) }
	// Blobs in a grid of cells as wide as the widest reach (5 SD, or the
	// removed dimers' reach for dark ones), so that a pixel looks at its
	// own cell's neighbours only.
	cell := 1.0
	for _, b := range blobs {
		cell = math.Max(cell, 5*b.sd+2)
	}
	buckets := map[[2]int][]int{}
	for k, b := range blobs {
		key := [2]int{int(math.Floor(b.x / cell)), int(math.Floor(b.y / cell))}
		buckets[key] = append(buckets[key], k)
	}
	near := func(x, y float64, fn func(b blob)) {
		cx, cy := int(math.Floor(x/cell)), int(math.Floor(y/cell))
		for dy := -1; dy <= 1; dy++ {
			for dx := -1; dx <= 1; dx++ {
				for _, k := range buckets[[2]int{cx + dx, cy + dy}] {
					fn(blobs[k])
				}
			}
		}
	}
	rng := rand.New(rand.NewPCG(p.Seed, 0x5eed))
	for j := 0; j < p.Height; j++ {
		line := p.LineNoiseNM * rng.NormFloat64()
		for i := 0; i < p.Width; i++ {
			x, y := p.Affine(float64(i)+0.5, float64(j)+0.5)
			s := side(x, y)
			if p.Step != nil && p.Step.Jagged && math.Abs(p.Step.signedDistance(x, y)) < 1.5 {
				s = nearestOwner(ts, p.Step, x, y)
			}
			t := ts[s]
			z := t.height + p.TiltNMPerNM[0]*x + p.TiltNMPerNM[1]*y + line
			// Terrace lattice: the 3 x 3 dimers around the point whose
			// centres lie on this terrace.
			k0, l0 := t.cell(x, y)
			nearDark := false
			var bump float64
			if len(blobs) > 0 {
				near(x, y, func(bl blob) {
					nearDark = nearDark || bl.dark
					ddx, ddy := x-bl.x, y-bl.y
					if r2 := ddx*ddx + ddy*ddy; r2 < 25*bl.sd*bl.sd {
						bump += bl.amp * math.Exp(-r2/(2*bl.sd*bl.sd))
					}
				})
			}
			var lat float64
			for dk := -1; dk <= 1; dk++ {
				for dl := -1; dl <= 1; dl++ {
					k, l := k0+dk, l0+dl
					if nearDark && t.missing[[2]int{k, l}] {
						continue
					}
					q := t.centre(k, l)
					if p.Step != nil && side(q[0], q[1]) != s {
						continue
					}
					dx, dy := x-q[0], y-q[1]
					a := dx*t.along[0] + dy*t.along[1]
					b := dx*t.across[0] + dy*t.across[1]
					lat += dimerAmp * g(a, dAlong) * g(b, dAcross)
					ga := g(a, hSD)
					lat += hAmp * ga * (g(b-hOff, hSD) + g(b+hOff, hSD))
				}
			}
			dx, dy := x-t.origin[0], y-t.origin[1]
			b := dx*t.across[0] + dy*t.across[1]
			lat += rowAmp * math.Cos(2*math.Pi*b/t.acrossPeriod)
			z += lat
			z += bump
			z += p.NoiseNM * rng.NormFloat64()
			img.Z[j*p.Width+i] = z
		}
	}
	return img, nil
}

// nearestOwner returns the terrace whose nearest dimer on its own side of
// the step is nearer to (x, y).
func nearestOwner(ts []*terrace, st *Step, x, y float64) int {
	best, owner := math.Inf(1), 0
	for ti, t := range ts {
		k0, l0 := t.cell(x, y)
		for dk := -2; dk <= 2; dk++ {
			for dl := -3; dl <= 3; dl++ {
				q := t.centre(k0+dk, l0+dl)
				if (st.signedDistance(q[0], q[1]) > 0) != (ti == 1) {
					continue
				}
				if d := math.Hypot(x-q[0], y-q[1]); d < best {
					best, owner = d, ti
				}
			}
		}
	}
	return owner
}

// signedDistance is the distance of (x, y) from the edge, positive on its
// left (the other terrace).
func (s *Step) signedDistance(x, y float64) float64 {
	sn, cs := math.Sincos(s.AngleDeg * math.Pi / 180)
	dx, dy := x-s.Through[0], y-s.Through[1]
	along := dx*cs + dy*sn
	d := -dx*sn + dy*cs
	if s.WiggleNM != 0 && s.WigglePeriodNM > 0 {
		d -= s.WiggleNM * math.Sin(2*math.Pi*along/s.WigglePeriodNM)
	}
	return d
}

// SignedDistanceNM returns the distance in nm of the true point (x, y)
// from the step edge, positive on the other terrace's side; for a wiggled
// edge it is the offset along the edge's normal.
func (s *Step) SignedDistanceNM(x, y float64) float64 { return s.signedDistance(x, y) }

// cell returns the (across, along) indices of the dimer nearest (x, y).
func (t *terrace) cell(x, y float64) (k, l int) {
	dx, dy := x-t.origin[0], y-t.origin[1]
	k = int(math.Round((dx*t.across[0] + dy*t.across[1]) / t.acrossPeriod))
	l = int(math.Round((dx*t.along[0] + dy*t.along[1]) / t.alongPeriod))
	return k, l
}

// centre returns the position of dimer (k, l).
func (t *terrace) centre(k, l int) [2]float64 {
	a, b := float64(l)*t.alongPeriod, float64(k)*t.acrossPeriod
	return [2]float64{
		t.origin[0] + a*t.along[0] + b*t.across[0],
		t.origin[1] + a*t.along[1] + b*t.across[1],
	}
}

// lineAngle returns the angle of the line along v in degrees, in (−90, 90].
func lineAngle(v [2]float64) float64 {
	a := math.Atan2(v[1], v[0]) * 180 / math.Pi
	for a <= -90 {
		a += 180
	}
	for a > 90 {
		a -= 180
	}
	return a
}
