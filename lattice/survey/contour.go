package survey

import (
	"math"
	"slices"
)

// pt is a point in image pixel-edge coordinates (x from the left edge, y
// from the bottom edge, in pixel steps) or, after conversion, in nm.
type pt struct{ x, y float64 }

// contour returns the polylines along which the field f (nx x ny nodes at
// coordinates xs[i], ys[j], f[j*nx+i]) changes sign (positive against
// zero or negative), by marching squares with each crossing placed by
// linear interpolation. A closed loop repeats its first point at the end;
// an open line ends on the grid's border. Saddle cells pair their
// crossings by the cell's mean.
func contour(f []float64, nx, ny int, xs, ys []float64) [][]pt {
	if nx < 2 || ny < 2 {
		return nil
	}
	pos := func(k int) bool { return f[k] > 0 }
	// Edge ids: horizontal (i,j)-(i+1,j) = j*nx+i; vertical (i,j)-(i,j+1)
	// = nx*ny + j*nx + i.
	hEdge := func(i, j int) int { return j*nx + i }
	vEdge := func(i, j int) int { return nx*ny + j*nx + i }
	point := func(e int) pt {
		if e < nx*ny {
			j, i := e/nx, e%nx
			a, b := f[j*nx+i], f[j*nx+i+1]
			t := a / (a - b)
			return pt{xs[i] + t*(xs[i+1]-xs[i]), ys[j]}
		}
		e -= nx * ny
		j, i := e/nx, e%nx
		a, b := f[j*nx+i], f[(j+1)*nx+i]
		t := a / (a - b)
		return pt{xs[i], ys[j] + t*(ys[j+1]-ys[j])}
	}
	// Each crossed edge joins at most two segments, one per cell.
	link := map[int][2]int{}
	add := func(a, b int) {
		for _, e := range [2][2]int{{a, b}, {b, a}} {
			l, ok := link[e[0]]
			if !ok {
				l = [2]int{-1, -1}
			}
			if l[0] < 0 {
				l[0] = e[1]
			} else {
				l[1] = e[1]
			}
			link[e[0]] = l
		}
	}
	for j := 0; j+1 < ny; j++ {
		for i := 0; i+1 < nx; i++ {
			k00, k10, k01, k11 := j*nx+i, j*nx+i+1, (j+1)*nx+i, (j+1)*nx+i+1
			bottom, right, top, left := hEdge(i, j), vEdge(i+1, j), hEdge(i, j+1), vEdge(i, j)
			var cross []int
			if pos(k00) != pos(k10) {
				cross = append(cross, bottom)
			}
			if pos(k10) != pos(k11) {
				cross = append(cross, right)
			}
			if pos(k11) != pos(k01) {
				cross = append(cross, top)
			}
			if pos(k01) != pos(k00) {
				cross = append(cross, left)
			}
			switch len(cross) {
			case 2:
				add(cross[0], cross[1])
			case 4:
				centre := (f[k00] + f[k10] + f[k01] + f[k11]) / 4
				// The corners that agree with the centre join across it.
				if (centre > 0) == pos(k00) {
					add(bottom, right)
					add(top, left)
				} else {
					add(bottom, left)
					add(top, right)
				}
			}
		}
	}
	used := map[int]bool{}
	walk := func(start int) []pt {
		line := []pt{point(start)}
		used[start] = true
		prev, cur := -1, start
		for {
			l := link[cur]
			next := l[0]
			if next == prev || next < 0 || (used[next] && next != start) {
				next = l[1]
			}
			if next < 0 || next == prev {
				return line
			}
			if next == start {
				return append(line, line[0])
			}
			if used[next] {
				return line
			}
			used[next] = true
			line = append(line, point(next))
			prev, cur = cur, next
		}
	}
	keys := make([]int, 0, len(link))
	for e := range link {
		keys = append(keys, e)
	}
	slices.Sort(keys) // the same field gives the same lines in the same order
	var out [][]pt
	// Open lines first: they start at an edge with one segment.
	for _, e := range keys {
		if !used[e] && link[e][1] < 0 {
			out = append(out, walk(e))
		}
	}
	for _, e := range keys {
		if !used[e] {
			out = append(out, walk(e))
		}
	}
	return out
}

// simplify returns line with points closer than tol to the chord between
// kept neighbours removed (Douglas and Peucker, Canadian Cartographer 10,
// 112 (1973)); a closed line stays closed.
func simplify(line []pt, tol float64) []pt {
	if len(line) < 3 {
		return line
	}
	keep := make([]bool, len(line))
	keep[0], keep[len(line)-1] = true, true
	var rec func(a, b int)
	rec = func(a, b int) {
		best, at := -1.0, -1
		for k := a + 1; k < b; k++ {
			if d := segDist(line[k], line[a], line[b]); d > best {
				best, at = d, k
			}
		}
		if best > tol {
			keep[at] = true
			rec(a, at)
			rec(at, b)
		}
	}
	if closed(line) {
		// Split a loop at its point furthest from the start.
		far, at := -1.0, 1
		for k := 1; k < len(line)-1; k++ {
			if d := math.Hypot(line[k].x-line[0].x, line[k].y-line[0].y); d > far {
				far, at = d, k
			}
		}
		keep[at] = true
		rec(0, at)
		rec(at, len(line)-1)
	} else {
		rec(0, len(line)-1)
	}
	var out []pt
	for k, p := range line {
		if keep[k] {
			out = append(out, p)
		}
	}
	return out
}

func closed(line []pt) bool {
	return len(line) > 2 && line[0] == line[len(line)-1]
}

// segDist returns the distance from p to the segment ab.
func segDist(p, a, b pt) float64 {
	dx, dy := b.x-a.x, b.y-a.y
	l2 := dx*dx + dy*dy
	t := 0.0
	if l2 > 0 {
		t = math.Max(0, math.Min(1, ((p.x-a.x)*dx+(p.y-a.y)*dy)/l2))
	}
	return math.Hypot(p.x-a.x-t*dx, p.y-a.y-t*dy)
}

// polygonArea returns the signed area of a closed or open ring (positive
// counter-clockwise).
func polygonArea(ring []pt) float64 {
	var s float64
	n := len(ring)
	if closed(ring) {
		n--
	}
	for i := 0; i < n; i++ {
		a, b := ring[i], ring[(i+1)%n]
		s += a.x*b.y - b.x*a.y
	}
	return s / 2
}
