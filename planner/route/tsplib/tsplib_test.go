package tsplib_test

import (
	"errors"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"dimerpath/planner/route/internal/testset"
	"dimerpath/planner/route/tsplib"
)

// TestOptimalTours scores each published optimal tour (TSPLIB95's
// NAME.opt.tour files) with Dist and checks it against the published
// optimum in OPTIMA.tsv (Reinelt 1991): this pins the distance function.
func TestOptimalTours(t *testing.T) {
	opt, err := testset.Optima()
	if err != nil {
		t.Fatal(err)
	}
	tours, _ := filepath.Glob(filepath.Join(testset.Dir(), "*.opt.tour"))
	if len(tours) < 7 {
		t.Fatalf("found %d .opt.tour files in %s, want 7", len(tours), testset.Dir())
	}
	for _, path := range tours {
		name := strings.TrimSuffix(filepath.Base(path), ".opt.tour")
		t.Run(name, func(t *testing.T) {
			in, err := testset.Load(name)
			if err != nil {
				t.Fatal(err)
			}
			tour, err := testset.LoadTour(name, in.Len())
			if err != nil {
				t.Fatal(err)
			}
			if got := in.TourLength(tour); got != opt[name] {
				t.Errorf("%s.opt.tour scores %d, published optimum %d", name, got, opt[name])
			}
		})
	}
}

// TestReadAll reads every instance and checks its dimension against the
// list of optima.
func TestReadAll(t *testing.T) {
	files, _ := filepath.Glob(filepath.Join(testset.Dir(), "*.tsp"))
	for _, path := range files {
		f, err := os.Open(path)
		if err != nil {
			t.Fatal(err)
		}
		in, err := tsplib.Read(f, path)
		f.Close()
		if err != nil {
			t.Errorf("Read(%s): %v", path, err)
			continue
		}
		if in.WeightType != "EUC_2D" || in.Len() < 50 {
			t.Errorf("Read(%s): type %s, %d nodes", path, in.WeightType, in.Len())
		}
	}
}

func TestDist(t *testing.T) {
	in := &tsplib.Instance{WeightType: "EUC_2D", X: []float64{0, 3, 1.5}, Y: []float64{0, 4, 0}}
	// 5 exactly; 1.5 rounds to 2 (nint, TSPLIB95 documentation).
	for _, c := range []struct{ i, j, want int }{{0, 1, 5}, {0, 2, 2}, {1, 2, 4}} {
		if got := in.Dist(c.i, c.j); got != c.want {
			t.Errorf("Dist(%d, %d) = %d, want %d", c.i, c.j, got, c.want)
		}
	}
}

func TestReadErrors(t *testing.T) {
	head := "NAME: x\nTYPE: TSP\nDIMENSION: 2\nEDGE_WEIGHT_TYPE: EUC_2D\nNODE_COORD_SECTION\n"
	for _, c := range []struct {
		name, text string
		line       int
		err        error
	}{
		{"bad number", head + "1 0 0\n2 x 1\nEOF\n", 7, tsplib.ErrFormat},
		{"node out of range", head + "1 0 0\n3 1 1\n", 7, tsplib.ErrFormat},
		{"repeated", head + "1 0 0\n1 1 1\n", 7, tsplib.ErrFormat},
		{"too few", head + "1 0 0\nEOF\n", 0, tsplib.ErrFormat},
		{"nan", head + "1 0 0\n2 NaN 1\n", 7, tsplib.ErrFormat},
		{"explicit", "NAME: x\nTYPE: TSP\nDIMENSION: 2\nEDGE_WEIGHT_TYPE: EXPLICIT\n", 4, tsplib.ErrUnsupported},
		{"atsp", "NAME: x\nTYPE: ATSP\n", 2, tsplib.ErrUnsupported},
		{"huge", "DIMENSION: 999999999999\n", 1, tsplib.ErrFormat},
		{"coords before dimension", "NODE_COORD_SECTION\n", 1, tsplib.ErrFormat},
	} {
		t.Run(c.name, func(t *testing.T) {
			_, err := tsplib.Read(strings.NewReader(c.text), "x.tsp")
			var pe *tsplib.ParseError
			if !errors.As(err, &pe) || pe.Line != c.line || !errors.Is(err, c.err) || pe.File != "x.tsp" {
				t.Errorf("Read error %v, want line %d and %v", err, c.line, c.err)
			}
		})
	}
}

func FuzzRead(f *testing.F) {
	for _, name := range []string{"eil51", "berlin52"} {
		b, err := os.ReadFile(filepath.Join(testset.Dir(), name+".tsp"))
		if err != nil {
			f.Fatal(err)
		}
		f.Add(string(b))
	}
	f.Add("DIMENSION : 1\nEDGE_WEIGHT_TYPE : ATT\nNODE_COORD_SECTION\n1 1e3 -2.5\n")
	f.Fuzz(func(t *testing.T, s string) {
		in, err := tsplib.Read(strings.NewReader(s), "fuzz.tsp")
		if err != nil {
			if in != nil {
				t.Fatal("instance and error both returned")
			}
			return
		}
		if len(in.X) != len(in.Y) || in.Len() == 0 {
			t.Fatalf("bad instance: %d x, %d y", len(in.X), len(in.Y))
		}
		tour := make([]int, in.Len())
		for i := range tour {
			tour[i] = i
		}
		_ = in.TourLength(tour)
	})
}

func FuzzReadTour(f *testing.F) {
	b, err := os.ReadFile(filepath.Join(testset.Dir(), "eil51.opt.tour"))
	if err != nil {
		f.Fatal(err)
	}
	f.Add(string(b), 51)
	f.Add("TOUR_SECTION\n2 1 3\n-1\nEOF\n", 3)
	f.Fuzz(func(t *testing.T, s string, n int) {
		if n < 0 || n > 1000 {
			return
		}
		tour, err := tsplib.ReadTour(strings.NewReader(s), "fuzz.tour", n)
		if err != nil {
			return
		}
		seen := make([]bool, n)
		for _, v := range tour {
			if v < 0 || v >= n || seen[v] {
				t.Fatalf("tour %v is not a permutation of 0..%d", tour, n-1)
			}
			seen[v] = true
		}
		if len(tour) != n {
			t.Fatalf("tour of %d nodes, want %d", len(tour), n)
		}
	})
}

// Issue 16: a coordinate of 1e308 passed the reader and was refused by
// the route engine without the file or the line.
func TestReadRefusesHugeCoordinates(t *testing.T) {
	in := "NAME: x\nTYPE: TSP\nDIMENSION: 3\nEDGE_WEIGHT_TYPE: EUC_2D\nNODE_COORD_SECTION\n1 0 0\n2 1e308 5\n3 4 4\nEOF\n"
	_, err := tsplib.Read(strings.NewReader(in), "big.tsp")
	if err == nil || !strings.HasPrefix(err.Error(), "big.tsp:7") || !strings.Contains(err.Error(), "1e308") {
		t.Errorf("Read = %v, want an error naming big.tsp, line 7 and 1e308", err)
	}
}
