package planner

import (
	"fmt"
	"math"

	"github.com/golang/geo/r2"

	"dimerpath/lattice/design"
)

// timeline is the schedule of a plan or of one step of it.
type timeline struct {
	actions   []Action
	segments  []Segment
	breakdown Breakdown
	clock     float64
}

// add appends a at the clock, to segment seg, and counts its time.
func (tl *timeline) add(a Action, seg int) {
	a.Index = len(tl.actions)
	a.Segment = seg
	a.StartS = tl.clock
	if a.Kind != ActWrite && a.Kind != ActDwell {
		a.Stroke = -1
	}
	tl.clock += a.DurationS
	tl.actions = append(tl.actions, a)
	b := &tl.breakdown
	switch a.Kind {
	case ActMove:
		b.TravelS += a.DurationS
	case ActSwitch:
		b.ModeSwitchS += a.DurationS
	case ActRegister, ActRefind:
		b.RegistrationS += a.DurationS
	case ActVerify:
		b.VerificationS += a.DurationS
	case ActDwell:
		b.DwellS += a.DurationS
	case ActWrite:
		if a.Mode == design.ModeFE {
			b.FEWriteS += a.DurationS
		} else {
			b.APWriteS += a.DurationS
		}
	case ActSurvey:
		b.SurveyS += a.DurationS
	case ActCondition:
		b.ConditioningS += a.DurationS
	case ActRepair:
		b.RepairS += a.DurationS
	case ActDocument:
		b.DocumentationS += a.DurationS
	case ActDose:
		b.DoseS += a.DurationS
	case ActAnneal:
		b.AnnealS += a.DurationS
	}
}

// segmentEnd lists what is done at the end of a segment, after its last
// write: the verification images and repairs of the features it
// completed (see session.go).
type segmentEnd func(tl *timeline, seg int, at r2.Point)

// scheduleStep lays one lithography step's jobs out in time after the
// timeline's clock, with a registration of the given kind before each
// segment start, in the order the operator works:
//
//	coarse: move to the fiducial, (switch,) register, move to the stroke;
//	local:  move to the stroke, (switch,) register on the lattice;
//	write, move, (switch,) write, ..., verification images, repairs, ...
//
// Every action starts where the previous one ends. The writing and
// registration time equals segmenter.totalOf for the same starts;
// strokes[order[i]].Segment is set, and segments are numbered from
// firstSeg.
func (tl *timeline) scheduleStep(sg *segmenter, order []int, starts []int, kinds []RegistrationKind, strokes []Stroke, prof *Profile, step, firstSeg int, end segmentEnd) {
	if len(order) == 0 {
		return
	}
	c := &sg.c
	seg := firstSeg - 1
	next := 0 // index into starts of the next segment
	var prevMode design.Mode
	closeSegment := func(last r2.Point) {
		if c.verify > 0 {
			tl.add(Action{Kind: ActVerify, From: last, To: last, DurationS: c.verify, Note: "verification image of the segment"}, seg)
		}
		if end != nil {
			end(tl, seg, last)
		}
	}
	for j, i := range order {
		jb := timelineJob(strokes, i)
		st := &strokes[jb.stroke]
		if next < len(starts) && starts[next] == j {
			kind := kinds[next]
			at := c.fiducials[sg.fid[j]]
			from := c.fiducials[sg.first].At
			if j > 0 {
				from = timelineJob(strokes, order[j-1]).end
				closeSegment(from)
			}
			if j > 0 && kind == RegCoarse {
				tl.add(Action{Kind: ActMove, From: from, To: at.At, DurationS: sg.detour[j], Note: "to fiducial " + at.Name}, seg)
				from = at.At
			}
			if j > 0 {
				tl.segments[len(tl.segments)-1].EndS = tl.clock
			}
			seg++
			next++
			g := Segment{Index: seg, Step: step, Registration: kind, StartS: tl.clock}
			if kind == RegCoarse {
				g.Fiducial, g.FiducialAt = at.Name, at.At
			} else {
				g.FiducialAt = jb.start
			}
			tl.segments = append(tl.segments, g)
			if kind == RegLocal {
				mv := sg.m[j]
				if j == 0 {
					mv = sg.B[kLocal][0] - c.local
				}
				tl.add(Action{Kind: ActMove, From: from, To: jb.start, DurationS: mv, Note: moveNote(c, from, jb.start, jb.tolNM)}, seg)
			}
			// A local image of an FE segment is made at imaging
			// conditions; the switch to FE follows it.
			switchAfter := kind == RegLocal && jb.mode == design.ModeFE
			if j > 0 && prevMode != jb.mode && !switchAfter {
				tl.switchTo(c, jb.mode, prevMode, prof, jb.start, seg, kind == RegCoarse, at)
			}
			if kind == RegCoarse {
				tl.add(Action{Kind: ActRegister, From: at.At, To: at.At, DurationS: c.register, Note: "image fiducial " + at.Name + " and correct the offset"}, seg)
				tl.add(Action{Kind: ActMove, From: at.At, To: jb.start, DurationS: sg.a[j], Note: moveNote(c, at.At, jb.start, jb.tolNM)}, seg)
			} else {
				what := "the lattice and the written features"
				if jb.mode == design.ModeFE {
					what = "the atomic-precision features written"
				}
				tl.add(Action{Kind: ActRegister, From: jb.start, To: jb.start, DurationS: c.local,
					Note: "image " + what + " beside the stroke and correct the offset"}, seg)
			}
			if j > 0 && prevMode != jb.mode && switchAfter {
				tl.switchTo(c, jb.mode, prevMode, prof, jb.start, seg, false, at)
			}
		} else {
			prev := timelineJob(strokes, order[j-1])
			tl.add(Action{Kind: ActMove, From: prev.end, To: jb.start, DurationS: sg.m[j], Note: moveNote(c, prev.end, jb.start, jb.tolNM)}, seg)
			if prev.mode != jb.mode {
				tl.switchTo(c, jb.mode, prev.mode, prof, jb.start, seg, false, Fiducial{})
			}
		}
		cur := &tl.segments[len(tl.segments)-1]
		cur.Strokes = append(cur.Strokes, st.ID)
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
			a.Note = fmt.Sprintf("expected %.3g s; stop at completion or after %.3g s", jb.writeS, prof.DwellCapS())
		}
		tl.add(a, seg)
		prevMode = jb.mode
	}
	closeSegment(timelineJob(strokes, order[len(order)-1]).end)
	tl.segments[len(tl.segments)-1].EndS = tl.clock
}

// moveNote says why a move takes longer than its travel: the wait for
// the creep of a long move.
func moveNote(c *costs, a, b r2.Point, tol float64) string {
	mv := c.move(a, b, tol)
	if mv.waitS < 0.05 {
		return ""
	}
	return fmt.Sprintf("wait %.0f s after the %.0f nm move for the piezo creep to settle", mv.waitS, a.Sub(b).Norm())
}

// switchTo adds the switch to mode to (and the tip conditioning after
// field-emission work); at a coarse registration it is made at the
// fiducial before registering.
func (tl *timeline) switchTo(c *costs, to, from design.Mode, prof *Profile, at r2.Point, seg int, atFiducial bool, f Fiducial) {
	if atFiducial {
		at = f.At
	}
	cond := prof.AP
	if to == design.ModeFE {
		cond = prof.FE
	}
	tl.add(Action{Kind: ActSwitch, From: at, To: at, DurationS: c.modeSwitch, Mode: to,
		BiasV: cond.BiasV, CurrentA: cond.CurrentA, Note: "switch to " + to.Adjective() + " conditions"}, seg)
	if from == design.ModeFE && c.condition > 0 {
		tl.add(Action{Kind: ActCondition, From: at, To: at, DurationS: c.condition, Note: "condition the tip after field-emission work"}, seg)
	}
}

// finiteClock reports whether every time of the timeline is finite.
func (tl *timeline) finiteClock() bool { return !math.IsInf(tl.clock, 0) && !math.IsNaN(tl.clock) }
