package survey

import (
	"dimerpath/internal/fft2"
	"math"
)

// padding places an image in a larger frame of smooth size, zero outside
// it, so that filters reach past its edges without wrapping round to the
// far edge.
type padding struct {
	w, h   int // the padded frame
	x0, y0 int // where the image's pixel (0, 0) lies
	iw, ih int // the image's size
}

// padFor returns the frame with at least margin pixels on each side of an
// iw x ih image.
func padFor(iw, ih, margin int) padding {
	w, h := smoothAbove(iw+2*margin), smoothAbove(ih+2*margin)
	return padding{w: w, h: h, x0: (w - iw) / 2, y0: (h - ih) / 2, iw: iw, ih: ih}
}

// rows returns the rows of g in the padded frame for forwardRows: zero
// outside the image and at pixels where keep (when not nil) is false. g
// should have a mean near zero (it is levelled).
func (p padding) rows(g *grid, keep func(q int) bool) func(y int, dst []float64) {
	return func(y int, dst []float64) {
		clear(dst)
		j := y - p.y0
		if j < 0 || j >= p.ih {
			return
		}
		src := g.v[j*p.iw : j*p.iw+p.iw]
		out := dst[p.x0 : p.x0+p.iw]
		if keep == nil {
			copy(out, src)
			return
		}
		for i, v := range src {
			if keep(j*p.iw + i) {
				out[i] = v
			}
		}
	}
}

// reflect maps any index into [0, n) by mirroring at the ends.
func reflect(i, n int) int {
	if n == 1 {
		return 0
	}
	period := 2 * n
	i %= period
	if i < 0 {
		i += period
	}
	if i >= n {
		i = period - 1 - i
	}
	return i
}

// amplitudeMap is the local amplitude of one lattice component on a
// coarse grid over a padded image.
type amplitudeMap struct {
	mw, mh int
	step   [2]float64 // padded pixels from one node to the next
	a      []float64  // |amplitude|, a[n*mw+m] at padded pixel (m·step[0], n·step[1])
}

// demodulate returns the amplitude of the lattice component at frequency
// f (cycles per pixel) around every point, averaged by a Gaussian of SD
// sigma pixels: the band of s around f, weighted by that Gaussian's
// transform, moved to zero frequency and transformed back on a grid about
// sigma/2 apart (the band is narrow, so a coarse grid holds it exactly).
// A lattice of amplitude A (peak to peak 2A) gives A/2.
func demodulate(s *spectrum, f [2]float64, sigma float64) *amplitudeMap {
	w, h := s.w, s.h
	mw := smoothAbove(int(math.Ceil(2 * float64(w) / sigma)))
	mh := smoothAbove(int(math.Ceil(2 * float64(h) / sigma)))
	mw, mh = min(mw, w), min(mh, h)
	sk := 1 / (2 * math.Pi * sigma) // the Gaussian's SD in cycles per pixel
	k0x, k0y := int(math.Round(f[0]*float64(w))), int(math.Round(f[1]*float64(h)))
	c := make([]complex128, mw*mh)
	for dy := -mh / 2; dy < mh-mh/2; dy++ {
		ky := k0y + dy
		fy := float64(ky)/float64(h) - f[1]
		gy := math.Exp(-fy * fy / (2 * sk * sk))
		if gy < 1e-6 {
			continue
		}
		for dx := -mw / 2; dx < mw-mw/2; dx++ {
			kx := k0x + dx
			fx := float64(kx)/float64(w) - f[0]
			g := gy * math.Exp(-fx*fx/(2*sk*sk))
			if g < 1e-6 {
				continue
			}
			c[((dy+mh)%mh)*mw+(dx+mw)%mw] = s.at(kx, ky) * complex(g, 0)
		}
	}
	fft2.Transform(c, mw, mh, true)
	m := &amplitudeMap{mw: mw, mh: mh, step: [2]float64{float64(w) / float64(mw), float64(h) / float64(mh)}, a: make([]float64, mw*mh)}
	norm := 1 / float64(w*h)
	for i, v := range c {
		m.a[i] = math.Hypot(real(v), imag(v)) * norm
	}
	return m
}

// sample returns the map's value at padded pixel point (x, y) by bilinear
// interpolation (periodic, as the transform is).
func (m *amplitudeMap) sample(x, y float64) float64 {
	u, v := x/m.step[0], y/m.step[1]
	i0, j0 := int(math.Floor(u)), int(math.Floor(v))
	fu, fv := u-float64(i0), v-float64(j0)
	at := func(i, j int) float64 {
		i = ((i % m.mw) + m.mw) % m.mw
		j = ((j % m.mh) + m.mh) % m.mh
		return m.a[j*m.mw+i]
	}
	return (1-fu)*(1-fv)*at(i0, j0) + fu*(1-fv)*at(i0+1, j0) + (1-fu)*fv*at(i0, j0+1) + fu*fv*at(i0+1, j0+1)
}
