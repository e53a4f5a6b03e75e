package survey

import (
	"math"
	"slices"
)

// Defect detection settings (nm), chosen for defects a nanometre or so
// across on images of 0.02–0.2 nm per pixel.
const (
	// smoothNM is the SD of the Gaussian that takes pixel noise off the
	// residual before extremes are sought.
	smoothNM = 0.18
	// backgroundNM is the SD of the Gaussian whose blur of the residual is
	// taken as the local surface.
	backgroundNM = 3.0
	// mergeNM: extremes closer than this are one defect.
	mergeNM = 0.5
	// stepBandNM: no defect is sought this close to a step edge. The edge
	// follows the dimers (kinks a dimer or a row deep) and has its own
	// contrast; what of it is left in the residual looks like specks.
	// Placement keeps away from step edges anyway.
	stepBandNM = 0.4
	// minSizeNM: a feature fitted narrower than this or two pixels (full
	// width at half maximum) is noise, not a defect: an STM tip images
	// nothing on the surface sharper, and a glitch along one scan line
	// looks like that (common practice).
	minSizeNM = 0.25
	// DefaultThresholdSD is the default detection threshold: a defect is
	// an extreme of the smoothed residual beyond this many robust SDs of
	// it (common practice for peak finding on noisy images: 5–6; the
	// residual near steps and strong defects is not quite noise).
	DefaultThresholdSD = 6.0
)

// foundDefect is one defect, positions in image pixel-edge units.
type foundDefect struct {
	x, y   float64 // pixel-edge units
	height float64 // apparent height, signed, in the image's height units
	sizeNM float64 // full width at half maximum
	score  float64 // smoothed residual over its SD, signed
}

// subtractBackground takes from d the blur of r by a Gaussian of SD sigma
// pixels, leaving out the pixels where exclude is true (when not nil: the
// defects found so far, whose own height would otherwise raise the
// surface round them and leave a moat), by normalised convolution on a
// grid sigma/4 pixels apart read back by bilinear interpolation.
func subtractBackground(d []float64, r *grid, sigma float64, exclude []bool) {
	f := max(1, int(sigma/4))
	cw, ch := (r.w+f-1)/f, (r.h+f-1)/f
	sum := make([]float64, cw*ch)
	count := make([]float64, cw*ch)
	for j := 0; j < r.h; j++ {
		for i := 0; i < r.w; i++ {
			q := j*r.w + i
			if exclude != nil && exclude[q] {
				continue
			}
			k := (j/f)*cw + i/f
			sum[k] += r.v[q]
			count[k]++
		}
	}
	bs := gaussBlur(sum, cw, ch, sigma/float64(f))
	bc := gaussBlur(count, cw, ch, sigma/float64(f))
	blur := make([]float64, cw*ch)
	for k := range blur {
		if bc[k] > 1e-9 {
			blur[k] = bs[k] / bc[k]
		}
	}
	for j := 0; j < r.h; j++ {
		v := (float64(j)+0.5)/float64(f) - 0.5
		j0 := int(math.Floor(v))
		fv := v - float64(j0)
		ja, jb := min(max(j0, 0), ch-1), min(max(j0+1, 0), ch-1)
		for i := 0; i < r.w; i++ {
			u := (float64(i)+0.5)/float64(f) - 0.5
			i0 := int(math.Floor(u))
			fu := u - float64(i0)
			ia, ib := min(max(i0, 0), cw-1), min(max(i0+1, 0), cw-1)
			b := (1-fu)*(1-fv)*blur[ja*cw+ia] + fu*(1-fv)*blur[ja*cw+ib] + (1-fu)*fv*blur[jb*cw+ia] + fu*fv*blur[jb*cw+ib]
			d[j*r.w+i] -= b
		}
	}
}

// detectDefects finds the local extremes of the residual r (lattice
// removed, terraces levelled) beyond k robust SDs after smoothing and
// background removal (the background leaves out the pixels where exclude,
// when not nil, is true), away from the image's border and step edges
// (stepDist, nm), and fits each with a Gaussian for its position,
// apparent height and size. a is the calibration's pixel-to-true map. It
// returns the defects and the robust SD of the smoothed residual.
func detectDefects(r *grid, stepDist []float32, exclude []bool, a [2][2]float64, k float64) ([]foundDefect, float64) {
	px := math.Sqrt(a[0][0] * a[1][1]) // nm per pixel, geometric mean
	// The smoothed residual less its local surface, in place; the surface
	// is smooth on a scale of nanometres and is blurred on a coarse grid.
	d := gaussBlur(r.v, r.w, r.h, smoothNM/px)
	release(r)
	subtractBackground(d, r, backgroundNM/px, exclude)
	const border = 2
	allowed := func(q int) bool {
		i, j := q%r.w, q/r.w
		return i >= border && j >= border && i < r.w-border && j < r.h-border && stepDist[q] >= stepBandNM
	}
	var sample []float64
	step := max(1, len(d)/400000)
	for i := 0; i < len(d); i += step {
		if allowed(i) {
			sample = append(sample, d[i])
		}
	}
	sd := robustSD(sample)
	if !(sd > 0) {
		return nil, sd
	}
	type cand struct {
		i, j  int
		score float64
	}
	var cands []cand
	for j := 1; j < r.h-1; j++ {
		for i := 1; i < r.w-1; i++ {
			q := j*r.w + i
			v := d[q]
			if math.Abs(v) < k*sd || !allowed(q) {
				continue
			}
			ext := true
			for dj := -1; dj <= 1 && ext; dj++ {
				for di := -1; di <= 1; di++ {
					u := d[q+dj*r.w+di]
					if (di != 0 || dj != 0) && ((v > 0 && u > v) || (v < 0 && u < v)) {
						ext = false
						break
					}
				}
			}
			if ext {
				cands = append(cands, cand{i, j, v / sd})
			}
		}
	}
	slices.SortFunc(cands, func(p, q cand) int { return cmpDesc(math.Abs(p.score), math.Abs(q.score)) })
	var out []foundDefect
	for _, c := range cands {
		x, y := float64(c.i)+0.5, float64(c.j)+0.5
		near := false
		for _, o := range out {
			if (o.score > 0) == (c.score > 0) && trueDist(a, x-o.x, y-o.y) < mergeNM {
				near = true
				break
			}
		}
		if near {
			continue
		}
		f, fitted := fitDefect(r, a, c.i, c.j, c.score > 0)
		f.score = c.score
		// Two extremes of one feature fit to one place.
		for _, o := range out {
			if (o.score > 0) == (c.score > 0) && trueDist(a, f.x-o.x, f.y-o.y) < mergeNM {
				f.height = 0
				break
			}
		}
		// A feature no Gaussian fits is kept only when it stands out
		// four times as far as the threshold.
		if f.height == 0 || (!fitted && math.Abs(c.score) < 4*k) {
			continue
		}
		out = append(out, f)
		if len(out) >= MaxDefects {
			break
		}
	}
	return out, sd
}

// MaxDefects bounds the defects one image reports.
const MaxDefects = 100000

// trueDist returns the true length in nm of the pixel displacement
// (du, dv).
func trueDist(a [2][2]float64, du, dv float64) float64 {
	return math.Hypot(a[0][0]*du+a[0][1]*dv, a[1][1]*dv)
}

// fitDefect fits c + A·exp(−ρ²/2σ²) (ρ the true distance from the centre)
// to r around pixel (i, j) by damped Gauss–Newton steps
// (Levenberg–Marquardt), in a window of about three widths. It falls back
// on the pixel itself where the fit fails or wanders.
func fitDefect(r *grid, a [2][2]float64, i0, j0 int, bright bool) (foundDefect, bool) {
	px := math.Min(a[0][0], a[1][1])
	fallback := foundDefect{x: float64(i0) + 0.5, y: float64(j0) + 0.5, height: r.at(i0, j0), sizeNM: 2 * px}
	radius := 1.2 // nm
	n := int(math.Ceil(radius / px))
	type sample struct{ x, y, z float64 } // true nm from pixel (i0, j0)'s centre
	var pts []sample
	for j := max(0, j0-n); j <= min(r.h-1, j0+n); j++ {
		for i := max(0, i0-n); i <= min(r.w-1, i0+n); i++ {
			du, dv := float64(i-i0), float64(j-j0)
			x, y := a[0][0]*du+a[0][1]*dv, a[1][1]*dv
			if x*x+y*y <= radius*radius {
				pts = append(pts, sample{x, y, r.at(i, j)})
			}
		}
	}
	if len(pts) < 8 {
		return fallback, false
	}
	// Start: the edge of the window as the base, the centre's height.
	var edge []float64
	for _, p := range pts {
		if p.x*p.x+p.y*p.y > 0.64*radius*radius {
			edge = append(edge, p.z)
		}
	}
	base := median(edge)
	th := [5]float64{base, r.at(i0, j0) - base, 0, 0, math.Log(0.3)} // c, A, x0, y0, ln σ
	cost := func(t [5]float64) float64 {
		s2 := math.Exp(2 * t[4])
		var sum float64
		for _, p := range pts {
			dx, dy := p.x-t[2], p.y-t[3]
			e := t[0] + t[1]*math.Exp(-(dx*dx+dy*dy)/(2*s2)) - p.z
			sum += e * e
		}
		return sum
	}
	lambda := 1e-3
	c0 := cost(th)
	for iter := 0; iter < 30; iter++ {
		var jtj [5][5]float64
		var jtr [5]float64
		s2 := math.Exp(2 * th[4])
		for _, p := range pts {
			dx, dy := p.x-th[2], p.y-th[3]
			ex := math.Exp(-(dx*dx + dy*dy) / (2 * s2))
			e := th[0] + th[1]*ex - p.z
			g := [5]float64{1, ex, th[1] * ex * dx / s2, th[1] * ex * dy / s2, th[1] * ex * (dx*dx + dy*dy) / s2}
			for u := 0; u < 5; u++ {
				jtr[u] += g[u] * e
				for v := 0; v < 5; v++ {
					jtj[u][v] += g[u] * g[v]
				}
			}
		}
		improved := false
		for try := 0; try < 8; try++ {
			m := make([][]float64, 5)
			for u := range m {
				m[u] = make([]float64, 6)
				copy(m[u], jtj[u][:])
				m[u][u] *= 1 + lambda
				m[u][5] = -jtr[u]
			}
			step, ok := gauss(m)
			if !ok {
				lambda *= 10
				continue
			}
			var nt [5]float64
			for u := range nt {
				nt[u] = th[u] + step[u]
			}
			if c := cost(nt); c < c0 {
				th, c0, lambda = nt, c, lambda/3
				improved = true
				break
			}
			lambda *= 10
		}
		if !improved {
			break
		}
	}
	sigma := math.Exp(th[4])
	shift := math.Hypot(th[2], th[3])
	if (th[1] > 0) != bright || sigma < 0.4*px || sigma > 2.5 || shift > 0.8 || math.IsNaN(c0) {
		return fallback, false
	}
	if 2*math.Sqrt(2*math.Ln2)*sigma < math.Max(minSizeNM, 2*px) {
		return foundDefect{}, false // narrower than the tip or two pixels: noise
	}
	// Back from true nm to pixel units: solve a·(du, dv) = (x, y).
	dv := th[3] / a[1][1]
	du := (th[2] - a[0][1]*dv) / a[0][0]
	return foundDefect{
		x: float64(i0) + 0.5 + du, y: float64(j0) + 0.5 + dv,
		height: th[1], sizeNM: 2 * math.Sqrt(2*math.Ln2) * sigma,
	}, true
}

// defectMask marks the pixels within each defect's reach: one and a half
// times its full width at half maximum (where a Gaussian has fallen to
// 0.2 %), at least 0.6 nm and at most 2.5 nm (the lattice model, a local
// average over about 2 nm, has to reach across the hole) from its
// centre.
func defectMask(ds []foundDefect, w, h int, a [2][2]float64) []bool {
	m := make([]bool, w*h)
	for _, d := range ds {
		r := math.Min(2.5, math.Max(0.6, 1.5*d.sizeNM))
		rx, ry := r/a[0][0]+1, r/a[1][1]+1
		for j := max(0, int(d.y-ry)); j <= min(h-1, int(d.y+ry)); j++ {
			for i := max(0, int(d.x-rx)); i <= min(w-1, int(d.x+rx)); i++ {
				if trueDist(a, float64(i)+0.5-d.x, float64(j)+0.5-d.y) <= r {
					m[j*w+i] = true
				}
			}
		}
	}
	return m
}
