package survey

import (
	"math"
	"slices"
)

// segmentation divides the image into terraces by the local direction of
// the dimer rows, on a grid of nodes about half the demodulation width
// apart.
type segmentation struct {
	nx, ny int
	xs, ys []float64 // node coordinates, image pixel-edge units
	// s is the signed row-direction field at the nodes: > 0 where the rows
	// run across b2 (kind 2), ≤ 0 across b1 (kind 1), cleaned so that its
	// sign is each node's terrace kind.
	s []float64
	// comp is each node's terrace (component) index.
	comp  []int
	comps []component
	// present says which kinds of terrace the image shows.
	present [2]bool
}

// component is one terrace: a connected set of nodes of one kind.
type component struct {
	kind  int // 0: rows across b1, 1: rows across b2
	nodes int
}

const (
	// minConfidence is the least normalised row amplitude at which a
	// node's row direction is read; weaker nodes (defect clusters, noise)
	// take their neighbours' terrace.
	minConfidence = 0.3
	// presentFactor: a kind of terrace is present where its row amplitude
	// exceeds this many times the amplitude at a frequency the surface
	// cannot show (b1 + b2, both indices odd) on presentShare of the nodes.
	presentFactor = 4.0
	presentShare  = 0.005
)

// segment finds the terraces: the amplitudes of the two row frequencies
// b1 and b2 around every node (demodulated from the padded image's
// spectrum s with a Gaussian of SD sigma pixels), each normalised by its
// typical value on its own terraces; the sign of their difference says
// which way the rows run. Terraces smaller than minAreaPx pixels join
// their surroundings.
func segment(s *spectrum, p padding, b basis, sigma, minAreaPx float64) *segmentation {
	step := sigma / 2
	nx := max(2, int(math.Round(float64(p.iw)/step))+1)
	ny := max(2, int(math.Round(float64(p.ih)/step))+1)
	sg := &segmentation{nx: nx, ny: ny, xs: make([]float64, nx), ys: make([]float64, ny)}
	for i := range sg.xs {
		sg.xs[i] = float64(i) * float64(p.iw) / float64(nx-1)
	}
	for j := range sg.ys {
		sg.ys[j] = float64(j) * float64(p.ih) / float64(ny-1)
	}
	sampleAll := func(m *amplitudeMap) []float64 {
		out := make([]float64, nx*ny)
		for j, y := range sg.ys {
			for i, x := range sg.xs {
				out[j*nx+i] = m.sample(x-0.5+float64(p.x0), y-0.5+float64(p.y0))
			}
		}
		return out
	}
	a1 := sampleAll(demodulate(s, b.b1, sigma))
	a2 := sampleAll(demodulate(s, b.b2, sigma))
	ref := sampleAll(demodulate(s, [2]float64{b.b1[0] + b.b2[0], b.b1[1] + b.b2[1]}, sigma))
	floor := median(slices.Clone(ref))
	typical := func(a []float64) (float64, bool) {
		var strong []float64
		for _, v := range a {
			if v > presentFactor*floor {
				strong = append(strong, v)
			}
		}
		if float64(len(strong)) < presentShare*float64(len(a)) {
			return 0, false
		}
		slices.Sort(strong)
		return strong[int(0.9*float64(len(strong)-1))], true
	}
	t1, ok1 := typical(a1)
	t2, ok2 := typical(a2)
	sg.present = [2]bool{ok1, ok2}
	n := nx * ny
	sg.s = make([]float64, n)
	kind := make([]int, n)
	switch {
	case ok1 && ok2:
		known := make([]bool, n)
		for k := range sg.s {
			n1, n2 := a1[k]/t1, a2[k]/t2
			sg.s[k] = n2 - n1
			if sg.s[k] > 0 {
				kind[k] = 1
			}
			known[k] = math.Max(n1, n2) >= minConfidence
		}
		fillUnknown(kind, known, nx, ny)
	case ok2:
		for k := range kind {
			kind[k], sg.s[k] = 1, 1
		}
	default: // one kind, or none seen clearly: the strongest fit's own
		for k := range kind {
			sg.s[k] = -1
		}
	}
	// Terraces too small to be real join their surroundings.
	cellArea := (float64(p.iw) / float64(nx-1)) * (float64(p.ih) / float64(ny-1))
	minNodes := int(math.Ceil(minAreaPx / cellArea))
	for pass := 0; pass < 6; pass++ {
		comp, sizes := components(kind, nx, ny)
		flipped := false
		for k := range kind {
			if sizes[comp[k]] < minNodes {
				kind[k] = 1 - kind[k]
				flipped = true
			}
		}
		if !flipped {
			break
		}
	}
	// The field's sign is the node's kind; where the measurement
	// disagrees (unknown or joined nodes) it is a token ±ε.
	const eps = 1e-3
	for k := range sg.s {
		if (sg.s[k] > 0) != (kind[k] == 1) {
			sg.s[k] = eps
			if kind[k] == 0 {
				sg.s[k] = -eps
			}
		}
	}
	var sizes []int
	sg.comp, sizes = components(kind, nx, ny)
	sg.comps = make([]component, len(sizes))
	for k, c := range sg.comp {
		sg.comps[c].kind = kind[k]
		sg.comps[c].nodes = sizes[c]
	}
	return sg
}

// fillUnknown gives every unknown node the kind of the nearest known node
// (breadth first over the grid); with none known all stay as they are.
func fillUnknown(kind []int, known []bool, nx, ny int) {
	queue := make([]int, 0, len(kind))
	seen := slices.Clone(known)
	for k, ok := range known {
		if ok {
			queue = append(queue, k)
		}
	}
	for q := 0; q < len(queue); q++ {
		k := queue[q]
		i, j := k%nx, k/nx
		for _, d := range [4][2]int{{1, 0}, {-1, 0}, {0, 1}, {0, -1}} {
			a, b := i+d[0], j+d[1]
			if a < 0 || b < 0 || a >= nx || b >= ny {
				continue
			}
			m := b*nx + a
			if !seen[m] {
				seen[m] = true
				kind[m] = kind[k]
				queue = append(queue, m)
			}
		}
	}
}

// components labels the 4-connected components of equal kind and returns
// each node's component and the components' sizes.
func components(kind []int, nx, ny int) ([]int, []int) {
	comp := make([]int, len(kind))
	for k := range comp {
		comp[k] = -1
	}
	var sizes []int
	var stack []int
	for k := range kind {
		if comp[k] >= 0 {
			continue
		}
		id := len(sizes)
		sizes = append(sizes, 0)
		stack = append(stack[:0], k)
		comp[k] = id
		for len(stack) > 0 {
			c := stack[len(stack)-1]
			stack = stack[:len(stack)-1]
			sizes[id]++
			i, j := c%nx, c/nx
			for _, d := range [4][2]int{{1, 0}, {-1, 0}, {0, 1}, {0, -1}} {
				a, b := i+d[0], j+d[1]
				if a < 0 || b < 0 || a >= nx || b >= ny {
					continue
				}
				m := b*nx + a
				if comp[m] < 0 && kind[m] == kind[c] {
					comp[m] = id
					stack = append(stack, m)
				}
			}
		}
	}
	return comp, sizes
}

// field returns the cleaned field at image point (x, y) (pixel-edge
// units) by bilinear interpolation between the nodes.
func (sg *segmentation) field(x, y float64) float64 {
	u := x / sg.xs[sg.nx-1] * float64(sg.nx-1)
	v := y / sg.ys[sg.ny-1] * float64(sg.ny-1)
	i := min(max(int(math.Floor(u)), 0), sg.nx-2)
	j := min(max(int(math.Floor(v)), 0), sg.ny-2)
	fu, fv := u-float64(i), v-float64(j)
	at := func(a, b int) float64 { return sg.s[b*sg.nx+a] }
	return (1-fu)*(1-fv)*at(i, j) + fu*(1-fv)*at(i+1, j) + (1-fu)*fv*at(i, j+1) + fu*fv*at(i+1, j+1)
}

// terraceAt returns the terrace (component) at image point (x, y): the
// component of the nearest of the four surrounding nodes whose kind is
// the sign of the interpolated field there.
func (sg *segmentation) terraceAt(x, y float64) int {
	u := x / sg.xs[sg.nx-1] * float64(sg.nx-1)
	v := y / sg.ys[sg.ny-1] * float64(sg.ny-1)
	i := min(max(int(math.Floor(u)), 0), sg.nx-2)
	j := min(max(int(math.Floor(v)), 0), sg.ny-2)
	want := 0
	if sg.field(x, y) > 0 {
		want = 1
	}
	best, bestD := -1, math.Inf(1)
	for _, d := range [4][2]int{{0, 0}, {1, 0}, {0, 1}, {1, 1}} {
		k := (j+d[1])*sg.nx + i + d[0]
		c := sg.comp[k]
		dd := math.Hypot(u-float64(i+d[0]), v-float64(j+d[1]))
		if sg.comps[c].kind == want && dd < bestD {
			best, bestD = c, dd
		}
	}
	if best < 0 {
		k := int(math.Round(v))*sg.nx + int(math.Round(u))
		return sg.comp[k]
	}
	return best
}

// steps returns the step edges: where the field changes sign, in image
// pixel-edge units.
func (sg *segmentation) steps() [][]pt {
	return contour(sg.s, sg.nx, sg.ny, sg.xs, sg.ys)
}

// outline returns the outer boundary of terrace c, counter-clockwise,
// following the image's border where the terrace meets it.
func (sg *segmentation) outline(c int) []pt {
	// The field is extended by a ring outside the image at the border's
	// own coordinates, so that every terrace is closed.
	nx, ny := sg.nx+2, sg.ny+2
	xs := make([]float64, nx)
	ys := make([]float64, ny)
	copy(xs[1:], sg.xs)
	copy(ys[1:], sg.ys)
	xs[0], xs[nx-1] = sg.xs[0], sg.xs[sg.nx-1]
	ys[0], ys[ny-1] = sg.ys[0], sg.ys[sg.ny-1]
	f := make([]float64, nx*ny)
	for k := range f {
		f[k] = -1
	}
	for j := 0; j < sg.ny; j++ {
		for i := 0; i < sg.nx; i++ {
			k := j*sg.nx + i
			v := math.Max(math.Abs(sg.s[k]), 1e-9)
			if sg.comp[k] != c {
				v = -v
			}
			f[(j+1)*nx+i+1] = v
		}
	}
	var best []pt
	bestArea := 0.0
	for _, line := range contour(f, nx, ny, xs, ys) {
		if !closed(line) {
			continue
		}
		if a := math.Abs(polygonArea(line)); a > bestArea {
			best, bestArea = line, a
		}
	}
	if polygonArea(best) < 0 {
		slices.Reverse(best)
	}
	return best
}
