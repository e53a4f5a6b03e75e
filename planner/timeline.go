package planner

import (
	"fmt"
	"math"

	"dimerpath/lattice/design"
)

// timeline is the schedule of one segmented writing order.
type timeline struct {
	actions   []Action
	segments  []Segment
	breakdown Breakdown
}

// schedule lays the jobs out in time with a registration before each
// segment start, in the order the operator works:
//
//	register at the segment's fiducial, move to the first stroke,
//	(switch mode,) write, move, ... write, verify,
//	move to the next segment's fiducial (switch mode there if the next
//	segment starts in another mode), register, ...
//
// Every action starts where the previous one ends. The total equals
// segmenter.totalOf for the same starts; strokes[jobs[i].stroke].Segment
// is set.
func schedule(sg *segmenter, starts []int, strokes []Stroke, prof *Profile) timeline {
	var tl timeline
	jobs := sg.jobs
	if len(jobs) == 0 {
		return tl
	}
	c := &sg.c
	clock := 0.0
	seg := 0
	add := func(a Action) {
		a.Index = len(tl.actions)
		a.Segment = seg
		a.StartS = clock
		clock += a.DurationS
		tl.actions = append(tl.actions, a)
		switch a.Kind {
		case ActMove:
			tl.breakdown.TravelS += a.DurationS
		case ActSwitch:
			tl.breakdown.ModeSwitchS += a.DurationS
		case ActRegister:
			tl.breakdown.RegistrationS += a.DurationS
		case ActVerify:
			tl.breakdown.VerificationS += a.DurationS
		case ActDwell:
			tl.breakdown.DwellS += a.DurationS
		case ActWrite:
			if a.Mode == design.ModeFE {
				tl.breakdown.FEWriteS += a.DurationS
			} else {
				tl.breakdown.APWriteS += a.DurationS
			}
		}
	}
	next := 1 // index into starts of the next segment
	var prevMode design.Mode
	for j, jb := range jobs {
		st := &strokes[jb.stroke]
		if j == 0 || (next < len(starts) && starts[next] == j) {
			f := c.fiducials[sg.fid[j]]
			if j > 0 {
				last := jobs[j-1].end
				if c.verify > 0 {
					add(Action{Kind: ActVerify, Stroke: -1, From: last, To: last, DurationS: c.verify, Note: "verification image of the segment"})
				}
				add(Action{Kind: ActMove, Stroke: -1, From: last, To: f.At, DurationS: c.move(last, f.At), Note: "to fiducial " + f.Name})
				tl.segments[len(tl.segments)-1].EndS = clock
				seg++
				next++
			}
			tl.segments = append(tl.segments, Segment{Index: seg, Fiducial: f.Name, FiducialAt: f.At, StartS: clock, BudgetS: math.Inf(1)})
			if j > 0 && prevMode != jb.mode {
				add(switchAction(c, jb.mode, prof, f))
			}
			add(Action{Kind: ActRegister, Stroke: -1, From: f.At, To: f.At, DurationS: c.register, Note: "image fiducial " + f.Name + " and correct the offset"})
			add(Action{Kind: ActMove, Stroke: -1, From: f.At, To: jb.start, DurationS: c.move(f.At, jb.start)})
		} else {
			prev := jobs[j-1]
			add(Action{Kind: ActMove, Stroke: -1, From: prev.end, To: jb.start, DurationS: c.move(prev.end, jb.start)})
			if prev.mode != jb.mode {
				add(switchAction(c, jb.mode, prof, Fiducial{At: jb.start}))
			}
		}
		cur := &tl.segments[len(tl.segments)-1]
		cur.Strokes = append(cur.Strokes, st.ID)
		cur.BudgetS = math.Min(cur.BudgetS, jb.budgetS)
		st.Segment = seg
		a := Action{Kind: ActWrite, Stroke: st.ID, From: jb.start, To: jb.end, DurationS: jb.writeS, Mode: jb.mode}
		cond := prof.AP
		if jb.mode == design.ModeFE {
			cond = prof.FE
		}
		a.BiasV, a.CurrentA, a.SpeedNMPS = cond.BiasV, cond.CurrentA, cond.Speed()
		if jb.dwell {
			a.Kind = ActDwell
			a.BiasV, a.CurrentA, a.SpeedNMPS = prof.Dwell.BiasV, prof.Dwell.CurrentA, 0
			a.Note = fmt.Sprintf("expected %.3g s; stop at completion or after %.3g s", jb.writeS, prof.Dwell.CapS())
		}
		add(a)
		prevMode = jb.mode
	}
	if c.verify > 0 {
		last := jobs[len(jobs)-1].end
		add(Action{Kind: ActVerify, Stroke: -1, From: last, To: last, DurationS: c.verify, Note: "verification image of the segment"})
	}
	tl.segments[len(tl.segments)-1].EndS = clock
	for i := range tl.segments {
		if math.IsInf(tl.segments[i].BudgetS, 1) {
			tl.segments[i].BudgetS = 0 // no drift: JSON cannot carry +Inf
		}
	}
	return tl
}

func switchAction(c *costs, to design.Mode, prof *Profile, at Fiducial) Action {
	cond := prof.AP
	if to == design.ModeFE {
		cond = prof.FE
	}
	return Action{Kind: ActSwitch, Stroke: -1, From: at.At, To: at.At, DurationS: c.modeSwitch, Mode: to,
		BiasV: cond.BiasV, CurrentA: cond.CurrentA, Note: "switch to " + to.Adjective() + " conditions"}
}
