package route

import (
	"context"
	"time"
)

// Point is a position in the caller's length unit (nm in dimerpath).
type Point struct{ X, Y float64 }

// Item is one thing to visit: a point (A == B, or IsPoint) or a stroke
// from A to B that the engine may write in either direction unless
// OneWay is set.
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
	// Closed asks for a tour that returns to its start.
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
	// Budget bounds the improvement phase by wall-clock time; 0 takes
	// DefaultBudget. A run that hits a wall-clock budget depends on the
	// machine's speed; set MaxKicks for a result that depends on Seed alone.
	Budget time.Duration
	// MaxKicks, when > 0, bounds the improvement phase by a count of
	// perturbations instead, making the result depend only on the seed.
	MaxKicks int
	Seed     int64
	// Progress, when non-nil, is called from the solving goroutine now
	// and then.
	Progress func(Progress)
}

// DefaultBudget is the improvement budget when Options.Budget is 0.
const DefaultBudget = 2 * time.Second

// Progress reports a long solve's state.
type Progress struct {
	Phase   string // "construct", "local", "improve"
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
	// TimeS is Length/MoveSpeed + SettleS per move.
	TimeS float64
}

// Solve orders p's items. It returns ctx.Err() if cancelled.
//
// This placeholder keeps input order; the real engine replaces it.
func Solve(ctx context.Context, p Problem, opt Options) (Solution, error) {
	n := len(p.Items)
	s := Solution{Order: make([]int, n), Reversed: make([]bool, n)}
	for i := range s.Order {
		s.Order[i] = i
	}
	return s, ctx.Err()
}
