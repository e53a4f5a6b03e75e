package planner

import (
	"fmt"
	"math"

	"github.com/golang/geo/r2"

	"dimerpath/lattice/design"
)

// job is one stroke as the segmenter and the timeline see it, in
// writing order.
type job struct {
	stroke     int      // index into the plan's strokes
	start, end r2.Point // tip position where the write starts and ends
	writeS     float64  // write or dwell duration
	tolNM      float64  // placement tolerance, ±nm
	mode       design.Mode
	dwell      bool
	group      int  // the route group within its step (see builder.groupOf)
	joined     bool // inside a coupled block: no registration before it
	localOnly  bool // coupled to work of an earlier step: its segment registers locally
	// nearAP: an FE job that starts beside atomic-precision features
	// written before it, on which a local registration can be made
	nearAP bool
}

// RegistrationKind is how a segment finds its position.
type RegistrationKind string

const (
	// RegCoarse registers on a fiducial mark: a move there and back and
	// an image of the mark; its error is registration.coarse_error_nm
	// plus the creep of the move that follows.
	RegCoarse RegistrationKind = "coarse"
	// RegLocal registers on the lattice or on features already written
	// right beside the atomic-precision work: a small atomic-resolution
	// image, no move; its error is a fraction of a dimer pitch.
	RegLocal RegistrationKind = "local"
)

// costs turns tip motion and instrument steps into time, the same way
// for the segmenter, the timeline and the by-hand baseline.
type costs struct {
	motion
	modeSwitch, register, verify, local, condition float64
	fiducials                                      []Fiducial
	coarseErrNM                                    float64
}

func newCosts(p *Profile, fids []Fiducial) costs {
	c := costs{
		motion:     newMotion(p, p.Registration.Creep.Fraction),
		modeSwitch: p.ModeSwitchS, register: p.Drift.RegistrationS, verify: p.Drift.VerificationS,
		local:       p.Registration.Local.TimeS(),
		fiducials:   fids,
		coarseErrNM: p.Registration.CoarseErrorNM,
	}
	if p.Session.Conditioning.Enabled {
		c.condition = p.Session.Conditioning.TimeS
	}
	return c
}

// switchCost is what is paid between two consecutive writes of modes a
// and b: the mode switch, and the tip conditioning after field-emission
// work.
func (c *costs) switchCost(a, b design.Mode) float64 {
	if a == b {
		return 0
	}
	if a == design.ModeFE {
		return c.modeSwitch + c.condition
	}
	return c.modeSwitch
}

// nearest returns the index of the fiducial nearest p.
func (c *costs) nearest(p r2.Point) int {
	best, bd := 0, math.Inf(1)
	for i, f := range c.fiducials {
		if d := f.At.Sub(p).Dot(f.At.Sub(p)); d < bd {
			best, bd = i, d
		}
	}
	return best
}

// segModel holds the values the segmenter plans with: the drift rate and
// creep fraction at the level the profile asks (see planValues), the
// registration errors times z, and the drift model's switches.
type segModel struct {
	r0       float64 // the profile's mean drift rate, nm/min
	rateMul  float64 // planning rate / r0
	creep    float64 // planning creep fraction
	errLocal float64 // z·σ of a local registration, nm
	errCoase float64 // z·σ of a coarse registration, nm
	// compensation: share of the base rate left after the first segment
	residual float64
	// excess drift after the anneal before the step: its level at
	// clock 0 (nm/min) and time constant
	annealLevel, annealTau float64
	moveTau                float64
	// compensatedStart: the first segment already has a measured rate
	// (a segment re-ordered on its own, see reoptimise)
	compensatedStart bool
}

// segmenter holds, for one step's writing order, everything the choice of
// segment boundaries and registration kinds depends on. With n jobs and
// the tip at fiducial f0 before the first:
//
//	T[j]      writing clock at the end of job j: writes, moves (with their
//	          creep waits) and switches, no registrations;
//	ts[j]     writing clock at the start of job j (T[j] − writeS);
//	m[j], sw[j] the move into job j from job j−1 and the switch before it;
//	fid[s], a[s] the fiducial of a coarse registration before job s (the
//	          one nearest it; f0 for s = 0) and the approach from it;
//	B[k][s]   the extra time of a registration of kind k before job s:
//	          local: the image; coarse: the detour through fid[s] and
//	          the image, less the direct move it replaces.
//
// A segment of kind k starting at s may hold job j when, at the planning
// values, the registration error, the creep and the drift from the end
// of the registration to the end of j stay within j's tolerance (divided
// by the margin):
//
//	err[k] + creep(s..j) + drift(s..j) ≤ tol[j]/margin,
//
// with creep and drift read off fields of the writing clock (creepF,
// drift), so the condition separates into q[j] ≤ cst[k][s] and
// feasibility is a prefix in j: the exact dynamic programme over the last
// boundary of the former segmenter stays.
type segmenter struct {
	jobs  []job
	c     costs
	model segModel
	n     int

	T, ts, m, sw []float64
	moveCreep    []float64 // creep per unit fraction left by the move into j
	moveExcess   []float64 // excess drift rate it starts, nm/min at r0
	fid          []int
	a            []float64 // approach from fid[s] to job s
	aCreep       []float64 // its creep per unit fraction
	aExcess      []float64 // its excess drift rate, nm/min at r0
	detour       []float64 // move from job s−1 to fid[s]
	B            [2][]float64
	first        int // f0

	creepF           decay      // creep per unit fraction, nm
	driftRaw, driftC driftField // drift at r0: uncompensated, compensated

	// What solve needs that does not depend on the margin, and its
	// working arrays: made on its first call (chooseMargin solves the
	// same segmenter at several margins), dropped by releaseSolve.
	cache *solveCache
}

// solveCache is solve's margin-independent terms and working memory.
type solveCache struct {
	value     [2][]float64 // planning load at each job's end: raw, compensated field
	cst       [2][]float64 // per kind, the load a segment starting at s starts from
	nextLocal []int        // the first job at or after s that needs a local registration
	trees     [2]maxTree
	D         []float64
	from      []cand
}

// releaseSolve drops solve's cache (solve makes it again if called).
func (sg *segmenter) releaseSolve() { sg.cache = nil }

// keepForTimeline drops what only the segmentation, the segments' notes
// and the by-hand plan read (the clocks, the loads and the drift and
// creep fields: ~140 MB at 10^6 jobs) and the jobs themselves (~90 MB):
// the timeline reads each job from its stroke (timelineJob), after this
// checks that every job is its stroke's, and the order from st.order.
// It keeps what else scheduleStep reads: the costs, fiducials, moves,
// approaches, detours and the first local registration's cost. Nothing
// but the timeline may use st.sg after.
func (st *stepWork) keepForTimeline(strokes []Stroke) error {
	sg := st.sg
	st.jobs = nil
	if sg == nil {
		st.order = nil
		return nil
	}
	st.order = make([]int, len(sg.jobs))
	for j, jb := range sg.jobs {
		if want := timelineJob(strokes, jb.stroke); jb.stroke < 0 || jb.stroke >= len(strokes) || !sameTimelineJob(want, jb) {
			return &InternalError{Message: fmt.Sprintf("job %d (stroke %d) is not its stroke's: %+v against %+v", j, jb.stroke, jb, want)}
		}
		st.order[j] = jb.stroke
	}
	sg.jobs = nil
	sg.cache = nil
	sg.T, sg.ts, sg.sw = nil, nil, nil
	sg.moveCreep, sg.moveExcess, sg.aCreep, sg.aExcess = nil, nil, nil, nil
	if len(sg.B[kLocal]) > 0 {
		sg.B[kLocal] = []float64{sg.B[kLocal][0]}
	}
	sg.B[kCoarse] = nil
	sg.creepF, sg.driftRaw, sg.driftC = decay{}, driftField{}, driftField{}
	return nil
}

// sameTimelineJob reports whether a and b agree in what the timeline
// reads, bit for bit (a NaN duration is the same NaN: checkFiniteTime
// names its profile fields later, which an internal error would hide).
func sameTimelineJob(a, b job) bool {
	return sameMoveInputs(a, b) && sameFloat(a.writeS, b.writeS) && a.dwell == b.dwell
}

// timelineJob returns what the timeline reads of the job that writes
// stroke i: its path's ends (as the route left them), write time,
// tolerance, mode and whether it is a dwell.
func timelineJob(strokes []Stroke, i int) job {
	if i < 0 || i >= len(strokes) {
		return job{stroke: i}
	}
	s := &strokes[i]
	return job{stroke: i, start: s.Path[0], end: s.Path[len(s.Path)-1], writeS: s.DurationS, tolNM: s.ToleranceNM, mode: s.Mode, dwell: s.Kind == StrokeDwell}
}

const (
	kLocal  = 0
	kCoarse = 1
)

var regKinds = [2]RegistrationKind{RegLocal, RegCoarse}

func newSegmenter(jobs []job, c costs, model segModel, first int) *segmenter {
	return newSegmenterFrom(jobs, c, model, first, nil)
}

// newSegmenterFrom is newSegmenter taking the moves, switches,
// fiducials, approaches and detours of a job from prev (a segmenter of
// the same step made with the same costs and first fiducial, before
// reoptimise changed a few segments' order) where the job and the one
// before it are prev's at the same index, bit for bit in what they read
// (sameMoveInputs): they are the values the motion would give again.
func newSegmenterFrom(jobs []job, c costs, model segModel, first int, prev *segmenter) *segmenter {
	n := len(jobs)
	sg := &segmenter{jobs: jobs, c: c, model: model, n: n, first: first,
		T: make([]float64, n), ts: make([]float64, n), m: make([]float64, n), sw: make([]float64, n),
		moveCreep: make([]float64, n), moveExcess: make([]float64, n), fid: make([]int, n), a: make([]float64, n), aCreep: make([]float64, n),
		aExcess: make([]float64, n), detour: make([]float64, n)}
	sg.B[kLocal], sg.B[kCoarse] = make([]float64, n), make([]float64, n)
	sg.creepF.tau = c.creepTau
	base := model.r0 / 60
	sg.driftRaw = driftField{basePerS: base, moves: decay{tau: model.moveTau}, anneal: decay{tau: model.annealTau}}
	sg.driftC = driftField{basePerS: base * model.residual, moves: decay{tau: model.moveTau}, anneal: decay{tau: model.annealTau}}
	if model.annealLevel > 0 {
		sg.driftRaw.anneal.add(0, model.annealLevel/60)
		// The excess after an anneal changes slowly (tens of minutes):
		// a rate measured between registrations follows it, so
		// compensation leaves the same share of it as of the base.
		sg.driftC.anneal.add(0, model.annealLevel*model.residual/60)
	}
	if n == 0 {
		return sg
	}
	// reuse[j]: job j and the one before it are prev's.
	var reuse []bool
	if prev != nil && prev.first == first && prev.fid != nil {
		reuse = make([]bool, n)
		for j := range min(n, prev.n) {
			reuse[j] = sameMoveInputs(jobs[j], prev.jobs[j]) && (j == 0 || sameMoveInputs(jobs[j-1], prev.jobs[j-1]))
		}
	}
	// Each job's move, switch, fiducial, approach and detour depend on
	// it and the job before alone: a large step's are made on every core
	// (inParallel), then the clocks and drift fields are added up in
	// order.
	f0 := c.fiducials[first].At
	inParallel(n, func(lo, hi int) {
		for j := max(lo, 1); j < hi; j++ {
			if reuse == nil || !reuse[j] {
				mv := c.move(jobs[j-1].end, jobs[j].start, jobs[j].tolNM)
				sg.m[j], sg.moveCreep[j], sg.moveExcess[j] = mv.timeS, mv.creepUnit, mv.excess
			} else {
				sg.m[j], sg.moveCreep[j], sg.moveExcess[j] = prev.m[j], prev.moveCreep[j], prev.moveExcess[j]
			}
			sg.sw[j] = c.switchCost(jobs[j-1].mode, jobs[j].mode)
		}
		for s := lo; s < hi; s++ {
			if s > 0 && reuse != nil && reuse[s] {
				sg.fid[s], sg.a[s], sg.aCreep[s], sg.aExcess[s] = prev.fid[s], prev.a[s], prev.aCreep[s], prev.aExcess[s]
				sg.detour[s] = prev.detour[s]
				sg.B[kCoarse][s] = c.verify + sg.detour[s] + c.register + sg.a[s] - sg.m[s]
				sg.B[kLocal][s] = c.verify + c.local
				continue
			}
			f := first
			if s > 0 {
				f = c.nearest(jobs[s].start)
			}
			sg.fid[s] = f
			at := c.fiducials[f].At
			ap := c.move(at, jobs[s].start, jobs[s].tolNM)
			sg.a[s], sg.aCreep[s], sg.aExcess[s] = ap.timeS, ap.creepUnit, ap.excess
			if s == 0 {
				sg.B[kCoarse][0] = c.register + ap.timeS
				sg.B[kLocal][0] = c.move(f0, jobs[0].start, jobs[0].tolNM).timeS + c.local
				continue
			}
			// The image of the fiducial waits for the creep of the move there
			// to fall to share·(coarse error).
			sg.detour[s] = c.move(jobs[s-1].end, at, c.coarseErrNM).timeS
			sg.B[kCoarse][s] = c.verify + sg.detour[s] + c.register + ap.timeS - sg.m[s]
			sg.B[kLocal][s] = c.verify + c.local
		}
	})
	t := 0.0
	for j := range jobs {
		if j > 0 {
			t += sg.m[j]
			// The creep and the excess start when the move has settled.
			sg.creepF.add(t, sg.moveCreep[j]/c.creepTau)
			sg.driftRaw.moves.add(t, sg.moveExcess[j]/60)
			sg.driftC.moves.add(t, sg.moveExcess[j]/60)
			t += sg.sw[j]
		}
		sg.ts[j] = t
		t += jobs[j].writeS
		sg.T[j] = t
	}
	return sg
}

// keepForSuccessor drops what newSegmenterFrom does not read of a
// segmenter about to be replaced: its clocks, switch costs,
// registration costs, fields and solve's cache.
func (sg *segmenter) keepForSuccessor() {
	sg.cache = nil
	sg.T, sg.ts, sg.sw = nil, nil, nil
	sg.B = [2][]float64{}
	sg.creepF, sg.driftRaw, sg.driftC = decay{}, driftField{}, driftField{}
}

// sameMoveInputs reports whether jobs a and b agree, bit for bit, in
// what newSegmenter's moves, switches, fiducials, approaches and detours
// read of them: their ends, tolerance and mode.
func sameMoveInputs(a, b job) bool {
	return sameFloat(a.start.X, b.start.X) && sameFloat(a.start.Y, b.start.Y) && sameFloat(a.end.X, b.end.X) && sameFloat(a.end.Y, b.end.Y) &&
		sameFloat(a.tolNM, b.tolNM) && a.mode == b.mode
}

// clockStart returns the writing clock at which a registration of kind k
// before job s leaves the tip: at the job's start for a local image (an
// FE job switches to its conditions after the image, at AP-imaging
// conditions), the approach earlier for a coarse one.
func (sg *segmenter) clockStart(s, k int) float64 {
	switch {
	case k == kCoarse:
		return sg.ts[s] - sg.a[s]
	case sg.jobs[s].mode == design.ModeFE:
		return sg.ts[s] - sg.sw[s]
	}
	return sg.ts[s]
}

// field returns the drift field a segment starting at s uses: the first
// segment of a step has no measured rate to compensate with.
func (sg *segmenter) field(s int) *driftField {
	if sg.model.residual == 1 || (s == 0 && !sg.model.compensatedStart) {
		return &sg.driftRaw
	}
	return &sg.driftC
}

// regError returns z·σ of registration kind k.
func (sg *segmenter) regError(k int) float64 {
	if k == kCoarse {
		return sg.model.errCoase
	}
	return sg.model.errLocal
}

// startTerms returns, for a segment of kind k starting at s, the creep
// per unit fraction and the drift at r0 that count against every stroke
// of the segment beyond what the fields hold from its clock start on:
// for a coarse registration, what its approach from the fiducial leaves
// beyond what the direct move into s (which the approach replaces, and
// whose creep and excess the fields hold) leaves, all of it at most;
// less, for either kind, what the creep and excess of earlier moves lose
// while the registration's own time passes, which the writing clock does
// not hold (counted up to the end of job s only, a lower bound).
func (sg *segmenter) startTerms(s, k int) (creepUnit, drift float64) {
	return sg.startTermsMemo(s, k, nil)
}

// startTermsMemo is startTerms with the decays' Expm1 values from m (see
// decay.savedMemo).
func (sg *segmenter) startTermsMemo(s, k int, m *savedMemo) (creepUnit, drift float64) {
	t0 := sg.clockStart(s, k)
	delay := sg.B[k][s]
	if s > 0 {
		delay -= sg.c.verify
	}
	f := sg.field(s)
	creepUnit = -sg.creepF.savedMemo(t0, sg.T[s], delay, m)
	drift = -f.moves.savedMemo(t0, sg.T[s], delay, m)
	if k == kCoarse {
		direct, excess := 0.0, 0.0
		if s > 0 {
			direct, excess = sg.moveCreep[s], sg.moveExcess[s]
		}
		creepUnit += math.Max(sg.aCreep[s]-direct, 0)
		drift += math.Max(sg.aExcess[s]-excess, 0) / 60 * sg.model.moveTau
	}
	return creepUnit, drift
}

// load returns the creep per unit fraction and the drift at r0 from the
// registration of a segment (s, k) to the end of job j (j ≥ s).
func (sg *segmenter) load(s, k, j int) (creepUnit, drift float64) {
	return sg.segmentLoads(s, k).at(j)
}

// segmentLoads returns the loads of segment (s, k), whose start terms
// are worked out once for all its jobs.
func (sg *segmenter) segmentLoads(s, k int) segLoads {
	t0 := sg.clockStart(s, k)
	f := sg.field(s)
	c0, d0 := sg.startTerms(s, k)
	return segLoads{sg: sg, k: k, f: f, c0: c0, d0: d0, creep0: sg.creepF.integral(t0), drift0: f.at(t0)}
}

// segLoads reads the loads of one segment's jobs (see load).
type segLoads struct {
	sg             *segmenter
	k              int
	f              *driftField
	c0, d0         float64
	creep0, drift0 float64
}

// at returns the creep per unit fraction and the drift at r0 from the
// segment's registration to the end of job j.
func (l segLoads) at(j int) (creepUnit, drift float64) {
	t := l.sg.T[j]
	return math.Max(l.c0+l.sg.creepF.integral(t)-l.creep0, 0), math.Max(l.d0+l.f.at(t)-l.drift0, 0)
}

// planLoad returns the displacement (nm) at the planning values from the
// registration of (s, k) to the end of j, error included.
func (sg *segmenter) planLoad(s, k, j int) float64 {
	return sg.segmentLoads(s, k).plan(j)
}

// plan returns the displacement (nm) at the planning values from the
// segment's registration to the end of job j (see planLoad).
func (l segLoads) plan(j int) float64 {
	cu, d := l.at(j)
	return l.sg.regError(l.k) + l.sg.model.creep*cu + l.sg.model.rateMul*d
}

// allowed reports whether a registration of kind k may stand before job
// s: a local image needs the lattice beside atomic-precision work, or
// atomic-precision features already written beside the field-emission
// work that follows (a lead's end for its fan-out): elsewhere the tip's
// position after a long move is known only to what a fiducial finds; a
// job coupled to an earlier step's work needs a local one; no
// registration breaks a coupled block.
func (sg *segmenter) allowed(s, k int) bool {
	jb := sg.jobs[s]
	if s > 0 && jb.joined {
		return false
	}
	if k == kLocal {
		return jb.mode != design.ModeFE || jb.nearAP
	}
	return !jb.localOnly
}

// solve returns the segment starts (job indices, starts[0] = 0) and the
// kind of each registration that minimise the step's time with every
// tolerance divided by margin, the time (from the tip at f0 to the end
// of the last job and its verification), and the jobs that could not be
// held even right after a registration (they start a segment of their
// own, or close a coupled block that could not be). It is exact for the
// given order: D[e] = min over feasible (s, k) of D[s−1] + B[k][s], the
// feasible segments of each (s, k) found by descending a max tree of
// q[j] = planning load at j's end − tol[j]/margin against the load at
// the segment's start, candidates kept in a heap keyed by D[s−1]+B[k][s]
// and dropped once expired. O(n log n) time, O(n) memory.
func (sg *segmenter) solve(margin float64) (starts []int, kinds []RegistrationKind, total float64, forced []int) {
	n := sg.n
	if n == 0 {
		return nil, nil, 0, nil
	}
	if sg.cache == nil {
		sg.cache = sg.prepareSolve()
	}
	sc := sg.cache
	// q over a drift field: every start after the first reads the same
	// field (see field), so only its tree is built; the first start
	// reads its own, where it differs, by a scan (firstAbove0).
	fieldOf := func(e int) int {
		if sg.field(e) == &sg.driftC {
			return 1
		}
		return 0
	}
	q := func(v, j int) float64 { return sc.value[v][j] - sg.jobs[j].tolNM/margin }
	vRest := fieldOf(min(1, n-1))
	tree := &sc.trees[vRest]
	if tree.v == nil {
		*tree = makeMaxTree(n)
	}
	leaves := tree.leaves()
	for j := range leaves {
		leaves[j] = q(vRest, j)
	}
	tree.build()
	firstAbove0 := func(c float64) int {
		v := fieldOf(0)
		if v == vRest {
			return tree.firstAbove(0, c)
		}
		for j := range n {
			if q(v, j) > c {
				return j
			}
		}
		return n
	}
	nextLocal := sc.nextLocal
	D, from := sc.D, sc.from
	var h candHeap
	// here: the candidates starting at e; latest: those of the latest
	// allowed start (fixed buffers: one pair per job was most of the
	// allocations of a 10^6-job solve).
	var hereBuf, latestBuf [2]cand
	var latest []cand
	for e := 0; e < n; e++ {
		prev := 0.0
		if e > 0 {
			prev = D[e-1]
		}
		here := hereBuf[:0]
		for k := 0; k < 2; k++ {
			if !sg.allowed(e, k) {
				continue
			}
			var emax int
			if e == 0 {
				emax = firstAbove0(sc.cst[k][0]) - 1
			} else {
				emax = tree.firstAbove(e, sc.cst[k][e]) - 1
			}
			if k == kCoarse {
				emax = min(emax, nextLocal[e]-1)
			}
			here = append(here, cand{key: prev + sg.B[k][e], s: e, kind: k, emax: emax})
		}
		if len(here) == 0 && (e == 0 || !sg.jobs[e].joined) {
			// No registration meets every wish here (a job coupled to an
			// earlier step that a local image cannot reach): a coarse one,
			// over budget.
			k := kCoarse
			here = append(here, cand{key: prev + sg.B[k][e], s: e, kind: k, emax: e - 1})
		}
		if len(here) > 0 {
			ok := false
			for _, c := range here {
				if c.emax >= e {
					h.push(c)
					ok = true
				}
			}
			if !ok {
				// Over budget even alone: its own segment, with the
				// cheaper registration allowed.
				best := here[0]
				for _, c := range here[1:] {
					if c.key < best.key {
						best = c
					}
				}
				best.emax = e
				h.push(best)
				forced = append(forced, e)
			}
			latest = latestBuf[:copy(latestBuf[:], here)]
		}
		for len(h) > 0 && h[0].emax < e {
			h.pop()
		}
		if len(h) == 0 {
			// A coupled block outlasts every segment that could hold it:
			// the latest start carries it on, over budget.
			for _, c := range latest {
				c.emax = e
				h.push(c)
			}
			forced = append(forced, e)
		}
		D[e], from[e] = h[0].key, h[0]
	}
	var ks []RegistrationKind
	for e := n - 1; e >= 0; e = from[e].s - 1 {
		starts = append(starts, from[e].s)
		ks = append(ks, regKinds[from[e].kind])
	}
	for i, j := 0, len(starts)-1; i < j; i, j = i+1, j-1 {
		starts[i], starts[j] = starts[j], starts[i]
		ks[i], ks[j] = ks[j], ks[i]
	}
	return starts, ks, D[n-1] + sg.T[n-1] + sg.c.verify, dedupe(forced)
}

// prepareSolve makes solve's margin-independent terms: the planning
// load at each job's end on either drift field, and for each start s and
// kind k the load its segment starts from (less the registration error
// and the start terms), against which the loads of its jobs are read.
func (sg *segmenter) prepareSolve() *solveCache {
	n := sg.n
	md := sg.model
	sc := &solveCache{D: make([]float64, n), from: make([]cand, n)}
	value := func(f *driftField, t float64) float64 {
		return md.creep*sg.creepF.integral(t) + md.rateMul*f.at(t)
	}
	// value on both fields, each integral taken once: the creep is the
	// same on both, and so are the moves' excess decays (newSegmenter
	// adds the same sources to both; checked, else taken apart).
	raw, cmp := &sg.driftRaw, &sg.driftC
	sameMoves := raw.moves.same(&cmp.moves)
	sc.value[0], sc.value[1] = make([]float64, n), make([]float64, n)
	for k := range sc.cst {
		sc.cst[k] = make([]float64, n)
	}
	// Each job's terms read the segmenter alone: a large step's are made
	// on every core (inParallel), each block with its own memo (it holds
	// exact values, so what it hits does not change them).
	inParallel(n, func(lo, hi int) {
		for j := lo; j < hi; j++ {
			t := sg.T[j]
			ci, mr := sg.creepF.integral(t), raw.moves.integral(t)
			mc := mr
			if !sameMoves {
				mc = cmp.moves.integral(t)
			}
			sc.value[0][j] = md.creep*ci + md.rateMul*(raw.basePerS*t+mr+raw.anneal.integral(t))
			sc.value[1][j] = md.creep*ci + md.rateMul*(cmp.basePerS*t+mc+cmp.anneal.integral(t))
		}
		memo := newSavedMemo()
		for k := range sc.cst {
			for s := lo; s < hi; s++ {
				if !sg.allowed(s, k) {
					continue
				}
				c0, d0 := sg.startTermsMemo(s, k, memo)
				sc.cst[k][s] = value(sg.field(s), sg.clockStart(s, k)) - sg.regError(k) - md.creep*c0 - md.rateMul*d0
			}
		}
	})
	// nextLocal[s]: the first job at or after s that needs a local
	// registration (n when none).
	sc.nextLocal = make([]int, n+1)
	sc.nextLocal[n] = n
	for j := n - 1; j >= 0; j-- {
		sc.nextLocal[j] = sc.nextLocal[j+1]
		if sg.jobs[j].localOnly {
			sc.nextLocal[j] = j
		}
	}
	return sc
}

func dedupe(xs []int) []int {
	var out []int
	for i, x := range xs {
		if i == 0 || x != xs[i-1] {
			out = append(out, x)
		}
	}
	return out
}

// kindIndex returns the index of registration kind k in regKinds.
func kindIndex(k RegistrationKind) int {
	if k == RegCoarse {
		return kCoarse
	}
	return kLocal
}

// totalOf returns the time of a segmentation (as solve counts it).
func (sg *segmenter) totalOf(starts []int, kinds []RegistrationKind) float64 {
	if sg.n == 0 {
		return 0
	}
	t := sg.T[sg.n-1] + sg.c.verify
	for i, s := range starts {
		t += sg.B[kindIndex(kinds[i])][s]
	}
	return t
}

// fixedInterval returns the segment starts of the by-hand practice: a
// registration whenever the next job would end more than interval after
// the last one, local before atomic-precision work, coarse before
// field-emission work.
func (sg *segmenter) fixedInterval(interval float64) ([]int, []RegistrationKind) {
	if sg.n == 0 {
		return nil, nil
	}
	kindOf := func(s int) RegistrationKind {
		if sg.allowed(s, kLocal) {
			return RegLocal
		}
		return RegCoarse
	}
	starts := []int{0}
	kinds := []RegistrationKind{kindOf(0)}
	s := 0
	for j := 1; j < sg.n; j++ {
		if sg.T[j]-sg.clockStart(s, kindIndex(kinds[len(kinds)-1])) > interval && !sg.jobs[j].joined {
			starts = append(starts, j)
			kinds = append(kinds, kindOf(j))
			s = j
		}
	}
	return starts, kinds
}

type cand struct {
	key  float64
	s    int
	kind int
	emax int
}

// candHeap is a binary min-heap of candidates by key, then start.
type candHeap []cand

func (h candHeap) less(i, j int) bool {
	if h[i].key != h[j].key {
		return h[i].key < h[j].key
	}
	if h[i].s != h[j].s {
		return h[i].s < h[j].s
	}
	return h[i].kind < h[j].kind
}

func (h *candHeap) push(c cand) {
	*h = append(*h, c)
	a := *h
	for i := len(a) - 1; i > 0; {
		p := (i - 1) / 2
		if !a.less(i, p) {
			break
		}
		a[i], a[p] = a[p], a[i]
		i = p
	}
}

func (h *candHeap) pop() {
	a := *h
	n := len(a) - 1
	a[0] = a[n]
	a = a[:n]
	for i := 0; ; {
		l, r, m := 2*i+1, 2*i+2, i
		if l < n && a.less(l, m) {
			m = l
		}
		if r < n && a.less(r, m) {
			m = r
		}
		if m == i {
			break
		}
		a[i], a[m] = a[m], a[i]
		i = m
	}
	*h = a
}

// maxTree answers "first index at or after i whose value exceeds c".
type maxTree struct {
	n, size int
	v       []float64
}

func newMaxTree(vals []float64) *maxTree {
	t := makeMaxTree(len(vals))
	copy(t.leaves(), vals)
	t.build()
	return &t
}

// makeMaxTree returns a tree of n values, all −Inf until set through
// leaves and build.
func makeMaxTree(n int) maxTree {
	size := 1
	for size < n {
		size *= 2
	}
	t := maxTree{n: n, size: size, v: make([]float64, 2*size)}
	for i := range t.v {
		t.v[i] = math.Inf(-1)
	}
	return t
}

// leaves returns the n values, to be set before build.
func (t *maxTree) leaves() []float64 { return t.v[t.size : t.size+t.n] }

// build makes the inner nodes from the leaves.
func (t *maxTree) build() {
	for i := t.size - 1; i >= 1; i-- {
		t.v[i] = math.Max(t.v[2*i], t.v[2*i+1])
	}
}

// firstAbove returns the least j >= from with vals[j] > c, or n.
// It climbs from the leaf of from to the first subtree to its right
// holding such a value and descends into it: O(log(j − from)), where
// the answer is a segment's length away.
func (t *maxTree) firstAbove(from int, c float64) int {
	if from >= t.n {
		return t.n
	}
	i := from + t.size
	if !(t.v[i] > c) {
		for {
			for i&1 == 1 { // a right child: up to the first left one
				i >>= 1
			}
			if i == 0 {
				return t.n // climbed past the root
			}
			i++ // its right sibling
			if t.v[i] > c {
				break
			}
		}
		for i < t.size {
			i *= 2
			if !(t.v[i] > c) {
				i++
			}
		}
	}
	return min(i-t.size, t.n)
}

// DriftBudget returns the time in seconds within which a stroke of
// placement tolerance toleranceNM (±nm) must be written after a
// registration of error registrationNM, with creepNM of creep still to
// come, at a drift rate of rateNMPerMin: (tolerance − registration error
// − creep) / rate. It is +Inf without drift and 0 when the error and the
// creep alone use the tolerance up.
func DriftBudget(toleranceNM, registrationNM, creepNM, rateNMPerMin float64) float64 {
	room := toleranceNM - registrationNM - creepNM
	if room <= 0 {
		return 0
	}
	if rateNMPerMin <= 0 {
		return math.Inf(1)
	}
	return room / rateNMPerMin * 60
}
