package route_test

import (
	"context"
	"errors"
	"fmt"
	"math"
	"math/rand/v2"
	"testing"

	"dimerpath/planner/route"
)

// bruteForce returns the shortest idle travel over every order and every
// direction of the reversible strokes: the exact optimum by enumeration,
// independent of the engine (it scores with Problem.Evaluate, which
// TestEvaluate checks by hand).
func bruteForce(p route.Problem) float64 {
	n := len(p.Items)
	perm := make([]int, n)
	for i := range perm {
		perm[i] = i
	}
	rev := make([]bool, n)
	best := math.Inf(1)
	var dirs func(k int)
	dirs = func(k int) {
		if k == n {
			best = min(best, p.Evaluate(perm, rev).Length)
			return
		}
		rev[k] = false
		dirs(k + 1)
		it := p.Items[perm[k]]
		if !it.IsPoint() && !it.OneWay {
			rev[k] = true
			dirs(k + 1)
			rev[k] = false
		}
	}
	var permute func(k int)
	permute = func(k int) {
		if k == n {
			dirs(0)
			return
		}
		for i := k; i < n; i++ {
			perm[k], perm[i] = perm[i], perm[k]
			permute(k + 1)
			perm[k], perm[i] = perm[i], perm[k]
		}
	}
	permute(0)
	return best
}

func randomItems(r *rand.Rand, n int, strokes, oneWay bool) []route.Item {
	items := make([]route.Item, n)
	for i := range items {
		a := route.Point{X: r.Float64() * 100, Y: r.Float64() * 100}
		b := a
		if strokes && r.IntN(3) > 0 {
			b = route.Point{X: a.X + r.Float64()*30 - 15, Y: a.Y + r.Float64()*30 - 15}
		}
		items[i] = route.Item{A: a, B: b, OneWay: oneWay && !strokes == false && r.IntN(3) == 0 && a != b}
	}
	return items
}

type smallCase struct {
	name            string
	n               int
	strokes, oneWay bool
	closed, start   bool
}

func smallCases(maxPoints, maxStrokes int) []smallCase {
	var cs []smallCase
	for _, kind := range []struct {
		strokes, oneWay bool
		max             int
	}{{false, false, maxPoints}, {true, false, maxStrokes}, {true, true, maxStrokes}} {
		for n := 1; n <= kind.max; n++ {
			for _, closed := range []bool{false, true} {
				for _, start := range []bool{false, true} {
					cs = append(cs, smallCase{
						name: fmt.Sprintf("n=%d/strokes=%v/oneway=%v/closed=%v/start=%v", n, kind.strokes, kind.oneWay, closed, start),
						n:    n, strokes: kind.strokes, oneWay: kind.oneWay, closed: closed, start: start,
					})
				}
			}
		}
	}
	return cs
}

func (c smallCase) problem(seed uint64) route.Problem {
	r := rand.New(rand.NewPCG(seed, uint64(c.n)))
	p := route.Problem{Items: randomItems(r, c.n, c.strokes, c.oneWay), Closed: c.closed}
	if c.start {
		p.Start = &route.Point{X: r.Float64() * 100, Y: r.Float64() * 100}
	}
	return p
}

// checkValid fails t unless s visits every item of p exactly once, in one
// direction, one-way strokes forwards, and its Length and TimeS are those
// of its order.
func checkValid(t *testing.T, p route.Problem, s route.Solution) {
	t.Helper()
	if len(s.Order) != len(p.Items) || len(s.Reversed) != len(p.Items) {
		t.Fatalf("Solve: %d orders, %d directions for %d items", len(s.Order), len(s.Reversed), len(p.Items))
	}
	seen := make([]bool, len(p.Items))
	for k, i := range s.Order {
		if i < 0 || i >= len(p.Items) || seen[i] {
			t.Fatalf("Solve: item %d visited twice or out of range (position %d)", i, k)
		}
		seen[i] = true
		if s.Reversed[k] && p.Items[i].OneWay {
			t.Fatalf("Solve: one-way item %d written backwards", i)
		}
	}
	e := p.Evaluate(s.Order, s.Reversed)
	if math.Abs(e.Length-s.Length) > 1e-9*max(1, e.Length) || math.Abs(e.TimeS-s.TimeS) > 1e-9*max(1, e.TimeS) {
		t.Fatalf("Solve: Length %v TimeS %v, its order gives %v %v", s.Length, s.TimeS, e.Length, e.TimeS)
	}
}

// TestSolveExact checks Solve against brute-force enumeration on every
// small configuration: points up to 9, strokes up to 7.
func TestSolveExact(t *testing.T) {
	for _, c := range smallCases(9, 7) {
		t.Run(c.name, func(t *testing.T) {
			for seed := range uint64(3) {
				p := c.problem(seed)
				s, err := route.Solve(context.Background(), p, route.Options{MaxKicks: 100})
				if err != nil {
					t.Fatal(err)
				}
				checkValid(t, p, s)
				if want := bruteForce(p); math.Abs(s.Length-want) > 1e-9*max(1, want) {
					t.Errorf("seed %d: Solve length %v, brute force %v", seed, s.Length, want)
				}
			}
		})
	}
}

// TestHeuristicSmall sends the small problems through the heuristic
// (construction, local search, kicks) instead of the exact solver, and
// checks it against brute force too.
func TestHeuristicSmall(t *testing.T) {
	defer route.SetExactMax(0)()
	worse, total := 0, 0
	for _, c := range smallCases(9, 7) {
		t.Run(c.name, func(t *testing.T) {
			for seed := range uint64(3) {
				p := c.problem(seed)
				s, err := route.Solve(context.Background(), p, route.Options{MaxKicks: 300, Seed: int64(seed)})
				if err != nil {
					t.Fatal(err)
				}
				checkValid(t, p, s)
				want := bruteForce(p)
				total++
				if s.Length > want*(1+1e-9)+1e-9 {
					worse++
					t.Logf("seed %d: heuristic %v, optimum %v (%.2f%% above)", seed, s.Length, want, 100*(s.Length/want-1))
				}
				if s.Length < want*(1-1e-9)-1e-9 {
					t.Errorf("seed %d: heuristic %v below the brute-force optimum %v", seed, s.Length, want)
				}
			}
		})
	}
	if worse > 0 {
		t.Errorf("heuristic above the optimum on %d of %d small problems", worse, total)
	}
}

// TestEvaluate checks lengths and times against a hand computation.
func TestEvaluate(t *testing.T) {
	st := route.Point{X: 0, Y: 0}
	p := route.Problem{
		Items: []route.Item{
			{A: route.Point{X: 3, Y: 4}, B: route.Point{X: 3, Y: 4}},  // point
			{A: route.Point{X: 6, Y: 8}, B: route.Point{X: 6, Y: 10}}, // stroke of length 2
		},
		Start: &st, MoveSpeed: 5, SettleS: 0.5,
	}
	// start -> (3,4): 5; (3,4) -> B (6,10): sqrt(9+36); write to A (6,8).
	want := 5 + math.Sqrt(45)
	s := p.Evaluate([]int{0, 1}, []bool{false, true})
	if math.Abs(s.Length-want) > 1e-12 {
		t.Errorf("Evaluate length %v, want %v", s.Length, want)
	}
	if wantT := want/5 + 2*0.5; math.Abs(s.TimeS-wantT) > 1e-12 {
		t.Errorf("Evaluate time %v, want %v", s.TimeS, wantT)
	}
	p.Closed = true // back from (6,8) to the start: 10
	if s := p.Evaluate([]int{0, 1}, []bool{false, true}); math.Abs(s.Length-(want+10)) > 1e-12 {
		t.Errorf("closed Evaluate length %v, want %v", s.Length, want+10)
	}
}

func TestValidate(t *testing.T) {
	pt := route.Item{A: route.Point{X: 1, Y: 1}, B: route.Point{X: 1, Y: 1}}
	nan := math.NaN()
	for _, c := range []struct {
		name  string
		p     route.Problem
		field string
		err   error
	}{
		{"nan x", route.Problem{Items: []route.Item{pt, {A: route.Point{X: nan}}}}, "Items[1].A.X", route.ErrNotFinite},
		{"inf start", route.Problem{Items: []route.Item{pt}, Start: &route.Point{Y: math.Inf(1)}}, "Start.Y", route.ErrNotFinite},
		{"huge", route.Problem{Items: []route.Item{pt, {A: route.Point{X: 1, Y: 2}, B: route.Point{X: 1, Y: -1e200}}}}, "Items[1].B.Y", route.ErrRange},
		{"huge start", route.Problem{Items: []route.Item{pt}, Start: &route.Point{X: 2e15}}, "Start.X", route.ErrRange},
		{"negative speed", route.Problem{Items: []route.Item{pt}, MoveSpeed: -1}, "MoveSpeed", route.ErrNegative},
		{"negative settle", route.Problem{Items: []route.Item{pt}, SettleS: -1}, "SettleS", route.ErrNegative},
		{"group length", route.Problem{Items: []route.Item{pt, pt}, Group: []int{0}}, "Group", route.ErrGroup},
		{"negative group", route.Problem{Items: []route.Item{pt}, Group: []int{-2}}, "Group[0]", route.ErrGroup},
		{"unknown group", route.Problem{Items: []route.Item{pt}, Group: []int{0}, Before: [][2]int{{0, 7}}}, "Before[0]", route.ErrGroup},
		{"before without groups", route.Problem{Items: []route.Item{pt}, Before: [][2]int{{0, 1}}}, "Before", route.ErrGroup},
		{"cycle", route.Problem{Items: []route.Item{pt, pt, pt}, Group: []int{0, 1, 2}, Before: [][2]int{{0, 1}, {1, 2}, {2, 0}}}, "Before", route.ErrCycle},
		{"self", route.Problem{Items: []route.Item{pt}, Group: []int{0}, Before: [][2]int{{0, 0}}}, "Before[0]", route.ErrCycle},
	} {
		t.Run(c.name, func(t *testing.T) {
			_, err := route.Solve(context.Background(), c.p, route.Options{MaxKicks: 1})
			var ie *route.InputError
			if !errors.As(err, &ie) || ie.Field != c.field || !errors.Is(err, c.err) {
				t.Errorf("Solve error %v, want field %s and %v", err, c.field, c.err)
			}
		})
	}
}

// TestGroups checks contiguity and precedence on random grouped problems
// of points, reversible and one-way strokes.
func TestGroups(t *testing.T) {
	for _, n := range []int{5, 40, 400, 3000, -40, -3000} {
		closed := n < 0
		n = max(n, -n)
		t.Run(fmt.Sprintf("n=%d/closed=%v", n, closed), func(t *testing.T) {
			r := rand.New(rand.NewPCG(uint64(n), 9))
			p := route.Problem{Items: randomItems(r, n, true, true), Group: make([]int, n), Closed: closed}
			for i := range p.Group {
				p.Group[i] = r.IntN(5) * 10
			}
			p.Group[0], p.Group[1], p.Group[2], p.Group[3], p.Group[4] = 0, 10, 20, 30, 40
			p.Before = [][2]int{{40, 0}, {0, 30}, {20, 30}}
			p.Start = &route.Point{X: 50, Y: 50}
			s, err := route.Solve(context.Background(), p, route.Options{MaxKicks: 2000})
			if err != nil {
				t.Fatal(err)
			}
			checkValid(t, p, s)
			pos := map[int][2]int{} // group -> first and last position
			done := map[int]bool{}
			prev := -1
			for k, i := range s.Order {
				g := p.Group[i]
				if g != prev && done[g] {
					t.Fatalf("group %d not contiguous (again at position %d)", g, k)
				}
				if g != prev {
					done[g] = true
					pos[g] = [2]int{k, k}
				}
				pos[g] = [2]int{pos[g][0], k}
				prev = g
			}
			for _, b := range p.Before {
				if pos[b[0]][1] > pos[b[1]][0] {
					t.Errorf("group %d must come before group %d: positions %v, %v", b[0], b[1], pos[b[0]], pos[b[1]])
				}
			}
		})
	}
}

// TestValidLarge checks the invariants on larger mixed problems, open and
// closed, with and without a start, and that the engine beats the
// nearest-neighbour baseline.
func TestValidLarge(t *testing.T) {
	for _, n := range []int{11, 12, 50, 1000, 5000} {
		for _, closed := range []bool{false, true} {
			for _, start := range []bool{false, true} {
				for _, oneWay := range []bool{false, true} {
					t.Run(fmt.Sprintf("n=%d/closed=%v/start=%v/oneway=%v", n, closed, start, oneWay), func(t *testing.T) {
						r := rand.New(rand.NewPCG(uint64(n), 3))
						p := route.Problem{Items: randomItems(r, n, true, oneWay), Closed: closed, MoveSpeed: 10, SettleS: 0.01}
						if start {
							p.Start = &route.Point{X: -5, Y: 50}
						}
						s, err := route.Solve(context.Background(), p, route.Options{MaxKicks: min(2*n, 1000)})
						if err != nil {
							t.Fatal(err)
						}
						checkValid(t, p, s)
						nn, _ := route.Nearest(p)
						checkValid(t, p, nn)
						if s.Length > nn.Length {
							t.Errorf("Solve %v longer than nearest neighbour %v", s.Length, nn.Length)
						}
					})
				}
			}
		}
	}
}

// TestSpatialOrder runs mixed problems through the Hilbert renumbering
// (normally only above 1,000 nodes) and checks the invariants and the
// exact optimum where it is known.
func TestSpatialOrder(t *testing.T) {
	defer route.SetSpatialOrderMin(0)()
	for _, c := range smallCases(0, 7) {
		if c.n < 6 {
			continue
		}
		t.Run(c.name, func(t *testing.T) {
			defer route.SetExactMax(0)()
			p := c.problem(11)
			s, err := route.Solve(context.Background(), p, route.Options{MaxKicks: 300})
			if err != nil {
				t.Fatal(err)
			}
			checkValid(t, p, s)
			if want := bruteForce(p); s.Length > want*(1+1e-9)+1e-9 {
				t.Errorf("length %v, optimum %v", s.Length, want)
			}
		})
	}
	r := rand.New(rand.NewPCG(8, 8))
	p := route.Problem{Items: randomItems(r, 3000, true, true), Start: &route.Point{X: 1, Y: 2}, Group: make([]int, 3000), Before: [][2]int{{1, 0}}}
	for i := range p.Group {
		p.Group[i] = i % 2
	}
	s, err := route.Solve(context.Background(), p, route.Options{MaxKicks: 3000})
	if err != nil {
		t.Fatal(err)
	}
	checkValid(t, p, s)
	if p.Group[s.Order[0]] != 1 || p.Group[s.Order[len(s.Order)-1]] != 0 {
		t.Error("group 1 must come first")
	}
}

func TestDeterministic(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 2))
	for _, p := range []route.Problem{
		{Items: randomItems(r, 500, true, false)},
		// Points, closed: the Lin-Kernighan search on α candidates.
		{Items: randomItems(r, 1500, false, false), Closed: true},
		// One-way strokes: the single deep moves on nearest neighbours.
		{Items: randomItems(r, 500, true, true)},
	} {
		a, _ := route.Solve(context.Background(), p, route.Options{MaxKicks: 3000, Seed: 7})
		b, _ := route.Solve(context.Background(), p, route.Options{MaxKicks: 3000, Seed: 7})
		if fmt.Sprint(a.Order, a.Reversed) != fmt.Sprint(b.Order, b.Reversed) {
			t.Errorf("%d items: Solve with the same seed and MaxKicks gave different orders", len(p.Items))
		}
	}
}

func TestCancel(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 2))
	p := route.Problem{Items: randomItems(r, 2000, false, false)}
	ctx, cancel := context.WithCancel(context.Background())
	calls := 0
	s, err := route.Solve(ctx, p, route.Options{MaxKicks: 1 << 30, Progress: func(pr route.Progress) {
		calls++
		if pr.Phase == "improve" {
			cancel()
		}
	}})
	if !errors.Is(err, context.Canceled) {
		t.Fatalf("Solve after cancel: error %v, want context.Canceled", err)
	}
	if calls == 0 {
		t.Error("no progress reported")
	}
	checkValid(t, p, s) // the best ordering so far comes with the error
	cancel()
	if _, err := route.Solve(ctx, p, route.Options{}); !errors.Is(err, context.Canceled) {
		t.Errorf("Solve on a cancelled context: %v", err)
	}
}
