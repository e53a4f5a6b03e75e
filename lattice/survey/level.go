package survey

import (
	"math"
	"slices"

	"dimerpath/internal/selection"
)

// grid is a real image, row-major with line 0 at the bottom.
type grid struct {
	w, h int
	v    []float64
}

func newGrid(w, h int) *grid { return &grid{w: w, h: h, v: make([]float64, w*h)} }

func (g *grid) at(i, j int) float64 { return g.v[j*g.w+i] }

// toGrid converts a topograph's heights to nm where the file gives their
// unit (grey levels otherwise).
func toGrid(t *Topograph) *grid {
	g := newGrid(t.Width, t.Height)
	scale := 1.0
	if t.ZUnitNM > 0 {
		scale = t.ZUnitNM
	}
	for i, v := range t.Z {
		g.v[i] = float64(v) * scale
	}
	return g
}

// fitPlane fits z = c0 + c1·x + c2·y by least squares over the pixels
// where keep is nil or true, x and y in pixels from the image centre.
func fitPlane(g *grid, keep []bool) (c [3]float64) {
	var s [3][3]float64
	var r [3]float64
	cx, cy := float64(g.w-1)/2, float64(g.h-1)/2
	for j := 0; j < g.h; j++ {
		y := float64(j) - cy
		for i := 0; i < g.w; i++ {
			k := j*g.w + i
			if keep != nil && !keep[k] {
				continue
			}
			x := float64(i) - cx
			z := g.v[k]
			b := [3]float64{1, x, y}
			for p := 0; p < 3; p++ {
				r[p] += b[p] * z
				for q := 0; q < 3; q++ {
					s[p][q] += b[p] * b[q]
				}
			}
		}
	}
	sol, ok := solve(s[:], r[:])
	if !ok {
		return c
	}
	copy(c[:], sol)
	return c
}

// subtractPlane removes a plane fitted robustly: the fit is repeated
// without the pixels more than 3 robust SDs from the first fit (defects,
// the smaller terrace beyond a step).
func subtractPlane(g *grid) {
	c := fitPlane(g, nil)
	apply := func(c [3]float64) {
		cx, cy := float64(g.w-1)/2, float64(g.h-1)/2
		for j := 0; j < g.h; j++ {
			for i := 0; i < g.w; i++ {
				g.v[j*g.w+i] -= c[0] + c[1]*(float64(i)-cx) + c[2]*(float64(j)-cy)
			}
		}
	}
	apply(c)
	sd := robustSD(g.v)
	if !(sd > 0) {
		return
	}
	// Around the residuals' median: outliers pull the first fit's level
	// off zero as much as its slopes.
	step := max(1, len(g.v)/200000)
	sample := make([]float64, 0, len(g.v)/step+1)
	for i := 0; i < len(g.v); i += step {
		sample = append(sample, g.v[i])
	}
	m := median(sample)
	keep := make([]bool, len(g.v))
	for i, v := range g.v {
		keep[i] = math.Abs(v-m) < 3*sd
	}
	apply(fitPlane(g, keep))
}

// robustSD returns 1.4826 x the median absolute deviation from the
// median of a sample of v (at most 200 000 values, evenly spaced): the SD
// of the normal distribution, unmoved by a few outliers.
func robustSD(v []float64) float64 {
	if len(v) == 0 {
		return 0
	}
	step := max(1, len(v)/200000)
	s := make([]float64, 0, len(v)/step+1)
	for i := 0; i < len(v); i += step {
		s = append(s, v[i])
	}
	m := median(s)
	for i := range s {
		s[i] = math.Abs(s[i] - m)
	}
	return 1.4826 * median(s)
}

// median returns the median of s, reordering s (Hoare's selection, in
// linear expected time; the upper middle of an even count is the least
// value after the lower, which the selection leaves there).
func median(s []float64) float64 {
	n := len(s)
	if n == 0 {
		return 0
	}
	if n%2 == 1 {
		selection.Kth(s, n/2)
		return s[n/2]
	}
	selection.Kth(s, n/2-1)
	a := s[n/2-1]
	b := s[n/2]
	for _, v := range s[n/2:] {
		b = math.Min(b, v)
	}
	return (a + b) / 2
}

// lineOffsets returns the offset of each scan line (a line of constant y)
// and the height of each terrace (terrace 0 at 0) of r, an image with the
// lattice and the plane taken out, fitted together: every line's median
// over each terrace it crosses (pixels at least a nanometre from a step
// edge) is its offset plus that terrace's height. Fitting them apart
// fails where a step runs along the lines: a line offset that drifts
// down the image then looks like a terrace height and the reverse; lines
// that cross a step tell the two apart. The fit alternates medians
// (robust to defects) until it settles. Terraces no line shares with a
// measured one keep height NaN. Common practice is the line-by-line
// median offset; this is that with the terraces levelled.
func lineOffsets(r heights, comp []int32, nc int, stepDist []float32) (line, terrace []float64) {
	w, h := r.w, r.h
	type cell struct {
		c   int
		med float64
		n   int
	}
	cells := make([][]cell, h)
	// One buffer per terrace, reused line after line.
	byTerrace := make([][]float64, nc)
	var seen []int32
	for j := 0; j < h; j++ {
		seen = seen[:0]
		for i := 0; i < w; i++ {
			q := j*w + i
			if stepDist[q] >= 1 {
				c := comp[q]
				if len(byTerrace[c]) == 0 {
					seen = append(seen, c)
				}
				byTerrace[c] = append(byTerrace[c], r.at(i, j))
			}
		}
		slices.Sort(seen)
		for _, c := range seen {
			if v := byTerrace[c]; len(v) >= 8 {
				cells[j] = append(cells[j], cell{int(c), median(v), len(v)})
			}
			byTerrace[c] = byTerrace[c][:0]
		}
	}
	line = make([]float64, h)
	terrace = make([]float64, nc)
	known := make([]bool, nc)
	known[0] = true
	// Terraces join the fit as lines tie them to one already in it.
	for changed := true; changed; {
		changed = false
		for _, cs := range cells {
			if len(cs) < 2 {
				continue
			}
			has := false
			for _, c := range cs {
				has = has || known[c.c]
			}
			if !has {
				continue
			}
			for _, c := range cs {
				if !known[c.c] {
					known[c.c] = true
					changed = true
				}
			}
		}
	}
	// Start from the plain line medians of the largest terrace on each
	// line, then alternate.
	buf := make([]float64, 0, h)
	for iter := 0; iter < 30; iter++ {
		for j, cs := range cells {
			buf = buf[:0]
			for _, c := range cs {
				if known[c.c] {
					buf = append(buf, c.med-terrace[c.c])
				}
			}
			if len(buf) > 0 {
				line[j] = median(buf)
			}
		}
		moved := 0.0
		for c := 1; c < nc; c++ {
			if !known[c] {
				continue
			}
			// Only lines that cross a step say anything of a terrace's
			// height; a line on one terrace alone fits any.
			buf = buf[:0]
			for j, cs := range cells {
				if len(cs) < 2 {
					continue
				}
				for _, cl := range cs {
					if cl.c == c {
						buf = append(buf, cl.med-line[j])
					}
				}
			}
			if len(buf) > 0 {
				v := median(buf)
				moved = math.Max(moved, math.Abs(v-terrace[c]))
				terrace[c] = v
			}
		}
		if moved == 0 {
			break
		}
	}
	for c := range terrace {
		if !known[c] {
			terrace[c] = math.NaN()
		}
	}
	// Lines with no usable pixel take their neighbours' offsets.
	for j := range line {
		if len(cells[j]) == 0 {
			line[j] = math.NaN()
		}
	}
	fillGaps(line)
	return line, terrace
}

// fillGaps replaces NaN entries by linear interpolation between the
// nearest known ones (the end values held beyond them); all NaN gives 0.
func fillGaps(v []float64) {
	last := -1
	for i := range v {
		if math.IsNaN(v[i]) {
			continue
		}
		if last < 0 {
			for k := 0; k < i; k++ {
				v[k] = v[i]
			}
		} else {
			for k := last + 1; k < i; k++ {
				t := float64(k-last) / float64(i-last)
				v[k] = v[last] + t*(v[i]-v[last])
			}
		}
		last = i
	}
	if last < 0 {
		clear(v)
		return
	}
	for k := last + 1; k < len(v); k++ {
		v[k] = v[last]
	}
}

// solve solves the small dense system a·x = b by Gaussian elimination with
// partial pivoting; ok is false when a is singular.
func solve(a [][3]float64, b []float64) ([]float64, bool) {
	n := len(b)
	m := make([][]float64, n)
	for i := range m {
		m[i] = make([]float64, n+1)
		copy(m[i], a[i][:n])
		m[i][n] = b[i]
	}
	return gauss(m)
}

// gauss solves the augmented n x (n+1) system m in place.
func gauss(m [][]float64) ([]float64, bool) {
	n := len(m)
	scale := 0.0
	for i := range m {
		for j := 0; j < n; j++ {
			scale = max(scale, math.Abs(m[i][j]))
		}
	}
	if scale == 0 {
		return nil, false
	}
	for c := 0; c < n; c++ {
		p := c
		for r := c + 1; r < n; r++ {
			if math.Abs(m[r][c]) > math.Abs(m[p][c]) {
				p = r
			}
		}
		if math.Abs(m[p][c]) < 1e-12*scale {
			return nil, false
		}
		m[c], m[p] = m[p], m[c]
		for r := 0; r < n; r++ {
			if r == c {
				continue
			}
			f := m[r][c] / m[c][c]
			for k := c; k <= n; k++ {
				m[r][k] -= f * m[c][k]
			}
		}
	}
	x := make([]float64, n)
	for i := range x {
		x[i] = m[i][n] / m[i][i]
	}
	return x, true
}
