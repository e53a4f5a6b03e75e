// Package testset loads the route engine's test and benchmark instances:
// the TSPLIB files in the repository's testdata/tsplib (with the
// published optima listed there) and seeded random instances.
package testset

import (
	"bufio"
	"fmt"
	"math"
	"math/rand/v2"
	"os"
	"path/filepath"
	"runtime"
	"strconv"
	"strings"

	"dimerpath/planner/route"
	"dimerpath/planner/route/tsplib"
)

// Dir is the directory of the TSPLIB test files.
func Dir() string {
	_, file, _, _ := runtime.Caller(0)
	return filepath.Join(filepath.Dir(file), "..", "..", "..", "..", "testdata", "tsplib")
}

// Optima returns the published optimal tour lengths, by instance name,
// from testdata/tsplib/OPTIMA.tsv (TSPLIB95's list of optima).
func Optima() (map[string]int, error) { return OptimaIn(Dir()) }

// OptimaIn reads dir/OPTIMA.tsv: a header line, then name, n, edge weight
// type and optimal length, tab-separated.
func OptimaIn(dir string) (map[string]int, error) {
	f, err := os.Open(filepath.Join(dir, "OPTIMA.tsv"))
	if err != nil {
		return nil, err
	}
	defer f.Close()
	opt := map[string]int{}
	sc := bufio.NewScanner(f)
	for line := 1; sc.Scan(); line++ {
		f := strings.Split(sc.Text(), "\t")
		if line == 1 || len(f) < 4 {
			continue
		}
		v, err := strconv.Atoi(f[3])
		if err != nil {
			return nil, fmt.Errorf("OPTIMA.tsv:%d: optimal_length %q: %w", line, f[3], err)
		}
		opt[f[0]] = v
	}
	return opt, sc.Err()
}

// Load reads testdata/tsplib/NAME.tsp.
func Load(name string) (*tsplib.Instance, error) { return LoadIn(Dir(), name) }

// LoadIn reads dir/NAME.tsp.
func LoadIn(dir, name string) (*tsplib.Instance, error) {
	path := filepath.Join(dir, name+".tsp")
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	return tsplib.Read(f, path)
}

// LoadTour reads testdata/tsplib/NAME.opt.tour for an instance of n nodes.
func LoadTour(name string, n int) ([]int, error) {
	path := filepath.Join(Dir(), name+".opt.tour")
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	return tsplib.ReadTour(f, path, n)
}

// Quality lists the TSPLIB instances of 1,000 to 20,000 nodes held in
// testdata/tsplib, smallest first.
var Quality = []string{"pr1002", "pcb1173", "u2152", "pcb3038", "fnl4461", "rl5915", "usa13509", "d15112"}

// Uniform returns n points uniform in the square [0, side)^2 with
// side = sqrt(n), so that the mean spacing is about 1.
func Uniform(n int, seed uint64) []route.Item {
	r := rand.New(rand.NewPCG(seed, 0x5eed))
	side := math.Sqrt(float64(n))
	items := make([]route.Item, n)
	for i := range items {
		p := route.Point{X: r.Float64() * side, Y: r.Float64() * side}
		items[i] = route.Item{A: p, B: p}
	}
	return items
}

// Strokes returns n reversible strokes whose midpoints are uniform in the
// square [0, side)^2, side = sqrt(n) (mean spacing about 1), with
// uniformly random directions and lengths uniform in [0.5, 1.5] (about the
// mean spacing).
func Strokes(n int, seed uint64) []route.Item {
	r := rand.New(rand.NewPCG(seed, 0x57c0))
	side := math.Sqrt(float64(n))
	items := make([]route.Item, n)
	for i := range items {
		mx, my := r.Float64()*side, r.Float64()*side
		l := 0.5 + r.Float64()
		a := r.Float64() * 2 * math.Pi
		dx, dy := l/2*math.Cos(a), l/2*math.Sin(a)
		items[i] = route.Item{A: route.Point{X: mx - dx, Y: my - dy}, B: route.Point{X: mx + dx, Y: my + dy}}
	}
	return items
}
