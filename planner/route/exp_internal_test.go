package route

import (
	"os"
	"testing"
	"time"

	"context"
	"math"
	"math/rand/v2"
	"slices"
)

func TestExpAlpha(t *testing.T) {
	for _, name := range []string{"pr1002", "pcb442", "a280"} {
		items := loadTestTSPLIB(t, name)
		g := newGraph(items, nil, nil, false)
		nb := buildNeighbours(g, 10, false)
		tour := greedyTour(g, nb)
		opt := loadTestTour(t, name)
		for _, iters := range []int{0, 20, 50, 100, 300} {
			t0 := time.Now()
			pool := buildPool(g, 10, 2)
			sg := newSparseGraph(g, pool, tour)
			upper := 0.0
			for i, v := range tour {
				upper += g.d(v, tour[(i+1)%len(tour)])
			}
			_, w, _, _ := ascend(sg, g.n(), upper, iters)
			cand := alphaCandidates(g, pool, tour, 5, iters)
			el := time.Since(t0)
			miss, missNN := 0, 0
			for i, a := range opt {
				b := opt[(i+1)%len(opt)]
				ids, _ := cand.list(int32(a))
				ids2, _ := cand.list(int32(b))
				if !slices.Contains(ids, int32(b)) && !slices.Contains(ids2, int32(a)) {
					miss++
				}
				ids, _ = nb.list(int32(a))
				ids2, _ = nb.list(int32(b))
				if !slices.Contains(ids[:5], int32(b)) && !slices.Contains(ids2[:5], int32(a)) {
					missNN++
				}
			}
			optLen := 0.0
			for i, a := range opt {
				optLen += g.d(int32(a), int32(opt[(i+1)%len(opt)]))
			}
			t.Logf("%s iters %d: bound %.4f of opt, opt edges missing from alpha-5 %d, from 5-NN %d, %v", name, iters, w/optLen, miss, missNN, el)
		}
	}
}

func TestExpProfile(t *testing.T) {
	name := os.Getenv("RX_NAME")
	if name == "" {
		t.Skip()
	}
	items := loadTestTSPLIB(t, name)
	t0 := time.Now()
	s, err := Solve(context.Background(), Problem{Items: items, Closed: true}, Options{Seed: int64(envInt("RX_SEED", 1)), MaxKicks: envInt("RX_KICKS", 0), Budget: time.Duration(envInt("RX_BUDGET_MS", 0)) * time.Millisecond})
	defer func() { t.Logf("wall %v", time.Since(t0)) }()
	if err != nil {
		t.Fatal(err)
	}
	rl := 0
	for k, i := range s.Order {
		a := items[i].A
		b := items[s.Order[(k+1)%len(s.Order)]].A
		rl += int(math.Sqrt((a.X-b.X)*(a.X-b.X)+(a.Y-b.Y)*(a.Y-b.Y)) + 0.5)
	}
	t.Logf("%s: %d", name, rl)
}

func expStrokes(n int, seed uint64) []Item {
	r := rand.New(rand.NewPCG(seed, 0x57c0))
	side := math.Sqrt(float64(n))
	items := make([]Item, n)
	for i := range items {
		mx, my := r.Float64()*side, r.Float64()*side
		l := 0.5 + r.Float64()
		a := r.Float64() * 2 * math.Pi
		dx, dy := l/2*math.Cos(a), l/2*math.Sin(a)
		items[i] = Item{A: Point{X: mx - dx, Y: my - dy}, B: Point{X: mx + dx, Y: my + dy}}
	}
	return items
}

func TestExpStrokes(t *testing.T) {
	n := envInt("RX_STROKES", 0)
	if n == 0 {
		t.Skip()
	}
	inst := uint64(envInt("RX_INST", 1))
	items := expStrokes(n, inst)
	s, err := Solve(context.Background(), Problem{Items: items}, Options{Seed: int64(envInt("RX_SEED", 1)), MaxKicks: envInt("RX_KICKS", 0), Budget: time.Duration(envInt("RX_BUDGET_MS", 0)) * time.Millisecond})
	if err != nil {
		t.Fatal(err)
	}
	t.Logf("strokes %d inst %d: %.3f", n, inst, s.Length)
}

func TestExpUniform(t *testing.T) {
	n := envInt("RX_UNIFORM", 0)
	if n == 0 {
		t.Skip()
	}
	r := rand.New(rand.NewPCG(1, 0x5eed))
	side := math.Sqrt(float64(n))
	items := make([]Item, n)
	for i := range items {
		p := Point{X: r.Float64() * side, Y: r.Float64() * side}
		items[i] = Item{A: p, B: p}
	}
	t0 := time.Now()
	s, _ := Solve(context.Background(), Problem{Items: items, Closed: true}, Options{Seed: 1, Budget: time.Duration(envInt("RX_BUDGET_MS", 0)) * time.Millisecond})
	t.Logf("uniform %d: %.4f in %v (cpu %v)", n, s.Length/float64(n), time.Since(t0), cpuNow())
}
