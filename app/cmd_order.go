package app

import (
	"bytes"
	"context"
	"encoding/json"
	"errors"
	"flag"
	"fmt"
	"io"
	"os"
	"os/signal"
	"strconv"
	"strings"
	"time"

	"dimerpath/internal/jsonfile"
	"dimerpath/planner/route"
	"dimerpath/planner/route/tsplib"
)

func init() {
	Register(&Command{
		Name:    "order",
		Usage:   "order FILE.csv [--strokes] [--closed] [--start X,Y] [--budget 2s] [--seed N] [--json]",
		Summary: "order points or strokes for the shortest tip travel",
		Help: `FILE.csv holds one point per line as x,y or, with --strokes, one stroke per
line as x1,y1,x2,y2 (written in whichever direction is shorter). Lines that
start with # are comments; the first line may be a header. A TSPLIB .tsp file
(EUC_2D) is read as points.

Without --json it prints the idle travel, the solve time and the gain over
the input order; with --json one object: "order" (0-based input indices in
visiting order), "reversed" (strokes only: written from x2,y2 to x1,y1),
"length" (idle travel in input units, with the return to the start when
--closed), "input_length", "elapsed_ms", and "time_s" with --speed.
Ctrl-C stops the search and prints the best order found so far.`,
		Flags: func(fs *flag.FlagSet) func(Env, []string) int {
			strokes := fs.Bool("strokes", false, "lines are strokes x1,y1,x2,y2")
			closed := fs.Bool("closed", false, "return to the start (or the first item) at the end")
			start := fs.String("start", "", "tip position `X,Y` before the first item")
			budget := fs.Duration("budget", route.DefaultBudget, "time for the search")
			seed := fs.Int64("seed", 1, "seed of the search's random choices")
			kicks := fs.Int("kicks", 0, "stop after `N` perturbations instead of --budget (same N and seed, same order)")
			speed := fs.Float64("speed", 0, "tip move speed, input units per second, for the travel time")
			settle := fs.Float64("settle", 0, "settle time per move, seconds, for the travel time")
			asJSON := fs.Bool("json", false, "print one JSON object")
			return func(env Env, args []string) int {
				return runOrder(env, args, orderFlags{*strokes, *closed, *start, *budget, *seed, *kicks, *speed, *settle, *asJSON})
			}
		},
	})
}

type orderFlags struct {
	strokes, closed bool
	start           string
	budget          time.Duration
	seed            int64
	kicks           int
	speed, settle   float64
	json            bool
}

func runOrder(env Env, args []string, fl orderFlags) int {
	fail := failer(env, "order")
	if len(args) != 1 {
		return fail("want one input file, got %d (dimerpath order --help)", len(args))
	}
	if fl.budget <= 0 && fl.kicks <= 0 {
		return fail("--budget %v must be positive", fl.budget)
	}
	if fl.kicks < 0 {
		return fail("--kicks %d must not be negative", fl.kicks)
	}
	path := args[0]
	f, err := os.Open(path)
	if err != nil {
		return fail("%v", err)
	}
	// A regular file beyond the limit is refused by its size, unread.
	if st, err := f.Stat(); err == nil && st.Mode().IsRegular() && st.Size() > maxOrderFileBytes {
		f.Close()
		return fail("%s: the file holds %s, more than the %s limit for an item file", path, jsonfile.Bytes(st.Size()), jsonfile.Bytes(maxOrderFileBytes))
	}
	src := &orderInput{r: f}
	var items []route.Item
	var inst *tsplib.Instance
	if strings.HasSuffix(strings.ToLower(path), ".tsp") {
		if fl.strokes {
			f.Close()
			return fail("%s: a TSPLIB file holds points; leave out --strokes", path)
		}
		inst, err = tsplib.Read(src, path)
		if err == nil {
			items = inst.Items()
		}
	} else {
		items, err = route.ReadCSV(src, path, fl.strokes)
	}
	f.Close()
	if src.over != "" {
		return fail("%s: %s", path, src.over)
	}
	if err != nil {
		return fail("%v", err)
	}
	if len(items) == 0 {
		return fail("%s: no items", path)
	}
	p := route.Problem{Items: items, Closed: fl.closed, MoveSpeed: fl.speed, SettleS: fl.settle}
	if fl.start != "" {
		st, err := parsePoint(fl.start)
		if err != nil {
			return fail("--start %q: %v", fl.start, err)
		}
		p.Start = &st
	}
	if err := p.Validate(); err != nil {
		return fail("%v", err)
	}
	opt := route.Options{Budget: fl.budget, Seed: fl.seed, MaxKicks: fl.kicks}
	switch {
	case fl.kicks > 0:
		opt.Budget = 0
	case fl.budget == route.DefaultBudget:
		opt.Budget = 0 // the default: stop early once converged
	}
	clearStatus := func() {}
	if f, ok := env.Stderr.(*os.File); ok && isTerminal(f) {
		// A live status line on a terminal; nothing when stderr is a
		// file or a pipe.
		var last time.Time
		opt.Progress = func(pr route.Progress) {
			if now := time.Now(); now.Sub(last) > 250*time.Millisecond {
				last = now
				fmt.Fprintf(f, "\r\033[Korder: %s, travel %s, %.1f s", pr.Phase, fmtLen(pr.Length), pr.Elapsed.Seconds())
			}
		}
		clearStatus = func() { fmt.Fprint(f, "\r\033[K") }
	}
	ctx, stop := signal.NotifyContext(context.Background(), os.Interrupt)
	defer stop()
	t0 := time.Now()
	sol, err := route.Solve(ctx, p, opt)
	elapsed := time.Since(t0)
	clearStatus()
	if err != nil && sol.Order == nil {
		return fail("%v", err)
	}
	if err != nil {
		fmt.Fprintf(env.Stderr, "dimerpath order: interrupted (%v); printing the best order found so far\n", err)
	}
	in := make([]int, len(items))
	for i := range in {
		in[i] = i
	}
	input := p.Evaluate(in, make([]bool, len(items)))
	if fl.json {
		out := struct {
			Order       []int    `json:"order"`
			Reversed    []bool   `json:"reversed,omitempty"`
			Length      float64  `json:"length"`
			InputLength float64  `json:"input_length"`
			TimeS       *float64 `json:"time_s,omitempty"`
			ElapsedMS   float64  `json:"elapsed_ms"`
		}{Order: sol.Order, Length: sol.Length, InputLength: input.Length,
			ElapsedMS: float64(elapsed.Microseconds()) / 1000}
		if fl.strokes {
			out.Reversed = sol.Reversed
			if out.Reversed == nil {
				out.Reversed = []bool{}
			}
		}
		if fl.speed > 0 || fl.settle > 0 {
			out.TimeS = &sol.TimeS
		}
		enc := json.NewEncoder(env.Stdout)
		if err := enc.Encode(out); err != nil {
			return fail("%v", err)
		}
		return ExitOK
	}
	kind := "points"
	if fl.strokes {
		kind = "strokes"
	}
	shape := "open path"
	if fl.closed {
		shape = "closed tour"
	}
	w := env.Stdout
	fmt.Fprintf(w, "%s: %d %s, %s\n", path, len(items), kind, shape)
	fmt.Fprintf(w, "travel length  %s\n", fmtLen(sol.Length))
	gain := 0.0
	if input.Length > 0 {
		gain = 100 * (1 - sol.Length/input.Length)
	}
	fmt.Fprintf(w, "input order    %s (%.1f%% saved)\n", fmtLen(input.Length), gain)
	if inst != nil && fl.closed {
		fmt.Fprintf(w, "TSPLIB length  %d (edges rounded to the nearest integer)\n", inst.TourLength(sol.Order))
	}
	if fl.speed > 0 || fl.settle > 0 {
		fmt.Fprintf(w, "travel time    %.4g s (%d moves) vs %.4g s in input order\n", sol.TimeS, p.Moves(), input.TimeS)
	}
	fmt.Fprintf(w, "solved in      %.2f s\n", elapsed.Seconds())
	return ExitOK
}

func isTerminal(f *os.File) bool {
	fi, err := f.Stat()
	return err == nil && fi.Mode()&os.ModeCharDevice != 0
}

func fmtLen(v float64) string { return strconv.FormatFloat(v, 'f', 3, 64) }

// parsePoint reads "X,Y".
func parsePoint(s string) (route.Point, error) {
	parts := strings.Split(s, ",")
	if len(parts) != 2 {
		return route.Point{}, fmt.Errorf("want X,Y")
	}
	var v [2]float64
	for i, f := range parts {
		x, err := strconv.ParseFloat(strings.TrimSpace(f), 64)
		if err != nil {
			return route.Point{}, fmt.Errorf("%q is not a number", f)
		}
		v[i] = x
	}
	return route.Point{X: v[0], Y: v[1]}, nil
}

// maxOrderFileBytes bounds an item or TSPLIB file (64 MiB: about 10^6
// strokes written with full precision, the largest problems the route
// engine is measured on).
const maxOrderFileBytes = 64 << 20

// maxOrderLines bounds the lines of an item or TSPLIB file, and so its
// items: 64 MiB of short lines ("1,2") hold 16 million points, which the
// route engine cannot order in any memory a desktop has (10^6 points take
// about 400 MB). Twice the largest problem it is measured on.
const maxOrderLines = 2_000_000

// orderInput passes an item file through to its reader within
// maxOrderFileBytes and maxOrderLines, also when the file is a pipe that
// its size could not be checked by; over says which was exceeded.
type orderInput struct {
	r            io.Reader
	bytes, lines int64
	over         string
}

func (in *orderInput) Read(p []byte) (int, error) {
	if in.over != "" {
		return 0, errors.New(in.over)
	}
	n, err := in.r.Read(p)
	in.bytes += int64(n)
	in.lines += int64(bytes.Count(p[:n], []byte{'\n'}))
	switch {
	case in.bytes > maxOrderFileBytes:
		in.over = fmt.Sprintf("more than %s, the limit for an item file", jsonfile.Bytes(maxOrderFileBytes))
	case in.lines > maxOrderLines:
		in.over = fmt.Sprintf("more than %d lines, the limit for an item file (the route engine is measured up to 10^6 items)", maxOrderLines)
	}
	if in.over != "" {
		return 0, errors.New(in.over)
	}
	return n, err
}
