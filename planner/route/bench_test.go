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

// smallArrayProblems are problems like the planner's per-segment
// re-route of a window array: ~33 short strokes on a lattice of window
// sites, a start, an open path.
func smallArrayProblems(count int) []route.Problem {
	ps := make([]route.Problem, count)
	for i := range ps {
		// A deterministic scatter of windows 7.68 nm apart, four strokes each.
		var items []route.Item
		w := 0
		for len(items) < 33 {
			x, y := float64(w%4)*7.68, float64(w/4)*7.68+float64(i%5)*0.384
			for s := range 4 {
				if len(items) == 33 {
					break
				}
				a := route.Point{X: x + float64(s%2)*0.768, Y: y + float64(s/2)*0.384}
				items = append(items, route.Item{A: a, B: route.Point{X: a.X + 0.768, Y: a.Y}})
			}
			w++
		}
		ps[i] = route.Problem{Start: &route.Point{X: -3, Y: float64(i % 7)}, Items: items, MoveSpeed: 100, SettleS: 0.1}
	}
	return ps
}

// BenchmarkSmallProblems solves many small problems, as the planner's
// re-route of a million-window array does (~30,000 of them), bounded by
// kicks as the planner bounds them; it reports the mean tour length.
func BenchmarkSmallProblems(b *testing.B) {
	ps := smallArrayProblems(64)
	var total float64
	b.ReportAllocs()
	for b.Loop() {
		total = 0
		for i, p := range ps {
			s, err := route.Solve(context.Background(), p, route.Options{MaxKicks: 10, Seed: int64(i)})
			if err != nil {
				b.Fatal(err)
			}
			total += s.Length
		}
	}
	b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/float64(len(ps))/1e3, "µs/problem")
	b.ReportMetric(total/float64(len(ps)), "mean-length")
}
