package route

import "math"

// exactMax is the largest number of items solved exactly (a variable so
// that tests can send small problems through the heuristic).
var exactMax = 10

// solveExact orders up to exactMax items optimally by dynamic programming
// over subsets (Held & Karp 1962, "A dynamic programming approach to
// sequencing problems", J. SIAM 10(1); Bellman 1962), with each stroke's
// direction as part of the state: O(2^n n^2) time and O(2^n n) memory.
//
// With end set (and closed false) the path must finish there: its last
// move, from the last item to end, is counted.
func solveExact(items []Item, start, end *Point, closed bool) (order []int, reversed []bool) {
	n := len(items)
	if n == 0 {
		return nil, nil
	}
	// entry/exit of item i written in direction o (0: A to B, 1: B to A).
	entry := func(i, o int) Point {
		if o == 0 {
			return items[i].A
		}
		return items[i].B
	}
	exit := func(i, o int) Point { return entry(i, 1-o) }
	dirs := func(i int) int {
		if items[i].IsPoint() || items[i].OneWay {
			return 1
		}
		return 2
	}
	full := 1<<n - 1
	size := (full + 1) * n * 2
	dp := make([]float64, size)
	from := make([]int16, size) // previous (item*2+dir), -1 at the first item
	at := func(set, i, o int) int { return (set*n+i)*2 + o }
	bestC := math.Inf(1)
	// run fills the table for paths that begin with item first0 written
	// in direction dir0 (or any item, when first0 < 0) and keeps the
	// best complete ordering.
	run := func(first0, dir0 int, home *Point) {
		for i := range dp {
			dp[i] = math.Inf(1)
		}
		for i := range n {
			if first0 >= 0 && i != first0 {
				continue
			}
			for o := range dirs(i) {
				if first0 >= 0 && o != dir0 {
					continue
				}
				c := 0.0
				if start != nil {
					c = dist(*start, entry(i, o))
				}
				dp[at(1<<i, i, o)] = c
				from[at(1<<i, i, o)] = -1
			}
		}
		for set := 1; set <= full; set++ {
			for i := range n {
				if set&(1<<i) == 0 {
					continue
				}
				for o := range dirs(i) {
					c := dp[at(set, i, o)]
					if math.IsInf(c, 1) {
						continue
					}
					x := exit(i, o)
					for j := range n {
						if set&(1<<j) != 0 {
							continue
						}
						for oj := range dirs(j) {
							nc := c + dist(x, entry(j, oj))
							k := at(set|1<<j, j, oj)
							if nc < dp[k] {
								dp[k] = nc
								from[k] = int16(i*2 + o)
							}
						}
					}
				}
			}
		}
		bestI, bestO := -1, -1
		for i := range n {
			for o := range dirs(i) {
				c := dp[at(full, i, o)]
				if home != nil {
					c += dist(exit(i, o), *home)
				}
				if c < bestC {
					bestC, bestI, bestO = c, i, o
				}
			}
		}
		if bestI < 0 {
			return
		}
		order, reversed = order[:0], reversed[:0]
		set, i, o := full, bestI, bestO
		for {
			order = append(order, i)
			reversed = append(reversed, o == 1)
			f := from[at(set, i, o)]
			set &^= 1 << i
			if f < 0 {
				break
			}
			i, o = int(f)/2, int(f)%2
		}
		for l, r := 0, len(order)-1; l < r; l, r = l+1, r-1 {
			order[l], order[r] = order[r], order[l]
			reversed[l], reversed[r] = reversed[r], reversed[l]
		}
	}
	order = make([]int, 0, n)
	reversed = make([]bool, 0, n)
	switch {
	case end != nil:
		run(-1, 0, end)
	case !closed:
		run(-1, 0, nil)
	case start != nil:
		run(-1, 0, start)
	default:
		// A closed tour without a start may begin at item 0, in either
		// direction; it returns to where item 0 was entered.
		for o := range dirs(0) {
			home := entry(0, o)
			run(0, o, &home)
		}
	}
	return order, reversed
}

func dist(a, b Point) float64 {
	dx, dy := a.X-b.X, a.Y-b.Y
	return math.Sqrt(dx*dx + dy*dy)
}
