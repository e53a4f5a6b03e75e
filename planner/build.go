package planner

import (
	"context"
	"fmt"
	"math"

	"github.com/golang/geo/r2"

	"dimerpath/internal/jsonfile"
	"dimerpath/lattice"
	"dimerpath/lattice/design"
	"dimerpath/planner/route"
)

// Options control how a plan is built.
type Options struct {
	// Seed drives every random choice (route perturbations, Monte Carlo):
	// the same design, profile and seed give the same plan.
	Seed int64
	// MonteCarloRuns is the number of samples for the time spread
	// (0 takes DefaultMonteCarloRuns).
	MonteCarloRuns int
	// RouteKicks bounds the route engine's improvement phase by a count
	// of perturbations, so the plan depends on Seed alone and not on the
	// machine's speed; 0 takes a default that grows with the number of
	// strokes.
	RouteKicks int
	// Progress, when non-nil, is called with a stage name and the
	// fraction of the whole work done (0..1), from the planning goroutine.
	Progress func(stage string, fraction float64)
}

// progress stages and the share of the work done when each starts.
var stages = []struct {
	name string
	at   float64
}{
	{"modes", 0.05}, {"strokes", 0.15}, {"coverage", 0.25},
	{"route", 0.4}, {"segments", 0.7}, {"spread", 0.8}, {"yield", 0.95},
}

func (o *Options) stage(name string) {
	if o.Progress == nil {
		return
	}
	for _, s := range stages {
		if s.name == name {
			o.Progress(name, s.at)
		}
	}
}

// Build plans the laid-out variant lay (see design.Design.Lay, which the
// caller shares with the checks, the export and the GUI) with the
// instrument profile prof: it chooses each region's mode, generates the
// strokes, proves their coverage, orders them with package route, splits
// the writing order into drift-safe segments, lays out the timeline and
// estimates its spread and the dopant yield. It returns ctx.Err() when
// cancelled, a *jsonfile.Error for an invalid profile, and a *LimitError
// when the plan would need a value beyond prof.Limits. It never panics: a
// broken invariant of its own, or any panic on the way, comes back as an
// *InternalError (errors.Is(err, ErrInternal)).
func Build(ctx context.Context, lay *design.Layout, prof Profile, opt Options) (plan *Plan, err error) {
	defer recoverInternal(&plan, &err)
	b := &builder{ctx: ctx, lay: lay, d: lay.Design, prof: prof, opt: opt}
	return b.build()
}

type builder struct {
	ctx  context.Context
	lay  *design.Layout
	d    *design.Design // lay.Design
	prof Profile
	opt  Options

	gen      *strokeGen
	regions  []*regionWork
	fids     []Fiducial
	strokes  []Stroke
	warnings []string
}

func (b *builder) build() (*Plan, error) {
	prof, lay := &b.prof, b.lay
	if err := prof.Validate(); err != nil {
		return nil, err
	}
	if err := prof.checkField(b.d.Field.WidthNM, b.d.Field.HeightNM); err != nil {
		return nil, err
	}
	if err := b.checkRaster(); err != nil {
		return nil, err
	}
	if err := b.ctx.Err(); err != nil {
		return nil, err
	}
	b.gen = newStrokeGen(lay.Surface, prof)
	if err := b.regionWork(); err != nil {
		return nil, err
	}

	b.opt.stage("modes")
	mc := &modeChooser{g: b.gen, prof: prof, keepOut: lay.Rules.FEKeepOutNM, regions: b.regions, feCache: map[*lattice.SiteSet][]Stroke{}}
	mc.choose()
	for _, r := range b.regions {
		b.warnings = append(b.warnings, r.warnings...)
	}
	if err := b.ctx.Err(); err != nil {
		return nil, err
	}

	b.opt.stage("strokes")
	windows := b.makeStrokes()
	if err := checkStrokes(float64(len(b.strokes)), "one or more per run of sites and per FE serpentine; split the design"); err != nil {
		return nil, err
	}
	use := b.modesUsed()
	if err := prof.CheckLimits(&use); err != nil {
		return nil, err
	}
	b.fiducials()
	if err := b.splitLong(); err != nil {
		return nil, err
	}
	for i := range b.strokes {
		b.strokes[i].ID = i
	}

	b.opt.stage("coverage")
	if err := b.ctx.Err(); err != nil {
		return nil, err
	}
	cov := CheckCoverage(lay.Surface, b.coverageRegions(), b.strokes, *prof)
	if !cov.OK {
		b.warnings = append(b.warnings, fmt.Sprintf("coverage check: %d uncovered and %d overcleared site(s); see coverage.issues", cov.Uncovered, cov.Overcleared))
	}

	b.opt.stage("route")
	first, order, err := b.route()
	if err != nil {
		return nil, err
	}

	b.opt.stage("segments")
	c := newCosts(prof, b.fids)
	jobs := b.jobs(order)
	sg := newSegmenter(jobs, c, first)
	starts, _, _ := sg.solve(1)
	jobs, err = b.reoptimise(sg, starts)
	if err != nil {
		return nil, err
	}
	sg = newSegmenter(jobs, c, first)
	starts, total, forced := sg.solve(1)
	for _, j := range forced {
		st := b.strokes[jobs[j].stroke]
		b.warnings = append(b.warnings, fmt.Sprintf("stroke %d (region %q) takes longer than its drift budget of %.3g s even right after a registration: expect drift beyond ±%g nm",
			st.ID, st.Region, jobs[j].budgetS, st.ToleranceNM))
	}
	// A timeline holds a write or dwell per stroke, a move before each,
	// and a registration, a switch and a verification per segment.
	if n := 2*len(b.strokes) + 4*len(starts) + 2; n > MaxActions {
		return nil, &CountError{What: "actions of the timeline", Count: float64(n), Max: MaxActions,
			Cause: fmt.Sprintf("%d strokes in %d segments", len(b.strokes), len(starts))}
	}
	tl := schedule(sg, starts, b.strokes, prof)
	if err := checkFiniteTime(tl.breakdown); err != nil {
		return nil, err
	}

	b.opt.stage("spread")
	dwells := 0
	for _, j := range jobs {
		if j.dwell {
			dwells++
		}
	}
	mcr, err := monteCarlo(b.ctx, sg, prof, b.opt.MonteCarloRuns, b.opt.Seed, dwells, nil)
	if err != nil {
		return nil, err
	}

	b.opt.stage("yield")
	plan := &Plan{
		Design: b.d.Name, Variant: lay.Variant.Name, Profile: prof.Name, Seed: b.opt.Seed,
		FieldWidthNM: b.d.Field.WidthNM, FieldHeightNM: b.d.Field.HeightNM,
		Conditions: b.conditions(use),
		Fiducials:  b.fids,
		Strokes:    b.strokes,
		Segments:   tl.segments,
		Actions:    tl.actions,
		Breakdown:  tl.breakdown,
		P10S:       mcr.p10, P50S: mcr.p50, P90S: mcr.p90,
		Windows:  windows,
		Coverage: cov,
	}
	plan.TotalS = plan.Breakdown.Total()
	if n := len(plan.Segments); n > 0 {
		// The clock summed action by action may differ from the sum by
		// kind in the last bits; the plan ends at TotalS.
		plan.Segments[n-1].EndS = plan.TotalS
	}
	if math.Abs(plan.TotalS-total) > 1e-6*math.Max(total, 1) {
		return nil, &InternalError{Message: fmt.Sprintf("timeline total %v s disagrees with the segmentation's %v s", plan.TotalS, total)}
	}
	plan.FloorS = plan.Breakdown.APWriteS + plan.Breakdown.FEWriteS + plan.Breakdown.DwellS
	if err := checkProbabilities(windows); err != nil {
		return nil, err
	}
	plan.Yield = YieldOf(windows)
	for _, r := range b.regions {
		req := r.requested
		if req == "" {
			req = design.ModeAuto
		}
		plan.Modes = append(plan.Modes, RegionMode{Region: r.name, Role: r.role, Requested: req, Mode: r.mode, Reason: r.reason, Sites: r.count})
	}
	byHand, err := b.byHand(mc)
	if err != nil {
		return nil, err
	}
	plan.ByHandS = byHand
	plan.Warnings = b.warnings
	if b.opt.Progress != nil {
		b.opt.Progress("done", 1)
	}
	return plan, nil
}

// regionWork lays out every region of the variant, once their runs of
// sites are known to be within MaxRuns.
func (b *builder) regionWork() error {
	rules := b.d.Rules
	names := make([]string, len(b.lay.Regions))
	sets := make([]*lattice.SiteSet, len(b.lay.Regions))
	for i := range b.lay.Regions {
		names[i], sets[i] = b.lay.Regions[i].Region.Name, b.lay.Regions[i].Sites
	}
	if err := checkRuns(names, sets); err != nil {
		return err
	}
	for i := range b.lay.Regions {
		rl := &b.lay.Regions[i]
		r := rl.Region
		plain := rl.Sites
		if len(rl.Windows) > 0 {
			win := lattice.NewSiteSet()
			for _, w := range rl.Windows {
				w.AddTo(win)
			}
			plain = rl.Sites.Clone().Difference(win)
		}
		rw := &regionWork{index: i, name: r.Name, role: r.Role, requested: r.Mode, sites: rl.Sites, windows: rl.Windows,
			plain: plain, tolGiven: r.ToleranceNM, segs: b.gen.segsOf(plain)}
		rw.tolAP, rw.tolFE = b.prof.ToleranceAPNM, b.prof.ToleranceFENM
		if rules != nil && rules.APToleranceNM != nil {
			rw.tolAP = *rules.APToleranceNM
		}
		if rules != nil && rules.FEToleranceNM != nil {
			rw.tolFE = *rules.FEToleranceNM
		}
		if r.ToleranceNM > 0 {
			rw.tolAP, rw.tolFE = r.ToleranceNM, r.ToleranceNM
		}
		// The runs are at hand: their lengths count the sites without
		// another pass over the bitsets.
		for _, sg := range rw.segs {
			rw.plainCount += sg.run.Len
		}
		rw.count = rw.plainCount
		if plain != rl.Sites {
			rw.count = rl.Sites.Count()
		}
		b.regions = append(b.regions, rw)
	}
	return nil
}

// makeStrokes generates every region's strokes and returns the plan's
// windows.
func (b *builder) makeStrokes() []Window {
	var windows []Window
	surf := b.lay.Surface
	for _, r := range b.regions {
		for _, w := range r.windows {
			ss := b.gen.windowStrokes(r.name, w, len(windows))
			sites := 0
			for i := range ss {
				ss[i].ToleranceNM = r.tolAP
				sites += ss[i].Sites
			}
			b.strokes = append(b.strokes, ss...)
			p := w.Template.Probability
			open := 1.0
			if b.prof.WindowStyle == WindowStyleDwell {
				open = math.Pow(b.prof.Dwell.Completion, float64(sites))
			}
			if sites < w.Template.Sites() {
				b.warnings = append(b.warnings, fmt.Sprintf("window %v of region %q reaches beyond its terrace: %d of its %d sites exist", w, r.name, sites, w.Template.Sites()))
			}
			windows = append(windows, Window{Region: r.name, Species: w.Template.Species, Template: w.Template.Name,
				At: surf.WindowCentre(w), Sites: sites, OpenProbability: open, Probability: p * open})
		}
		if r.apPart != nil && !r.apPart.IsEmpty() {
			ss := b.gen.apStrokes(r.name, r.apPart)
			for i := range ss {
				ss[i].ToleranceNM = r.tolAP
			}
			b.strokes = append(b.strokes, ss...)
		}
		if r.fePart != nil && !r.fePart.IsEmpty() {
			ss := b.gen.feStrokes(r.name, r.fePart)
			tol := r.tolFE
			if r.mode == design.ModeHybrid {
				tol = b.prof.ToleranceFENM // the fill's edge is inside the AP band
			}
			n := r.plainCount
			if r.fePart != r.plain {
				n = r.fePart.Count()
			}
			shareSites(ss, n)
			for i := range ss {
				ss[i].ToleranceNM = tol
			}
			b.strokes = append(b.strokes, ss...)
		}
	}
	return windows
}

// shareSites gives each FE stroke its share of the sites it fills, by
// length.
func shareSites(ss []Stroke, sites int) {
	total := 0.0
	for _, s := range ss {
		if s.Kind == StrokeRaster {
			total += s.LengthNM
		}
	}
	left := sites
	last := -1
	for i := range ss {
		if ss[i].Kind != StrokeRaster || total == 0 {
			continue
		}
		ss[i].Sites = int(float64(sites) * ss[i].LengthNM / total)
		left -= ss[i].Sites
		last = i
	}
	if last >= 0 {
		ss[last].Sites += left
	}
}

func (b *builder) modesUsed() ModeUse {
	var u ModeUse
	for _, s := range b.strokes {
		switch {
		case s.Kind == StrokeDwell:
			u.Dwell = true
		case s.Mode == design.ModeFE:
			u.FE = true
		default:
			u.AP = true
		}
	}
	return u
}

func (b *builder) conditions(u ModeUse) []Conditions {
	var cs []Conditions
	if u.AP {
		m := b.prof.AP
		cs = append(cs, Conditions{Mode: design.ModeAP, Kind: StrokeLine, BiasV: m.BiasV, CurrentA: m.CurrentA, LineDoseCPerCm: m.LineDoseCPerCm,
			SpeedNMPerS: m.Speed(), LineWidthNM: m.LineWidth(), Passes: max(m.Passes, 1)})
	}
	if u.Dwell {
		d := b.prof.Dwell
		cs = append(cs, Conditions{Mode: design.ModeAP, Kind: StrokeDwell, BiasV: d.BiasV, CurrentA: d.CurrentA, Passes: 1,
			DwellS: d.ExpectedS(), DwellCapS: d.CapS()})
	}
	if u.FE {
		m := b.prof.FE
		cs = append(cs, Conditions{Mode: design.ModeFE, Kind: StrokeRaster, BiasV: m.BiasV, CurrentA: m.CurrentA, LineDoseCPerCm: m.LineDoseCPerCm,
			SpeedNMPerS: m.Speed(), LineWidthNM: m.LineWidth(), Passes: max(m.Passes, 1), PitchNM: m.Pitch()})
	}
	return cs
}

// fiducials takes the design's marks; a design without any gets one at
// the field centre, with a warning.
func (b *builder) fiducials() {
	for _, f := range b.d.Fiducials {
		b.fids = append(b.fids, Fiducial{Name: f.Name, At: r2.Point{X: f.AtNM[0], Y: f.AtNM[1]}})
	}
	if len(b.fids) == 0 {
		c := r2.Point{X: b.d.Field.WidthNM / 2, Y: b.d.Field.HeightNM / 2}
		b.fids = []Fiducial{{Name: "field-centre", At: c}}
		b.warnings = append(b.warnings, "the design has no fiducial marks: registrations are planned at the field centre; add fiducials to the design")
	}
}

// splitLong cuts every stroke whose writing outlasts its drift budget,
// less the approach from the nearest fiducial, into equal pieces that
// each fit, so that a registration can fall between them.
func (b *builder) splitLong() error {
	c := newCosts(&b.prof, b.fids)
	var out []Stroke
	pieces := float64(len(b.strokes))
	for _, s := range b.strokes {
		budget := DriftBudget(s.ToleranceNM, b.prof.Drift.RateNMPerMin)
		if s.Kind == StrokeDwell || math.IsInf(budget, 1) || s.DurationS <= 0 {
			out = append(out, s)
			continue
		}
		// The farthest the tip may have to come from a fiducial to reach
		// any point of the stroke, and the mode switch that may precede it
		// inside the drift clock (a switch at a boundary is made before
		// registering, so only a switch within a segment counts).
		far := 0.0
		for _, p := range []r2.Point{s.Path[0], s.Path[len(s.Path)-1]} {
			f := b.fids[c.nearest(p)]
			far = math.Max(far, f.At.Sub(p).Norm())
		}
		approach := (far+s.LengthNM)/c.speed + c.settle
		room := budget - approach
		if s.DurationS <= budget-c.move(b.fids[c.nearest(s.Path[0])].At, s.Path[0]) {
			out = append(out, s)
			continue
		}
		if room <= 0 {
			out = append(out, s)
			continue // reported by the segmenter as over budget
		}
		kf := math.Ceil(s.DurationS / room)
		if !(kf <= MaxPieces) {
			return &CountError{What: fmt.Sprintf("pieces of a %s stroke of region %q cut at registrations", s.Kind, s.Region), Count: kf, Max: MaxPieces,
				Cause: fmt.Sprintf("it takes %s s against a drift budget of %s s (tolerance ±%s nm at drift.rate_nm_per_min = %s) less %s s to reach it from a fiducial; %s",
					jsonfile.Approx(s.DurationS), jsonfile.Approx(budget), jsonfile.Number(s.ToleranceNM), jsonfile.Number(b.prof.Drift.RateNMPerMin),
					jsonfile.Approx(approach), speedCause(s.Mode, b.prof.modeOf(s.Mode)))}
		}
		if pieces += kf - 1; !(pieces <= MaxStrokes) {
			return checkStrokes(pieces, "strokes longer than their drift budget are cut into pieces at registrations; "+speedCause(s.Mode, b.prof.modeOf(s.Mode)))
		}
		k := int(kf)
		pieces := splitPath(s.Path, k)
		b.warnings = append(b.warnings, fmt.Sprintf("a %s stroke of region %q takes %.0f s, longer than its %.0f s drift budget (±%g nm at %g nm/min): split into %d pieces at registrations",
			s.Kind, s.Region, s.DurationS, budget, s.ToleranceNM, b.prof.Drift.RateNMPerMin, k))
		for _, p := range pieces {
			piece := s
			piece.Path = p
			piece.LengthNM = pathLength(p)
			piece.DurationS = s.DurationS * piece.LengthNM / s.LengthNM
			piece.Sites = int(math.Round(float64(s.Sites) * piece.LengthNM / s.LengthNM))
			out = append(out, piece)
		}
	}
	b.strokes = out
	return nil
}

// splitPath cuts a polyline into k pieces of equal length.
func splitPath(path []r2.Point, k int) [][]r2.Point {
	total := pathLength(path)
	var out [][]r2.Point
	cur := []r2.Point{path[0]}
	target := total / float64(k)
	acc := 0.0
	for i := 1; i < len(path); i++ {
		a, b := path[i-1], path[i]
		seg := b.Sub(a).Norm()
		for len(out) < k-1 && acc+seg >= target*float64(len(out)+1) {
			f := (target*float64(len(out)+1) - acc) / seg
			p := a.Add(b.Sub(a).Mul(f))
			cur = append(cur, p)
			out = append(out, cur)
			cur = []r2.Point{p}
		}
		cur = append(cur, b)
		acc += seg
	}
	return append(out, cur)
}

func (b *builder) coverageRegions() []CoverageRegion {
	cr := make([]CoverageRegion, len(b.regions))
	for i, r := range b.regions {
		cr[i] = CoverageRegion{Name: r.name, Sites: r.sites}
	}
	return cr
}

// modeGroup returns the route group of a stroke: 0 for the mode written
// first, 1 for the other.
func (b *builder) modeGroup(m design.Mode) int {
	first := design.ModeAP
	if b.prof.Order == OrderFEFirst {
		first = design.ModeFE
	}
	if m == first {
		return 0
	}
	return 1
}

// route orders the strokes, each mode's strokes together and in the
// profile's order, from the fiducial nearest the first group's centre.
// It returns that fiducial and the order (stroke indices, with paths
// reversed where the engine says so).
func (b *builder) route() (int, []int, error) {
	c := newCosts(&b.prof, b.fids)
	n := len(b.strokes)
	if n == 0 {
		return 0, nil, nil
	}
	groups := make([]int, n)
	var centre r2.Point
	count := 0
	hasGroup := [2]bool{}
	for i, s := range b.strokes {
		groups[i] = b.modeGroup(s.Mode)
		hasGroup[groups[i]] = true
	}
	firstGroup := 0
	if !hasGroup[0] {
		firstGroup = 1
	}
	for i, s := range b.strokes {
		if groups[i] == firstGroup {
			centre = centre.Add(s.Path[0])
			count++
		}
	}
	centre = centre.Mul(1 / float64(count))
	first := c.nearest(centre)
	start := route.Point{X: b.fids[first].At.X, Y: b.fids[first].At.Y}
	p := route.Problem{Start: &start, MoveSpeed: b.prof.MoveSpeedNMPerS, SettleS: b.prof.SettleS}
	p.Items = make([]route.Item, n)
	for i, s := range b.strokes {
		a, z := s.Path[0], s.Path[len(s.Path)-1]
		p.Items[i] = route.Item{A: route.Point{X: a.X, Y: a.Y}, B: route.Point{X: z.X, Y: z.Y}}
	}
	if hasGroup[0] && hasGroup[1] {
		p.Group = groups
		p.Before = [][2]int{{0, 1}}
	}
	sol, err := route.Solve(b.ctx, p, route.Options{MaxKicks: b.kicks(n), Seed: b.opt.Seed})
	if err != nil {
		return 0, nil, err
	}
	if len(sol.Order) != n {
		return 0, nil, fmt.Errorf("planner: the route engine returned %d of %d strokes", len(sol.Order), n)
	}
	for k, i := range sol.Order {
		if k < len(sol.Reversed) && sol.Reversed[k] {
			reversePath(b.strokes[i].Path)
		}
	}
	return first, sol.Order, nil
}

func (b *builder) kicks(n int) int {
	if b.opt.RouteKicks > 0 {
		return b.opt.RouteKicks
	}
	// Travel between strokes is mostly settle time, which no order
	// changes, so a modest improvement phase is enough.
	return min(max(n/2, 100), 20000)
}

func reversePath(p []r2.Point) {
	for i, j := 0, len(p)-1; i < j; i, j = i+1, j-1 {
		p[i], p[j] = p[j], p[i]
	}
}

// jobs lists the strokes in writing order for the segmenter.
func (b *builder) jobs(order []int) []job {
	jobs := make([]job, len(order))
	for k, i := range order {
		s := &b.strokes[i]
		jobs[k] = job{stroke: i, start: s.Path[0], end: s.Path[len(s.Path)-1], writeS: s.DurationS,
			budgetS: DriftBudget(s.ToleranceNM, b.prof.Drift.RateNMPerMin), mode: s.Mode, dwell: s.Kind == StrokeDwell}
	}
	return jobs
}

// reoptimise re-orders the strokes of each segment from its fiducial
// with the route engine (keeping the mode groups in order) and keeps the
// new order where it is shorter, counting the move on to the next
// fiducial, and every stroke still meets its drift budget.
func (b *builder) reoptimise(sg *segmenter, starts []int) ([]job, error) {
	jobs := append([]job(nil), sg.jobs...)
	c := &sg.c
	for si, s := range starts {
		e := len(jobs)
		if si+1 < len(starts) {
			e = starts[si+1]
		}
		if e-s < 3 {
			continue
		}
		if err := b.ctx.Err(); err != nil {
			return nil, err
		}
		f := c.fiducials[sg.fid[s]].At
		var exit *r2.Point
		if e < len(jobs) {
			x := c.fiducials[sg.fid[e]].At
			exit = &x
		}
		seg := jobs[s:e]
		cost := func(js []job) (float64, bool) {
			t := c.move(f, js[0].start)
			clock := t
			ok := true
			for k, j := range js {
				if k > 0 {
					m := c.move(js[k-1].end, j.start) + c.switchCost(js[k-1].mode, j.mode)
					t += m
					clock += m
				}
				t += j.writeS
				clock += j.writeS
				if clock > j.budgetS+1e-9 {
					ok = false
				}
			}
			if exit != nil {
				t += c.move(js[len(js)-1].end, *exit)
			}
			return t, ok
		}
		old, _ := cost(seg)
		start := route.Point{X: f.X, Y: f.Y}
		p := route.Problem{Start: &start, MoveSpeed: c.speed, SettleS: c.settle, Items: make([]route.Item, len(seg))}
		groups := make([]int, len(seg))
		two := [2]bool{}
		for k, j := range seg {
			p.Items[k] = route.Item{A: route.Point{X: j.start.X, Y: j.start.Y}, B: route.Point{X: j.end.X, Y: j.end.Y}}
			groups[k] = b.modeGroup(j.mode)
			two[groups[k]] = true
		}
		if two[0] && two[1] {
			p.Group, p.Before = groups, [][2]int{{0, 1}}
		}
		sol, err := route.Solve(b.ctx, p, route.Options{MaxKicks: min(max(len(seg)/8, 10), 100), Seed: b.opt.Seed + int64(si)})
		if err != nil {
			return nil, err
		}
		if len(sol.Order) != len(seg) {
			continue
		}
		cand := make([]job, len(seg))
		for k, i := range sol.Order {
			j := seg[i]
			if k < len(sol.Reversed) && sol.Reversed[k] {
				j.start, j.end = j.end, j.start
			}
			cand[k] = j
		}
		if t, ok := cost(cand); ok && t < old-1e-9 {
			for _, j := range cand {
				if st := &b.strokes[j.stroke]; st.Path[0] != j.start {
					reversePath(st.Path)
				}
			}
			copy(jobs[s:e], cand)
		}
	}
	return jobs, nil
}

// byHand returns the total time of the plan a user would make by hand:
// regions in file order, each region's strokes in raster order as
// generated (rows bottom to top, each written left to right), one mode
// per region (hybrid regions written in AP), and a registration at the
// fixed interval of the tightest drift budget of the variant.
func (b *builder) byHand(mc *modeChooser) (float64, error) {
	var strokes []Stroke
	var jobs []job
	c := newCosts(&b.prof, b.fids)
	tightest := math.Inf(1)
	add := func(ss []Stroke) {
		for _, s := range ss {
			if s.Kind != StrokeDwell && !math.IsInf(DriftBudget(s.ToleranceNM, b.prof.Drift.RateNMPerMin), 1) {
				tightest = math.Min(tightest, DriftBudget(s.ToleranceNM, b.prof.Drift.RateNMPerMin))
			}
			strokes = append(strokes, s)
		}
	}
	byRegion := map[string][]Stroke{}
	for _, s := range b.strokes {
		byRegion[s.Region] = append(byRegion[s.Region], s)
	}
	for _, r := range b.regions {
		if r.mode == design.ModeHybrid {
			var ss []Stroke
			for _, s := range byRegion[r.name] {
				if s.Window >= 0 {
					ss = append(ss, s)
				}
			}
			ap := b.gen.apStrokes(r.name, r.plain)
			for i := range ap {
				ap[i].ToleranceNM = r.tolAP
			}
			add(append(ss, ap...))
			continue
		}
		add(byRegion[r.name])
	}
	if len(strokes) == 0 {
		return 0, nil
	}
	// Generated order is raster order; put every stroke back the way it
	// was generated (left to right, bottom to top).
	for i := range strokes {
		s := &strokes[i]
		p := append([]r2.Point(nil), s.Path...)
		a, z := p[0], p[len(p)-1]
		if z.X < a.X || (z.X == a.X && z.Y < a.Y) {
			reversePath(p)
		}
		s.Path = p
		jobs = append(jobs, job{stroke: i, start: p[0], end: p[len(p)-1], writeS: s.DurationS,
			budgetS: DriftBudget(s.ToleranceNM, b.prof.Drift.RateNMPerMin), mode: s.Mode, dwell: s.Kind == StrokeDwell})
	}
	first := c.nearest(jobs[0].start)
	sg := newSegmenter(jobs, c, first)
	interval := tightest
	if math.IsInf(interval, 1) {
		return sg.totalOf([]int{0}), nil
	}
	return sg.totalOf(sg.fixedInterval(interval)), nil
}
