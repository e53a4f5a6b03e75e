package route

import "testing"

// BenchmarkNeighbourLists times buildNeighbours on the stroke ends of a
// 300 x 300 window array (two ends per window, as the planner's route
// of a large array: k = 8, no quadrants).
func BenchmarkNeighbourLists(b *testing.B) {
	const side = 300
	items := make([]Item, 0, side*side)
	for i := range side * side {
		x, y := float64(i%side)*3.1, float64(i/side)*2.3
		items = append(items, Item{A: Point{X: x, Y: y}, B: Point{X: x + 0.77, Y: y}})
	}
	g := newGraph(items, nil, nil, true).spatiallyOrdered()
	b.ResetTimer()
	for range b.N {
		buildNeighbours(g, 8, false)
	}
}
