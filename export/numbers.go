package export

import "dimerpath/planner"

// Strokes carry two numbers. Their id (planner.Stroke.ID, from 0) is how
// the plan file and the action CSV refer to them; it follows the order
// the planner made them in, region by region. On paper they are numbered
// from 1 in the order they are written, so an operator reads 1, 2, 3 …
// down the stroke list and across the figures; the plan file and the CSV
// print that number beside the id.

// StrokeNumbers returns each stroke's number on paper, indexed by stroke
// id: its place in writing order, from 1. Writing order is the order of
// the plan's write and dwell actions; a stroke that no action writes
// (never so in a plan the planner made) follows, in the order of its
// segment's stroke list and then of its id. O(strokes + actions).
func StrokeNumbers(p *planner.Plan) []int {
	num := make([]int, len(p.Strokes))
	next := 1
	give := func(id int) {
		if id >= 0 && id < len(num) && num[id] == 0 {
			num[id] = next
			next++
		}
	}
	for _, a := range p.Actions {
		if a.Kind == planner.ActWrite || a.Kind == planner.ActDwell {
			give(a.Stroke)
		}
	}
	for _, s := range p.Segments {
		for _, id := range s.Strokes {
			give(id)
		}
	}
	for id := range num {
		give(id)
	}
	return num
}

// writingOrder returns the stroke ids in writing order: the inverse of
// numbers (as StrokeNumbers returns them).
func writingOrder(numbers []int) []int {
	order := make([]int, len(numbers))
	for id, n := range numbers {
		order[n-1] = id
	}
	return order
}
