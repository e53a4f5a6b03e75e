package planner

import (
	"math"
	"math/rand/v2"
	"testing"

	"github.com/golang/geo/r2"
)

// bruteTravel is the shortest idle travel over every order and
// direction of seg from entry, by enumeration (small seg only).
func bruteTravel(seg []job, entry r2.Point) float64 {
	best := math.Inf(1)
	used := make([]bool, len(seg))
	var walk func(at r2.Point, left int, sofar float64)
	walk = func(at r2.Point, left int, sofar float64) {
		if sofar >= best {
			return
		}
		if left == 0 {
			best = sofar
			return
		}
		for i := range seg {
			if used[i] {
				continue
			}
			used[i] = true
			walk(seg[i].end, left-1, sofar+at.Sub(seg[i].start).Norm())
			walk(seg[i].start, left-1, sofar+at.Sub(seg[i].end).Norm())
			used[i] = false
		}
	}
	walk(entry, len(seg), 0)
	return best
}

// The bound must never exceed the true optimum (found by enumeration),
// or the re-route would skip segments it could shorten.
func TestTravelLowerBoundBelowOptimum(t *testing.T) {
	r := rand.New(rand.NewPCG(1, 2))
	for trial := range 300 {
		n := 1 + trial%7
		seg := make([]job, n)
		for i := range seg {
			a := r2.Point{X: r.Float64() * 20, Y: r.Float64() * 20}
			b := a
			if r.IntN(3) > 0 {
				b = a.Add(r2.Point{X: r.NormFloat64() * 3, Y: r.NormFloat64() * 3})
			}
			seg[i] = job{start: a, end: b}
		}
		entry := r2.Point{X: r.Float64() * 30, Y: r.Float64() * 30}
		lb, opt := travelLowerBound(seg, entry), bruteTravel(seg, entry)
		if lb > opt+1e-9 {
			t.Fatalf("trial %d: bound %.6f above the optimum %.6f", trial, lb, opt)
		}
		if lb < 0 || math.IsNaN(lb) {
			t.Fatalf("trial %d: bound %v", trial, lb)
		}
	}
}

// On a row of equal strokes written one after another from its near
// end, every move is the shortest there is: the bound proves the order
// optimal. Swapping two strokes makes it not so.
func TestTravelOptimalOnARow(t *testing.T) {
	var seg []job
	for i := range 12 {
		x := 3.84 * float64(i)
		seg = append(seg, job{start: r2.Point{X: x, Y: 0}, end: r2.Point{X: x + 0.77, Y: 0}})
	}
	entry := r2.Point{X: -10, Y: 0}
	if !travelOptimal(seg, entry) {
		t.Errorf("row in order: travel %.4f, bound %.4f: want proven optimal", travelLength(seg, entry), travelLowerBound(seg, entry))
	}
	seg[3], seg[7] = seg[7], seg[3]
	if travelOptimal(seg, entry) {
		t.Errorf("row with two strokes swapped proven optimal")
	}
	if got := travelLowerBound(nil, entry); got != 0 {
		t.Errorf("bound of nothing = %v, want 0", got)
	}
}

// firstAbove against a scan, on every start and a spread of thresholds.
func TestMaxTreeFirstAbove(t *testing.T) {
	r := rand.New(rand.NewPCG(3, 4))
	for _, n := range []int{1, 2, 3, 5, 8, 13, 64, 100} {
		vals := make([]float64, n)
		for i := range vals {
			vals[i] = math.Round(r.NormFloat64() * 4)
		}
		tr := newMaxTree(vals)
		for from := 0; from <= n+1; from++ {
			for c := -12.0; c <= 12; c += 0.5 {
				want := n
				for j := max(from, 0); j < n; j++ {
					if vals[j] > c {
						want = j
						break
					}
				}
				if got := tr.firstAbove(from, c); got != want {
					t.Fatalf("n %d: firstAbove(%d, %v) = %d, want %d (%v)", n, from, c, got, want, vals)
				}
			}
		}
	}
}
