package export

import (
	"context"
	"fmt"
	"strconv"

	"dimerpath/lattice/design"
	"dimerpath/planner"
)

// pdfStrokeList prints every action an operator does, in the order they
// are done, each with a box to tick: the process actions (conditioning,
// survey, dose, anneal, …) between the lithography, and per segment the
// registration, then each change of conditions, stroke and verification
// image. Strokes carry their number on paper (numbers, from
// StrokeNumbers) and their id in the plan file and action CSV; moves are
// implied by each stroke's start. A segment that runs onto the next page
// is announced again there ("continued"), and nothing is left out however
// long the plan. O(actions).
func pdfStrokeList(ctx context.Context, d *pdfDoc, p *planner.Plan, numbers []int) error {
	if len(p.Strokes) == 0 {
		return nil
	}
	if len(p.Strokes) > maxListedStrokes {
		return pdfActionRanges(ctx, d, p, numbers)
	}
	d.heading("Every action, in order", 20)
	d.para("Every action of the session, in order, with a box to tick: the process actions between the lithography, and for each "+
		"segment its registration, the conditions where a row gives them, then each stroke: move to its start and write it towards its end. "+
		"No. is the stroke's number on paper (as in the figures); \"id\" is the same stroke's id in the plan file and the action CSV.", fontBody)
	f := font{size: 7}
	t := newTable(d, f,
		tableColumn{title: "Done", share: 5},
		tableColumn{title: "No.", share: 6, right: true},
		tableColumn{title: "id", share: 6, right: true},
		tableColumn{title: "Region", share: 18},
		tableColumn{title: "Stroke", share: 11},
		tableColumn{title: "Start x, y (nm)", share: 15},
		tableColumn{title: "End x, y (nm)", share: 15},
		tableColumn{title: "Length (nm)", share: 8, right: true},
		tableColumn{title: "Passes", share: 6, right: true},
		tableColumn{title: "Time (s)", share: 8, right: true},
	)
	t.pad = 0.6 // a compact table: a plan of 10^4 strokes fills about 170 pages
	tick := func(top float64) { d.tickBox(t.colX(0)+1.2, top+0.6, t.lh-0.2) }
	seg := -1
	rowH := t.lh + 2*t.pad
	// The conditions last printed, so a row announces each change and
	// each segment's first (a plan starts in them without a switch).
	type cond struct {
		mode                 design.Mode
		dwell                bool
		bias, current, speed float64
	}
	var said *cond
	t.start()
	// After a page break inside a segment, say which segment goes on.
	d.onBreak = func() {
		t.header()
		if seg >= 0 {
			t.spanRowFont("", fmt.Sprintf("Segment %d, continued", seg+1), fontBold)
		}
	}
	for i, a := range p.Actions {
		if i%500 == 0 {
			if err := ctx.Err(); err != nil {
				return err
			}
		}
		switch a.Kind {
		case planner.ActMove:
			// Implied by the next row's position.
		case planner.ActRegister:
			seg = -1         // a new segment's first row needs no "continued" above it
			d.need(5 * rowH) // never a segment's heading (two lines) alone at a page's foot
			s := &p.Segments[a.Segment]
			head := fmt.Sprintf("Segment %d: register locally at %s, %s nm", a.Segment+1, nm1(s.FiducialAt.X), nm1(s.FiducialAt.Y))
			if s.Fiducial != "" {
				head = fmt.Sprintf("Segment %d: register on %s at %s, %s nm", a.Segment+1, s.Fiducial, nm1(s.FiducialAt.X), nm1(s.FiducialAt.Y))
			}
			if len(s.Strokes) > 0 {
				head += "; " + plural("stroke", len(s.Strokes)) + " " + numberRanges(segmentNumbers(s, numbers))
			}
			if a.Note != "" {
				head += " (" + a.Note + ")"
			}
			tick(t.spanRowFont("", head, fontBold))
			seg, said = a.Segment, nil // registering images: say the writing conditions again
		case planner.ActSwitch:
			tick(t.spanRow("", fmt.Sprintf("Switch to %s conditions: %s V, %s nA", a.Mode.Adjective(), signedV(a.BiasV), nanoAmps(a.CurrentA))))
			said = nil
		case planner.ActWrite, planner.ActDwell:
			now := cond{mode: a.Mode, dwell: a.Kind == planner.ActDwell, bias: a.BiasV, current: a.CurrentA, speed: a.SpeedNMPS}
			if now.dwell {
				now.speed = 0
			}
			if said == nil || *said != now {
				said = &now
				how := fmt.Sprintf("Writing conditions, %s mode: %s V, %s nA, %s nm/s", a.Mode.Adjective(), signedV(a.BiasV), nanoAmps(a.CurrentA), sig(a.SpeedNMPS, 4))
				if now.dwell {
					how = fmt.Sprintf("Dwell conditions, %s mode: %s V, %s nA, the tip parked on each point", a.Mode.Adjective(), signedV(a.BiasV), nanoAmps(a.CurrentA))
				}
				d.need(2 * rowH)
				t.spanRow("", how)
			}
			s := &p.Strokes[a.Stroke]
			start, end := s.Path[0], s.Path[len(s.Path)-1]
			length := "–"
			if s.Kind != planner.StrokeDwell {
				length = sig(s.LengthNM, 3)
			}
			top, _ := t.row("", strconv.Itoa(numbers[a.Stroke]), strconv.Itoa(s.ID), s.Region, strokeKindName(s.Mode, s.Kind),
				nm1(start.X)+", "+nm1(start.Y), nm1(end.X)+", "+nm1(end.Y), length, strconv.Itoa(s.Passes), sig(a.DurationS, 3))
			tick(top)
		default:
			// A verification image, or a process action (conditioning,
			// survey, dose, anneal, refind, repair, documentation).
			if a.Segment < 0 {
				seg = -1 // between segments: nothing continues
			}
			what := a.Note
			if what == "" {
				what = string(a.Kind)
			}
			tick(t.spanRow("", capitalise(what)+" ("+clock(a.DurationS)+")"))
			said = nil
		}
	}
	seg = -1
	t.end()
	return nil
}

// strokeKindName names a stroke's mode and kind: "AP line", "FE raster
// fill", "AP dwell point".
func strokeKindName(m design.Mode, k planner.StrokeKind) string {
	return m.Abbrev() + " " + kindNoun(k)
}
