package planner

import (
	"context"
	"fmt"
	"math"
	"runtime"
	"runtime/debug"
	"slices"

	"github.com/golang/geo/r2"

	"dimerpath/internal/blocks"
	"dimerpath/internal/jsonfile"
	"dimerpath/internal/units"
	"dimerpath/lattice"
	"dimerpath/lattice/design"
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
	defer func() { b.gc.release() }()
	return b.build()
}

// CheckWriting runs the part of Build that decides what is written, on
// the same layout and profile: each region's write mode, the strokes and
// their coverage expectation, with every site outside the regions that
// clears above prof.StrayLimit (Coverage.StraySites, with the region and
// stroke that reach it). A design whose CheckWriting finds no such site
// plans without a coverage error: Build computes the same strokes and
// the same expectation. The modes are returned for the messages.
func CheckWriting(ctx context.Context, lay *design.Layout, prof Profile) (cov Coverage, modes []RegionMode, err error) {
	var unused *Plan
	defer recoverInternal(&unused, &err)
	b := &builder{ctx: ctx, lay: lay, d: lay.Design, prof: prof}
	defer func() { b.gc.release() }()
	_, cov, err = b.writing()
	if err != nil {
		return Coverage{}, nil, err
	}
	return cov, b.regionModes(), nil
}

// regionModes returns each region's mode as drawn and as planned.
func (b *builder) regionModes() []RegionMode {
	var modes []RegionMode
	for _, r := range b.regions {
		req := r.requested
		if req == "" {
			req = design.ModeAuto
		}
		modes = append(modes, RegionMode{Region: r.name, Role: r.role, Requested: req, Mode: r.mode, Reason: r.reason, Sites: r.count})
	}
	return modes
}

type builder struct {
	ctx  context.Context
	gc   *gcBudget // a large plan's share of the soft memory limit
	lay  *design.Layout
	d    *design.Design // lay.Design
	prof Profile
	opt  Options

	gen      *strokeGen
	placed   []lattice.Window // the plan's windows on the lattice, as Plan.Windows; nil once openWindows has read it
	regions  []*regionWork
	fids     []Fiducial
	strokes  []Stroke
	warnings []string

	// painted is the union of the regions' sites, made once for the
	// windows (openWindows) and the coverage check, and dropped when the
	// check has it.
	painted *lattice.SiteSet

	model  segModel // the planning values (session.go)
	costs  costs
	stepOf []int // the step of each stroke

	lastCouplings []couplingWork
	marginUsed    float64
}

// writing runs the stages that decide what is written: the profile's
// checks, each region's mode, the strokes (split at their drift budgets)
// and their coverage expectation. CheckWriting stops here; Build runs
// startWriting and finishes the coverage check beside its route.
func (b *builder) writing() ([]Window, Coverage, error) {
	windows, job, err := b.startWriting()
	if err != nil {
		return nil, Coverage{}, err
	}
	cov, err := b.finishCoverage(job)
	if err != nil {
		return nil, Coverage{}, err
	}
	return windows, cov, nil
}

// startWriting is writing up to the coverage check, which it starts on
// its own goroutine (finishCoverage waits for it): nothing the route, the
// segments and the margin search compute depends on it, only the
// session's repairs (each stroke's ExpectedMissed), so the check's
// workers and the route share the cores.
func (b *builder) startWriting() ([]Window, *coverageJob, error) {
	prof, lay := &b.prof, b.lay
	if err := prof.Validate(); err != nil {
		return nil, nil, err
	}
	if err := prof.checkField(b.d.Field.WidthNM, b.d.Field.HeightNM); err != nil {
		return nil, nil, err
	}
	if err := b.checkRaster(); err != nil {
		return nil, nil, err
	}
	if err := b.ctx.Err(); err != nil {
		return nil, nil, err
	}
	b.gen = newStrokeGen(lay.Surface, prof)
	if err := b.regionWork(); err != nil {
		return nil, nil, err
	}
	b.model, _ = planModel(prof) // the stroke splits need its values

	// The union of the regions' sites, which openWindows and the check
	// read, depends on the regions alone: on more than one core it is
	// made beside the modes and strokes.
	var windows []Window
	var err error
	strokes := func() { windows, err = b.modesAndStrokes() }
	if runtime.GOMAXPROCS(0) > 1 {
		blocks.Both(func() { b.painted = b.regionsUnion() }, strokes)
	} else {
		strokes()
	}
	if err != nil {
		return nil, nil, err
	}

	b.opt.stage("coverage")
	if err := b.ctx.Err(); err != nil {
		return nil, nil, err
	}
	if err := b.openWindows(windows); err != nil {
		return nil, nil, err
	}
	b.placed = nil // only openWindows reads it
	return windows, b.startCoverage(), nil
}

// modesAndStrokes chooses each region's mode and makes the strokes,
// split at their drift budgets and numbered, and returns the plan's
// windows.
func (b *builder) modesAndStrokes() ([]Window, error) {
	prof, lay := &b.prof, b.lay
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
	if err := b.checkTolerances(); err != nil {
		return nil, err
	}
	b.fiducials()
	b.costs = newCosts(prof, b.fids)
	b.costs.creepFrac = b.model.creep
	if err := b.splitLong(); err != nil {
		return nil, err
	}
	for i := range b.strokes {
		b.strokes[i].ID = i
	}
	b.gc = holdGCBudget(len(b.strokes))
	return windows, nil
}

// coverageJob is the coverage check running on its own goroutine: done
// is closed when cov, strokes (the check's copy of the strokes, with
// their expected missed and stray sites) and err are set.
type coverageJob struct {
	done    chan struct{}
	cancel  context.CancelFunc
	cov     Coverage
	strokes []Stroke
	err     error
	// warnAt is where in b.warnings the check's warning goes: where it
	// stood when the check ran before the route.
	warnAt int
	// background is set when the check (its pieces and its sums) runs
	// beside the route (more than one core); taken is set once
	// finishCoverage took the results.
	background, taken bool
}

// startCoverage starts the coverage check of b.strokes as they stand
// before the route reverses paths in place and changes tolerances. With
// more than one core the whole check (pieces and sums) runs on its own
// goroutine beside the route, of its own copy of the strokes and their
// paths. On one core, and for a plan large enough to hold a GC budget,
// it runs here: overlapping gains nothing on one core, and a large
// plan's memory matters more than the overlap. A panic of the check
// comes back as an *InternalError.
func (b *builder) startCoverage() *coverageJob {
	ctx, cancel := context.WithCancel(b.ctx)
	job := &coverageJob{done: make(chan struct{}), cancel: cancel, warnAt: len(b.warnings),
		background: runtime.GOMAXPROCS(0) > 1 && len(b.strokes) < gcBudgetMinStrokes}
	prof := b.prof
	// Beside the route the check needs its own copy of the strokes and
	// of their paths, which Build reverses in place once the route has
	// solved; on one core it runs now and sets Build's strokes in place
	// (no copy: 145 MB at 10^6 windows, held beside the pieces at the
	// check's peak).
	strokes := b.strokes
	if job.background {
		strokes = cloneStrokesAndPaths(strokes)
	}
	surf, regions, painted := b.lay.Surface, b.coverageRegions(), b.paintedSites()
	b.painted = nil
	check := func() {
		defer close(job.done)
		defer func() {
			if r := recover(); r != nil {
				job.err = &InternalError{Message: fmt.Sprintf("panic: %v", r), Stack: debug.Stack()}
			}
		}()
		if coveragePiecesHook != nil {
			coveragePiecesHook()
		}
		ck := newCoverageCheckPainted(surf, regions, painted, strokes, &prof)
		if coverageStartHook != nil {
			coverageStartHook(ctx)
		}
		if job.err = ck.run(ctx); job.err == nil {
			job.cov, job.strokes = ck.cov, ck.strokes
		}
	}
	if job.background {
		go check() // its pieces too are made beside the route, of its copy
	} else {
		check()
	}
	return job
}

// cloneStrokesAndPaths copies the strokes and their paths (the points
// in one allocation).
func cloneStrokesAndPaths(strokes []Stroke) []Stroke {
	out := slices.Clone(strokes)
	n := 0
	for _, s := range strokes {
		n += len(s.Path)
	}
	pts := make([]r2.Point, 0, n)
	for i, s := range strokes {
		if s.Path == nil {
			continue
		}
		k := len(pts)
		pts = append(pts, s.Path...)
		out[i].Path = pts[k:len(pts):len(pts)]
	}
	return out
}

// coveragePiecesHook, when set (by tests only), is called before the
// check makes its pieces: a test delays them past the route to see that
// the check reads its own copy of the paths, not the ones Build
// reverses after the route.
var coveragePiecesHook func()

// coverageStartHook, when set (by tests only), is called with the
// check's context before its sums: a test holds the check there to see
// that Build stops it.
var coverageStartHook func(ctx context.Context)

// stop stops a coverage check that is no longer wanted (Build
// failed on the way) and waits for its goroutine to end.
func (job *coverageJob) stop() {
	if job != nil {
		job.cancel()
		<-job.done
	}
}

// finishCoverage waits for the coverage check and takes its results:
// each stroke's expected missed and stray sites, and the warning when a
// site outside the regions clears above the limit.
func (b *builder) finishCoverage(job *coverageJob) (Coverage, error) {
	if job.taken {
		return job.cov, nil
	}
	<-job.done
	job.cancel()
	if job.err != nil {
		return Coverage{}, job.err
	}
	if len(job.strokes) != len(b.strokes) {
		return Coverage{}, &InternalError{Message: fmt.Sprintf("the coverage check returned %d strokes for %d", len(job.strokes), len(b.strokes))}
	}
	for i := range b.strokes {
		b.strokes[i].ExpectedMissed, b.strokes[i].ExpectedStray = job.strokes[i].ExpectedMissed, job.strokes[i].ExpectedStray
	}
	job.strokes, job.taken = nil, true
	cov := job.cov
	if !cov.OK {
		w := fmt.Sprintf("coverage check: %d site(s) outside every region clear with more than %.2g %%; see coverage.stray_sites", cov.OverLimit, 100*cov.StrayLimit)
		b.warnings = slices.Insert(b.warnings, job.warnAt, w)
	}
	return cov, nil
}

func (b *builder) build() (plan *Plan, err error) {
	prof, lay := &b.prof, b.lay
	windows, job, err := b.startWriting()
	if err != nil {
		return nil, err
	}
	defer func() {
		// Failed or panicking (Build's recoverInternal takes the panic):
		// the check is no longer wanted.
		if plan == nil {
			job.stop()
		}
	}()
	if !job.background {
		// Done already: its results taken now, its copy of the strokes
		// let go before the route.
		if _, err := b.finishCoverage(job); err != nil {
			return nil, err
		}
	}
	var drift DriftPlan
	b.model, drift = planModel(prof)
	use := b.modesUsed()

	b.opt.stage("route")
	b.gc.update()
	steps, err := b.assignSteps(windows)
	if err != nil {
		return nil, err
	}
	b.stepOf = make([]int, len(b.strokes))
	for k, st := range steps {
		for _, i := range st.strokes {
			b.stepOf[i] = k
		}
	}
	cps := b.couplings()
	b.lastCouplings = cps
	for _, cp := range cps {
		if cp.sa >= 0 && cp.sb >= 0 && b.stepOf[cp.sa] != b.stepOf[cp.sb] {
			// The later side registers locally on the earlier: its
			// tolerance relative to it is the coupling's.
			later := cp.sa
			if b.stepOf[cp.sb] > b.stepOf[cp.sa] {
				later = cp.sb
			}
			s := &b.strokes[later]
			s.ToleranceNM = math.Min(s.ToleranceNM, cp.ToleranceNM)
		}
	}
	if err := b.planSteps(steps, cps); err != nil {
		return nil, err
	}

	b.opt.stage("segments")
	b.gc.update()
	draws := drawMotion(prof, b.runs(), b.opt.Seed)
	margin, tol, pairIndex, err := b.chooseMargin(b.ctx, steps, cps, draws)
	if err != nil {
		return nil, err
	}
	drift.Margin = margin
	b.marginUsed = margin
	for _, st := range steps {
		if st.sg != nil {
			st.sg.releaseSolve() // segmentations are done: free its memory
		}
	}
	// Said once per region: a tolerance too tight for the registration
	// error makes every stroke of a region fail alike.
	var forced []*strokeNote
	for _, st := range steps {
		for _, j := range st.forced {
			s := b.strokes[st.jobs[j].stroke]
			n := noteFor(&forced, s.Region, "", s.ToleranceNM)
			n.ids = append(n.ids, s.ID)
		}
	}
	for _, n := range forced {
		what := fmt.Sprintf("stroke %d (region %q) cannot be held", n.ids[0], n.region)
		if len(n.ids) > 1 {
			what = fmt.Sprintf("%d strokes of region %q (ids %s) cannot be held", len(n.ids), n.region, units.Ranges(n.ids, 6))
		}
		b.warnings = append(b.warnings, fmt.Sprintf("%s within ±%.3g nm even right after a registration at the planned drift (%.3g nm/min) and creep: expect %s to leave %s tolerance",
			what, n.tolNM, drift.RateNMPerMin, map[bool]string{true: "them", false: "it"}[len(n.ids) > 1], map[bool]string{true: "their", false: "its"}[len(n.ids) > 1]))
	}
	// A timeline holds a write or dwell per stroke, a move before each,
	// a registration, a switch, a conditioning and a verification per
	// segment, a verification and a repair per feature, and the session's
	// steps.
	nseg := 0
	for _, st := range steps {
		nseg += len(st.starts)
	}
	if n := 2*len(b.strokes) + 6*nseg + 2*len(b.regions)*len(steps) + 16; n > MaxActions {
		return nil, &CountError{What: "actions of the timeline", Count: float64(n), Max: MaxActions,
			Cause: fmt.Sprintf("%d strokes in %d segments", len(b.strokes), nseg)}
	}
	// The dopant yield depends on the windows alone: taken while the
	// coverage check may still be running.
	var yield Yield
	if checkProbabilities(windows) == nil {
		yield = YieldOf(windows, b.opt.Seed)
	}
	// The session's repairs need each stroke's expected missed sites.
	cov, err := b.finishCoverage(job)
	if err != nil {
		return nil, err
	}
	// What reads the segmenters beyond the timeline's needs runs first:
	// the segments' notes and the by-hand plan (its own jobs and
	// segmenter, ~190 MB at 10^6 strokes, are then not held beside the
	// timeline's actions, ~300 MB); the segmenters keep only what the
	// timeline reads (keepForTimeline).
	notes := b.describeSegments(steps, tol, drift)
	hand, err := b.byHand(steps, margin)
	if err != nil {
		return nil, err
	}
	for _, st := range steps {
		if err := st.keepForTimeline(b.strokes); err != nil {
			return nil, err
		}
	}
	b.gc.collect()
	tl, stepList, tm := b.sessionTimeline(steps, windows)
	if err := checkFiniteTime(tl.breakdown); err != nil {
		return nil, err
	}
	for _, st := range steps {
		st.sg = nil // the timeline was its last reader
	}

	b.opt.stage("spread")
	b.gc.update()
	mct, err := sampleTimes(b.ctx, tm, prof, b.runs(), b.opt.Seed)
	if err != nil {
		return nil, err
	}

	b.opt.stage("yield")
	plan = &Plan{
		Design: b.d.Name, Variant: lay.Variant.Name, Profile: prof.Name, Seed: b.opt.Seed,
		FieldWidthNM: b.d.Field.WidthNM, FieldHeightNM: b.d.Field.HeightNM,
		Conditions: b.conditions(use),
		Fiducials:  b.fids,
		Strokes:    b.strokes,
		Segments:   tl.segments,
		Actions:    tl.actions,
		Steps:      stepList,
		Breakdown:  mct.breakdown,
		P10S:       mct.p10, P50S: mct.p50, P90S: mct.p90,
		ScheduleS:    tl.clock,
		PInTolerance: tol.all,
		Drift:        drift,
		Windows:      windows,
		Coverage:     cov,
	}
	plan.TotalS = plan.Breakdown.Total()
	if math.Abs(plan.TotalS-mct.mean) > 1e-6*math.Max(mct.mean, 1) {
		return nil, &InternalError{Message: fmt.Sprintf("the breakdown sums to %v s, the Monte Carlo mean is %v s", plan.TotalS, mct.mean)}
	}
	if err := setSegmentNotes(plan, steps, notes); err != nil {
		return nil, err
	}
	b.describeCouplings(plan, cps, tol, pairIndex)
	b.windowWarnings(plan)
	plan.FloorS = tl.breakdown.APWriteS + tl.breakdown.FEWriteS + tl.breakdown.DwellS
	if err := checkProbabilities(windows); err != nil {
		return nil, err // yield was not taken
	}
	plan.Yield = yield
	plan.Modes = b.regionModes()
	plan.ByHandS = byHandTotal(plan.TotalS, hand)
	plan.Warnings = b.warnings
	if b.opt.Progress != nil {
		b.opt.Progress("done", 1)
	}
	return plan, nil
}

// runs returns the number of Monte Carlo samples.
func (b *builder) runs() int {
	if b.opt.MonteCarloRuns > 0 {
		return b.opt.MonteCarloRuns
	}
	return DefaultMonteCarloRuns
}

// regionWork lays out every region of the variant, once their runs of
// sites are known to be within MaxRuns.
func (b *builder) regionWork() error {
	names := make([]string, len(b.lay.Regions))
	sets := make([]*lattice.SiteSet, len(b.lay.Regions))
	for i := range b.lay.Regions {
		names[i], sets[i] = b.lay.Regions[i].Region.Name, b.lay.Regions[i].Sites
	}
	if err := checkRuns(names, sets); err != nil {
		return err
	}
	// Each region's plain sites and their run segments (checkRuns bounded
	// their number), on every core at once: a pad's segments are most of
	// this stage, in the serial head of the plan.
	plains := make([]*lattice.SiteSet, len(b.lay.Regions))
	segs := make([][]runSeg, len(b.lay.Regions))
	blocks.Run(len(b.lay.Regions), 2, 1, func() func(lo, hi int) {
		return func(lo, hi int) {
			for i := lo; i < hi; i++ {
				rl := &b.lay.Regions[i]
				plain := rl.Sites
				if len(rl.Windows) > 0 {
					win := lattice.NewSiteSet()
					for _, w := range rl.Windows {
						w.AddTo(win)
					}
					plain = rl.Sites.Clone().Difference(win)
				}
				plains[i], segs[i] = plain, runSegments(b.gen.surf, plain)
			}
		}
	})
	for i := range b.lay.Regions {
		rl := &b.lay.Regions[i]
		r := rl.Region
		plain := plains[i]
		b.gen.segs[plain] = segs[i] // what segsOf(plain) returns from now on
		rw := &regionWork{index: i, name: r.Name, role: r.Role, requested: r.Mode, sites: rl.Sites, windows: rl.Windows,
			plain: plain, tolGiven: r.ToleranceNM, segs: segs[i]}
		rw.dopant, rw.stepNamed = b.d.DopantOf(r), r.LithographyStep
		b.tolerances(rw, r)
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

// tolerances sets a region's AP and FE tolerances and where each comes
// from (RegionTolerances).
func (b *builder) tolerances(rw *regionWork, r *design.Region) {
	vi := slices.IndexFunc(b.d.Variants, func(v design.Variant) bool { return v.Name == b.lay.Variant.Name })
	t := RegionTolerances(b.d, vi, rw.index, r, &b.prof)
	rw.tolAP, rw.tolFE, rw.srcAP, rw.srcFE = t.AP, t.FE, t.SourceAP, t.SourceFE
}

// Tolerances are the placement tolerances (±nm) a region is held to in
// atomic-precision and in field-emission work, and where each comes
// from (a design or profile field).
type Tolerances struct {
	AP, FE             float64
	SourceAP, SourceFE string
}

// RegionTolerances returns the tolerances the planner holds region r
// (region index of variant variant of d) to: its own tolerance_nm, else
// its role's (leads, gates, pads: the design's rules, else the
// profile's), else the mode's (the design's rules, else the profile's);
// field-emission work is never held tighter than the FE tolerance unless
// the region asks for it.
func RegionTolerances(d *design.Design, variant, index int, r *design.Region, prof *Profile) Tolerances {
	rules := d.Rules
	if rules == nil {
		rules = &design.Rules{}
	}
	pick := func(rule *float64, rulePath string, prof float64, profPath string) (float64, string) {
		if rule != nil {
			return *rule, "rules." + rulePath
		}
		return prof, "the profile's " + profPath
	}
	var t Tolerances
	t.AP, t.SourceAP = pick(rules.APToleranceNM, "ap_tolerance_nm", prof.ToleranceAPNM, "tolerance_ap_nm")
	t.FE, t.SourceFE = pick(rules.FEToleranceNM, "fe_tolerance_nm", prof.ToleranceFENM, "tolerance_fe_nm")
	var role float64
	var src string
	switch r.Role {
	case design.RoleLead:
		role, src = pick(rules.LeadToleranceNM, "lead_tolerance_nm", prof.ToleranceLeadNM, "tolerance_lead_nm")
	case design.RoleGate:
		role, src = pick(rules.GateToleranceNM, "gate_tolerance_nm", prof.ToleranceGateNM, "tolerance_gate_nm")
	case design.RolePad:
		role, src = pick(rules.PadToleranceNM, "pad_tolerance_nm", prof.TolerancePadNM, "tolerance_pad_nm")
	}
	if role > 0 {
		t.AP, t.SourceAP = role, src
		if role > t.FE {
			t.FE, t.SourceFE = role, src
		}
	}
	if r.ToleranceNM > 0 {
		src := fmt.Sprintf("variants[%d].regions[%d].tolerance_nm", variant, index)
		t.AP, t.FE, t.SourceAP, t.SourceFE = r.ToleranceNM, r.ToleranceNM, src, src
	}
	return t
}

// checkTolerances refuses a tolerance no registration can ever hold: an
// atomic-precision stroke's below the local registration's error, a
// field-emission stroke's below the coarse registration's.
func (b *builder) checkTolerances() error {
	reg := b.prof.Registration
	for _, r := range b.regions {
		// A hybrid region's FE fill lies inside its AP band: it is held
		// to the FE tolerance (see makeStrokes).
		feTol, feSrc := r.tolFE, r.srcFE
		if r.mode == design.ModeHybrid {
			feTol, feSrc = b.prof.ToleranceFENM, "the profile's tolerance_fe_nm"
		}
		checks := []struct {
			used      bool
			tol       float64
			src, kind string
			err       float64
			errPath   string
		}{
			{r.apPart != nil && !r.apPart.IsEmpty() || len(r.windows) > 0, r.tolAP, r.srcAP, "local", reg.Local.ErrorNM, "registration.local.error_nm"},
			{r.fePart != nil && !r.fePart.IsEmpty(), feTol, feSrc, "coarse", reg.CoarseErrorNM, "registration.coarse_error_nm"},
		}
		for _, c := range checks {
			if c.used && c.tol <= c.err {
				return fmt.Errorf("planner: %s = %g nm (region %q): a tolerance no %s registration can hold, its error alone is ±%g nm (%s); widen the tolerance or calibrate the registration",
					c.src, c.tol, r.name, c.kind, c.err, c.errPath)
			}
		}
	}
	return nil
}

// makeStrokes generates every region's strokes and returns the plan's
// windows.
func (b *builder) makeStrokes() []Window {
	// Room for the windows and their strokes at once: 10^6 windows grown
	// by doubling leave some hundreds of MB of copies behind.
	nwin := 0
	for _, r := range b.regions {
		nwin += len(r.windows)
	}
	var windows []Window // nil without windows, as before
	if nwin > 0 {
		windows = make([]Window, 0, nwin)
	}
	b.placed = slices.Grow(b.placed, nwin)
	b.strokes = slices.Grow(b.strokes, nwin)
	surf := b.lay.Surface
	fills := b.feFills()
	for k, r := range b.regions {
		for _, w := range r.windows {
			n0 := len(b.strokes)
			b.strokes = b.gen.appendWindowStrokes(b.strokes, r.name, w, len(windows))
			ss := b.strokes[n0:]
			sites := 0
			for i := range ss {
				ss[i].ToleranceNM = r.tolAP
				sites += ss[i].Sites
			}
			if sites < w.Template.Sites() {
				b.warnings = append(b.warnings, fmt.Sprintf("window %v of region %q reaches beyond its terrace: %d of its %d sites exist", w, r.name, sites, w.Template.Sites()))
			}
			t := w.Template
			windows = append(windows, Window{Region: r.name, Species: t.Species, Template: t.Name,
				At: surf.WindowCentre(w), Sites: sites, P0: t.P0, P1: t.P1, P2Plus: t.P2Plus, P1SD: t.P1SD})
			b.placed = append(b.placed, w)
		}
		if r.apPart != nil && !r.apPart.IsEmpty() {
			ss := b.gen.apStrokes(r.name, r.apPart)
			for i := range ss {
				ss[i].ToleranceNM = r.tolAP
			}
			b.strokes = append(b.strokes, ss...)
		}
		if r.fePart != nil && !r.fePart.IsEmpty() {
			ss := fills[k]
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

// feFills returns each region's FE strokes (nil for a region without an
// FE part), the regions filled on the cores at once: a fill depends on
// its region alone, so the strokes are the same on any core count.
func (b *builder) feFills() [][]Stroke {
	var todo []int
	for k, r := range b.regions {
		if r.fePart != nil && !r.fePart.IsEmpty() {
			b.gen.segsOf(r.fePart) // made here: the workers only read them
			todo = append(todo, k)
		}
	}
	fills := make([][]Stroke, len(b.regions))
	blocks.Run(len(todo), 2, 1, func() func(lo, hi int) {
		g := *b.gen // each worker's: its path block is its own
		g.pts = nil
		return func(lo, hi int) {
			for _, k := range todo[lo:hi] {
				r := b.regions[k]
				fills[k] = g.feStrokes(r.name, r.fePart)
			}
		}
	})
	return fills
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
	line := func(mode design.Mode, kind StrokeKind) Conditions {
		m, l := b.prof.modeOf(mode), b.prof.Line(mode)
		return Conditions{Mode: mode, Kind: kind, BiasV: m.BiasV, CurrentA: m.CurrentA, LineDoseCPerCm: m.LineDoseCPerCm,
			SpeedNMPerS: m.Speed(), LineWidthNM: l.Width(), Passes: max(m.Passes, 1),
			YieldPerElectron: l.Yield, SigmaNM: l.SigmaNM, ElectronsPerSite: ElectronsPerRowSite(m.LineDoseCPerCm) * float64(max(m.Passes, 1))}
	}
	if u.AP {
		cs = append(cs, line(design.ModeAP, StrokeLine))
	}
	if u.Dwell {
		d := b.prof.Dwell
		cs = append(cs, Conditions{Mode: design.ModeAP, Kind: StrokeDwell, BiasV: d.BiasV, CurrentA: d.CurrentA, Passes: 1,
			DwellS: b.prof.DwellExpectedS(), DwellCapS: b.prof.DwellCapS(), YieldPerElectron: b.prof.DwellYield(), SigmaNM: d.SigmaNM})
	}
	if u.FE {
		c := line(design.ModeFE, StrokeRaster)
		c.PitchNM = b.prof.FEPitch()
		cs = append(cs, c)
	}
	return cs
}

// strokeNote gathers the strokes of one region (and kind, and
// tolerance) that share a warning, so that it is said once for them.
type strokeNote struct {
	region, kind string
	tolNM        float64
	ids          []int
	// longestS is the longest stroke's duration, budgetS its drift
	// budget; pieces counts the pieces they were cut into.
	longestS, budgetS float64
	pieces            int
}

// noteFor returns the note of notes for the region, kind and tolerance,
// appending a new one (notes keep the order they were first met in).
func noteFor(notes *[]*strokeNote, region, kind string, tolNM float64) *strokeNote {
	for _, n := range *notes {
		if n.region == region && n.kind == kind && n.tolNM == tolNM {
			return n
		}
	}
	n := &strokeNote{region: region, kind: kind, tolNM: tolNM}
	*notes = append(*notes, n)
	return n
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

// splitLong cuts every stroke whose writing outlasts its drift budget at
// the planning values (after a local registration for AP work; after a
// coarse one and the approach from the nearest fiducial for FE work)
// into equal pieces that each fit, so that a registration can fall
// between them.
func (b *builder) splitLong() error {
	c := &b.costs
	m := b.model
	rate := m.r0 * m.rateMul
	// out is made at the first stroke cut: until then the strokes stand
	// as they are (most plans cut none, and a copy of 10^6 strokes is
	// 150 MB).
	var out []Stroke
	keep := func(s Stroke) {
		if out != nil {
			out = append(out, s)
		}
	}
	var split []*strokeNote
	pieces := float64(len(b.strokes))
	for i, s := range b.strokes {
		err, approach := m.errLocal, 0.0
		if s.Mode == design.ModeFE {
			err = m.errCoase
			// The farthest the tip may have to come from a fiducial to
			// reach any point of the stroke.
			far := 0.0
			for _, p := range []r2.Point{s.Path[0], s.Path[len(s.Path)-1]} {
				far = math.Max(far, b.fids[c.nearest(p)].At.Sub(p).Norm())
			}
			approach = (far+s.LengthNM)/c.speed + c.settle
		}
		budget := DriftBudget(s.ToleranceNM, err, 0, rate)
		if s.Kind == StrokeDwell || math.IsInf(budget, 1) || s.DurationS <= 0 || s.DurationS <= budget-approach {
			keep(s)
			continue
		}
		room := budget - approach
		if room <= 0 {
			keep(s)
			continue // reported by the segmenter as over budget
		}
		kf := math.Ceil(s.DurationS / room)
		if !(kf <= MaxPieces) {
			return &CountError{What: fmt.Sprintf("pieces of a %s stroke of region %q cut at registrations", s.Kind, s.Region), Count: kf, Max: MaxPieces,
				Cause: fmt.Sprintf("it takes %s s against a drift budget of %s s (tolerance ±%s nm at the planned %s nm/min) less %s s to reach it from a fiducial; %s",
					jsonfile.Approx(s.DurationS), jsonfile.Approx(budget), jsonfile.Number(s.ToleranceNM), jsonfile.Approx(rate),
					jsonfile.Approx(approach), speedCause(s.Mode, b.prof.modeOf(s.Mode)))}
		}
		if pieces += kf - 1; !(pieces <= MaxStrokes) {
			return checkStrokes(pieces, "strokes longer than their drift budget are cut into pieces at registrations; "+speedCause(s.Mode, b.prof.modeOf(s.Mode)))
		}
		k := int(kf)
		if out == nil {
			out = make([]Stroke, i, len(b.strokes)+k)
			copy(out, b.strokes[:i])
		}
		parts := splitPath(s.Path, k)
		n := noteFor(&split, s.Region, string(s.Kind), s.ToleranceNM)
		n.ids = append(n.ids, s.ID)
		n.pieces += k
		if s.DurationS > n.longestS {
			n.longestS, n.budgetS = s.DurationS, budget
		}
		for _, p := range parts {
			piece := s
			piece.Path = p
			piece.LengthNM = pathLength(p)
			piece.DurationS = s.DurationS * piece.LengthNM / s.LengthNM
			piece.Sites = int(math.Round(float64(s.Sites) * piece.LengthNM / s.LengthNM))
			out = append(out, piece)
		}
	}
	if out != nil {
		b.strokes = out
	} else if len(b.strokes) == 0 {
		b.strokes = nil
	}
	// Said once per region and kind of stroke, not once per stroke.
	for _, n := range split {
		if len(n.ids) == 1 {
			b.warnings = append(b.warnings, fmt.Sprintf("a %s stroke of region %q takes %.3g s, longer than its %.3g s drift budget (±%.3g nm at %.3g nm/min): split into %d pieces at registrations",
				n.kind, n.region, n.longestS, n.budgetS, n.tolNM, rate, n.pieces))
			continue
		}
		b.warnings = append(b.warnings, fmt.Sprintf("%d %s strokes of region %q outlast their drift budget (±%.3g nm at %.3g nm/min; the longest takes %.3g s against %.3g s): split into %d pieces in all, at registrations",
			len(n.ids), n.kind, n.region, n.tolNM, rate, n.longestS, n.budgetS, n.pieces))
	}
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

// paintedSites returns the union of the regions' sites (b.painted,
// made on first use).
func (b *builder) paintedSites() *lattice.SiteSet {
	if b.painted == nil {
		b.painted = b.regionsUnion()
	}
	return b.painted
}

// regionsUnion returns the union of the regions' sites.
func (b *builder) regionsUnion() *lattice.SiteSet {
	sets := make([]*lattice.SiteSet, len(b.regions))
	for i, r := range b.regions {
		sets[i] = r.sites
	}
	return lattice.UnionOf(sets...)
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

func (b *builder) kicks(n int) int {
	if b.opt.RouteKicks > 0 {
		return b.opt.RouteKicks
	}
	// Travel between strokes is mostly settle time, which no order
	// changes, so a modest improvement phase is enough. Above
	// kicksFullMax strokes a kick costs more (its reversals run over
	// longer stretches of the tour) and reaches a smaller share of it, so
	// the count falls as 1/n: on a 300 x 300 donor array 200 kicks gave
	// a plan 0.03 s longer of 259,774 s than 20,000, and at 10^6 strokes
	// the 20,000 kicks were a tenth of the plan's time.
	k := min(max(n/2, 100), 20000)
	if n > kicksFullMax {
		k = max(k*kicksFullMax/n, 100)
	}
	return k
}

// kicksFullMax is the most strokes that get the full count of kicks.
const kicksFullMax = 100_000

func reversePath(p []r2.Point) {
	for i, j := 0, len(p)-1; i < j; i, j = i+1, j-1 {
		p[i], p[j] = p[j], p[i]
	}
}

// byHand returns the session time of the plan a user would make by
// hand: the same steps and session around them, but in each lithography
// step the regions in file order, each region's strokes in raster order
// as generated (rows bottom to top, each written left to right), one
// mode per region (hybrid regions written in AP), the windows last, and a
// registration at the fixed interval of the tightest budget at the
// planned values (local before atomic-precision work, coarse before
// field-emission work). It returns each step's part (byHandTotal adds
// them to the session); it runs before the timeline, when the timeline's
// actions are not yet held beside its own jobs and segmenter.
func (b *builder) byHand(steps []*stepWork, margin float64) ([]byHandStep, error) {
	// The plan's strokes by index (a copy of each would hold the whole
	// plan again: 10^6 strokes are some 200 MB).
	byRegion := map[string][]int{}
	for i := range b.strokes {
		s := &b.strokes[i]
		byRegion[s.Region] = append(byRegion[s.Region], i)
	}
	hs := make([]byHandStep, len(steps))
	inStep := make([]bool, len(b.strokes))
	for k, st := range steps {
		if st.sg == nil || st.sg.n == 0 {
			continue
		}
		hs[k].segmented, hs[k].plannedS = true, st.sg.totalOf(st.starts, st.kinds)
		clear(inStep)
		for _, i := range st.strokes {
			inStep[i] = true
		}
		var plain, wins []*Stroke
		for _, r := range b.regions {
			for _, i := range byRegion[r.name] {
				if inStep[i] && b.strokes[i].Window >= 0 {
					wins = append(wins, &b.strokes[i])
				}
			}
			if r.mode == design.ModeHybrid {
				if b.plainStep(byRegion[r.name]) == k {
					ap := b.gen.apStrokes(r.name, r.plain)
					for i := range ap {
						ap[i].ToleranceNM = r.tolAP
						ap[i].Window = -1
						plain = append(plain, &ap[i])
					}
				}
				continue
			}
			for _, i := range byRegion[r.name] {
				if inStep[i] && b.strokes[i].Window < 0 {
					plain = append(plain, &b.strokes[i])
				}
			}
		}
		all := append(plain, wins...)
		if len(all) == 0 {
			continue
		}
		jobs := make([]job, len(all))
		tightest := math.Inf(1)
		m := st.sg.model
		for i, s := range all {
			// Generated order is raster order; put every stroke back the
			// way it was generated (left to right, bottom to top).
			start, end := s.Path[0], s.Path[len(s.Path)-1]
			if end.X < start.X || (end.X == start.X && end.Y < start.Y) {
				start, end = end, start
			}
			err := m.errLocal
			if s.Mode == design.ModeFE {
				err = m.errCoase
			}
			if bud := DriftBudget(s.ToleranceNM/margin, err, 0, m.r0*m.rateMul); s.Kind != StrokeDwell && !math.IsInf(bud, 1) {
				tightest = math.Min(tightest, bud)
			}
			jobs[i] = job{stroke: i, start: start, end: end, writeS: s.DurationS, tolNM: s.ToleranceNM, mode: s.Mode,
				dwell: s.Kind == StrokeDwell, group: b.groupOf(s)}
		}
		sg := newSegmenter(jobs, b.costs, m, b.costs.nearest(jobs[0].start))
		starts, kinds := sg.fixedInterval(tightest)
		hs[k].written, hs[k].byHandS = true, sg.totalOf(starts, kinds)
	}
	if err := b.ctx.Err(); err != nil {
		return nil, err
	}
	return hs, nil
}

// byHandStep is one step's part of the by-hand estimate: the time of
// its planned segmentation (segmented: it has one) and of the by-hand
// one (written: it has strokes to write by hand).
type byHandStep struct {
	segmented, written bool
	plannedS, byHandS  float64
}

// byHandTotal returns the session time by hand: the planned session less
// each step's planned segmentation plus its by-hand one, in step order
// (the order byHand added them in when it ran after the timeline).
func byHandTotal(session float64, hs []byHandStep) float64 {
	total := session
	for _, h := range hs {
		if !h.segmented {
			continue
		}
		total -= h.plannedS
		if h.written {
			total += h.byHandS
		}
	}
	return total
}

// plainStep returns the step of a region's strokes outside its windows
// (-1 when it has none).
func (b *builder) plainStep(ids []int) int {
	for _, i := range ids {
		if b.strokes[i].Window < 0 {
			return b.stepOf[i]
		}
	}
	return -1
}
