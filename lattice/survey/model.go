package survey

import (
	"math"
)

// latticePeaks returns the lattice frequencies (cycles per pixel) of the
// given kind of terrace below the Nyquist limit, one of each ±f pair:
// (m, n) on b's grid with n even for kind 0 (rows across b1), m even for
// kind 1.
func latticePeaks(b basis, kind int) [][2]float64 {
	var out [][2]float64
	for m := -16; m <= 16; m++ {
		for n := -16; n <= 16; n++ {
			if (m == 0 && n == 0) || (kind == 0 && n%2 != 0) || (kind == 1 && m%2 != 0) {
				continue
			}
			f := [2]float64{float64(m)*b.b1[0] + float64(n)*b.b2[0], float64(m)*b.b1[1] + float64(n)*b.b2[1]}
			if math.Abs(f[0]) >= 0.5 || math.Abs(f[1]) >= 0.5 {
				continue
			}
			if f[0] > 0 || (f[0] == 0 && f[1] > 0) {
				out = append(out, f)
			}
		}
	}
	return out
}

// bandPass multiplies s by the sum of Gaussians (SD 1/(2π·sigma) cycles
// per pixel, the transform of a spatial Gaussian of SD sigma pixels) at
// ±each of the frequencies, capped at 1: what passes is the lattice, what
// is stopped everything else.
func bandPass(s *spectrum, freqs [][2]float64, sigma float64) {
	sk := 1 / (2 * math.Pi * sigma)
	wt := make([]float32, len(s.c))
	rx := int(math.Ceil(4 * sk * float64(s.w)))
	ry := int(math.Ceil(4 * sk * float64(s.h)))
	gx := make([]float64, 2*rx+1)
	gy := make([]float64, 2*ry+1)
	for _, f0 := range freqs {
		for _, sg := range []float64{1, -1} {
			f := [2]float64{sg * f0[0], sg * f0[1]}
			cx, cy := int(math.Round(f[0]*float64(s.w))), int(math.Round(f[1]*float64(s.h)))
			for d := range gx {
				dx := float64(cx+d-rx)/float64(s.w) - f[0]
				gx[d] = math.Exp(-dx * dx / (2 * sk * sk))
			}
			for d := range gy {
				dy := float64(cy+d-ry)/float64(s.h) - f[1]
				gy[d] = math.Exp(-dy * dy / (2 * sk * sk))
			}
			for kx := max(0, cx-rx); kx <= min(s.hw-1, cx+rx); kx++ {
				wx := gx[kx-cx+rx]
				for ky := cy - ry; ky <= cy+ry; ky++ {
					row := ((ky % s.h) + s.h) % s.h
					wt[row*s.hw+kx] += float32(wx * gy[ky-cy+ry])
				}
			}
		}
	}
	for i, v := range wt {
		if v == 0 {
			s.c[i] = 0
		} else if v < 1 {
			s.c[i] *= complex(v, 0)
		}
	}
}

// latticeModel returns the lattice seen in g: each pixel holds the model
// of its own kind of terrace (kindOf: true for kind 1; kinds: the bits of
// the kinds present). The model of a kind is the band of its lattice
// frequencies (Gaussian bands of spatial SD sigma) taken over that kind's
// terraces alone and divided by the blurred mask of those terraces
// (normalised convolution, Knutsson and Westin, CVPR 1993), so that it
// keeps the lattice's full amplitude up to each step edge and to the
// image's border instead of fading across them. Pixels where exclude is
// true (defects, when not nil) are left out the same way: the model there
// is the lattice around them. s, when not nil, is the spectrum of g in
// the padded frame p (line offsets dropped) and is overwritten; it serves
// only when nothing is excluded.
func latticeModel(g *grid, p padding, s *spectrum, b basis, kindOf []bool, kinds int, sigma float64, exclude []bool) []float64 {
	model := make([]float64, p.iw*p.ih)
	in := func(k int) func(q int) bool {
		return func(q int) bool { return kindOf[q] == (k == 1) && (exclude == nil || !exclude[q]) }
	}
	var spectra [2]*spectrum
	for k := 0; k < 2; k++ {
		if kinds&(1<<k) == 0 {
			continue
		}
		switch {
		case s != nil && kinds != 3:
			spectra[k] = s // one kind, nothing left out: the whole image
		case s != nil && k == 0:
			continue // kind 0 is the whole less kind 1, below
		default:
			spectra[k] = forwardRows(p.w, p.h, p.rows(g, in(k)))
			spectra[k].dropLineOffsets()
		}
	}
	if s != nil && kinds == 3 {
		for i := range s.c { // kind 0's share: what kind 1's mask left out
			s.c[i] -= spectra[1].c[i]
		}
		spectra[0] = s
	}
	for k, sp := range spectra {
		if sp == nil {
			continue
		}
		share := maskShare(in(k), p, sigma)
		bandPass(sp, latticePeaks(b, k), sigma)
		sp.inverseRows(func(y int, v []float64) {
			j := y - p.y0
			if j < 0 || j >= p.ih {
				return
			}
			for i := 0; i < p.iw; i++ {
				q := j*p.iw + i
				if kindOf[q] == (k == 1) {
					if sh := share(i, j); sh > 0.01 {
						model[q] = v[i+p.x0] / sh
					}
				}
			}
		})
		spectra[k] = nil
		release(g)
	}
	return model
}

// maskShare returns the blur by a Gaussian of SD sigma pixels of the mask
// of the image pixels where in is true (zero outside the image), as a
// function of the image pixel (i, j). The mask is blurred on a grid
// sigma/4 pixels apart (its cells hold the share of their pixels) and
// read back by bilinear interpolation: the blur is smooth on that scale.
func maskShare(in func(q int) bool, p padding, sigma float64) func(i, j int) float64 {
	f := max(1, int(sigma/4))
	cw, ch := (p.w+f-1)/f, (p.h+f-1)/f
	coarse := make([]float64, cw*ch)
	inv := 1 / float64(f*f)
	for j := 0; j < p.ih; j++ {
		cj := (j + p.y0) / f
		for i := 0; i < p.iw; i++ {
			if in(j*p.iw + i) {
				coarse[cj*cw+(i+p.x0)/f] += inv
			}
		}
	}
	// A true Gaussian here (the grid is small): the band-pass filter is
	// exactly one, and the two must agree for the division to be exact.
	blur := gaussKernelBlur(coarse, cw, ch, sigma/float64(f))
	return func(i, j int) float64 {
		// The cell centres sit at f·(c + ½) − ½ in pixels.
		u := (float64(i+p.x0)+0.5)/float64(f) - 0.5
		v := (float64(j+p.y0)+0.5)/float64(f) - 0.5
		i0, j0 := int(math.Floor(u)), int(math.Floor(v))
		fu, fv := u-float64(i0), v-float64(j0)
		at := func(a, b int) float64 {
			a, b = min(max(a, 0), cw-1), min(max(b, 0), ch-1)
			return blur[b*cw+a]
		}
		return (1-fu)*(1-fv)*at(i0, j0) + fu*(1-fv)*at(i0+1, j0) + (1-fu)*fv*at(i0, j0+1) + fu*fv*at(i0+1, j0+1)
	}
}

// gaussKernelBlur returns f blurred by a sampled Gaussian of SD sigma in x
// and y (kernel to ±4 SD, the edges clamped).
func gaussKernelBlur(f []float64, w, h int, sigma float64) []float64 {
	r := int(math.Ceil(4 * sigma))
	k := make([]float64, 2*r+1)
	var sum float64
	for i := range k {
		d := float64(i - r)
		k[i] = math.Exp(-d * d / (2 * sigma * sigma))
		sum += k[i]
	}
	for i := range k {
		k[i] /= sum
	}
	tmp := make([]float64, w*h)
	for j := 0; j < h; j++ {
		for i := 0; i < w; i++ {
			var s float64
			for d := -r; d <= r; d++ {
				s += k[d+r] * f[j*w+min(max(i+d, 0), w-1)]
			}
			tmp[j*w+i] = s
		}
	}
	out := make([]float64, w*h)
	for j := 0; j < h; j++ {
		for i := 0; i < w; i++ {
			var s float64
			for d := -r; d <= r; d++ {
				s += k[d+r] * tmp[min(max(j+d, 0), h-1)*w+i]
			}
			out[j*w+i] = s
		}
	}
	return out
}

// gaussBlur returns f blurred by three passes of a box filter in x and y,
// close to a Gaussian of SD sigma (Wells, IEEE PAMI 8, 234 (1986)), at a
// cost independent of sigma; the edges are mirrored.
func gaussBlur(f []float64, w, h int, sigma float64) []float64 {
	// Three boxes of width 2r+1 have variance 3((2r+1)²−1)/12.
	r := max(0, int(math.Round((math.Sqrt(4*sigma*sigma+1)-1)/2)))
	out := append([]float64(nil), f...)
	if r == 0 {
		return out
	}
	n := max(w, h)
	src, dst := make([]float64, n), make([]float64, n)
	for j := 0; j < h; j++ {
		row := out[j*w : j*w+w]
		copy(src, row)
		for pass := 0; pass < 3; pass++ {
			boxLine(src[:w], dst[:w], r)
			src, dst = dst, src
		}
		copy(row, src[:w])
	}
	// Columns in blocks, so that each row's cache line is read once.
	const block = 16
	cols := make([][]float64, block)
	tmp := make([][]float64, block)
	for b := range cols {
		cols[b], tmp[b] = make([]float64, h), make([]float64, h)
	}
	for i0 := 0; i0 < w; i0 += block {
		nb := min(block, w-i0)
		for j := 0; j < h; j++ {
			row := out[j*w+i0 : j*w+i0+nb]
			for b, v := range row {
				cols[b][j] = v
			}
		}
		for b := 0; b < nb; b++ {
			s, d := cols[b], tmp[b]
			for pass := 0; pass < 3; pass++ {
				boxLine(s, d, r)
				s, d = d, s
			}
			cols[b], tmp[b] = s, d
		}
		for j := 0; j < h; j++ {
			row := out[j*w+i0 : j*w+i0+nb]
			for b := range row {
				row[b] = cols[b][j]
			}
		}
	}
	return out
}

// boxLine writes into dst the mean of src over ±r around each index, the
// ends mirrored.
func boxLine(src, dst []float64, r int) {
	n := len(src)
	at := func(i int) float64 {
		if i >= 0 && i < n {
			return src[i]
		}
		return src[reflect(i, n)]
	}
	var sum float64
	for i := -r; i <= r; i++ {
		sum += at(i)
	}
	inv := 1 / float64(2*r+1)
	i := 0
	for ; i < n && i-r < 0; i++ {
		dst[i] = sum * inv
		sum += at(i+r+1) - at(i-r)
	}
	for ; i+r+1 < n; i++ {
		dst[i] = sum * inv
		sum += src[i+r+1] - src[i-r]
	}
	for ; i < n; i++ {
		dst[i] = sum * inv
		sum += at(i+r+1) - at(i-r)
	}
}
