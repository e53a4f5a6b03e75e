package route_test

import (
	"context"
	"testing"

	"dimerpath/planner/route"
	"dimerpath/planner/route/internal/testset"
)

// TestQualityTSPLIB solves small TSPLIB instances as closed tours with a
// fixed number of kicks (so the result depends on the seed alone, not on
// the machine) and checks the gap to the published optimum (TSPLIB95
// list, Reinelt 1991) with TSPLIB's rounded distance. The bound is loose
// on purpose: speed and the real quality goals are measured by the
// benchmarks and the yardstick.
func TestQualityTSPLIB(t *testing.T) {
	optima, err := testset.Optima()
	if err != nil {
		t.Fatal(err)
	}
	for _, name := range []string{"eil51", "berlin52", "kroA100", "ch150", "a280", "lin318", "pcb442", "rat783", "pr1002"} {
		t.Run(name, func(t *testing.T) {
			in, err := testset.Load(name)
			if err != nil {
				t.Fatal(err)
			}
			p := route.Problem{Items: in.Items(), Closed: true}
			s, err := route.Solve(context.Background(), p, route.Options{MaxKicks: 3 * in.Len(), Seed: 1})
			if err != nil {
				t.Fatal(err)
			}
			checkValid(t, p, s)
			got, opt := in.TourLength(s.Order), optima[name]
			gap := 100 * float64(got-opt) / float64(opt)
			t.Logf("%s: %d, optimum %d, gap %.2f%%", name, got, opt, gap)
			if got < opt {
				t.Errorf("%s: tour %d shorter than the published optimum %d", name, got, opt)
			}
			if gap > 1 {
				t.Errorf("%s: gap %.2f%% to the published optimum, want <= 1%%", name, gap)
			}
		})
	}
}
