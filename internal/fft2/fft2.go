// Package fft2 is the one 2-D discrete Fourier transform of dimerpath's
// image work (the survey's demodulation and the placement search's
// dilation), built on gonum's 1-D complex FFT.
package fft2

import "gonum.org/v1/gonum/dsp/fourier"

// Transform transforms the complex w x h array c (row-major) in place,
// rows then columns; inverse when asked, unnormalised as gonum's
// Sequence is.
func Transform(c []complex128, w, h int, inverse bool) {
	rf := fourier.NewCmplxFFT(w)
	for y := 0; y < h; y++ {
		row := c[y*w : y*w+w]
		if inverse {
			rf.Sequence(row, row)
		} else {
			rf.Coefficients(row, row)
		}
	}
	cf := fourier.NewCmplxFFT(h)
	col := make([]complex128, h)
	for x := 0; x < w; x++ {
		for y := range col {
			col[y] = c[y*w+x]
		}
		if inverse {
			cf.Sequence(col, col)
		} else {
			cf.Coefficients(col, col)
		}
		for y := range col {
			c[y*w+x] = col[y]
		}
	}
}
