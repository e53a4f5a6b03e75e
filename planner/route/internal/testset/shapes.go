package testset

import (
	"math"
	"math/rand/v2"

	"dimerpath/planner/route"
)

// Shapes of point sets other than TSPLIB's, for checking the engine on
// instances it was not tuned on: each is made in code from a seed, at
// about n points (Patches and Grid hold a few less: their points are
// distinct). The side of the square is sqrt(n), so the mean spacing is
// about 1, as in Uniform.
var Shapes = []struct {
	Name string
	Make func(n int, seed uint64) []route.Item
}{
	{"uniform", Uniform},
	{"clustered", Clustered},
	{"patches", Patches},
	{"grid", Grid},
}

func point(x, y float64) route.Item {
	p := route.Point{X: x, Y: y}
	return route.Item{A: p, B: p}
}

// Clustered returns n points in n/75 normal clusters (standard deviation
// 1.5% of the side) at uniform random centres: a few long edges between
// clusters and many short ones inside.
func Clustered(n int, seed uint64) []route.Item {
	r := rand.New(rand.NewPCG(seed, 0xc1))
	side := math.Sqrt(float64(n))
	k := max(1, n/75)
	cx, cy := make([]float64, k), make([]float64, k)
	for i := range k {
		cx[i], cy[i] = r.Float64()*side, r.Float64()*side
	}
	items := make([]route.Item, n)
	for i := range items {
		c := r.IntN(k)
		items[i] = point(cx[c]+r.NormFloat64()*0.015*side, cy[c]+r.NormFloat64()*0.015*side)
	}
	return items
}

// Patches returns about n points like a drilling plan: dense rectangular
// patches of points on fine pitches (most of a patch's sites taken), a
// few rows of points on a line, all on one coarse grid, so that many
// distances tie.
func Patches(n int, seed uint64) []route.Item {
	r := rand.New(rand.NewPCG(seed, 0xf1))
	side := int(math.Sqrt(float64(n))) * 10
	seen := make(map[[2]int]bool, n)
	items := make([]route.Item, 0, n)
	add := func(x, y int) {
		if len(items) < n && !seen[[2]int{x, y}] {
			seen[[2]int{x, y}] = true
			items = append(items, point(float64(x)/10, float64(y)/10))
		}
	}
	for len(items) < n {
		x, y := r.IntN(side), r.IntN(side)
		if r.IntN(4) == 0 { // a row
			dx, dy := 1+r.IntN(2), 0
			if r.IntN(2) == 0 {
				dx, dy = dy, dx
			}
			for k := range 10 + r.IntN(30) {
				add(x+k*dx, y+k*dy)
			}
			continue
		}
		w, h, pitch := 4+r.IntN(9), 4+r.IntN(9), 1+r.IntN(3)
		for a := range w {
			for b := range h {
				if r.IntN(10) != 0 {
					add(x+a*pitch, y+b*pitch)
				}
			}
		}
	}
	return items
}

// Grid returns about n points of a square grid of pitch 1 with a quarter
// of the sites left out at random and one rectangular hole: equal
// distances everywhere, as in a lattice of windows.
func Grid(n int, seed uint64) []route.Item {
	r := rand.New(rand.NewPCG(seed, 0x9d))
	w := int(math.Sqrt(float64(n)/0.7)) + 1
	items := make([]route.Item, 0, n)
	for x := range w {
		for y := range w {
			hole := x > w/4 && x < w/2 && y > w/3 && y < 2*w/3
			if !hole && r.IntN(4) != 0 && len(items) < n {
				items = append(items, point(float64(x), float64(y)))
			}
		}
	}
	return items
}
