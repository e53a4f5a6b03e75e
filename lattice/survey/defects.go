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
	stepBandNM = 0.5
	// minSizeNM: a feature fitted narrower than this (full width at half
	// maximum) is noise, not a defect: an STM tip images nothing on the
	// surface sharper (common practice).
	minSizeNM = 0.25
	// DefaultThresholdSD is the default detection threshold: a defect is
	// an extreme of the smoothed residual beyond this many robust SDs of
	// it (common practice for peak finding on noisy images).
	DefaultThresholdSD = 5.0
)

// foundDefect is one defect, positions in image pixel-edge units.
type foundDefect struct {
	x, y   float64 // pixel-edge units
	height float64 // apparent height, signed, in the image's height units
	sizeNM float64 // full width at half maximum
	score  float64 // smoothed residual over its SD, signed
}

// detectDefects finds the local extremes of the residual r (lattice
// removed, terraces levelled) beyond k robust SDs after smoothing and
// background removal, on the pixels allowed, and fits each with a
// Gaussian for its position, apparent height and size. a is the
// calibration's pixel-to-true map. It returns the defects and the robust
// SD of the smoothed residual.
func detectDefects(r *grid, allowed []bool, stepDist []float64, a [2][2]float64, k float64) ([]foundDefect, float64) {
	px := math.Sqrt(a[0][0] * a[1][1]) // nm per pixel, geometric mean
	fine := gaussBlur(r.v, r.w, r.h, smoothNM/px)
	coarse := gaussBlur(r.v, r.w, r.h, backgroundNM/px)
	d := make([]float64, len(fine))
	var sample []float64
	for i := range d {
		d[i] = fine[i] - coarse[i]
		if allowed[i] && stepDist[i] >= stepBandNM {
			sample = append(sample, d[i])
		}
	}
	coarse = nil
	if dbgHook != nil {
		dbgHook("D", &grid{w: r.w, h: r.h, v: d})
		dbgHook("r", r)
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
			if !allowed[q] || stepDist[q] < stepBandNM || math.Abs(v) < k*sd {
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
		// A feature no Gaussian fits is kept only when it stands out
		// twice as far as the threshold.
		if f.height == 0 || (!fitted && math.Abs(c.score) < 2*k) {
			continue
		}
		out = append(out, f)
		if len(out) >= MaxDefects {
			break
		}
	}
	return dropEchoes(out, a, k), sd
}

// echoNM: the lattice model, averaged over about this radius, takes part
// of a strong defect for lattice and leaves a faint ring of it round the
// defect.
const echoNM = 3.5

// dropEchoes removes weak features (below twice the threshold) that lie
// within echoNM of a defect four times as strong: the rings the lattice
// model leaves round strong defects.
func dropEchoes(ds []foundDefect, a [2][2]float64, k float64) []foundDefect {
	out := ds[:0:0]
	for _, d := range ds {
		echo := false
		if math.Abs(d.score) < 2*k {
			for _, o := range ds {
				if math.Abs(o.score) > 4*math.Abs(d.score) && trueDist(a, d.x-o.x, d.y-o.y) < echoNM {
					echo = true
					break
				}
			}
		}
		if !echo {
			out = append(out, d)
		}
	}
	return out
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
	if 2*math.Sqrt(2*math.Ln2)*sigma < minSizeNM {
		return foundDefect{}, false // narrower than the tip can image: noise
	}
	// Back from true nm to pixel units: solve a·(du, dv) = (x, y).
	dv := th[3] / a[1][1]
	du := (th[2] - a[0][1]*dv) / a[0][0]
	return foundDefect{
		x: float64(i0) + 0.5 + du, y: float64(j0) + 0.5 + dv,
		height: th[1], sizeNM: 2 * math.Sqrt(2*math.Ln2) * sigma,
	}, true
}
