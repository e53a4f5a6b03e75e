package route_test

import (
	"context"
	"testing"

	"dimerpath/planner/route"
	"dimerpath/planner/route/internal/testset"
)

// Each benchmark solves once per iteration with the default budget and
// reports the quality beside the time: gap% to the published optimum for
// TSPLIB, and the ratio to the nearest-neighbour baseline measured in the
// same run. The full table is `go run ./planner/route/internal/yardstick`.

func BenchmarkSolveTSPLIB(b *testing.B) {
	optima, err := testset.Optima()
	if err != nil {
		b.Fatal(err)
	}
	for _, name := range []string{"pr1002", "fnl4461", "d15112"} {
		in, err := testset.Load(name)
		if err != nil {
			b.Fatal(err)
		}
		p := route.Problem{Items: in.Items(), Closed: true}
		nn, _ := route.Nearest(p)
		b.Run(name, func(b *testing.B) {
			var s route.Solution
			b.ReportAllocs()
			for b.Loop() {
				s, _ = route.Solve(context.Background(), p, route.Options{})
			}
			opt := float64(optima[name])
			b.ReportMetric(float64(in.TourLength(s.Order)), "length")
			b.ReportMetric(100*(float64(in.TourLength(s.Order))-opt)/opt, "gap%")
			b.ReportMetric(100*(float64(in.TourLength(nn.Order))-opt)/opt, "NNgap%")
		})
	}
}

// BenchmarkConstruct times the construction and the first local optimum
// alone (one kick), against the nearest-neighbour baseline.
func BenchmarkConstruct(b *testing.B) {
	for _, n := range []int{10_000, 100_000} {
		p := route.Problem{Items: testset.Uniform(n, 1), Closed: true}
		b.Run("solve/"+itoa(n), func(b *testing.B) {
			var s route.Solution
			for b.Loop() {
				s, _ = route.Solve(context.Background(), p, route.Options{MaxKicks: 1})
			}
			b.ReportMetric(s.Length/float64(n), "len/sqrt(nA)")
		})
		b.Run("nearest/"+itoa(n), func(b *testing.B) {
			var s route.Solution
			for b.Loop() {
				s, _ = route.Nearest(p)
			}
			b.ReportMetric(s.Length/float64(n), "len/sqrt(nA)")
		})
	}
}

func BenchmarkStrokes(b *testing.B) {
	for _, n := range []int{1000, 10_000} {
		p := route.Problem{Items: testset.Strokes(n, 1)}
		nn, _ := route.Nearest(p)
		b.Run(itoa(n), func(b *testing.B) {
			var s route.Solution
			for b.Loop() {
				s, _ = route.Solve(context.Background(), p, route.Options{})
			}
			b.ReportMetric(s.Length, "idle")
			b.ReportMetric(100*(1-s.Length/nn.Length), "gain%")
		})
	}
}

func itoa(n int) string {
	switch {
	case n%1_000_000 == 0:
		return string(rune('0'+n/1_000_000)) + "M"
	case n%1000 == 0 && n < 1_000_000:
		k := n / 1000
		s := ""
		for k > 0 {
			s = string(rune('0'+k%10)) + s
			k /= 10
		}
		return s + "k"
	}
	return "n"
}
