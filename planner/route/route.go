package route

import (
	"context"
	"time"
)

// Point is a position in the caller's length unit (nm in dimerpath).
type Point struct{ X, Y float64 }

// Item is one thing to visit: a point (A == B, or IsPoint) or a stroke
// from A to B that the engine may write in either direction unless
// OneWay is set (OneWay means nothing for a point).
type Item struct {
	A, B   Point
	OneWay bool
}

// IsPoint reports whether the item is a dwell point.
func (it Item) IsPoint() bool { return it.A == it.B }

// Problem is an ordering problem.
type Problem struct {
	Items []Item
	// Start is where the tip is before the first item; nil lets the
	// engine start anywhere.
	Start *Point
	// Closed asks for a tour that returns to its start (without a Start,
	// to where the first item was entered).
	Closed bool
	// Group, when non-nil, gives each item's group (>= 0); the items of a
	// group are visited contiguously.
	Group []int
	// Before lists precedence pairs of groups: every item of group
	// Before[i][0] comes before any item of group Before[i][1].
	Before [][2]int
	// MoveSpeed (units/s) and SettleS (s per move) turn travel into time:
	// a move costs distance/MoveSpeed + SettleS. MoveSpeed 0 costs
	// distance alone.
	MoveSpeed float64
	SettleS   float64
}

// Options control a solve.
type Options struct {
	// Budget bounds the wall-clock time of the Solve call, counted from
	// its start. The construction and the first local optimum always
	// complete, so a large problem may take longer than a short budget
	// (about 4-6 s for 10^6 points). 0 takes DefaultBudget unless MaxKicks
	// is set, and then the search also stops as soon as it has converged
	// (no kick has helped for max(10000, 50 n) kicks, n nodes, nor for as
	// many kicks as came before the last that did), which small problems
	// do in a fraction of a second; a Budget given explicitly is used to
	// the end. A run bounded by wall-clock time depends on the machine's
	// speed; set MaxKicks for a result that depends on Seed alone.
	Budget time.Duration
	// MaxKicks, when > 0, bounds the improvement phase by a count of
	// perturbations instead (shared among groups by size), making the
	// result depend only on the problem and the seed. If Budget is set
	// too, whichever ends first ends the search.
	MaxKicks int
	Seed     int64
	// Progress, when non-nil, is called from the solving goroutine at
	// each phase's end and about every 100 ms while improving.
	Progress func(Progress)
}

// DefaultBudget is the budget when Options.Budget and MaxKicks are 0.
const DefaultBudget = 2 * time.Second

// Progress reports a long solve's state.
type Progress struct {
	Phase string // "construct", "local", "improve"
	// Length is the current idle travel of the group being solved (of
	// the whole problem when it has no groups), in input units.
	Length  float64
	Elapsed time.Duration
	// Fraction is the share of the budget used, 0..1.
	Fraction float64
}

// Solution is an ordering: Order[k] is the input index of the k-th item
// visited and Reversed[k] says whether it is written from B to A.
type Solution struct {
	Order    []int
	Reversed []bool
	// Length is the idle travel (start to first item, between items, and
	// back to the start when Closed), in input units.
	Length float64
	// TimeS is Length/MoveSpeed + SettleS per move (Problem.Moves); the
	// first term is 0 when MoveSpeed is 0.
	TimeS float64
}

// Solver orders problems. Engine is the package's engine and
// NearestNeighbour its baseline; a caller that wants to compare or swap
// them takes a Solver.
type Solver interface {
	Solve(ctx context.Context, p Problem, opt Options) (Solution, error)
}

// Engine is the Solver that calls Solve.
type Engine struct{}

// Solve calls the package's Solve.
func (Engine) Solve(ctx context.Context, p Problem, opt Options) (Solution, error) {
	return Solve(ctx, p, opt)
}

// NearestNeighbour is the Solver that calls Nearest; it ignores the
// options and the context.
type NearestNeighbour struct{}

// Solve calls Nearest.
func (NearestNeighbour) Solve(_ context.Context, p Problem, _ Options) (Solution, error) {
	return Nearest(p)
}

var (
	_ Solver = Engine{}
	_ Solver = NearestNeighbour{}
)

// Solve orders p's items to make the idle travel short. It first checks p
// (see Problem.Validate). Up to 10 items (per group) it returns an exact
// optimum; above that it builds a greedy tour, improves it to a local
// optimum with 2-opt and Or-opt, then perturbs and re-optimises it until
// opt's budget is spent (see the package documentation for the methods
// and their sources). The construction and the first local optimum
// always complete; the budget, counted from the call, bounds the
// improvement after them.
//
// If ctx is cancelled Solve returns ctx.Err() together with the best
// ordering found so far, or an empty Solution if none was complete yet.
//
// Time: O(n log n) to build, then about O(n) per pass of local search;
// memory O(n).
func Solve(ctx context.Context, p Problem, opt Options) (Solution, error) {
	if err := p.Validate(); err != nil {
		return Solution{}, err
	}
	c := newControl(ctx, p, opt)
	order, rev, err := solveGroups(p, c.solve)
	if order == nil {
		return Solution{}, err
	}
	return p.solution(order, rev), err
}

// Nearest orders p's items by the nearest-neighbour rule: from the start
// (or the first item), go to the nearest end of any item not yet written,
// write it from there, repeat. Groups are taken in the same order as by
// Solve. It is the baseline Solve is measured against. O(n log n).
func Nearest(p Problem) (Solution, error) {
	if err := p.Validate(); err != nil {
		return Solution{}, err
	}
	order, rev, _ := solveGroups(p, func(items []Item, start, _ *Point, closed bool, share float64) ([]int, []bool, error) {
		o, r := nearestOrder(items, start)
		return o, r, nil
	})
	return p.solution(order, rev), nil
}

// Evaluate returns the Solution for visiting p's items in the given
// order and directions, with its Length and TimeS. It panics if the
// slices differ in length or an index is out of range.
func (p Problem) Evaluate(order []int, reversed []bool) Solution {
	if len(order) != len(reversed) {
		panic("route: Evaluate: order and reversed differ in length")
	}
	return p.solution(append([]int(nil), order...), append([]bool(nil), reversed...))
}

// Moves is the number of tip moves an ordering of p makes: between
// items, from the start to the first item when p has a start, and back
// to the start (or the first item) when p is closed.
func (p Problem) Moves() int {
	n := len(p.Items)
	if n == 0 {
		return 0
	}
	m := n - 1
	if p.Start != nil {
		m++
	}
	if p.Closed {
		m++
	}
	return m
}

func (p Problem) solution(order []int, rev []bool) Solution {
	s := Solution{Order: order, Reversed: rev}
	var cur *Point
	if p.Start != nil {
		st := *p.Start
		cur = &st
	}
	var home *Point
	for k, i := range order {
		it := p.Items[i]
		in, out := it.A, it.B
		if rev[k] {
			in, out = out, in
		}
		if cur != nil {
			s.Length += dist(*cur, in)
		}
		if home == nil {
			h := in
			if p.Start != nil {
				h = *p.Start
			}
			home = &h
		}
		cur = &out
	}
	if p.Closed && cur != nil && home != nil {
		s.Length += dist(*cur, *home)
	}
	if p.MoveSpeed > 0 {
		s.TimeS = s.Length / p.MoveSpeed
	}
	s.TimeS += p.SettleS * float64(p.Moves())
	return s
}
