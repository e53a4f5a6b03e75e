package planner

import (
	"math"

	"github.com/golang/geo/r2"
)

// The re-route of a segment (reoptimiseSegment) asks the route engine
// for a shorter order of its strokes from the segment's entry. On
// regular layouts such as donor arrays the order the step's route gave
// is nearly always already as short as any can be: on a 300 x 300 array
// 1,089 of 1,114 re-routed segments came back unchanged and 3 were
// taken. A lower bound on the travel of any order proves most of them
// optimal at the cost of a minimum spanning tree of some 30 points,
// against a full engine set-up for each.

// travelLength is the idle travel of writing seg in its order and
// directions from entry: the route engine's objective.
func travelLength(seg []job, entry r2.Point) float64 {
	if len(seg) == 0 {
		return 0
	}
	t := entry.Sub(seg[0].start).Norm()
	for i := 1; i < len(seg); i++ {
		t += seg[i-1].end.Sub(seg[i].start).Norm()
	}
	return t
}

// travelLowerBound is a lower bound on the idle travel of writing seg's
// strokes in any order and directions, starting from entry. Any such
// path of moves joins the entry and every stroke, so its moves hold a
// spanning tree of the graph whose nodes are the entry and the strokes,
// with the nearest distance between their ends as the edge length: the
// travel is at least that graph's minimum spanning tree (Prim's
// algorithm on the complete graph, O(n²)).
func travelLowerBound(seg []job, entry r2.Point) float64 {
	n := len(seg) + 1 // node 0 is the entry, node i the stroke seg[i-1]
	const stackMax = 128
	var keyBuf [stackMax]float64
	var doneBuf [stackMax]bool
	key, done := keyBuf[:0], doneBuf[:0]
	if n > stackMax {
		key, done = make([]float64, 0, n), make([]bool, 0, n)
	}
	key, done = key[:n], done[:n]
	// nearest is the shortest distance between the ends of nodes i < j.
	nearest := func(i, j int) float64 {
		b := &seg[j-1]
		if i == 0 {
			return min(dist2(entry, b.start), dist2(entry, b.end))
		}
		a := &seg[i-1]
		return min(dist2(a.start, b.start), dist2(a.start, b.end), dist2(a.end, b.start), dist2(a.end, b.end))
	}
	for i := range key {
		key[i] = math.Inf(1) // squared distance to the tree
		done[i] = false
	}
	key[0] = 0
	total := 0.0
	for range n {
		v := -1
		for i := range n {
			if !done[i] && (v < 0 || key[i] < key[v]) {
				v = i
			}
		}
		done[v] = true
		total += math.Sqrt(key[v])
		for i := range n {
			if done[i] {
				continue
			}
			var d float64
			if v < i {
				d = nearest(v, i)
			} else {
				d = nearest(i, v)
			}
			key[i] = min(key[i], d)
		}
	}
	return total
}

func dist2(a, b r2.Point) float64 {
	dx, dy := a.X-b.X, a.Y-b.Y
	return dx*dx + dy*dy
}

// travelOptimal reports whether seg's order from entry is as short as
// any order can be, by travelLowerBound (to rounding).
func travelOptimal(seg []job, entry r2.Point) bool {
	t := travelLength(seg, entry)
	return t <= travelLowerBound(seg, entry)+1e-9*max(t, 1)
}
