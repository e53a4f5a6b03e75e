package route

import (
	"fmt"
	"math"
	"slices"
)

// subSolver orders one group's items from start (nil: anywhere) to end
// (nil: anywhere; only for open paths from a start); share is the
// group's part of what is left of the budget. It returns indices into
// items.
type subSolver func(items []Item, start, end *Point, closed bool, share float64) ([]int, []bool, error)

// groupDAG is the precedence structure between the groups of a problem.
type groupDAG struct {
	ids   []int   // distinct group numbers, ascending
	items [][]int // item indices of each group, by position in ids
	succ  [][]int // positions of the groups that must follow
	indeg []int
}

func newGroupDAG(p Problem) groupDAG {
	var d groupDAG
	pos := map[int]int{}
	for _, g := range p.Group {
		if _, ok := pos[g]; !ok {
			pos[g] = 0
			d.ids = append(d.ids, g)
		}
	}
	slices.Sort(d.ids)
	for i, g := range d.ids {
		pos[g] = i
	}
	d.items = make([][]int, len(d.ids))
	for i, g := range p.Group {
		d.items[pos[g]] = append(d.items[pos[g]], i)
	}
	d.succ = make([][]int, len(d.ids))
	d.indeg = make([]int, len(d.ids))
	seen := map[[2]int]bool{}
	for _, b := range p.Before {
		e := [2]int{pos[b[0]], pos[b[1]]}
		if seen[e] {
			continue
		}
		seen[e] = true
		d.succ[e[0]] = append(d.succ[e[0]], e[1])
		d.indeg[e[1]]++
	}
	return d
}

// groupOrderCheck reports a cycle in p's precedence as an *InputError.
// It assumes the groups named in p.Before exist.
func groupOrderCheck(p Problem) ([]int, error) {
	d := newGroupDAG(p)
	indeg := slices.Clone(d.indeg)
	var ready, done []int
	for i, v := range indeg {
		if v == 0 {
			ready = append(ready, i)
		}
	}
	for len(ready) > 0 {
		g := ready[len(ready)-1]
		ready = ready[:len(ready)-1]
		done = append(done, g)
		for _, h := range d.succ[g] {
			if indeg[h]--; indeg[h] == 0 {
				ready = append(ready, h)
			}
		}
	}
	if len(done) < len(d.ids) {
		var stuck []int
		for i, v := range indeg {
			if v > 0 {
				stuck = append(stuck, d.ids[i])
			}
		}
		return nil, &InputError{Field: "Before", Value: fmt.Sprintf("groups %v", stuck), Err: ErrCycle}
	}
	return done, nil
}

// solveGroups orders p's items with sub. Without groups that is one
// call. With groups it is the greedy method: of the groups whose
// predecessors are all written, take the one with an item end nearest
// to where the tip is (the lowest-numbered first, when there is no start
// yet), order it as an open path from there, and go on from where it
// ends. If sub fails
// (on cancellation), the groups not yet ordered follow in input order
// and the error is returned with the complete ordering, or with nil if
// the failing group had no ordering. The last group of a closed problem
// is solved as a path from where the tip is to the start (or the first
// item's entry), so that the way home is planned with it.
func solveGroups(p Problem, sub subSolver) ([]int, []bool, error) {
	if p.Group == nil {
		return sub(p.Items, p.Start, nil, p.Closed, 1)
	}
	d := newGroupDAG(p)
	indeg := slices.Clone(d.indeg)
	taken := make([]bool, len(d.ids))
	var cur, home *Point
	if p.Start != nil {
		st := *p.Start
		cur, home = &st, &st
	}
	order := make([]int, 0, len(p.Items))
	rev := make([]bool, 0, len(p.Items))
	left := len(p.Items)
	var failed error
	for range d.ids {
		gi := nextGroup(p, d, indeg, taken, cur)
		taken[gi] = true
		for _, h := range d.succ[gi] {
			indeg[h]--
		}
		idx := d.items[gi]
		if failed != nil {
			for _, i := range idx {
				order = append(order, i)
				rev = append(rev, false)
			}
			continue
		}
		items := make([]Item, len(idx))
		for k, i := range idx {
			items[k] = p.Items[i]
		}
		closed := p.Closed && len(d.ids) == 1
		// The last group of a closed problem heads for home.
		var end *Point
		if p.Closed && len(d.ids) > 1 && left == len(idx) {
			end = home
		}
		o, r, err := sub(items, cur, end, closed, float64(len(idx))/float64(left))
		left -= len(idx)
		if o == nil && len(idx) > 0 {
			return nil, nil, err
		}
		failed = err
		for k, j := range o {
			order = append(order, idx[j])
			rev = append(rev, r[k])
		}
		if home == nil && len(order) > 0 {
			it := p.Items[order[0]]
			h := it.A
			if rev[0] {
				h = it.B
			}
			home = &h
		}
		if len(o) > 0 {
			last := p.Items[idx[o[len(o)-1]]]
			end := last.B
			if r[len(r)-1] {
				end = last.A
			}
			cur = &end
		}
	}
	return order, rev, failed
}

// nextGroup picks the next group: among those ready, the one with an
// item end nearest cur, or the lowest-numbered when cur is nil.
// O(items in the ready groups).
func nextGroup(p Problem, d groupDAG, indeg []int, taken []bool, cur *Point) int {
	best, bestD := -1, math.Inf(1)
	for gi := range d.ids {
		if taken[gi] || indeg[gi] > 0 {
			continue
		}
		if cur == nil {
			return gi
		}
		for _, i := range d.items[gi] {
			it := p.Items[i]
			if dd := dist(*cur, it.A); dd < bestD {
				best, bestD = gi, dd
			}
			if !it.OneWay {
				if dd := dist(*cur, it.B); dd < bestD {
					best, bestD = gi, dd
				}
			}
		}
	}
	return best
}
