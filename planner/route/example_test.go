package route_test

import (
	"context"
	"fmt"

	"dimerpath/planner/route"
)

// Four dwell points and two strokes, from a tip parked at the origin.
func ExampleSolve() {
	pt := func(x, y float64) route.Item {
		return route.Item{A: route.Point{X: x, Y: y}, B: route.Point{X: x, Y: y}}
	}
	p := route.Problem{
		Items: []route.Item{
			pt(10, 0),
			{A: route.Point{X: 4, Y: 0}, B: route.Point{X: 2, Y: 0}}, // a stroke given right to left
			pt(1, 0),
			{A: route.Point{X: 6, Y: 0}, B: route.Point{X: 9, Y: 0}},
			pt(5, 0),
		},
		Start:     &route.Point{X: 0, Y: 0},
		MoveSpeed: 100, // nm/s
		SettleS:   0.5, // s per move
	}
	s, err := route.Solve(context.Background(), p, route.Options{})
	if err != nil {
		fmt.Println(err)
		return
	}
	fmt.Println("order:", s.Order)
	fmt.Println("reversed:", s.Reversed)
	fmt.Printf("idle travel %.0f nm, %.2f s\n", s.Length, s.TimeS)
	// Output:
	// order: [2 1 4 3 0]
	// reversed: [false true false false false]
	// idle travel 5 nm, 2.55 s
}

// A closed tour with groups: all of group 1 must come before group 0.
func ExampleSolve_groups() {
	pt := func(x, y float64) route.Item {
		return route.Item{A: route.Point{X: x, Y: y}, B: route.Point{X: x, Y: y}}
	}
	p := route.Problem{
		Items:  []route.Item{pt(0, 1), pt(0, 2), pt(5, 1), pt(5, 2)},
		Group:  []int{0, 0, 1, 1},
		Before: [][2]int{{1, 0}},
		Start:  &route.Point{X: 0, Y: 0},
	}
	s, _ := route.Solve(context.Background(), p, route.Options{})
	fmt.Println("order:", s.Order)
	// Output:
	// order: [2 3 1 0]
}

func ExampleNearest() {
	pt := func(x float64) route.Item { return route.Item{A: route.Point{X: x}, B: route.Point{X: x}} }
	// From 0 the nearest point is 1, which leaves -2 and 5 on either
	// side: 1 + 3 + 7 = 11. Going to -2 first costs 2 + 3 + 4 = 9.
	p := route.Problem{Items: []route.Item{pt(1), pt(-2), pt(5)}, Start: &route.Point{}}
	nn, _ := route.Nearest(p)
	best, _ := route.Solve(context.Background(), p, route.Options{})
	fmt.Println("nearest neighbour:", nn.Order, nn.Length)
	fmt.Println("solve:", best.Order, best.Length)
	// Output:
	// nearest neighbour: [0 1 2] 11
	// solve: [1 0 2] 9
}
