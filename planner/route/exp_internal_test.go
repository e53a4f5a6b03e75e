package route

import (
	"os"
	"testing"
	"time"

	"bufio"
	"math/rand/v2"
	"math"
	"context"
	"slices"
	"strconv"
	"strings"
)

func loadExp(t *testing.T, name string) []Item {
	b, err := os.ReadFile("../../testdata/tsplib/" + name + ".tsp")
	if err != nil {
		t.Fatal(err)
	}
	var items []Item
	in := false
	sc := bufio.NewScanner(strings.NewReader(string(b)))
	for sc.Scan() {
		l := strings.TrimSpace(sc.Text())
		if l == "NODE_COORD_SECTION" {
			in = true
			continue
		}
		if !in || l == "EOF" || l == "" {
			continue
		}
		f := strings.Fields(l)
		x, _ := strconv.ParseFloat(f[1], 64)
		y, _ := strconv.ParseFloat(f[2], 64)
		items = append(items, Item{A: Point{x, y}, B: Point{x, y}})
	}
	return items
}

func loadTour(t *testing.T, name string) []int {
	b, err := os.ReadFile("../../testdata/tsplib/" + name + ".opt.tour")
	if err != nil {
		t.Fatal(err)
	}
	var tour []int
	in := false
	for _, l := range strings.Split(string(b), "\n") {
		l = strings.TrimSpace(l)
		if l == "TOUR_SECTION" {
			in = true
			continue
		}
		if !in {
			continue
		}
		for _, f := range strings.Fields(l) {
			v, err := strconv.Atoi(f)
			if err != nil || v < 0 {
				return tour
			}
			tour = append(tour, v-1)
		}
	}
	return tour
}

func TestExpAlpha(t *testing.T) {
	for _, name := range []string{"pr1002", "pcb442", "a280"} {
		items := loadExp(t, name)
		g := newGraph(items, nil, nil, false)
		nb := buildNeighbours(g, 10, false)
		tour := greedyTour(g, nb)
		opt := loadTour(t, name)
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
	items := loadExp(t, name)
	t0 := time.Now()
	s, err := Solve(context.Background(), Problem{Items: items, Closed: true}, Options{Seed: 1, MaxKicks: envInt("RX_KICKS", 0), Budget: time.Duration(envInt("RX_BUDGET_MS", 0)) * time.Millisecond})
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

func TestExpLKKeepsTour(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 1))
	for trial := range 200 {
		n := 20 + r.IntN(60)
		items := randomItems(r, n, 0, 10)
		g := newGraph(items, nil, nil, false)
		nb := buildNeighbours(g, 8, false)
		order := r.Perm(n)
		rev := make([]bool, n)
		s := newSolver(g, nb, g.tourFromOrder(order, rev))
		s.useLK = true
		for range 100 {
			v := int32(r.IntN(int(s.n)))
			before := s.tourLength()
			l0 := s.length
			if s.lkSearch(v) {
				after := s.tourLength()
				if math.Abs(after-before-(s.length-l0)) > 1e-6 {
					t.Fatalf("trial %d: predicted %v real %v", trial, s.length-l0, after-before)
				}
				if after > before {
					t.Fatalf("worse")
				}
			} else if math.Abs(s.tourLength()-before) > 1e-9 || s.length != l0 {
				t.Fatalf("trial %d: failed search changed the tour", trial)
			}
			if err := tourError(s); err != "" {
				t.Fatal(err)
			}
		}
	}
}
