// Command yardstick measures the route engine against published optima
// and baselines in one run, and prints the tables `make bench` shows:
//
//   - the TSPLIB instances of 1,000-20,000 nodes in testdata/tsplib
//     (closed tours, TSPLIB's rounded distance, gap to the published
//     optimum) beside the nearest-neighbour tour;
//   - random uniform points (10^5, and 10^6 with -huge): time, peak memory
//     and length beside nearest neighbour;
//   - random reversible strokes (10^3, 10^4): idle travel beside the greedy
//     nearest-endpoint order.
//
// Usage: go run ./planner/route/internal/yardstick [-budget 2s] [-huge] [-only a,b]
package main

import (
	"context"
	"flag"
	"fmt"
	"os"
	"runtime"
	"strings"
	"text/tabwriter"
	"time"

	"dimerpath/planner/route"
	"dimerpath/planner/route/internal/testset"
)

func main() {
	budget := flag.Duration("budget", route.DefaultBudget, "Solve's budget per instance")
	huge := flag.Bool("huge", false, "also 10^6 random points (about a minute, 1 GB)")
	only := flag.String("only", "", "comma-separated sections or instance names: tsplib, uniform, strokes, pr1002, ...")
	seed := flag.Int64("seed", 1, "Solve's seed")
	flag.Parse()
	want := func(names ...string) bool {
		if *only == "" {
			return true
		}
		for _, f := range strings.Split(*only, ",") {
			for _, n := range names {
				if f == n {
					return true
				}
			}
		}
		return false
	}
	opt := route.Options{Budget: *budget, Seed: *seed}
	if *budget == route.DefaultBudget {
		opt.Budget = 0 // as callers get it: stops early once converged
	}
	fmt.Printf("route yardstick: budget %v, seed %d, GOMAXPROCS %d, %s\n\n", *budget, *seed, runtime.GOMAXPROCS(0), runtime.Version())
	if err := tsplibTable(want, opt); err != nil {
		fmt.Fprintln(os.Stderr, "yardstick:", err)
		os.Exit(1)
	}
	if want("uniform") {
		sizes := []int{100_000}
		if *huge {
			sizes = append(sizes, 1_000_000)
		}
		uniformTable(sizes, opt)
	}
	if want("strokes") {
		strokesTable(opt)
	}
}

func timed(f func()) time.Duration {
	t0 := time.Now()
	f()
	return time.Since(t0)
}

func tsplibTable(want func(...string) bool, opt route.Options) error {
	optima, err := testset.Optima()
	if err != nil {
		return err
	}
	tw := tabwriter.NewWriter(os.Stdout, 2, 0, 2, ' ', tabwriter.AlignRight)
	header := false
	var sumGap, sumNN float64
	count := 0
	for _, name := range testset.Quality {
		if !want("tsplib", name) {
			continue
		}
		in, err := testset.Load(name)
		if err != nil {
			return err
		}
		if !header {
			fmt.Println("TSPLIB closed tours (Reinelt 1991; length with TSPLIB's nint distance; optimum from TSPLIB's published list)")
			fmt.Fprintln(tw, "instance\tn\tlength\toptimum\tgap %\ttime\tNN length\tNN gap %\tNN time\t")
			header = true
		}
		p := route.Problem{Items: in.Items(), Closed: true}
		var s, nn route.Solution
		var serr error
		tn := timed(func() { nn, _ = route.Nearest(p) })
		ts := timed(func() { s, serr = route.Solve(context.Background(), p, opt) })
		if serr != nil {
			return serr
		}
		o := optima[name]
		l, ln := in.TourLength(s.Order), in.TourLength(nn.Order)
		gap, gapNN := 100*float64(l-o)/float64(o), 100*float64(ln-o)/float64(o)
		sumGap += gap
		sumNN += gapNN
		count++
		fmt.Fprintf(tw, "%s\t%d\t%d\t%d\t%.2f\t%.2fs\t%d\t%.2f\t%.3fs\t\n", name, in.Len(), l, o, gap, ts.Seconds(), ln, gapNN, tn.Seconds())
	}
	if count > 0 {
		fmt.Fprintf(tw, "mean\t\t\t\t%.2f\t\t\t%.2f\t\t\n", sumGap/float64(count), sumNN/float64(count))
		tw.Flush()
		fmt.Println()
	}
	return nil
}

// peakRSS is the process's peak resident memory in MB (Linux), or the
// Go runtime's total obtained from the system elsewhere.
func peakRSS() float64 {
	b, err := os.ReadFile("/proc/self/status")
	if err == nil {
		for _, line := range strings.Split(string(b), "\n") {
			var kb float64
			if _, err := fmt.Sscanf(line, "VmHWM: %f kB", &kb); err == nil {
				return kb / 1024
			}
		}
	}
	var ms runtime.MemStats
	runtime.ReadMemStats(&ms)
	return float64(ms.Sys) / (1 << 20)
}

func uniformTable(sizes []int, opt route.Options) {
	fmt.Println("Random uniform points in a square, closed tours: length / sqrt(n*A) (for large n the optimum tends to about 0.7124, the Beardwood-Halton-Hammersley constant as estimated by Applegate et al. 2006, from memory; finite n and the square's boundary add a little)")
	tw := tabwriter.NewWriter(os.Stdout, 2, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintln(tw, "n\tlength/sqrt(nA)\ttime\tpeak RSS MB\tNN length/sqrt(nA)\tNN time\tgain over NN %\t")
	for _, n := range sizes {
		p := route.Problem{Items: testset.Uniform(n, 1), Closed: true}
		var s, nn route.Solution
		tn := timed(func() { nn, _ = route.Nearest(p) })
		runtime.GC()
		ts := timed(func() { s, _ = route.Solve(context.Background(), p, opt) })
		scale := float64(n) // A = n for the unit-density square, so sqrt(n*A) = n
		fmt.Fprintf(tw, "%d\t%.4f\t%.2fs\t%.0f\t%.4f\t%.2fs\t%.1f\t\n", n, s.Length/scale, ts.Seconds(), peakRSS(),
			nn.Length/scale, tn.Seconds(), 100*(1-s.Length/nn.Length))
	}
	tw.Flush()
	fmt.Println("(peak RSS: the process's high-water mark so far, so the largest run's)")
	fmt.Println()
}

func strokesTable(opt route.Options) {
	fmt.Println("Random reversible strokes (midpoints uniform, lengths 0.5-1.5 x mean spacing), open paths: idle travel;")
	fmt.Println("the Held-Karp bound (1000 strokes only) is a lower bound on every ordering's idle travel")
	tw := tabwriter.NewWriter(os.Stdout, 2, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintln(tw, "n\tidle travel\ttime\tgreedy nearest-end\tgreedy time\tgain %\tHK bound\tabove bound %\tmost gain possible %\t")
	for _, n := range []int{1000, 10_000} {
		p := route.Problem{Items: testset.Strokes(n, 1)}
		var s, nn route.Solution
		tn := timed(func() { nn, _ = route.Nearest(p) })
		ts := timed(func() { s, _ = route.Solve(context.Background(), p, opt) })
		bound := "\t\t"
		if n <= 2000 {
			lb := testset.HeldKarpBound(p.Items, s.Length, 300)
			bound = fmt.Sprintf("%.1f\t%.1f\t%.1f", lb, 100*(s.Length/lb-1), 100*(1-lb/nn.Length))
		}
		fmt.Fprintf(tw, "%d\t%.1f\t%.2fs\t%.1f\t%.3fs\t%.1f\t%s\t\n", n, s.Length, ts.Seconds(), nn.Length, tn.Seconds(), 100*(1-s.Length/nn.Length), bound)
	}
	tw.Flush()
	fmt.Println()
}
