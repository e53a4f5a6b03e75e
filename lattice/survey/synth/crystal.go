package synth

import (
	"math"
	"slices"
)

// crystalLayer is the dimer lattice of a Si(100) terrace whose top layer
// is the (001) atomic plane at height n·a/4, in the crystal's in-plane
// frame (x along [100], y along [010]) in units of a.
type crystalLayer struct {
	centre    [2]float64 // one dimer centre
	pair      [2]float64 // from one atom of a dimer to its partner
	along     [2]float64 // unit vector along the dimer rows
	across    [2]float64 // unit vector across them (the dimer bond's direction)
	alongLen  float64    // dimer pitch
	acrossLen float64    // row spacing
}

// diamondAtoms lists the atoms of the diamond structure (the FCC lattice
// with the two-atom basis (0,0,0) and (¼,¼,¼)) in the cube [−span, span]³,
// in units of a.
func diamondAtoms(span int) [][3]float64 {
	fcc := [][3]float64{{0, 0, 0}, {0.5, 0.5, 0}, {0.5, 0, 0.5}, {0, 0.5, 0.5}}
	basis := [][3]float64{{0, 0, 0}, {0.25, 0.25, 0.25}}
	var out [][3]float64
	for i := -span; i <= span; i++ {
		for j := -span; j <= span; j++ {
			for k := -span; k <= span; k++ {
				for _, f := range fcc {
					for _, b := range basis {
						out = append(out, [3]float64{float64(i) + f[0] + b[0], float64(j) + f[1] + b[1], float64(k) + f[2] + b[2]})
					}
				}
			}
		}
	}
	return out
}

const eps = 1e-9

// layerLattice derives the dimer lattice of the terrace whose top atoms
// are the (001) plane at z = n·a/4. Each top atom keeps two bonds to the
// plane below and loses the two to the plane above; their in-plane parts
// point both ways along one ⟨110⟩ direction, and neighbouring top atoms
// pair into dimers along it. The dimer's centre then lies right under the
// removed atom above, the row spacing is twice the pair distance, and the
// dimers follow each other along the rows at the nearest-neighbour
// distance of the plane.
func layerLattice(n int) crystalLayer {
	atoms := diamondAtoms(2)
	z := float64(n) / 4
	var layer, above [][3]float64
	for _, a := range atoms {
		switch {
		case math.Abs(a[2]-z) < eps:
			layer = append(layer, a)
		case math.Abs(a[2]-z-0.25) < eps:
			above = append(above, a)
		}
	}
	order := func(a, b [3]float64) int {
		da, db := a[0]*a[0]+a[1]*a[1], b[0]*b[0]+b[1]*b[1]
		if math.Abs(da-db) > eps {
			return cmpf(da, db)
		}
		if math.Abs(a[0]-b[0]) > eps {
			return cmpf(a[0], b[0])
		}
		return cmpf(a[1], b[1])
	}
	slices.SortFunc(layer, order)
	slices.SortFunc(above, order)
	p := layer[0] // the top atom nearest the axis
	bond := math.Sqrt(3) / 4
	var up [2]float64
	for _, q := range above {
		if math.Abs(dist3(p, q)-bond) < eps {
			up = [2]float64{q[0] - p[0], q[1] - p[1]}
			break
		}
	}
	l := crystalLayer{
		pair:   [2]float64{2 * up[0], 2 * up[1]},
		centre: [2]float64{p[0] + up[0], p[1] + up[1]},
	}
	l.acrossLen = 2 * math.Hypot(l.pair[0], l.pair[1])
	l.across = unit(up)
	// Along the rows: the nearest neighbour in the plane at right angles
	// to the dimer bond.
	best := math.Inf(1)
	for _, q := range layer {
		v := [2]float64{q[0] - p[0], q[1] - p[1]}
		d := math.Hypot(v[0], v[1])
		if d < eps || math.Abs(v[0]*up[0]+v[1]*up[1]) > eps || d > best-eps {
			continue
		}
		best, l.along = d, unit(v)
	}
	l.alongLen = best
	// Right-handed (along, across).
	if l.along[0]*l.across[1]-l.along[1]*l.across[0] < 0 {
		l.along = [2]float64{-l.along[0], -l.along[1]}
	}
	return l
}

// hOffset returns the distance in nm of each H site from its dimer's
// centre, across the row: half the Si–Si dimer bond of the H-terminated
// surface (2.47 ± 0.02 Å by surface X-ray diffraction, Surf. Sci. 453, 18
// (2000)) plus the in-plane part of an Si–H bond of 1.50 Å (from memory)
// at an H–Si–Si angle of 110° (108–111° by ion scattering, Shoji,
// Kusumura and Oura, Surf. Sci. 1993).
func hOffset() float64 {
	const dimerBond, siH, angle = 0.247, 0.150, 110.0
	return dimerBond/2 + siH*math.Cos((180-angle)*math.Pi/180)
}

func dist3(a, b [3]float64) float64 {
	return math.Sqrt((a[0]-b[0])*(a[0]-b[0]) + (a[1]-b[1])*(a[1]-b[1]) + (a[2]-b[2])*(a[2]-b[2]))
}

func unit(v [2]float64) [2]float64 {
	n := math.Hypot(v[0], v[1])
	return [2]float64{v[0] / n, v[1] / n}
}

func cmpf(a, b float64) int {
	if a < b {
		return -1
	}
	if a > b {
		return 1
	}
	return 0
}
