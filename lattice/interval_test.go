package lattice

import (
	"math/rand/v2"
	"slices"
	"testing"

	"github.com/golang/geo/r1"
)

func iv(lo, hi float64) r1.Interval { return r1.Interval{Lo: lo, Hi: hi} }

func TestNormalizeAndMergeIntervals(t *testing.T) {
	tests := []struct {
		name string
		in   []r1.Interval
		gap  float64
		want []r1.Interval
	}{
		{"empty", nil, 0, nil},
		{"sorted apart", []r1.Interval{iv(0, 1), iv(2, 3)}, 0, []r1.Interval{iv(0, 1), iv(2, 3)}},
		{"unsorted overlapping", []r1.Interval{iv(2, 5), iv(0, 3), iv(7, 8)}, 0, []r1.Interval{iv(0, 5), iv(7, 8)}},
		{"touching joins", []r1.Interval{iv(0, 1), iv(1, 2)}, 0, []r1.Interval{iv(0, 2)}},
		{"within the gap", []r1.Interval{iv(0, 1), iv(1.5, 2), iv(3, 4)}, 0.5, []r1.Interval{iv(0, 2), iv(3, 4)}},
		{"nested", []r1.Interval{iv(0, 10), iv(2, 3)}, 0, []r1.Interval{iv(0, 10)}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			if got := MergeIntervals(slices.Clone(tc.in), tc.gap); !slices.Equal(got, tc.want) {
				t.Errorf("MergeIntervals(%v, %g) = %v, want %v", tc.in, tc.gap, got, tc.want)
			}
		})
	}
	in := []r1.Interval{iv(3, 3), iv(2, 1), iv(0, 1)}
	if got, want := NormalizeIntervals(in), []r1.Interval{iv(0, 1)}; !slices.Equal(got, want) {
		t.Errorf("NormalizeIntervals drops points and empty intervals: got %v, want %v", got, want)
	}
}

// randomIntervals returns a normalized list with ends on a grid of
// quarters, so that brute force can test the midpoints between them.
func randomIntervals(rng *rand.Rand) []r1.Interval {
	var s []r1.Interval
	for range rng.IntN(6) {
		lo := float64(rng.IntN(80)) / 4
		s = append(s, iv(lo, lo+float64(1+rng.IntN(20))/4))
	}
	return NormalizeIntervals(s)
}

func inList(s []r1.Interval, x float64) bool {
	for _, v := range s {
		if v.Contains(x) {
			return true
		}
	}
	return false
}

// Intersection and difference agree with a point-by-point test at the
// midpoints of the quarter grid (every interval end lies on the grid).
func TestIntersectSubtractAgainstPoints(t *testing.T) {
	rng := rand.New(rand.NewPCG(11, 12))
	for trial := range 500 {
		a, b := randomIntervals(rng), randomIntervals(rng)
		inter := IntersectIntervals(nil, a, b)
		diff := SubtractIntervals(nil, a, b)
		for _, got := range [][]r1.Interval{inter, diff} {
			if !slices.Equal(NormalizeIntervals(slices.Clone(got)), got) && len(got) > 1 {
				// Results may touch (a split at a point of b), never overlap.
				for k := 1; k < len(got); k++ {
					if got[k].Lo < got[k-1].Hi {
						t.Fatalf("trial %d: result %v overlaps", trial, got)
					}
				}
			}
		}
		for x := 0.125; x < 26; x += 0.25 {
			ina, inb := inList(a, x), inList(b, x)
			if inList(inter, x) != (ina && inb) {
				t.Fatalf("trial %d: x=%g: %v ∩ %v = %v", trial, x, a, b, inter)
			}
			if inList(diff, x) != (ina && !inb) {
				t.Fatalf("trial %d: x=%g: %v \\ %v = %v", trial, x, a, b, diff)
			}
		}
	}
}

func TestSearchIntervals(t *testing.T) {
	s := []r1.Interval{iv(0, 1), iv(2, 3), iv(5, 8)}
	tests := []struct {
		x    float64
		want int
	}{{-1, 0}, {0.5, 0}, {1, 0}, {1.5, 1}, {3, 1}, {4, 2}, {8, 2}, {9, 3}}
	for _, tc := range tests {
		if got := SearchIntervals(s, tc.x); got != tc.want {
			t.Errorf("SearchIntervals(%v, %g) = %d, want %d", s, tc.x, got, tc.want)
		}
	}
}
