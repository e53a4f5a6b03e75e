package planner

import (
	"fmt"

	"dimerpath/internal/units"
	"dimerpath/lattice/design"
)

// maxSegmentWarnings bounds the segments named one by one in warnings
// about the probability of staying within tolerance.
const maxSegmentWarnings = 5

// segmentNote is what describeSegments works out for one segment, kept
// until the timeline has made the plan's segments (setSegmentNotes).
type segmentNote struct {
	tightest  int
	budgetS   float64 // 0: unbounded
	pInTol    float64
	reason    string
	step, i   int // segment i of steps[step]
	wantIndex int // the index the timeline must give it
}

// describeSegments works out each segment's registration reason,
// tightest stroke, budget and probability of staying within tolerance
// (in the order the timeline makes the segments), and warns about
// segments below the profile's level, naming what would help; tol.all and
// drift are the plan's PInTolerance and Drift. It runs before the
// timeline, so that the segmenters' arrays only it reads are dropped
// before the timeline's actions are made (see segmenter.keepForTimeline).
func (b *builder) describeSegments(steps []*stepWork, tol tolResult, drift DriftPlan) []segmentNote {
	level := b.prof.Session.PInToleranceMin
	m := b.model
	rate := m.r0 * m.rateMul
	coupledTo := map[int]string{} // stroke -> why it must register locally
	for _, cp := range b.lastCouplings {
		if cp.sa < 0 || cp.sb < 0 || b.stepOf[cp.sa] == b.stepOf[cp.sb] {
			continue
		}
		later, earlier, region := cp.sa, cp.sb, cp.B
		if b.stepOf[cp.sb] > b.stepOf[cp.sa] {
			later, earlier, region = cp.sb, cp.sa, cp.A
		}
		coupledTo[later] = fmt.Sprintf("registers on %s, written in step %s (coupled ±%.3g nm)", region, stepName(steps[b.stepOf[earlier]].species), cp.ToleranceNM)
	}
	below, named := 0, 0
	g := 0 // index into tol.segs, and the segment's index in the plan
	notes := make([]segmentNote, 0, len(tol.segs))
	for si, st := range steps {
		sg := st.sg
		for sp := range st.spans() {
			i, s, e, k := sp.i, sp.s, sp.e, sp.k
			notes = append(notes, segmentNote{step: si, i: i, wantIndex: g})
			seg := &notes[len(notes)-1]
			// The tightest stroke: the largest share of its tolerance used
			// at the planning values.
			tight, share := s, -1.0
			at := sg.segmentLoads(s, k)
			for j := s; j < e; j++ {
				if sh := at.plan(j) / sg.jobs[j].tolNM; sh > share {
					tight, share = j, sh
				}
			}
			jb := sg.jobs[tight]
			seg.tightest = jb.stroke
			cu, _ := at.at(tight)
			if bud := DriftBudget(jb.tolNM, sg.regError(k), m.creep*cu, rate); !isInf(bud) {
				seg.budgetS = bud
			}
			seg.pInTol = tol.segs[g]
			g++
			seg.reason = b.registrationReason(sg, s, e, k, coupledTo)
			if seg.pInTol < level {
				below++
				if named < maxSegmentWarnings {
					named++
					fix := "a shorter segment, feed-forward drift compensation (drift.compensation), or a calibrated, lower drift rate"
					if k == kCoarse {
						fix = "a local registration (start the segment with atomic-precision work) or a shorter segment"
					}
					if sg.regError(k) >= 0.8*jb.tolNM/b.marginUsed {
						fix = "a registration of smaller error (" + map[bool]string{true: "registration.coarse_error_nm", false: "registration.local.error_nm"}[k == kCoarse] + ") or a wider tolerance: the error alone uses most of it"
					}
					s := b.strokes[jb.stroke]
					b.warnings = append(b.warnings, fmt.Sprintf("segment %d (step %s, %s registration): P(every stroke within tolerance) = %.3f, below %.2f; tightest stroke in %s (±%.3g nm); what would help: %s",
						seg.wantIndex+1, stepName(st.species), st.kinds[i], seg.pInTol, level, s.Region, s.ToleranceNM, fix))
				}
			}
		}
	}
	if below > named {
		b.warnings = append(b.warnings, fmt.Sprintf("%d more segments stay within tolerance with less than %.2f probability", below-named, level))
	}
	if tol.all < level {
		b.warnings = append(b.warnings, fmt.Sprintf("P(every stroke and coupled pair within tolerance) = %.3f for the whole write, below session.p_in_tolerance_min = %.2f (segments planned at %.3g nm/min drift and %.3g creep, margin ×%.2f)",
			tol.all, level, drift.RateNMPerMin, drift.CreepFraction, drift.Margin))
	}
	return notes
}

// setSegmentNotes puts describeSegments' notes on the plan's segments,
// which the timeline has made since (segment i of step k is the plan's
// steps[k].seg0 + i).
func setSegmentNotes(plan *Plan, steps []*stepWork, notes []segmentNote) error {
	if len(notes) != len(plan.Segments) {
		return &InternalError{Message: fmt.Sprintf("%d segments described, %d in the timeline", len(notes), len(plan.Segments))}
	}
	for _, n := range notes {
		i := steps[n.step].seg0 + n.i
		if i != n.wantIndex || plan.Segments[i].Index != i {
			return &InternalError{Message: fmt.Sprintf("segment %d of step %d is the timeline's %d, described as %d", n.i, n.step, i, n.wantIndex)}
		}
		seg := &plan.Segments[i]
		seg.Tightest, seg.BudgetS = n.tightest, n.budgetS
		seg.PInTolerance = n.pInTol
		seg.Reason = n.reason
	}
	return nil
}

func isInf(x float64) bool { return x > 1e300 }

// registrationReason says why a segment registers the way it does.
func (b *builder) registrationReason(sg *segmenter, s, e, k int, coupledTo map[int]string) string {
	jb := sg.jobs[s]
	c := &sg.c
	if k == kCoarse {
		f := c.fiducials[sg.fid[s]].Name
		if jb.mode == design.ModeFE {
			return fmt.Sprintf("field-emission work (±%.3g nm): fiducial %s; a local lattice image needs atomic-precision conditions", jb.tolNM, f)
		}
		return fmt.Sprintf("fiducial %s holds ±%.3g nm here (±%.2g nm and the approach's creep)", f, jb.tolNM, sg.model.errCoase)
	}
	for j := s; j < e; j++ {
		if why, ok := coupledTo[sg.jobs[j].stroke]; ok {
			return why
		}
	}
	if jb.mode == design.ModeFE {
		return fmt.Sprintf("field-emission work (±%.3g nm) beside atomic-precision features already written: a %s image of them instead of the detour to fiducial %s (%s)",
			jb.tolNM, units.Duration(c.local), c.fiducials[sg.fid[s]].Name, units.Duration(sg.B[kCoarse][s]))
	}
	coarse := sg.model.errCoase + sg.model.creep*sg.aCreep[s]
	if coarse >= jb.tolNM/b.marginUsed {
		return fmt.Sprintf("±%.3g nm is tighter than a fiducial registration holds (±%.2g nm with the approach's creep): lattice image beside the stroke", jb.tolNM, coarse)
	}
	return fmt.Sprintf("atomic-precision work: a %s lattice image instead of the detour to fiducial %s (%s)",
		units.Duration(c.local), c.fiducials[sg.fid[s]].Name, units.Duration(sg.B[kCoarse][s]))
}

// describeCouplings lists the coupled pairs with their probability of
// staying within tolerance, and warns about those below the level.
func (b *builder) describeCouplings(plan *Plan, cps []couplingWork, tol tolResult, index []int) {
	level := b.prof.Session.PInToleranceMin
	for ci, cp := range cps {
		if cp.sa < 0 || cp.sb < 0 {
			missing := cp.A
			if cp.sa >= 0 {
				missing = cp.B
			}
			b.warnings = append(b.warnings, fmt.Sprintf("%s of %s and %s: region %s has no strokes, nothing to hold", cp.Kind, cp.A, cp.B, missing))
			continue
		}
		c := cp.Coupling
		c.Strokes = []int{cp.sa, cp.sb}
		c.SameStep = b.stepOf[cp.sa] == b.stepOf[cp.sb]
		if k := index[ci]; k >= 0 {
			c.PInTolerance = tol.pairs[k]
		}
		plan.Couplings = append(plan.Couplings, c)
		if c.PInTolerance < level {
			how := "written inside one drift window"
			if !c.SameStep {
				how = "the later registered locally on the earlier"
			}
			b.warnings = append(b.warnings, fmt.Sprintf("%s of %s and %s (±%.3g nm, %s): P(within tolerance) = %.3f, below %.2f",
				c.Kind, c.A, c.B, c.ToleranceNM, how, c.PInTolerance, level))
		}
	}
}

// windowWarnings warns about dopant windows that stay open longer than
// the profile's limit before their dose.
func (b *builder) windowWarnings(plan *Plan) {
	limit := b.prof.Process.WindowOpenLimitS
	n, worst := 0, -1
	for i, w := range plan.Windows {
		if w.OpenS > limit {
			n++
			if worst < 0 || w.OpenS > plan.Windows[worst].OpenS {
				worst = i
			}
		}
	}
	if n > 0 {
		w := plan.Windows[worst]
		b.warnings = append(b.warnings, fmt.Sprintf("%d dopant window(s) stay open longer than process.window_open_limit_s (%s) before their dose, the longest %s (region %s): residual gas may reach them first; write fewer features after them in the step or raise the limit",
			n, units.Duration(limit), units.Duration(w.OpenS), w.Region))
	}
}
