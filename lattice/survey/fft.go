package survey

import (
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/dsp/fourier"
)

// spectrum is the 2-D discrete Fourier transform of a real w x h image,
// kept for the non-negative x frequencies only (the others are their
// complex conjugates): c[ky*hw+kx] for kx in [0, w/2], ky in [0, h),
//
//	c(kx, ky) = Σ_x Σ_y f(x, y) · exp(−2πi (kx·x/w + ky·y/h)).
type spectrum struct {
	w, h, hw int
	c        []complex128
}

// colBlock is how many columns the column pass copies at a time, so that
// it reads whole cache lines of the row-major spectrum.
const colBlock = 16

// forward2D transforms the real w x h image f (row-major, w and h smooth
// numbers: see smoothBelow) with gonum's FFT, two rows at a time as the
// real and imaginary parts of one complex sequence.
func forward2D(f []float64, w, h int) *spectrum {
	hw := w/2 + 1
	s := &spectrum{w: w, h: h, hw: hw, c: make([]complex128, hw*h)}
	rowFFT := fourier.NewCmplxFFT(w)
	buf := make([]complex128, w)
	for y := 0; y < h; y += 2 {
		a := f[y*w : y*w+w]
		if y+1 < h {
			b := f[(y+1)*w : (y+1)*w+w]
			for x := range buf {
				buf[x] = complex(a[x], b[x])
			}
		} else {
			for x := range buf {
				buf[x] = complex(a[x], 0)
			}
		}
		rowFFT.Coefficients(buf, buf)
		ra := s.c[y*hw : y*hw+hw]
		for k := 0; k < hw; k++ {
			z := buf[k]
			zm := cmplx.Conj(buf[(w-k)%w])
			ra[k] = (z + zm) / 2
			if y+1 < h {
				s.c[(y+1)*hw+k] = (z - zm) / complex(0, 2)
			}
		}
	}
	s.columns(false)
	return s
}

// columns transforms every column in place, forward or inverse.
func (s *spectrum) columns(inverse bool) {
	colFFT := fourier.NewCmplxFFT(s.h)
	block := make([][]complex128, colBlock)
	for i := range block {
		block[i] = make([]complex128, s.h)
	}
	for x0 := 0; x0 < s.hw; x0 += colBlock {
		n := min(colBlock, s.hw-x0)
		for y := 0; y < s.h; y++ {
			row := s.c[y*s.hw+x0 : y*s.hw+x0+n]
			for i, v := range row {
				block[i][y] = v
			}
		}
		for i := 0; i < n; i++ {
			if inverse {
				colFFT.Sequence(block[i], block[i])
			} else {
				colFFT.Coefficients(block[i], block[i])
			}
		}
		for y := 0; y < s.h; y++ {
			row := s.c[y*s.hw+x0 : y*s.hw+x0+n]
			for i := range row {
				row[i] = block[i][y]
			}
		}
	}
}

// inverse2D returns the real image whose spectrum s is, normalised (so
// inverse2D(forward2D(f)) = f), written into dst (allocated when nil). s
// is overwritten. The spectrum must be that of a real image, as every
// filter here keeps it (their weights depend on ±k alike).
func (s *spectrum) inverse2D(dst []float64) []float64 {
	w, h, hw := s.w, s.h, s.hw
	if dst == nil {
		dst = make([]float64, w*h)
	}
	s.columns(true)
	rowFFT := fourier.NewCmplxFFT(w)
	buf := make([]complex128, w)
	norm := 1 / float64(w*h)
	for y := 0; y < h; y += 2 {
		a := s.c[y*hw : y*hw+hw]
		var b []complex128
		if y+1 < h {
			b = s.c[(y+1)*hw : (y+1)*hw+hw]
		}
		for k := 0; k < w; k++ {
			var za, zb complex128
			if k < hw {
				za = a[k]
				if b != nil {
					zb = b[k]
				}
			} else {
				za = cmplx.Conj(a[w-k])
				if b != nil {
					zb = cmplx.Conj(b[w-k])
				}
			}
			buf[k] = za + complex(0, 1)*zb
		}
		rowFFT.Sequence(buf, buf)
		for x := 0; x < w; x++ {
			dst[y*w+x] = real(buf[x]) * norm
			if y+1 < h {
				dst[(y+1)*w+x] = imag(buf[x]) * norm
			}
		}
	}
	return dst
}

// dropLineOffsets zeroes the column of zero x frequency: a scan line's
// offset is constant along x and lives there alone, and, strong in many
// images, it would otherwise pass into any lattice band that reaches the
// column. The lattice loses a sliver one bin wide at most.
func (s *spectrum) dropLineOffsets() {
	for ky := 0; ky < s.h; ky++ {
		s.c[ky*s.hw] = 0
	}
}

// at returns the coefficient at integer frequency (kx, ky), any sign.
func (s *spectrum) at(kx, ky int) complex128 {
	kx = ((kx % s.w) + s.w) % s.w
	ky = ((ky % s.h) + s.h) % s.h
	if kx < s.hw {
		return s.c[ky*s.hw+kx]
	}
	return cmplx.Conj(s.c[((s.h-ky)%s.h)*s.hw+(s.w-kx)])
}

// power returns |c(kx, ky)|².
func (s *spectrum) power(kx, ky int) float64 {
	c := s.at(kx, ky)
	return real(c)*real(c) + imag(c)*imag(c)
}

// directDFT returns Σ f(x, y)·exp(−2πi (fx·x + fy·y)) for frequencies in
// cycles per pixel, summed directly: the reference the FFT is checked
// against, and the exact coefficient at a frequency between bins.
func directDFT(f []float64, w, h int, fx, fy float64) complex128 {
	ex := make([]complex128, w)
	for x := range ex {
		ex[x] = cmplx.Exp(complex(0, -2*math.Pi*fx*float64(x)))
	}
	var sum complex128
	for y := 0; y < h; y++ {
		var row complex128
		line := f[y*w : y*w+w]
		for x, v := range line {
			row += complex(v, 0) * ex[x]
		}
		sum += row * cmplx.Exp(complex(0, -2*math.Pi*fy*float64(y)))
	}
	return sum
}

// smoothBelow returns the largest n' ≤ n whose only prime factors are 2,
// 3 and 5, the lengths gonum's FFT does fastest (a prime length costs n²).
func smoothBelow(n int) int {
	for m := n; m > 1; m-- {
		if isSmooth(m) {
			return m
		}
	}
	return 1
}

// smoothAbove returns the smallest n' ≥ n whose only prime factors are 2,
// 3 and 5.
func smoothAbove(n int) int {
	for m := max(n, 1); ; m++ {
		if isSmooth(m) {
			return m
		}
	}
}

func isSmooth(m int) bool {
	for _, p := range []int{2, 3, 5} {
		for m%p == 0 {
			m /= p
		}
	}
	return m == 1
}
