// Command yardstick measures the route engine against published optima
// and baselines in one run, and prints the tables `make bench` shows:
//
//   - every TSPLIB instance of 1,000-20,000 nodes in testdata/tsplib (or
//     -dir, with its OPTIMA.tsv) whose optimum is listed: closed tours,
//     TSPLIB's rounded distance, gap to the published optimum, mean and
//     worst, beside the nearest-neighbour tour, with the ratios of gap and
//     time to it measured in the same run;
//   - random uniform points (10^5, and 10^6 with -huge): time, peak memory
//     and length beside nearest neighbour;
//   - random reversible strokes (10^3 on 12 instances, 10^4 on 4): idle
//     travel beside the greedy nearest-endpoint order, the gain's mean and
//     worst over the instances, the Held-Karp lower bound, and with
//     -longrun the gap to a long run on each instance;
//   - with -shapes, generated point sets the engine was not tuned on
//     (uniform, clustered, drilling-like patches, a grid with holes):
//     each seed's gap to the best tour found for the instance, including
//     a -longrun run's.
//
// The load average is printed at the start and the end: the machine may
// be shared, so compare ratios measured in one run.
//
// Usage: go run ./planner/route/internal/yardstick [-budget 2s] [-seeds 1] [-huge]
// [-only a,b] [-dir DIR] [-min 1000] [-max 20000] [-strokes 1000:12,10000:4]
// [-longrun 60s] [-bound] [-shapes 2000,5000] [-cpuprofile FILE]
//
// Built with -tags routecpu (go run -tags routecpu ./planner/route/internal/yardstick)
// the budgets count the process's CPU time, not the wall clock: on a
// shared machine every solve then gets the same work whatever the load.
package main

import (
	"context"
	"flag"
	"fmt"
	"os"
	"path/filepath"
	"runtime"
	"runtime/pprof"
	"slices"
	"strconv"
	"strings"
	"text/tabwriter"
	"time"

	"dimerpath/planner/route"
	"dimerpath/planner/route/internal/testset"
	"dimerpath/planner/route/tsplib"
)

func main() {
	budget := flag.Duration("budget", route.DefaultBudget, "Solve's budget per instance")
	huge := flag.Bool("huge", false, "also 10^6 random points (about a minute, 1 GB)")
	only := flag.String("only", "", "comma-separated sections or instance names: tsplib, uniform, strokes, pr1002, ...")
	seed := flag.Int64("seed", 1, "Solve's seed")
	strokes := flag.String("strokes", "1000:12,10000:4", "stroke instances: n:count,... (instance seeds 1..count)")
	allBounds := flag.Bool("bound", false, "the Held-Karp bound on every stroke instance up to 2000 strokes, not only the first (about 5 s each)")
	dir := flag.String("dir", testset.Dir(), "directory of TSPLIB NAME.tsp files and their OPTIMA.tsv")
	minN := flag.Int("min", 1000, "smallest TSPLIB instance measured, in nodes")
	maxN := flag.Int("max", 20000, "largest TSPLIB instance measured, in nodes")
	seeds := flag.Int("seeds", 1, "TSPLIB: solve each instance with this many seeds from -seed on (mean and worst)")
	longRun := flag.Duration("longrun", 0, "strokes: also solve each instance with this budget and report the gap to that long run")
	shapes := flag.String("shapes", "", "also generated point sets (testset.Shapes: uniform, clustered, patches, grid) of these sizes, e.g. 2000,5000: solved with -seeds seeds, gaps to the best tour found (with -longrun, a long run's too)")
	cpuProfile := flag.String("cpuprofile", "", "write a CPU profile of the whole run to this file (go tool pprof)")
	flag.Parse()
	if *cpuProfile != "" {
		f, err := os.Create(*cpuProfile)
		if err == nil {
			err = pprof.StartCPUProfile(f)
		}
		if err != nil {
			fmt.Fprintln(os.Stderr, "yardstick: -cpuprofile:", err)
			os.Exit(1)
		}
		defer func() {
			pprof.StopCPUProfile()
			f.Close()
		}()
	}
	sizes, err := parseSizes(*strokes)
	if err != nil {
		fmt.Fprintln(os.Stderr, "yardstick: -strokes:", err)
		os.Exit(2)
	}
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
	fmt.Printf("route yardstick: budget %v (%s), seed %d, GOMAXPROCS %d, %s, load average at start %s\n\n", *budget, budgetClock, *seed, runtime.GOMAXPROCS(0), runtime.Version(), loadAvg())
	defer func() { fmt.Printf("load average at the end %s\n", loadAvg()) }()
	set, err := tsplibSet(*dir, *minN, *maxN, want)
	if err != nil {
		fmt.Fprintln(os.Stderr, "yardstick:", err)
		os.Exit(1)
	}
	tsplibTable(set, opt, *seeds)
	if want("uniform") {
		sizes := []int{100_000}
		if *huge {
			sizes = append(sizes, 1_000_000)
		}
		uniformTable(sizes, opt)
	}
	if want("strokes") {
		strokesTable(opt, sizes, *allBounds, *longRun)
	}
	if *shapes != "" {
		shapesTable(opt, *shapes, *seeds, *longRun)
	}
}

// loadAvg is the system's load average (Linux), or "?".
func loadAvg() string {
	b, err := os.ReadFile("/proc/loadavg")
	if err != nil {
		return "?"
	}
	f := strings.Fields(string(b))
	if len(f) < 3 {
		return "?"
	}
	return strings.Join(f[:3], " ")
}

func timed(f func()) time.Duration {
	t0 := time.Now()
	f()
	return time.Since(t0)
}

// instance is one TSPLIB file to measure.
type instance struct {
	name string
	in   *tsplib.Instance
	opt  int
}

// tsplibSet reads every NAME.tsp in dir with minN..maxN nodes whose
// optimum OPTIMA.tsv lists, smallest first.
func tsplibSet(dir string, minN, maxN int, want func(...string) bool) ([]instance, error) {
	optima, err := testset.OptimaIn(dir)
	if err != nil {
		return nil, err
	}
	files, _ := filepath.Glob(filepath.Join(dir, "*.tsp"))
	var set []instance
	for _, f := range files {
		name := strings.TrimSuffix(filepath.Base(f), ".tsp")
		o, ok := optima[name]
		if !ok || !want("tsplib", name) {
			continue
		}
		in, err := testset.LoadIn(dir, name)
		if err != nil {
			return nil, err
		}
		if in.Len() >= minN && in.Len() <= maxN {
			set = append(set, instance{name, in, o})
		}
	}
	slices.SortFunc(set, func(a, b instance) int { return a.in.Len() - b.in.Len() })
	return set, nil
}

// tsplibTable solves each instance with seeds opt.Seed.. (seeds of them) and prints its
// gap to the published optimum beside the nearest-neighbour tour's, with
// the ratios of gap and time to the nearest-neighbour tour measured in
// the same run, and the mean and worst over the instances.
func tsplibTable(set []instance, opt route.Options, seeds int) {
	if len(set) == 0 {
		return
	}
	fmt.Println("TSPLIB closed tours (Reinelt 1991; length with TSPLIB's nint distance; optimum from TSPLIB's published list);")
	fmt.Println("NN: the nearest-neighbour tour (route.Nearest) measured in the same run; gap ratio = gap / NN gap, time ratio = time / NN time;")
	fmt.Println("CPU: the process's CPU time during the solve (below the wall time when other work shares the cores)")
	tw := tabwriter.NewWriter(os.Stdout, 2, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintln(tw, "instance\tn\tlength\toptimum\tgap %\tworst seed gap %\ttime\tCPU\tNN length\tNN gap %\tNN time\tgap ratio\ttime ratio\t")
	var sumGap, sumNN, sumRatio, sumTRatio, worst float64
	worstName := ""
	for _, x := range set {
		p := route.Problem{Items: x.in.Items(), Closed: true}
		var nn route.Solution
		tn := timed(func() { nn, _ = route.Nearest(p) })
		ln := x.in.TourLength(nn.Order)
		gapNN := 100 * float64(ln-x.opt) / float64(x.opt)
		var gapSum, gapWorst, tSum, cSum float64
		var l int
		for i := range seeds {
			o := opt
			o.Seed = opt.Seed + int64(i)
			var s route.Solution
			c0 := cpuTime()
			ts := timed(func() { s, _ = route.Solve(context.Background(), p, o) })
			cSum += (cpuTime() - c0).Seconds()
			l = x.in.TourLength(s.Order)
			gap := 100 * float64(l-x.opt) / float64(x.opt)
			gapSum += gap
			gapWorst = max(gapWorst, gap)
			tSum += ts.Seconds()
		}
		k := float64(seeds)
		gap, ts := gapSum/k, tSum/k
		if gapWorst > worst {
			worst, worstName = gapWorst, x.name
		}
		sumGap += gap
		sumNN += gapNN
		sumRatio += gap / gapNN
		tnS := max(tn.Seconds(), 1e-6)
		sumTRatio += ts / tnS
		fmt.Fprintf(tw, "%s\t%d\t%d\t%d\t%.2f\t%.2f\t%.2fs\t%.2fs\t%d\t%.2f\t%.3fs\t%.4f\t%.0f\t\n",
			x.name, x.in.Len(), l, x.opt, gap, gapWorst, ts, cSum/k, ln, gapNN, tn.Seconds(), gap/gapNN, ts/tnS)
	}
	c := float64(len(set))
	fmt.Fprintf(tw, "mean\t\t\t\t%.3f\t\t\t\t\t%.2f\t\t%.4f\t%.0f\t\n", sumGap/c, sumNN/c, sumRatio/c, sumTRatio/c)
	tw.Flush()
	fmt.Printf("worst gap %.2f%% (%s); %d instance(s), %d seed(s) each (length column: the last seed's)\n\n", worst, worstName, len(set), seeds)
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

// strokeSize is a stroke count and the number of instances (seeds
// 1..count) to measure it on.
type strokeSize struct{ n, count int }

func parseSizes(spec string) ([]strokeSize, error) {
	var out []strokeSize
	for _, f := range strings.Split(spec, ",") {
		var sz strokeSize
		if _, err := fmt.Sscanf(f, "%d:%d", &sz.n, &sz.count); err != nil || sz.n < 1 || sz.count < 1 {
			return nil, fmt.Errorf("%q: want n:count with both >= 1", f)
		}
		out = append(out, sz)
	}
	return out, nil
}

// strokesTable solves count seeded instances of each size and prints
// one row per size: the gain over the greedy nearest-endpoint order as
// mean, worst and best over the instances (the gain depends much on how
// good the baseline happens to be on an instance, so one instance says
// little), and the Held-Karp bound.
//
// With longRun > 0 each instance is also solved with that budget, and the
// row gives the default run's idle travel above the best of the two (the
// best tour found with a long run), mean and worst.
func strokesTable(opt route.Options, sizes []strokeSize, allBounds bool, longRun time.Duration) {
	fmt.Println("Random reversible strokes (midpoints uniform, lengths 0.5-1.5 x mean spacing; testset.Strokes, instance seeds 1..k), open paths: idle")
	fmt.Println("travel against the greedy nearest-endpoint order. Held-Karp: a lower bound on every ordering's idle travel (instance 1, or all with -bound)")
	tw := tabwriter.NewWriter(os.Stdout, 2, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintln(tw, "n	instances	mean time	gain % mean	worst (seed)	best	above HK bound %	most gain possible %	above long run % mean	worst	")
	var lines []string
	for _, sz := range sizes {
		var sumGain, sumTime, sumAbove, sumPossible, sumLong, worstLong float64
		worst, worstSeed, best := 100.0, 0, -100.0
		bounds := 0
		gains := make([]string, 0, sz.count)
		for seed := 1; seed <= sz.count; seed++ {
			p := route.Problem{Items: testset.Strokes(sz.n, uint64(seed))}
			nn, _ := route.Nearest(p)
			var s route.Solution
			ts := timed(func() { s, _ = route.Solve(context.Background(), p, opt) })
			gain := 100 * (1 - s.Length/nn.Length)
			sumGain += gain
			sumTime += ts.Seconds()
			if gain < worst {
				worst, worstSeed = gain, seed
			}
			best = max(best, gain)
			gains = append(gains, fmt.Sprintf("%.1f", gain))
			if longRun > 0 {
				lo := opt
				lo.Budget = longRun
				ls, _ := route.Solve(context.Background(), p, lo)
				above := 100 * (s.Length/min(ls.Length, s.Length) - 1)
				sumLong += above
				worstLong = max(worstLong, above)
				gains[len(gains)-1] += fmt.Sprintf(" (%.2f%% above the %v run)", above, longRun)
			}
			if sz.n <= 2000 && (seed == 1 || allBounds) {
				lb := testset.HeldKarpBound(p.Items, s.Length, 300)
				sumAbove += 100 * (s.Length/lb - 1)
				sumPossible += 100 * (1 - lb/nn.Length)
				bounds++
			}
		}
		k := float64(sz.count)
		bound := "\t"
		if bounds > 0 {
			bound = fmt.Sprintf("%.1f\t%.1f", sumAbove/float64(bounds), sumPossible/float64(bounds))
		}
		long := "\t"
		if longRun > 0 {
			long = fmt.Sprintf("%.2f\t%.2f", sumLong/k, worstLong)
		}
		fmt.Fprintf(tw, "%d\t%d\t%.2fs\t%.2f\t%.2f (%d)\t%.2f\t%s\t%s\t\n", sz.n, sz.count, sumTime/k, sumGain/k, worst, worstSeed, best, bound, long)
		lines = append(lines, fmt.Sprintf("%d strokes, gain %% by instance seed 1..%d: %s", sz.n, sz.count, strings.Join(gains, " ")))
	}
	tw.Flush()
	for _, l := range lines {
		fmt.Println(l)
	}
	fmt.Println()
}

// shapesTable solves the generated point sets of testset.Shapes at each
// size with seeds seeds and prints each one's gap to the best tour found
// for it (over the seeds and, with longRun, a run of that budget): the
// engine's spread between seeds on instances it was not tuned on.
func shapesTable(opt route.Options, spec string, seeds int, longRun time.Duration) {
	var sizes []int
	for _, f := range strings.Split(spec, ",") {
		n, err := strconv.Atoi(strings.TrimSpace(f))
		if err != nil || n < 10 || n > 200_000 {
			fmt.Fprintf(os.Stderr, "yardstick: -shapes: %q is not a size of 10-200000 points\n", f)
			os.Exit(2)
		}
		sizes = append(sizes, n)
	}
	ref := "the best of the seeds"
	if longRun > 0 {
		ref = fmt.Sprintf("the best of the seeds and a %v run (seed %d)", longRun, opt.Seed)
	}
	fmt.Printf("Generated point sets (testset.Shapes, instance seed 1), closed tours, %d seed(s) each: gap %% to %s\n", seeds, ref)
	tw := tabwriter.NewWriter(os.Stdout, 2, 0, 2, ' ', tabwriter.AlignRight)
	fmt.Fprintln(tw, "shape	n	gap % mean	worst	best length	long run	CPU per solve	NN gap %	")
	for _, sh := range testset.Shapes {
		for _, n := range sizes {
			p := route.Problem{Items: sh.Make(n, 1), Closed: true}
			lengths := make([]float64, seeds)
			var cpu time.Duration
			for k := range seeds {
				o := opt
				o.Seed = opt.Seed + int64(k)
				c0 := cpuTime()
				s, _ := route.Solve(context.Background(), p, o)
				cpu += cpuTime() - c0
				lengths[k] = s.Length
			}
			best := slices.Min(lengths)
			long := "\t"
			if longRun > 0 {
				lo := opt
				lo.Budget = longRun
				ls, _ := route.Solve(context.Background(), p, lo)
				long = fmt.Sprintf("%.6g\t", ls.Length)
				best = min(best, ls.Length)
			}
			var sum, worst float64
			for _, l := range lengths {
				g := 100 * (l/best - 1)
				sum += g
				worst = max(worst, g)
			}
			nn, _ := route.Nearest(p)
			fmt.Fprintf(tw, "%s\t%d\t%.3f\t%.3f\t%.6g\t%s%.2fs\t%.2f\t\n", sh.Name, len(p.Items), sum/float64(seeds), worst, best, long, (cpu / time.Duration(seeds)).Seconds(), 100*(nn.Length/best-1))
		}
	}
	tw.Flush()
	fmt.Println()
}
