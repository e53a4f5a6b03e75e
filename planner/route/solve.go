package route

import (
	"context"
	"time"
)

// now is the clock of budgets and progress: a variable so that a
// measurement can bound runs by CPU time on a shared machine.
var now = time.Now

// control carries one Solve call's limits and reporting.
type control struct {
	ctx      context.Context
	begin    time.Time
	deadline time.Time // zero: no wall-clock bound
	kicks    int       // 0: no kick bound
	items    int       // items in the whole problem
	seed     int64
	progress func(Progress)
	lastProg time.Time
	converge bool          // stop when the search has converged (default budget)
	budget   time.Duration // the budget in force, 0 when bounded by kicks alone
}

func newControl(ctx context.Context, p Problem, opt Options) *control {
	c := &control{ctx: ctx, begin: now(), kicks: opt.MaxKicks, items: len(p.Items),
		seed: opt.Seed, progress: opt.Progress}
	budget := opt.Budget
	if budget == 0 && opt.MaxKicks <= 0 {
		budget = DefaultBudget
		c.converge = true
	}
	if budget > 0 {
		c.deadline = c.begin.Add(budget)
	}
	c.budget = max(budget, 0)
	return c
}

func (c *control) report(phase string, length, fraction float64) {
	if c.progress == nil {
		return
	}
	t := now()
	c.lastProg = t
	c.progress(Progress{Phase: phase, Length: length, Elapsed: t.Sub(c.begin), Fraction: min(max(fraction, 0), 1)})
}

// solve orders one group's items: exactly when there are few, else by
// the heuristic. share is the group's part of the remaining budget.
func (c *control) solve(items []Item, start, end *Point, closed bool, share float64) ([]int, []bool, error) {
	if err := c.ctx.Err(); err != nil {
		return nil, nil, err
	}
	if len(items) <= exactMax {
		o, r := solveExact(items, start, end, closed)
		return o, r, nil
	}
	deadline := c.deadline
	if !deadline.IsZero() {
		t := now()
		left := deadline.Sub(t)
		deadline = t.Add(time.Duration(float64(left) * share))
	}
	kicks := 0
	if c.kicks > 0 {
		kicks = max(1, int(float64(c.kicks)*float64(len(items))/float64(max(c.items, 1))))
	}
	return c.heuristic(items, start, end, closed, deadline, kicks)
}

// The Lin-Kernighan search (lk.go) on α-nearness candidates (alpha.go)
// replaces the single 4- and 5-opt moves wherever its set-up fits the
// budget. Measured on TSPLIB instances of 1,000-15,000 points and on
// 10,000 random strokes (see DEVELOPERS.md): the chained search finds
// tours 0.1-0.4 points closer to the optimum at equal time, and the
// candidates matter: with the 10 nearest instead, the chained search
// was worse than before.
var (
	poolNearest  = 10 // the pool α chooses from: nearest nodes...
	poolQuadrant = 2  // ...and nearest in each quadrant
	alphaCands   = 7  // candidates kept per node
	ascentIters  = 25 // subgradient iterations
	// The light set-up's.
	lightPoolNearest  = 8
	lightPoolQuadrant = 1
	lightAscentIters  = 10
	// Where stroke ends are at least half the nodes (the search then runs
	// alone, see lkOnlyStrokes), the light set-up keeps the full ascent:
	// the candidates' quality pays more there than the set-up's time. On
	// 10,000 random strokes (2 s of CPU, 20,000 nodes, set-up ~0.23 s)
	// 10 steps gave idle travel 0.12% longer than 25, 15 steps 0.06%
	// longer, 50 steps the same as 25, and no ascent at all (α on plain
	// lengths, 0.09 s less set-up) 0.07% longer than 10. The full pool
	// (10 nearest + 2 per quadrant) with 25 steps did no better (0.08%
	// shorter than 10 steps), nor a pool of 6 nearest (route14c,
	// instances 5-12, 2-3 seeds each; on instances 1-4, 6 seeds, 25
	// steps were about the same as 10; notes/route14c.md).
	lightStrokeAscentIters = ascentIters
	// fullSetupNodesPerSecond bounds the problems that get the full
	// set-up, per second of budget.
	fullSetupNodesPerSecond = 4_000
	// lkNodesPerSecond bounds the problems the search is set up for, per
	// second of budget: the ascent and the first local optimum cost about
	// 0.3 s per 10,000 nodes (2026 laptop-class core), so a default
	// budget takes problems up to 30,000 nodes.
	lkNodesPerSecond = 15_000
	// lkMaxNodesKicks bounds them when the run is bounded by kicks alone:
	// the same size as the default budget, so that the planner (which
	// bounds its routes by kicks) spends no more than it would there.
	lkMaxNodesKicks = 30_000
	// lkMaxNodes bounds them in any case: above it the ascent's tables
	// and the search's array reversals cost more than they bring.
	lkMaxNodes = 200_000
)

// lkLimit is the largest problem the Lin-Kernighan search is set up
// for under this call's limits. It depends on the limits the caller set,
// never on the clock, so a run bounded by MaxKicks stays deterministic.
func (c *control) lkLimit() int {
	if c.budget <= 0 {
		return lkMaxNodesKicks
	}
	return min(lkMaxNodes, int(c.budget.Seconds()*float64(lkNodesPerSecond)))
}

// fullSetupLimit is the largest problem that gets the full set-up under
// this call's limits (a run bounded by kicks alone counts as one with the
// default budget).
func (c *control) fullSetupLimit() int {
	b := c.budget
	if b <= 0 {
		b = DefaultBudget
	}
	return int(b.Seconds() * float64(fullSetupNodesPerSecond))
}

// lkOnlyStrokes lets problems made mostly of strokes, of at least
// lkOnlyMin nodes, skip the shallower moves (see heuristic).
var (
	lkOnlyStrokes       = true
	lkOnlyMin     int32 = 12
)

// kickSegMax bounds the three segments a kick moves, in nodes. Measured
// on the yardstick and with fixed kick counts: 10 and 30 are clearly
// worse, 100-1000 alike within the noise, 300 a little ahead.
var kickSegMax int32 = 300

// Record-to-record travel (Dueck 1993, "New optimization heuristics: the
// great deluge algorithm and the record-to-record travel", J. Comput.
// Phys. 104) once the kicks have stalled: after acceptAfter x n kicks
// without a new best tour, a kicked tour is kept if it is at most
// acceptSlack mean tour edges longer than the best (kept aside), until a
// new best is found. It helps where the kicks get stuck in one of a few
// deep basins: with 2 s of CPU on a drilling-like layout of dense patches
// (1,852 points, 24 seeds) 0.64% mean and 3.3% worst above a 30 s run
// before, 0.09% and 1.0% with it; on the TSPLIB set (2 s, 6 seeds; 30 s),
// uniform, clustered and grid layouts it changes little, as the kicks
// rarely stall that long there (DEVELOPERS.md). In a few shorter trials
// slacks of 0.1-0.5 mean edges did alike, 1 worse (u2152, 10 s).
var (
	acceptSlack = 0.3
	acceptAfter = 1.0
)

func (c *control) heuristic(items []Item, start, end *Point, closed bool, deadline time.Time, kicks int) ([]int, []bool, error) {
	if end != nil && start == nil {
		end = nil // an end needs a start to tie to
	}
	g := newGraph(items, start, end, !closed && end == nil)
	if g.n() > spatialOrderMin {
		g = g.spatiallyOrdered()
	}
	k := 10
	if g.n() > 200_000 {
		k = 8
	}
	// With strokes, quadrant neighbours too: 1.5% shorter idle travel on
	// clustered layouts of parallel strokes, no change on random strokes;
	// on the TSPLIB points they made the gaps worse. Not above 200,000
	// nodes, where their queries cost more than they bring (10^6 random
	// strokes: 3 s more, 0.5 point less gain at the default budget).
	withQuad := g.real > len(items) && g.n() <= 200_000
	lk := g.oneWay < 2 && g.n() <= c.lkLimit()
	// Where the set-up takes a large share of the budget, a lighter one
	// for the search: a smaller pool and fewer subgradient steps leave
	// more time to search (measured, 2 s: on 13,000-15,000 points 0.52%
	// mean gap against 0.65%, on 2,000-6,000 points 0.43% against 0.28%).
	nearest, quad, iters := poolNearest, poolQuadrant, ascentIters
	if g.n() > c.fullSetupLimit() {
		nearest, quad, iters = lightPoolNearest, lightPoolQuadrant, lightAscentIters
		if strokeEnds := g.real - len(items); 4*strokeEnds >= g.real {
			iters = lightStrokeAscentIters
		}
	}
	var nb, pool *neighbours
	if lk && nearest <= k {
		nb, pool = buildNeighboursPool(g, k, nearest, quad, withQuad)
	} else {
		nb = buildNeighbours(g, k, withQuad)
	}
	if err := c.ctx.Err(); err != nil {
		return nil, nil, err
	}
	tour := greedyTour(g, nb)
	lists := nb
	if lk {
		if pool == nil {
			pool = buildPool(g, nearest, quad)
		}
		if cand := alphaCandidates(g, pool, tour, alphaCands, iters); cand != nil {
			lists = cand
		} else {
			lk = false
		}
	}
	s := newSolver(g, lists, tour)
	s.useLK = lk
	if g.oneWay >= 2 {
		// Turning the backward one-way strokes of the greedy tour round
		// can cost much, and the one-way edges block most reversals
		// afterwards, so start from the nearest-neighbour order (which
		// writes them forwards) when that is shorter.
		s.orientOneWay()
		o, r := nearestOrder(items, start)
		if alt := newSolver(g, nb, g.tourFromOrder(o, r)); alt.length < s.length {
			s = alt
		}
	}
	if s.n > 100_000 {
		s.maxRev = 50_000
	}
	fixedLen := 0.0
	for v := range int32(g.real) {
		if p := g.partner[v]; p > v && p != g.dummy {
			fixedLen += g.d(v, p)
		}
	}
	if g.real > len(items) {
		// There are strokes. Each stroke end has one tour edge a move
		// may remove, so a sequential search from it has half the
		// choices it has at a point, and the deeper moves pay: on
		// random strokes (1,000 and 10,000, 2 s) they add about 0.15-0.2
		// points of gain over the greedy nearest-endpoint order, while
		// on the TSPLIB points they cost more time than they gain
		// (mean gap 0.44% without, 0.50% with; measured).
		s.deep = true
		s.lkBreadth = lkBreadthStrokes
		s.orientUnits()
		// Where stroke ends are at least half the nodes, the chained
		// search alone: measured with 2 s of CPU on 10,000 random strokes
		// (instances 1-4, seeds 1-6, run side by side with the old
		// order), idle travel 0.40% above the best of two 30 s runs
		// against 0.47% when 2-opt, Or-opt and 3-opt moves go first (as
		// they must on points: there the chained search alone was much
		// worse, 0.63% mean gap on TSPLIB against 0.36%).
		s.lkOnly = lk && lkOnlyStrokes && s.n >= lkOnlyMin && 4*(g.real-len(items)) >= g.real
		s.bridge = s.lkOnly && bridgeStrokes
	}
	c.report("construct", s.length-fixedLen, 0)
	for _, v := range s.t {
		s.push(v)
	}
	if s.lkOnly && s.n >= twoLevelMin {
		// The search alone makes long reversals in most moves, which
		// the two-level list makes in O(sqrt n): 16% less CPU for the
		// same kicks on 10,000 random strokes (the same tour; below
		// twoLevelMin it is slower). With the shallower moves first it
		// was slower too (route14b), so points keep the array.
		s.useTwoLevel()
	}
	stop := func() bool { return c.ctx.Err() != nil }
	if !s.localSearch(stop) {
		o, r := s.extract()
		return o, r, c.ctx.Err()
	}
	c.report("local", s.length-fixedLen, 0)

	r := newRNG(c.seed)
	t0 := now()
	total := deadline.Sub(t0)
	frac := 0.0
	// Measured on the yardstick (2 s runs): the longest run of failed
	// kicks before a later improvement was about 50 n on 1,000-20,000
	// nodes, so a search this long without one, and longer than all the
	// search before its last gain, has converged.
	stall := max(10_000, 50*int(s.n))
	lastGain := 0
	s.bestLen = s.length
	slack := acceptSlack * s.length / float64(s.n)
	slackAfter := int(acceptAfter * float64(s.n))
	for i := 0; kicks <= 0 || i < kicks; i++ {
		if i&15 == 0 {
			if c.ctx.Err() != nil {
				break
			}
			t := now()
			if !deadline.IsZero() && !t.Before(deadline) {
				break
			}
			if kicks > 0 {
				frac = float64(i) / float64(kicks)
			} else if total > 0 {
				frac = float64(t.Sub(t0)) / float64(total)
			}
			if c.progress != nil && t.Sub(c.lastProg) > 100*time.Millisecond {
				c.report("improve", min(s.length, s.bestLen)-fixedLen, frac)
			}
		}
		if s.kick(r, kickSegMax) {
			lastGain = i
			s.slack = 0
		} else if c.converge && i-lastGain > max(stall, lastGain) {
			break // converged: stop before the budget
		} else if i-lastGain > slackAfter {
			s.slack = slack
		}
	}
	s.restoreBest()
	c.report("improve", s.length-fixedLen, 1)
	o, rv := s.extract()
	return o, rv, c.ctx.Err()
}

// orientOneWay turns every one-way fixed edge that the tour runs
// backwards round in place, so that all run forwards.
func (s *solver) orientOneWay() {
	g := s.g
	for a := range int32(g.n()) {
		if !g.tail[a] {
			continue
		}
		b := g.partner[a]
		if s.succ(a) == b {
			continue
		}
		p, nx := s.pred(b), s.succ(a)
		s.length += g.d(p, a) + g.d(b, nx) - g.d(p, b) - g.d(a, nx)
		s.reverseRange(s.pos[b], 2)
	}
}

// extract reads the tour as an ordering of the items: from the dummy (or
// the start) in the direction that runs the one-way edges forwards.
func (s *solver) extract() ([]int, []bool) {
	g := s.g
	first := s.nodeAt(0)
	switch {
	case g.dummy >= 0:
		first = g.dummy
	case g.start >= 0:
		first = g.start
	}
	dir := 0
	if g.oneWay > 0 {
		for a := range int32(g.n()) {
			if g.tail[a] {
				if s.succ(a) != g.partner[a] {
					dir = 1
				}
				break
			}
		}
	}
	if p := g.partner[first]; p >= 0 && s.next(first, 1-dir) == p {
		first = p // begin a closed tour at a stroke's first end
	}
	order := make([]int, 0, g.real)
	rev := make([]bool, 0, g.real)
	last := int32(-1)
	v := first
	for range s.n {
		if it := g.item[v]; it >= 0 && it != last {
			order = append(order, int(it))
			rev = append(rev, g.end[v] == 1)
			last = it
		}
		v = s.next(v, dir)
	}
	return order, rev
}

// tourFromOrder is the node tour that writes the items in order, each
// from its entry end, after the dummy and the start and before the end
// node.
func (g *graph) tourFromOrder(order []int, rev []bool) []int32 {
	// The node of each item's A end.
	first := make([]int32, len(order))
	for v := range int32(g.real) {
		if it := g.item[v]; it >= 0 && g.end[v] == 0 {
			first[it] = v
		}
	}
	t := make([]int32, 0, g.n())
	if g.dummy >= 0 {
		t = append(t, g.dummy)
	}
	if g.start >= 0 {
		t = append(t, g.start)
	}
	for k, i := range order {
		a := first[i]
		if b := g.partner[a]; b >= 0 {
			if rev[k] {
				a, b = b, a
			}
			t = append(t, a, b)
		} else {
			t = append(t, a)
		}
	}
	if g.finish >= 0 {
		t = append(t, g.finish)
	}
	return t
}
