package units_test

import (
	"fmt"

	"dimerpath/internal/units"
)

func ExampleDuration() {
	for _, s := range []float64{0.0004, 4.531, 59.96, 119.6, 3599.6, 100000} {
		fmt.Println(units.Duration(s))
	}
	// Output:
	// 0.40 ms
	// 4.53 s
	// 1 min 00 s
	// 2 min 00 s
	// 1 h 00 min
	// 27 h 47 min
}

func ExampleClock() {
	fmt.Println(units.Clock(100000))
	// Output: 27:46:40
}

func ExampleProbability() {
	fmt.Println(units.Probability(0.53639, 0))
	fmt.Println(units.Probability(2.37e-14, 0))
	fmt.Println(units.Probability(0, -1429.3))
	fmt.Println(units.ProbabilityRange([2]float64{0.45, 0.6234}, [2]float64{}))
	// Output:
	// 0.536
	// 2.4e−14
	// 5.0e−1430
	// 0.45 to 0.623
}
