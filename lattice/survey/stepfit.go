package survey

import (
	"math"
	"slices"
)

// heights is an image read pixel by pixel: a grid less a plane, without
// making the difference a whole image.
type heights struct {
	g     *grid
	w, h  int
	plane func(i, j int) float64
}

func (y heights) at(i, j int) float64 { return y.g.at(i, j) - y.plane(i, j) }

// refineSteps moves each step edge to where the heights jump. The
// lattice places an edge to a few tenths of a nm; the heights of the two
// terraces, a/4 apart, place it to about a pixel. y is the image with the
// lattice and the plane taken out (the terraces keep their heights),
// offset the terraces' fitted heights. At vertices about 0.5 nm apart
// along each edge, the edge is moved along its normal to the place that
// best splits the pixels within ±1.2 nm across and ±0.4 nm along into the
// two terraces' heights over a local level and slope (least absolute
// deviations, so a defect on the edge does not pull it), by at most reach nm; the moves are smoothed by a
// running median of nine (4 nm) along the edge, so that a defect by the
// edge, which looks like a bit of the other terrace, does not bend it.
func refineSteps(steps []stepLine, y heights, offset []float64, a [2][2]float64, reach float64) {
	px := math.Min(a[0][0], a[1][1])
	for si := range steps {
		s := &steps[si]
		hl, hr := offset[s.sides[0]], offset[s.sides[1]]
		if math.Abs(hl-hr) == 0 {
			continue
		}
		line := resample(s.line, 0.5/px)
		moves := make([]float64, len(line))
		for k := range line {
			// The normal at the vertex (left of the direction of travel),
			// in pixel units, and its length in nm.
			p0, p1 := line[max(0, k-1)], line[min(len(line)-1, k+1)]
			dx, dy := p1.x-p0.x, p1.y-p0.y
			n := math.Hypot(dx, dy)
			if n == 0 {
				continue
			}
			tx, ty := dx/n, dy/n
			nx, ny := -ty, tx
			nlen := trueDist(a, nx, ny) // nm per pixel step along the normal
			tlen := trueDist(a, tx, ty)
			across := 1.2 / nlen
			along := 0.4 / tlen
			type sample struct{ d, z float64 }
			var ss []sample
			c := line[k]
			r := int(math.Ceil(math.Max(across, along))) + 1
			for j := int(c.y) - r; j <= int(c.y)+r; j++ {
				for i := int(c.x) - r; i <= int(c.x)+r; i++ {
					if i < 0 || j < 0 || i >= y.w || j >= y.h {
						continue
					}
					ux, uy := float64(i)+0.5-c.x, float64(j)+0.5-c.y
					d := ux*nx + uy*ny
					t := ux*tx + uy*ty
					if math.Abs(d) <= across && math.Abs(t) <= along {
						ss = append(ss, sample{d * nlen, y.at(i, j)})
					}
				}
			}
			if len(ss) < 10 {
				continue
			}
			// For each place m: the two heights, plus a level and a slope
			// across the edge fitted by least squares (scan-line offsets
			// and a tilt make the surface slope locally), then the sum of
			// absolute residuals.
			best, bestCost := 0.0, math.Inf(1)
			e := make([]float64, len(ss))
			for m := -reach; m <= reach+1e-9; m += 0.02 {
				var sd, sdd, se, sde float64
				for q, smp := range ss {
					h := hr
					if smp.d > m {
						h = hl
					}
					e[q] = smp.z - h
					sd += smp.d
					sdd += smp.d * smp.d
					se += e[q]
					sde += smp.d * e[q]
				}
				nn := float64(len(ss))
				slope := 0.0
				if den := nn*sdd - sd*sd; den > 0 {
					slope = (nn*sde - sd*se) / den
				}
				level := (se - slope*sd) / nn
				var cost float64
				for q, smp := range ss {
					cost += math.Abs(e[q] - level - slope*smp.d)
				}
				if cost < bestCost-1e-12 || (math.Abs(cost-bestCost) <= 1e-12 && math.Abs(m) < math.Abs(best)) {
					best, bestCost = m, cost
				}
			}
			moves[k] = best / nlen // back to pixel units along the normal
		}
		med := slices.Clone(moves)
		for k := range moves {
			win := slices.Clone(moves[max(0, k-4):min(len(moves), k+5)])
			med[k] = median(win)
		}
		// Then a running mean of five, so that the moved line has no
		// corners where the median jumps.
		smooth := slices.Clone(med)
		for k := range med {
			var sum float64
			lo, hi := max(0, k-2), min(len(med), k+3)
			for _, m := range med[lo:hi] {
				sum += m
			}
			smooth[k] = sum / float64(hi-lo)
		}
		for k := range line {
			p0, p1 := line[max(0, k-1)], line[min(len(line)-1, k+1)]
			dx, dy := p1.x-p0.x, p1.y-p0.y
			n := math.Hypot(dx, dy)
			if n == 0 {
				continue
			}
			line[k].x += -dy / n * smooth[k]
			line[k].y += dx / n * smooth[k]
		}
		// Ends stay on the image's border.
		clampToBorder(&line[0], y.w, y.h)
		clampToBorder(&line[len(line)-1], y.w, y.h)
		s.line = simplify(unfold(line), 0.05/px)
	}
}

// unfold drops the vertices where the line turns back on itself (by more
// than 90°), which moving the vertices of a bent line apart along their
// normals can make: a fold would put the pixels round it on the wrong
// side.
func unfold(line []pt) []pt {
	for {
		out := []pt{line[0]}
		dropped := false
		for k := 1; k < len(line); k++ {
			n := len(out)
			if n >= 2 && k < len(line)-1 {
				a, b, c := out[n-2], out[n-1], line[k]
				if (b.x-a.x)*(c.x-b.x)+(b.y-a.y)*(c.y-b.y) < 0 {
					out[n-1] = c // b folded back: keep c in its place
					dropped = true
					continue
				}
			}
			out = append(out, line[k])
		}
		line = out
		if !dropped || len(line) < 3 {
			return line
		}
	}
}

// resample returns points along line about step pixels apart, its ends
// kept.
func resample(line []pt, step float64) []pt {
	out := []pt{line[0]}
	for k := 1; k < len(line); k++ {
		p, q := line[k-1], line[k]
		l := math.Hypot(q.x-p.x, q.y-p.y)
		n := max(1, int(math.Ceil(l/step)))
		for m := 1; m <= n; m++ {
			t := float64(m) / float64(n)
			out = append(out, pt{p.x + t*(q.x-p.x), p.y + t*(q.y-p.y)})
		}
	}
	return out
}

// clampToBorder moves an end point that lies near the image's border onto
// it.
func clampToBorder(p *pt, w, h int) {
	const near = 1.0
	switch {
	case p.x < near:
		p.x = 0
	case p.x > float64(w)-near:
		p.x = float64(w)
	}
	switch {
	case p.y < near:
		p.y = 0
	case p.y > float64(h)-near:
		p.y = float64(h)
	}
	p.x = math.Max(0, math.Min(float64(w), p.x))
	p.y = math.Max(0, math.Min(float64(h), p.y))
}

// assignNearSteps gives each pixel within band nm of a step edge the
// terrace on its side of the nearest edge: the segmentation's terraces
// follow the lattice, known to a few tenths of a nm at an edge, the
// refined edges the heights.
func assignNearSteps(comp []int32, steps []stepLine, dist []float32, w, h int, band float64) {
	for j := 0; j < h; j++ {
		for i := 0; i < w; i++ {
			q := j*w + i
			if float64(dist[q]) > band {
				continue
			}
			p := pt{float64(i) + 0.5, float64(j) + 0.5}
			best, side := math.Inf(1), -1
			for _, s := range steps {
				d, left := sideOf(p, s.line)
				if d < best {
					best = d
					side = s.sides[1]
					if left {
						side = s.sides[0]
					}
				}
			}
			if side >= 0 {
				comp[q] = int32(side)
			}
		}
	}
}

// sideOf returns the distance from p to the polyline and whether p lies
// on its left (the side its normal (−dy, dx) points to). Where the
// nearest point is a vertex, the side is taken from the sum of the two
// segments' normals there, so that a kink does not put the pixels in its
// bend on the wrong side.
func sideOf(p pt, line []pt) (float64, bool) {
	best, left := math.Inf(1), false
	for k := 1; k < len(line); k++ {
		a, b := line[k-1], line[k]
		dx, dy := b.x-a.x, b.y-a.y
		l2 := dx*dx + dy*dy
		if l2 == 0 {
			continue
		}
		t := ((p.x-a.x)*dx + (p.y-a.y)*dy) / l2
		tc := math.Max(0, math.Min(1, t))
		ex, ey := p.x-(a.x+tc*dx), p.y-(a.y+tc*dy)
		d := math.Hypot(ex, ey)
		if d >= best {
			continue
		}
		best = d
		nx, ny := -dy, dx
		// At a shared vertex, add the neighbouring segment's normal.
		if tc == 1 && k+1 < len(line) {
			c := line[k+1]
			nx, ny = nx/math.Sqrt(l2)-(c.y-b.y)/math.Hypot(c.x-b.x, c.y-b.y), ny/math.Sqrt(l2)+(c.x-b.x)/math.Hypot(c.x-b.x, c.y-b.y)
		} else if tc == 0 && k >= 2 {
			z := line[k-2]
			nx, ny = nx/math.Sqrt(l2)-(a.y-z.y)/math.Hypot(a.x-z.x, a.y-z.y), ny/math.Sqrt(l2)+(a.x-z.x)/math.Hypot(a.x-z.x, a.y-z.y)
		}
		left = ex*nx+ey*ny > 0
	}
	return best, left
}

// stepContrastNM is how far from a step edge its own contrast (a dark
// groove or a bright rim, and the lattice cut off at the edge: where the
// rows run along the edge, the last rows look unlike the rest) is taken
// out of the residual before defects are sought.
const stepContrastNM = 3.0

// removeStepContrast subtracts from r, near each step edge, the edge's
// own profile across it: the median of r over pixels at the same distance
// from the edge (bins of 0.05 nm) within ±2 nm along it, the defects found
// so far (exclude, when not nil) left out. A defect by the edge is local
// and stays; a groove or rim that runs along the edge goes.
func removeStepContrast(r *grid, steps []stepLine, a [2][2]float64, exclude []bool) {
	const binD, binS, window = 0.05, 1.0, 2
	nd := int(math.Ceil(stepContrastNM / binD))
	type where struct {
		step, arc, dbin int
		dist            float64
	}
	at := map[int]where{}
	for si, s := range steps {
		arc := 0.0
		for k := 1; k < len(s.line); k++ {
			p, q := s.line[k-1], s.line[k]
			segNM := trueDist(a, q.x-p.x, q.y-p.y)
			if segNM == 0 {
				continue
			}
			reach := stepContrastNM/math.Min(a[0][0], a[1][1]) + 1
			x0, x1 := int(math.Floor(math.Min(p.x, q.x)-reach)), int(math.Ceil(math.Max(p.x, q.x)+reach))
			y0, y1 := int(math.Floor(math.Min(p.y, q.y)-reach)), int(math.Ceil(math.Max(p.y, q.y)+reach))
			for j := max(0, y0); j <= min(r.h-1, y1); j++ {
				for i := max(0, x0); i <= min(r.w-1, x1); i++ {
					c := pt{float64(i) + 0.5, float64(j) + 0.5}
					// Position along the segment (0..1) and distance across,
					// in nm (true frame).
					tx, ty := q.x-p.x, q.y-p.y
					t := ((c.x-p.x)*tx + (c.y-p.y)*ty) / (tx*tx + ty*ty)
					tc := math.Max(0, math.Min(1, t))
					ex, ey := c.x-(p.x+tc*tx), c.y-(p.y+tc*ty)
					dist := trueDist(a, ex, ey)
					if dist > stepContrastNM {
						continue
					}
					if tx*ey-ty*ex < 0 {
						dist = -dist
					}
					key := j*r.w + i
					if old, ok := at[key]; ok && math.Abs(old.dist) <= math.Abs(dist) {
						continue
					}
					at[key] = where{step: si, arc: int((arc + tc*segNM) / binS), dbin: int(math.Round(dist/binD)) + nd, dist: dist}
				}
			}
			arc += segNM
		}
	}
	type cell struct{ step, arc, dbin int }
	values := map[cell][]float64{}
	for key, w := range at {
		if exclude != nil && exclude[key] {
			continue // a defect by the edge is no part of the edge's profile
		}
		c := cell{w.step, w.arc, w.dbin}
		values[c] = append(values[c], r.v[key])
	}
	profile := map[cell]float64{}
	for key, w := range at {
		c := cell{w.step, w.arc, w.dbin}
		if _, done := profile[c]; done {
			continue
		}
		var pool []float64
		for da := -window; da <= window; da++ {
			pool = append(pool, values[cell{w.step, w.arc + da, w.dbin}]...)
		}
		profile[c] = median(pool)
		_ = key
	}
	for key, w := range at {
		r.v[key] -= profile[cell{w.step, w.arc, w.dbin}]
	}
}
