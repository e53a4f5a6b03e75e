package planner

import (
	"context"
	"fmt"
	"iter"
	"maps"
	"math"
	"runtime"
	"slices"
	"sort"
	"strings"
	"sync"
	"sync/atomic"

	"github.com/golang/geo/r2"
	"gonum.org/v1/gonum/stat/distuv"

	"dimerpath/internal/units"
	"dimerpath/lattice/design"
	"dimerpath/planner/route"
)

// The session as a lab runs it (issue 11): tip conditioning and a survey
// image; per dopant species a lithography step (windows last, every
// atomic-precision feature verified and repaired), its dose and its
// incorporation anneal; finding the area again before the next step; a
// documentation image at the end. Tip changes come at random during
// writing. The segments are planned for the drift and creep the profile's
// level asks, and the Monte Carlo measures the printed plan.

// feature is one atomic-precision feature of a step: a region's AP
// strokes in it, imaged after its last stroke.
type feature struct {
	region  string
	strokes []int // stroke indices
	lastJob int   // index in the step's jobs of its last stroke
	box     r2.Rect
	missed  float64 // expected missed sites, from the exposure model
}

// strokeMissed is the expected number of the stroke's own sites it
// leaves, from the exposure model (the coverage expectation).
func strokeMissed(s *Stroke) float64 { return s.ExpectedMissed }

// planModel returns the values the segments are planned for: drift rate
// and creep fraction at the level quantile of their log-normal spread,
// registration errors at z·σ with z the two-sided normal quantile of the
// level (gonum distuv).
func planModel(prof *Profile) (segModel, DriftPlan) {
	level := prof.Session.PInToleranceMin
	r0 := prof.Drift.RateNMPerMin
	rq := logNormalQuantile(level, r0, prof.Drift.RateSDNMPerMin)
	c := prof.Registration.Creep
	cq := logNormalQuantile(level, c.Fraction, c.FractionSD)
	z := distuv.UnitNormal.Quantile((1 + level) / 2)
	m := segModel{r0: r0, creep: cq, errLocal: z * prof.Registration.Local.ErrorNM, errCoase: z * prof.Registration.CoarseErrorNM,
		residual: 1, moveTau: prof.Drift.Excess.AfterMoveTauS, annealTau: prof.Drift.Excess.AfterAnnealTauS}
	if r0 > 0 {
		m.rateMul = rq / r0
	}
	if prof.Drift.Compensation.Enabled {
		m.residual = prof.Drift.Compensation.ResidualShare
	}
	return m, DriftPlan{RateNMPerMin: rq, CreepFraction: cq, ErrorZ: z, Margin: 1, Compensated: prof.Drift.Compensation.Enabled}
}

// groupOf returns a stroke's route group within its step: the mode
// written first (0), the other (1), and the dopant windows last (2), so
// that they stay open as short a time as possible before the dose.
func (b *builder) groupOf(s *Stroke) int {
	if s.Window >= 0 {
		return 2
	}
	return b.modeGroup(s.Mode)
}

// planSteps orders each step's strokes (route, coupled blocks), builds
// its segmenter with the planning values and re-orders each segment's
// strokes where that is shorter.
func (b *builder) planSteps(steps []*stepWork, cps []couplingWork) error {
	model := b.model
	written := newAPGrid(b.prof.Registration.Local.SizeNM)
	for k, st := range steps {
		if len(st.strokes) == 0 {
			continue
		}
		first, order, err := b.route(st.strokes)
		if err != nil {
			return err
		}
		st.first = first
		var pairs [][2]int
		localOnly := map[int]bool{}
		for _, cp := range cps {
			if cp.sa < 0 || cp.sb < 0 {
				continue
			}
			ka, kb := b.stepOf[cp.sa], b.stepOf[cp.sb]
			switch {
			case ka == k && kb == k:
				pairs = append(pairs, [2]int{cp.sa, cp.sb})
			case ka == k && kb < k:
				localOnly[cp.sa] = true
			case kb == k && ka < k:
				localOnly[cp.sb] = true
			}
		}
		order, joined := joinBlocks(order, pairs)
		st.order = order
		m := model
		if k > 0 {
			// The drift's excess after the anneal, at the end of finding
			// the area again.
			m.annealLevel = b.prof.Drift.Excess.AfterAnnealNMPerMin * math.Exp(-b.prof.Process.RefindS/math.Max(b.prof.Drift.Excess.AfterAnnealTauS, 1e-9))
		}
		// AP features written before this step's FE work: earlier steps'
		// and this step's groups before the FE group.
		near := newAPGrid(b.prof.Registration.Local.SizeNM)
		for c := range written.cells {
			near.cells[c] = true
		}
		feGroup := b.modeGroup(design.ModeFE)
		for _, i := range st.strokes {
			s := &b.strokes[i]
			if s.Mode != design.ModeFE && b.groupOf(s) < feGroup {
				near.addPath(s.Path)
			}
		}
		for _, i := range st.strokes {
			if b.strokes[i].Mode != design.ModeFE {
				written.addPath(b.strokes[i].Path)
			}
		}
		st.jobs = b.jobs(order, joined, localOnly, near)
		c := b.costs
		st.sg = newSegmenter(st.jobs, c, m, first)
		starts, kinds, _, _ := st.sg.solve(1)
		st.sg.releaseSolve() // solved once: its cache is garbage
		jobs, err := b.reoptimise(st.sg, starts, kinds)
		if err != nil {
			return err
		}
		st.jobs = jobs
		// The successor takes the moves of the jobs reoptimise left in
		// place from it (most of them), then it is garbage.
		prev := st.sg
		prev.keepForSuccessor()
		st.sg = nil
		st.sg = newSegmenterFrom(jobs, c, m, first, prev)
	}
	return nil
}

// loads returns the tolerance model of the steps' current segmentations:
// per segment its registration's σ and the strokes that can bind, per
// coupled pair its relative tolerance and load.
func (b *builder) loads(steps []*stepWork, cps []couplingWork) ([]segLoad, []pairLoad, []int) {
	nseg := 0
	for _, st := range steps {
		if st.sg != nil && st.sg.n > 0 {
			nseg += len(st.starts)
		}
	}
	segs := make([]segLoad, nseg)
	var pairs []pairLoad
	pairIndex := make([]int, len(cps))
	for i := range pairIndex {
		pairIndex[i] = -1
	}
	r := &b.prof.Registration
	// Each segment's loads read the segmenter alone: a large step's
	// segments are made on every core (inParallel).
	first := 0 // the step's first segment in segs
	for _, st := range steps {
		if st.sg == nil || st.sg.n == 0 {
			continue
		}
		sg := st.sg
		inParallel(len(st.starts), func(lo, hi int) {
			var scratch []strokeLoad
			for i := lo; i < hi; i++ {
				sp := st.span(i)
				s, e, k := sp.s, sp.e, sp.k
				g := segLoad{sigma: r.Local.ErrorNM}
				if k == kCoarse {
					g.sigma = r.CoarseErrorNM
				}
				ls := scratch[:0] // paretoLoads keeps what it returns apart
				at := sg.segmentLoads(s, k)
				for j := s; j < e; j++ {
					cu, d := at.at(j)
					ls = append(ls, strokeLoad{tol: sg.jobs[j].tolNM, creep: cu, drift: d})
				}
				g.loads = paretoLoads(ls)
				segs[first+i] = g
				scratch = ls
			}
		})
		first += len(st.starts)
	}
	for ci, cp := range cps {
		if cp.sa < 0 || cp.sb < 0 {
			continue
		}
		ka, kb := b.stepOf[cp.sa], b.stepOf[cp.sb]
		if ka == kb {
			st := steps[ka]
			ja, jb := st.jobIndex(cp.sa), st.jobIndex(cp.sb)
			if ja < 0 || jb < 0 {
				continue
			}
			lo, hi := min(ja, jb), max(ja, jb)
			sg := st.sg
			t0 := sg.ts[lo]
			f := sg.field(st.segmentStart(lo))
			cu := sg.creepF.integral(sg.T[hi]) - sg.creepF.integral(t0)
			d := f.at(sg.T[hi]) - f.at(t0)
			pairIndex[ci] = len(pairs)
			pairs = append(pairs, pairLoad{tol: cp.ToleranceNM, creep: cu, drift: d})
			continue
		}
		// Different steps: the later side registers locally on the
		// earlier; its error and the load of its segment up to it count.
		later := cp.sa
		if kb > ka {
			later = cp.sb
		}
		st := steps[b.stepOf[later]]
		j := st.jobIndex(later)
		if j < 0 {
			continue
		}
		s := st.segmentStart(j)
		k := kindIndex(st.kinds[st.segmentOf(j)])
		cu, d := st.sg.load(s, k, j)
		sigma := r.Local.ErrorNM
		if k == kCoarse {
			sigma = r.CoarseErrorNM
		}
		pairIndex[ci] = len(pairs)
		pairs = append(pairs, pairLoad{tol: cp.ToleranceNM, creep: cu, drift: d, sigma: sigma})
	}
	return segs, pairs, pairIndex
}

// jobIndex returns the position of stroke i in the step's jobs, or -1.
func (st *stepWork) jobIndex(i int) int {
	for j, jb := range st.jobs {
		if jb.stroke == i {
			return j
		}
	}
	return -1
}

// segSpan is one segment of a step: its index in st.starts, its jobs
// [s, e) in the step's order and its registration's kind index.
type segSpan struct{ i, s, e, k int }

// spans yields the step's segments in writing order; none when the
// step writes nothing.
func (st *stepWork) spans() iter.Seq[segSpan] {
	return func(yield func(segSpan) bool) {
		sg := st.sg
		if sg == nil || sg.n == 0 {
			return
		}
		for i := range st.starts {
			if !yield(st.span(i)) {
				return
			}
		}
	}
}

// span returns the step's segment i (the step writes something).
func (st *stepWork) span(i int) segSpan {
	e := st.sg.n
	if i+1 < len(st.starts) {
		e = st.starts[i+1]
	}
	return segSpan{i: i, s: st.starts[i], e: e, k: kindIndex(st.kinds[i])}
}

// segmentOf returns the index into st.starts of the segment holding job j.
func (st *stepWork) segmentOf(j int) int {
	return sort.SearchInts(st.starts, j+1) - 1
}

// segmentStart returns the first job of the segment holding job j.
func (st *stepWork) segmentStart(j int) int { return st.starts[st.segmentOf(j)] }

// segmentAll solves every step's segmentation with tolerances divided by
// margin.
func segmentAll(steps []*stepWork, margin float64) {
	for _, st := range steps {
		if st.sg == nil || st.sg.n == 0 {
			continue
		}
		st.starts, st.kinds, _, st.forced = st.sg.solve(margin)
	}
}

// chooseMargin segments every step at the planning values and raises
// the margin (×1.25, at most maxMargins times) until the sampled
// probability that every stroke and pair the margin can help stays
// within tolerance reaches the profile's level, or stops rising by a
// tenth of a percent. Segments holding a stroke that no segment can
// hold (over budget even alone) are left out of that decision: a margin
// only makes everything else slower. It returns the margin used, the
// probabilities at it and the index of each coupling's pair.
func (b *builder) chooseMargin(ctx context.Context, steps []*stepWork, cps []couplingWork, draws mcDraws) (float64, tolResult, []int, error) {
	const maxMargins = 8
	level := b.prof.Session.PInToleranceMin
	// The search for the margin uses the first draws; the result is
	// sampled again with all of them.
	search := draws
	if n := len(draws.rate); n > searchDraws {
		search = mcDraws{rate: draws.rate[:searchDraws], creep: draws.creep[:searchDraws]}
	}
	margin, bestMargin := 1.0, 1.0
	var best tolResult
	var bestIndex []int
	bestAdj := -1.0
	// The segmentation and loads last made: when the search ends on the
	// margin it chose, they are those of that margin (the segmenter's
	// solve depends only on the margin), and are not made again.
	lastMargin := math.NaN()
	var lastSegs []segLoad
	var lastPairs []pairLoad
	// The best margin's segmentation and loads, kept so that a search
	// that ends past it need not make them again.
	type segmentation struct {
		starts []int
		kinds  []RegistrationKind
		forced []int
	}
	var bestSegmentation []segmentation
	var bestSegs []segLoad
	var bestPairs []pairLoad
	for try := 0; try < maxMargins; try++ {
		segmentAll(steps, margin)
		segs, pairs, index := b.loads(steps, cps)
		lastMargin, lastSegs, lastPairs = margin, segs, pairs
		var leave []bool
		for _, st := range steps {
			if st.sg == nil || st.sg.n == 0 {
				continue
			}
			forced := map[int]bool{}
			for _, j := range st.forced {
				forced[st.segmentOf(j)] = true
			}
			for i := range st.starts {
				leave = append(leave, forced[i])
			}
		}
		res, err := pInTolerance(ctx, segs, pairs, search, leave)
		if err != nil {
			return 0, tolResult{}, nil, err
		}
		adj := res.some
		if try > 0 && adj < bestAdj+1e-3 {
			break // no longer helping: the registration errors bind
		}
		best, bestMargin, bestIndex, bestAdj = res, margin, index, adj
		bestSegs, bestPairs = segs, pairs
		bestSegmentation = bestSegmentation[:0]
		for _, st := range steps {
			bestSegmentation = append(bestSegmentation, segmentation{st.starts, st.kinds, st.forced})
		}
		if adj >= level {
			break
		}
		margin *= 1.25
	}
	if bestMargin != lastMargin {
		// What segmentAll(steps, bestMargin) and loads would make again.
		for k, st := range steps {
			sn := bestSegmentation[k]
			st.starts, st.kinds, st.forced = sn.starts, sn.kinds, sn.forced
		}
		lastSegs, lastPairs = bestSegs, bestPairs
	}
	if len(search.rate) < len(draws.rate) {
		res, err := pInTolerance(ctx, lastSegs, lastPairs, draws, nil)
		if err != nil {
			return 0, tolResult{}, nil, err
		}
		best = res
	}
	return bestMargin, best, bestIndex, nil
}

// searchDraws is the number of draws the margin search samples with.
const searchDraws = 500

// features returns the step's atomic-precision features: each region's
// AP strokes in the step, with the job of its last stroke.
func (b *builder) features(st *stepWork) []feature {
	byRegion := map[string]*feature{}
	var names []string
	for j, i := range st.order {
		s := &b.strokes[i]
		if s.Mode == design.ModeFE {
			continue
		}
		f, ok := byRegion[s.Region]
		if !ok {
			f = &feature{region: s.Region, box: r2.EmptyRect()}
			byRegion[s.Region] = f
			names = append(names, s.Region)
		}
		f.strokes = append(f.strokes, i)
		f.lastJob = j
		for _, p := range s.Path {
			f.box = f.box.AddPoint(p)
		}
		f.missed += strokeMissed(s)
	}
	out := make([]feature, 0, len(names))
	for _, n := range names {
		out = append(out, *byRegion[n])
	}
	return out
}

// sessionTimeline lays the whole session out on the plan clock and
// returns it with its steps and the time model of the random parts.
func (b *builder) sessionTimeline(steps []*stepWork, windows []Window) (timeline, []Step, timeModel) {
	var tl timeline
	// Room for every action at once (Build's bound on their count): a
	// slice grown by doubling to 2·10^6 actions holds some 450 MB of
	// copies on the way.
	nseg := 0
	for _, st := range steps {
		nseg += len(st.starts)
	}
	tl.actions = make([]Action, 0, 2*len(b.strokes)+6*nseg+2*len(b.regions)*len(steps)+16)
	var out []Step
	prof := &b.prof
	ses := &prof.Session
	c := &b.costs
	var tm timeModel
	// Where the tip is.
	var at r2.Point
	bbox := r2.EmptyRect()
	for _, s := range b.strokes {
		for _, p := range s.Path {
			bbox = bbox.AddPoint(p)
		}
	}
	if !bbox.IsEmpty() {
		at = bbox.Center()
	} else {
		at = r2.Point{X: b.d.Field.WidthNM / 2, Y: b.d.Field.HeightNM / 2}
	}
	begin := func(kind StepKind, species, note string) *Step {
		out = append(out, Step{Kind: kind, Species: species, StartS: tl.clock, Note: note})
		return &out[len(out)-1]
	}
	end := func(st *Step) { st.DurationS = tl.clock - st.StartS }

	if len(b.strokes) == 0 {
		return tl, out, tm // nothing to write: no session
	}
	if ses.Conditioning.Enabled || ses.Survey.Enabled {
		st := begin(StepSurvey, "", "")
		var parts []string
		if ses.Conditioning.Enabled {
			tl.add(Action{Kind: ActCondition, From: at, To: at, DurationS: ses.Conditioning.TimeS, Note: "condition the tip before the session"}, -1)
			parts = append(parts, "condition the tip")
		}
		if ses.Survey.Enabled && !bbox.IsEmpty() {
			w, h := bbox.Size().X, bbox.Size().Y
			tl.add(Action{Kind: ActSurvey, From: at, To: at, DurationS: ses.Survey.TimeS(w, h),
				Note: fmt.Sprintf("survey image of the write area, %.0f x %.0f nm at %g nm a pixel", w+2*ses.Survey.MarginNM, h+2*ses.Survey.MarginNM, ses.Survey.PixelNM)}, -1)
			parts = append(parts, "survey the write area (terraces, steps, defects)")
		}
		st.Note = strings.Join(parts, ", then ")
		end(st)
	}
	verifyOn := ses.Verification.Enabled
	repairOn := ses.Repair.Enabled
	perSite := prof.DwellExpectedS() + ImageProfile{PixelNM: ses.Verification.PixelNM, LineS: ses.Verification.LineS}.TimeS(ses.Repair.ReimageNM, ses.Repair.ReimageNM)
	seg := 0
	// windowEnd[i]: the end of window i's write, NaN until written.
	windowEnd := make([]float64, len(windows))
	for i := range windowEnd {
		windowEnd[i] = math.NaN()
	}
	for k, stw := range steps {
		if len(stw.order) == 0 {
			continue
		}
		f0 := c.fiducials[stw.first].At
		if k > 0 {
			st := begin(StepReregister, stw.species, "find the write area again after the anneal; the first registration of the next step re-registers on the fiducials and the features already written")
			tl.add(Action{Kind: ActRefind, From: at, To: f0, DurationS: prof.Process.RefindS, Note: "approach and find the write area again at fiducial " + c.fiducials[stw.first].Name}, -1)
			end(st)
		}
		lit := begin(StepLithography, stw.species, "")
		if k == 0 && at != f0 {
			// The move to the first fiducial is the step's first action.
			tl.add(Action{Kind: ActMove, From: at, To: f0, DurationS: c.plainMove(at, f0), Note: "to fiducial " + c.fiducials[stw.first].Name}, -1)
		}
		stw.seg0 = seg
		stw.features = b.features(stw)
		pending := map[int][]feature{} // segment (in step) -> features completed in it
		for _, f := range stw.features {
			si := stw.segmentOf(f.lastJob)
			pending[si] = append(pending[si], f)
		}
		endOf := func(tl *timeline, seg int, last r2.Point) {
			for _, f := range pending[seg-stw.seg0] {
				if verifyOn {
					w, h := f.box.Size().X, f.box.Size().Y
					tl.add(Action{Kind: ActVerify, From: last, To: last, DurationS: ses.Verification.TimeS(w, h),
						Note: fmt.Sprintf("verification image of %s, %.1f x %.1f nm at %g nm a pixel", f.region, w+2*ses.Verification.MarginNM, h+2*ses.Verification.MarginNM, ses.Verification.PixelNM)}, seg)
				}
				if verifyOn && repairOn && f.missed > 0 {
					tl.add(Action{Kind: ActRepair, From: last, To: last, DurationS: f.missed * perSite,
						Note: fmt.Sprintf("repair the %.2g missed sites expected in %s: a dwell and a re-image each", f.missed, f.region)}, seg)
					tm.repairs = append(tm.repairs, repairModel{missed: f.missed, perSiteS: perSite})
				}
			}
		}
		tl.scheduleStep(stw.sg, stw.order, stw.starts, stw.kinds, b.strokes, prof, len(out)-1, seg, endOf)
		for i := seg; i < len(tl.segments); i++ {
			lit.Segments = append(lit.Segments, i)
		}
		seg = len(tl.segments)
		for _, a := range tl.actions[len(tl.actions)-1:] {
			at = a.To
		}
		lit.Note = b.stepNote(stw)
		end(lit)
		for i := range tl.actions {
			if a := &tl.actions[i]; (a.Kind == ActWrite || a.Kind == ActDwell) && b.strokes[a.Stroke].Window >= 0 {
				windowEnd[b.strokes[a.Stroke].Window] = a.StartS + a.DurationS
			}
		}
		if stw.species == "" {
			continue
		}
		dose := begin(StepDose, stw.species, "")
		dose.Precursor, dose.ExposureL = design.Precursor(stw.species), prof.Process.Dose.ExposureL
		dose.Note = fmt.Sprintf("%s, %g L at %.2g Torr, then pump down", dose.Precursor, prof.Process.Dose.ExposureL, prof.Process.Dose.PressureTorr)
		tl.add(Action{Kind: ActDose, From: at, To: at, DurationS: prof.Process.Dose.TimeS(), Note: "dose " + dose.Note + "; tip retracted"}, -1)
		end(dose)
		for wi, w := range windows {
			if w.Species == stw.species {
				if e := windowEnd[wi]; !math.IsNaN(e) {
					windows[wi].OpenS = dose.StartS - e
				}
			}
		}
		an := begin(StepAnneal, stw.species, "")
		an.TemperatureC = prof.Process.Anneal.TemperatureC
		an.Note = fmt.Sprintf("incorporation anneal %g °C for %s, cool down %s", prof.Process.Anneal.TemperatureC, units.Duration(prof.Process.Anneal.TimeS), units.Duration(prof.Process.Anneal.CooldownS))
		tl.add(Action{Kind: ActAnneal, From: at, To: at, DurationS: prof.Process.Anneal.TimeS + prof.Process.Anneal.CooldownS, Note: an.Note}, -1)
		end(an)
	}
	if ses.Documentation.Enabled && !bbox.IsEmpty() {
		st := begin(StepDocumentation, "", "find the area again and image the written field")
		last := steps[len(steps)-1]
		if last.species != "" {
			tl.add(Action{Kind: ActRefind, From: at, To: bbox.Center(), DurationS: prof.Process.RefindS, Note: "approach and find the write area again"}, -1)
		}
		w, h := bbox.Size().X, bbox.Size().Y
		tl.add(Action{Kind: ActDocument, From: bbox.Center(), To: bbox.Center(), DurationS: ses.Documentation.TimeS(w, h),
			Note: fmt.Sprintf("documentation image, %.0f x %.0f nm at %g nm a pixel", w+2*ses.Documentation.MarginNM, h+2*ses.Documentation.MarginNM, ses.Documentation.PixelNM)}, -1)
		end(st)
	}
	tm.schedule = tl.breakdown
	tm.writeS = tl.breakdown.APWriteS + tl.breakdown.FEWriteS + tl.breakdown.DwellS
	tm.tipChange.enabled = ses.TipChanges.Enabled
	tm.tipChange.meanS = ses.TipChanges.MeanWriteS
	tm.tipChange.costS = prof.Drift.RegistrationS
	if ses.Conditioning.Enabled {
		tm.tipChange.costS += ses.Conditioning.TimeS
	}
	for _, s := range b.strokes {
		if s.Kind == StrokeDwell {
			tm.dwells++
		}
	}
	return tl, out, tm
}

// stepNote says what a lithography step writes.
func (b *builder) stepNote(st *stepWork) string {
	regions := map[string]bool{}
	var names []string
	windows := 0
	for _, i := range st.order {
		s := &b.strokes[i]
		if s.Window >= 0 {
			windows++
		}
		if !regions[s.Region] {
			regions[s.Region] = true
			names = append(names, s.Region)
		}
	}
	note := fmt.Sprintf("write %s", strings.Join(names, ", "))
	switch {
	case windows == 1:
		note += "; the dopant window last, to keep it open as short a time as possible"
	case windows > 1:
		note += fmt.Sprintf("; the %d dopant windows last, to keep them open as short a time as possible", windows)
	}
	return note
}

// groupsInOrder makes p route its items group by group, in ascending
// group number (groups[i] is item i's; present, the groups there are),
// when there is more than one group.
func groupsInOrder(p *route.Problem, groups []int, present map[int]bool) {
	if len(present) < 2 {
		return
	}
	p.Group = groups
	gs := slices.Sorted(maps.Keys(present))
	for i := 0; i+1 < len(gs); i++ {
		p.Before = append(p.Before, [2]int{gs[i], gs[i+1]})
	}
}

// route orders the strokes (indices into b.strokes) of one step: each
// mode's strokes together in the profile's order and the dopant windows
// last, from the fiducial nearest the first group's centre. It returns
// that fiducial and the order (stroke indices, with paths reversed where
// the engine says so).
func (b *builder) route(ids []int) (int, []int, error) {
	c := &b.costs
	n := len(ids)
	if n == 0 {
		return 0, nil, nil
	}
	groups := make([]int, n)
	present := map[int]bool{}
	for k, i := range ids {
		groups[k] = b.groupOf(&b.strokes[i])
		present[groups[k]] = true
	}
	firstGroup := 3
	for g := range present {
		firstGroup = min(firstGroup, g)
	}
	var centre r2.Point
	count := 0
	for k, i := range ids {
		if groups[k] == firstGroup {
			centre = centre.Add(b.strokes[i].Path[0])
			count++
		}
	}
	centre = centre.Mul(1 / float64(count))
	first := c.nearest(centre)
	start := route.Point{X: c.fiducials[first].At.X, Y: c.fiducials[first].At.Y}
	p := route.Problem{Start: &start, MoveSpeed: c.speed, SettleS: c.settle}
	p.Items = make([]route.Item, n)
	for k, i := range ids {
		s := &b.strokes[i]
		a, z := s.Path[0], s.Path[len(s.Path)-1]
		p.Items[k] = route.Item{A: route.Point{X: a.X, Y: a.Y}, B: route.Point{X: z.X, Y: z.Y}}
	}
	groupsInOrder(&p, groups, present)
	sol, err := route.Solve(b.ctx, p, route.Options{MaxKicks: b.kicks(n), Seed: b.opt.Seed})
	if err != nil {
		return 0, nil, err
	}
	if len(sol.Order) != n {
		return 0, nil, fmt.Errorf("planner: the route engine returned %d of %d strokes", len(sol.Order), n)
	}
	order := make([]int, n)
	for k, i := range sol.Order {
		if k < len(sol.Reversed) && sol.Reversed[k] {
			reversePath(b.strokes[ids[i]].Path)
		}
		order[k] = ids[i]
	}
	return first, order, nil
}

// jobs lists the strokes in writing order for the segmenter.
// near says, for FE jobs, whether atomic-precision features written
// before them lie beside their start (see segmenter.allowed).
func (b *builder) jobs(order []int, joined, localOnly map[int]bool, near *apGrid) []job {
	jobs := make([]job, len(order))
	for k, i := range order {
		s := &b.strokes[i]
		jobs[k] = job{stroke: i, start: s.Path[0], end: s.Path[len(s.Path)-1], writeS: s.DurationS, tolNM: s.ToleranceNM,
			mode: s.Mode, dwell: s.Kind == StrokeDwell, group: b.groupOf(s), joined: joined[i], localOnly: localOnly[i]}
		if s.Mode == design.ModeFE && near != nil {
			jobs[k].nearAP = near.near(s.Path[0]) || near.near(s.Path[len(s.Path)-1])
		}
	}
	return jobs
}

// apGrid holds where atomic-precision strokes were written, on a grid of
// cells the size of a local registration image: a point is near them
// when one lies in its cell or a neighbouring one (within about two
// image sizes).
type apGrid struct {
	cell  float64
	cells map[[2]int32]bool
}

func newAPGrid(cell float64) *apGrid {
	return &apGrid{cell: math.Max(cell, 1), cells: map[[2]int32]bool{}}
}

func (g *apGrid) key(p r2.Point) [2]int32 {
	return [2]int32{int32(math.Floor(p.X / g.cell)), int32(math.Floor(p.Y / g.cell))}
}

// addPath marks the cells a path passes through, sampled every half cell.
func (g *apGrid) addPath(path []r2.Point) {
	g.cells[g.key(path[0])] = true
	for i := 1; i < len(path); i++ {
		a, c := path[i-1], path[i]
		n := int(math.Ceil(c.Sub(a).Norm() / (g.cell / 2)))
		for k := 1; k <= n; k++ {
			g.cells[g.key(a.Add(c.Sub(a).Mul(float64(k)/float64(n))))] = true
		}
	}
}

func (g *apGrid) near(p r2.Point) bool {
	k := g.key(p)
	for dx := int32(-1); dx <= 1; dx++ {
		for dy := int32(-1); dy <= 1; dy++ {
			if g.cells[[2]int32{k[0] + dx, k[1] + dy}] {
				return true
			}
		}
	}
	return false
}

// reoptimise re-orders the strokes of each segment from where its
// registration leaves the tip with the route engine (keeping the groups
// in order) and keeps the new order where it is shorter, counting the
// move on to the next segment, and every stroke still holds its
// tolerance at the planning values. Segments holding coupled strokes
// keep their order.
//
// Segments are taken in order, and a segment's entry is where the one
// before it ends, so each depends on the outcome of the one before. On
// more than one core the segments are first solved side by side from
// the entries of the order as it stands (speculatively): a new order is
// rare, and one that ends elsewhere rarer still (on donor arrays of
// 10^4-10^5 windows, 3 of about 1,100 solved segments and none), so in
// the pass in order a segment whose entry is still the one it was
// solved from takes that result, which is exactly what solving it then
// would give; any other is solved again. The plan is the same on any
// number of cores (TestReoptimiseSameOnAnyCores).
func (b *builder) reoptimise(sg *segmenter, starts []int, kinds []RegistrationKind) ([]job, error) {
	jobs := append([]job(nil), sg.jobs...)
	end := func(si int) int {
		if si+1 < len(starts) {
			return starts[si+1]
		}
		return len(jobs)
	}
	type guess struct {
		entry r2.Point
		cand  []job
		ok    bool
	}
	var spec []guess
	if workers := runtime.GOMAXPROCS(0); workers > 1 && len(starts) >= parallelSegmentsMin {
		spec = make([]guess, len(starts))
		var next atomic.Int64
		var wg sync.WaitGroup
		for range workers {
			wg.Add(1)
			go func() {
				defer wg.Done()
				defer func() {
					// A panic here leaves its segments unsolved: the pass in
					// order solves them again and recovers it as Build does.
					_ = recover()
				}()
				for {
					si := int(next.Add(1) - 1)
					if si >= len(starts) || b.ctx.Err() != nil {
						return
					}
					// sg.jobs is never changed: the order as it stands.
					entry := b.segmentEntry(sg, sg.jobs, starts[si], kinds[si])
					cand, err := b.reoptimiseSegment(sg, sg.jobs, si, starts[si], end(si), kinds[si], entry)
					spec[si] = guess{entry: entry, cand: cand, ok: err == nil}
				}
			}()
		}
		wg.Wait()
	}
	for si, s := range starts {
		e := end(si)
		if err := b.ctx.Err(); err != nil {
			return nil, err
		}
		entry := b.segmentEntry(sg, jobs, s, kinds[si])
		var cand []job
		if spec != nil && spec[si].ok && spec[si].entry == entry {
			cand = spec[si].cand
		} else {
			var err error
			if cand, err = b.reoptimiseSegment(sg, jobs, si, s, e, kinds[si], entry); err != nil {
				return nil, err
			}
		}
		if cand == nil {
			continue
		}
		for _, j := range cand {
			if st := &b.strokes[j.stroke]; st.Path[0] != j.start {
				reversePath(st.Path)
			}
		}
		copy(jobs[s:e], cand)
	}
	return jobs, nil
}

// parallelSegmentsMin is the fewest segments of a step that reoptimise
// solves side by side: below it (the demo has a few dozen) the
// goroutines cost more than they save, and a sweep already plans its
// values in parallel.
const parallelSegmentsMin = 64

// segmentEntry returns where the tip is when segment s (its first job)
// starts writing: at its fiducial after a coarse registration, else where
// the job before it ended (at the first fiducial for the step's first).
func (b *builder) segmentEntry(sg *segmenter, jobs []job, s int, kind RegistrationKind) r2.Point {
	switch {
	case kindIndex(kind) == kCoarse:
		return sg.c.fiducials[sg.fid[s]].At
	case s > 0:
		return jobs[s-1].end
	default:
		return sg.c.fiducials[sg.first].At
	}
}

// reoptimiseSegment returns the new order of the jobs of segment si,
// jobs[s:e], entered at entry, or nil to keep theirs (see reoptimise).
// It reads jobs[s:e] and jobs[e] and changes nothing.
func (b *builder) reoptimiseSegment(sg *segmenter, jobs []job, si, s, e int, kind RegistrationKind, entry r2.Point) ([]job, error) {
	if e-s < 3 {
		return nil, nil
	}
	seg := jobs[s:e]
	for _, j := range seg {
		if j.joined || j.localOnly {
			return nil, nil
		}
	}
	if e < len(jobs) && jobs[e].joined {
		return nil, nil
	}
	if travelOptimal(seg, entry) {
		// No order is shorter: the engine would give this one back (or
		// one as short), so the order stands (see reroute.go).
		return nil, nil
	}
	c := &sg.c
	k := kindIndex(kind)
	var exit *r2.Point
	if e < len(jobs) {
		x := jobs[e].start
		exit = &x
	}
	// The segment alone, as a step of its own starting at its
	// registration: feasible when one segment of the same kind holds
	// it at the planning values.
	model := sg.model
	cost := func(js []job) (float64, bool) {
		t := c.move(entry, js[0].start, js[0].tolNM).timeS
		for i := 1; i < len(js); i++ {
			t += c.move(js[i-1].end, js[i].start, js[i].tolNM).timeS + c.switchCost(js[i-1].mode, js[i].mode)
		}
		for _, j := range js {
			t += j.writeS
		}
		if exit != nil {
			t += c.move(js[len(js)-1].end, *exit, jobs[e].tolNM).timeS
		}
		// Feasibility from the segment's own start, in a segmenter of
		// its jobs alone (the anneal's excess at the segment's clock).
		m := model
		m.annealLevel *= math.Exp(-sg.ts[s] / math.Max(m.annealTau, 1e-9))
		if s > 0 && m.residual != 1 {
			m.compensatedStart = true
		}
		f := c.fiducials
		fi := sg.fid[s]
		if k == kLocal {
			f = []Fiducial{{At: entry}}
			fi = 0
		}
		cc := *c
		cc.fiducials = f
		at := newSegmenter(js, cc, m, fi).segmentLoads(0, k)
		for j := range js {
			if at.plan(j) > js[j].tolNM*(1+1e-9) {
				return t, false
			}
		}
		return t, true
	}
	old, ok := cost(seg)
	if !ok {
		return nil, nil
	}
	start := route.Point{X: entry.X, Y: entry.Y}
	p := route.Problem{Start: &start, MoveSpeed: c.speed, SettleS: c.settle, Items: make([]route.Item, len(seg))}
	groups := make([]int, len(seg))
	present := map[int]bool{}
	for i, j := range seg {
		p.Items[i] = route.Item{A: route.Point{X: j.start.X, Y: j.start.Y}, B: route.Point{X: j.end.X, Y: j.end.Y}}
		groups[i] = j.group
		present[j.group] = true
	}
	groupsInOrder(&p, groups, present)
	sol, err := route.Solve(b.ctx, p, route.Options{MaxKicks: min(max(len(seg)/8, 10), 100), Seed: b.opt.Seed + int64(si)})
	if err != nil {
		return nil, err
	}
	if len(sol.Order) != len(seg) {
		return nil, nil
	}
	cand := make([]job, len(seg))
	for i, idx := range sol.Order {
		j := seg[idx]
		if i < len(sol.Reversed) && sol.Reversed[i] {
			j.start, j.end = j.end, j.start
		}
		cand[i] = j
	}
	if k == kLocal && cand[0].mode == design.ModeFE {
		return nil, nil
	}
	if t, ok := cost(cand); ok && t < old-1e-9 {
		return cand, nil
	}
	return nil, nil
}
