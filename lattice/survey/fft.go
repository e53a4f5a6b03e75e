package survey

import (
	"math"
	"math/cmplx"

	"gonum.org/v1/gonum/dsp/fourier"
)

// spectrum is the 2-D discrete Fourier transform of a real w x h image,
// kept for the non-negative x frequencies only (the others are their
// complex conjugates): c[ky*hw+kx] for kx in [0, w/2], ky in [0, h),
// stored in single precision (a 4096 x 4096 image's spectrum takes 70 MB;
// the transforms themselves run in double precision line by line),
//
//	c(kx, ky) = Σ_x Σ_y f(x, y) · exp(−2πi (kx·x/w + ky·y/h)).
type spectrum struct {
	w, h, hw int
	c        []complex64
}

// colBlock is how many columns the column pass copies at a time, so that
// it reads whole cache lines of the row-major spectrum.
const colBlock = 16

// forward2D transforms the real w x h image f (row-major, w and h smooth
// numbers: see smoothBelow) with gonum's FFT.
func forward2D(f []float64, w, h int) *spectrum {
	return forwardRows(w, h, func(y int, dst []float64) { copy(dst, f[y*w:y*w+w]) })
}

// forwardRows transforms the real w x h image whose row y the function
// row writes into dst, two rows at a time as the real and imaginary parts
// of one complex sequence, then the columns. The image itself is never
// held whole.
func forwardRows(w, h int, row func(y int, dst []float64)) *spectrum {
	hw := w/2 + 1
	s := &spectrum{w: w, h: h, hw: hw, c: make([]complex64, hw*h)}
	rowFFT := fourier.NewCmplxFFT(w)
	buf := make([]complex128, w)
	a, b := make([]float64, w), make([]float64, w)
	for y := 0; y < h; y += 2 {
		row(y, a)
		if y+1 < h {
			row(y+1, b)
		} else {
			clear(b)
		}
		for x := range buf {
			buf[x] = complex(a[x], b[x])
		}
		rowFFT.Coefficients(buf, buf)
		ra := s.c[y*hw : y*hw+hw]
		for k := 0; k < hw; k++ {
			z := buf[k]
			zm := cmplx.Conj(buf[(w-k)%w])
			ra[k] = complex64((z + zm) / 2)
			if y+1 < h {
				s.c[(y+1)*hw+k] = complex64((z - zm) / complex(0, 2))
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
				block[i][y] = complex128(v)
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
				row[i] = complex64(block[i][y])
			}
		}
	}
}

// inverse2D returns the real image whose spectrum s is, normalised (so
// inverse2D(forward2D(f)) = f), written into dst (allocated when nil). s
// is overwritten. The spectrum must be that of a real image, as every
// filter here keeps it (their weights depend on ±k alike).
func (s *spectrum) inverse2D(dst []float64) []float64 {
	if dst == nil {
		dst = make([]float64, s.w*s.h)
	}
	s.inverseRows(func(y int, v []float64) { copy(dst[y*s.w:], v) })
	return dst
}

// inverseRows transforms s back, handing each row of the real image
// (normalised) to the function row; s is overwritten.
func (s *spectrum) inverseRows(row func(y int, v []float64)) {
	w, h, hw := s.w, s.h, s.hw
	s.columns(true)
	rowFFT := fourier.NewCmplxFFT(w)
	buf := make([]complex128, w)
	ra, rb := make([]float64, w), make([]float64, w)
	norm := 1 / float64(w*h)
	for y := 0; y < h; y += 2 {
		a := s.c[y*hw : y*hw+hw]
		var b []complex64
		if y+1 < h {
			b = s.c[(y+1)*hw : (y+1)*hw+hw]
		}
		for k := 0; k < w; k++ {
			var za, zb complex128
			if k < hw {
				za = complex128(a[k])
				if b != nil {
					zb = complex128(b[k])
				}
			} else {
				za = cmplx.Conj(complex128(a[w-k]))
				if b != nil {
					zb = cmplx.Conj(complex128(b[w-k]))
				}
			}
			buf[k] = za + complex(0, 1)*zb
		}
		rowFFT.Sequence(buf, buf)
		for x := 0; x < w; x++ {
			ra[x] = real(buf[x]) * norm
			rb[x] = imag(buf[x]) * norm
		}
		row(y, ra)
		if y+1 < h {
			row(y+1, rb)
		}
	}
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
		return complex128(s.c[ky*s.hw+kx])
	}
	return cmplx.Conj(complex128(s.c[((s.h-ky)%s.h)*s.hw+(s.w-kx)]))
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
