// Package edt computes exact Euclidean distance transforms of sampled
// functions on a grid, by the lower envelope of parabolas of Felzenszwalb
// and Huttenlocher ("Distance transforms of sampled functions", Theory of
// Computing 8, 415 (2012)): one pass along each axis, O(cells) in all.
package edt

import "math"

// Squared returns, for every cell (i, j) of the w x h grid (f[j*w+i]),
//
//	min over cells (k, l) of  ((i−k)·dx)² + ((j−l)·dy)² + f[l*w+k],
//
// the squared distance to the nearest cell where f is 0 when f holds 0 at
// the sites and +Inf elsewhere; dx and dy are the cells' spacings. Cells
// with no finite f anywhere get +Inf. f is not changed.
func Squared(f []float64, w, h int, dx, dy float64) []float64 {
	out := make([]float64, w*h)
	copy(out, f)
	n := max(w, h)
	e := envelope{v: make([]int, n), z: make([]float64, n+1), in: make([]float64, n), d: make([]float64, n)}
	for j := 0; j < h; j++ {
		row := out[j*w : j*w+w]
		copy(e.in, row)
		e.transform(w, dx)
		copy(row, e.d[:w])
	}
	for i := 0; i < w; i++ {
		for j := 0; j < h; j++ {
			e.in[j] = out[j*w+i]
		}
		e.transform(h, dy)
		for j := 0; j < h; j++ {
			out[j*w+i] = e.d[j]
		}
	}
	return out
}

// envelope holds the work arrays of the 1-D transform.
type envelope struct {
	v  []int     // samples whose parabolas form the envelope
	z  []float64 // boundaries between them
	in []float64 // the sampled function
	d  []float64 // the result
}

// transform computes d[p] = min_q (s·(p−q))² + in[q] for p, q in [0, n).
func (e *envelope) transform(n int, s float64) {
	s2 := s * s
	k := -1
	for q := 0; q < n; q++ {
		fq := e.in[q]
		if math.IsInf(fq, 1) {
			continue
		}
		for k >= 0 {
			v := e.v[k]
			x := ((fq + s2*float64(q*q)) - (e.in[v] + s2*float64(v*v))) / (2 * s2 * float64(q-v))
			if x <= e.z[k] {
				k--
				continue
			}
			k++
			e.v[k], e.z[k] = q, x
			break
		}
		if k < 0 {
			k = 0
			e.v[0], e.z[0] = q, math.Inf(-1)
		}
		e.z[k+1] = math.Inf(1)
	}
	if k < 0 {
		for p := 0; p < n; p++ {
			e.d[p] = math.Inf(1)
		}
		return
	}
	j := 0
	for p := 0; p < n; p++ {
		for e.z[j+1] < float64(p) {
			j++
		}
		v := e.v[j]
		d := s * float64(p-v)
		e.d[p] = d*d + e.in[v]
	}
}
