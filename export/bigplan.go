package export

import (
	"context"
	"fmt"
	"strconv"
	"strings"

	"github.com/golang/geo/r2"

	"dimerpath/planner"
)

// Large plans on paper. A donor array of 10^6 windows is planned as 10^6
// strokes in thousands of segments: a list of every stroke would run to
// some 18 000 pages, the segment table to hundreds, and the overview would
// draw two million lines into one black rectangle. Beyond the limits
// below the printed plan summarises, and says so where it does; every
// segment, stroke and action is still in the plan JSON and the action
// CSV, which the operator's scripts follow.
const (
	// maxSegmentRows is the most rows of the segment table: beyond it a
	// row covers a range of consecutive segments.
	maxSegmentRows = 300
	// maxListedStrokes is the most strokes the action list prints one a
	// row (about 85 pages); beyond it the list prints ranges of segments
	// as the segment table does, and every action is left to the files.
	maxListedStrokes = 5000
	// maxDrawnStrokes is the most strokes the overview draws one by one;
	// beyond it each segment is drawn as the area its strokes cover, and
	// the moves are left out.
	maxDrawnStrokes = 20000
	// maxRegionRects is the most run rectangles drawn for one region on
	// the overview; beyond it the region is drawn as its bounding box.
	maxRegionRects = 20000
)

// segmentBlock returns how many consecutive segments one row of the
// segment table covers: 1 up to maxSegmentRows segments.
func segmentBlock(n int) int {
	return max(1, (n+maxSegmentRows-1)/maxSegmentRows)
}

// summarised reports whether the overview draws segment areas rather
// than strokes and moves: in the printed plan (WritePDF sets summary)
// of more than maxDrawnStrokes strokes. The SVG draws every stroke.
func (sc *scene) summarised() bool { return sc.summary && len(sc.plan.Strokes) > maxDrawnStrokes }

// pdfSegmentRanges prints the segment tables of a plan with more than
// maxSegmentRows segments, one per lithography step as pdfSegments does,
// with one row per range of consecutive segments: how they register
// (the fiducials, or local registration, and the least probability of a
// segment to stay within tolerance), the paper numbers of their strokes,
// the tip conditions they use, their duration and when the last ends.
// O(actions).
func pdfSegmentRanges(ctx context.Context, d *pdfDoc, p *planner.Plan, numbers []int) error {
	n := len(p.Segments)
	k := segmentBlock(n)
	d.page()
	d.heading("Segments", 0)
	d.para(fmt.Sprintf("This plan has %s segments, more than a table can list one by one: each row below covers up to %d consecutive "+
		"segments, one table per lithography step. Write them in order. For each segment: register on its fiducial (or locally, "+
		"on the lattice beside its first stroke), then write its strokes in order of their numbers. How each segment registers, "+
		"its strokes and every action are listed in the action CSV and the plan JSON (dimerpath export DESIGN.json -o PLAN.csv); "+
		"tick a row's box when all its segments are written. Each line within a row is one set of tip conditions and the strokes "+
		"written with it; P is the least probability, over the row's segments, that every stroke of a segment stays within its "+
		"tolerance; duration runs from the start of the row's first segment to the end of its last.",
		thousands(n), k), fontBody)
	// Actions of each segment, found in one pass.
	bounds := segmentActionBounds(p)
	f := font{size: 7.5}
	for _, g := range segmentTables(p) {
		if g.title != "" {
			d.heading(g.title, 30)
		}
		t := newTable(d, f,
			tableColumn{title: "Done", share: 6},
			tableColumn{title: "Segments", share: 12, right: true},
			tableColumn{title: "Register", share: 13},
			tableColumn{title: "First start x, y (nm); strokes", share: 17},
			tableColumn{title: "Strokes", share: 11},
			tableColumn{title: "Mode", share: 6},
			tableColumn{title: "Bias (V)", share: 7, right: true},
			tableColumn{title: "Setpoint (nA)", share: 8, right: true},
			tableColumn{title: "Speed (nm/s)", share: 8, right: true},
			tableColumn{title: "Duration (h:mm:ss)", share: 10, right: true},
			tableColumn{title: "Ends at (h:mm:ss)", share: 10, right: true},
		)
		t.start()
		last := 0.0
		for from := 0; from < len(g.segs); from += k {
			if err := ctx.Err(); err != nil {
				return err
			}
			rng := g.segs[from:min(from+k, len(g.segs))]
			var groups []condGroup
			var nums []int
			var regs []string
			regCount := map[string]int{}
			pMin := 1.0
			for _, si := range rng {
				s := &p.Segments[si]
				reg := s.Fiducial
				if s.Registration == planner.RegLocal {
					reg = "local"
				}
				if regCount[reg] == 0 {
					regs = append(regs, reg)
				}
				regCount[reg]++
				pMin = min(pMin, s.PInTolerance)
				for _, id := range s.Strokes {
					nums = append(nums, numbers[id])
				}
				groups = mergeGroups(groups, segmentGroups(p, si, min(bounds[si][0], bounds[si][1]), bounds[si][1]))
			}
			var regText []string
			for i, name := range regs {
				if i == 3 {
					regText = append(regText, fmt.Sprintf("and %d more", len(regs)-3))
					break
				}
				regText = append(regText, fmt.Sprintf("%s ×%d", name, regCount[name]))
			}
			regText = append(regText, "P "+probability(pMin))
			var strokes, modes, bias, cur, speed []string
			for _, cg := range groups {
				strokes = append(strokes, cg.kindCounts())
				modes = append(modes, cg.mode.Abbrev())
				bias = append(bias, signedV(cg.bias))
				cur = append(cur, nanoAmps(cg.current))
				if cg.dwell {
					speed = append(speed, sig(cg.time/float64(len(cg.kinds)), 3)+" s/pt")
				} else {
					speed = append(speed, sig(cg.speed, 4))
				}
			}
			first, end := &p.Segments[rng[0]], &p.Segments[rng[len(rng)-1]]
			start := ""
			if len(first.Strokes) > 0 {
				q := p.Strokes[first.Strokes[0]].Path[0]
				start = nm1(q.X) + ", " + nm1(q.Y)
			}
			if len(nums) > 0 {
				start += "\n" + plural("stroke", len(nums)) + " " + numberRanges(nums)
			}
			segs := numberRanges(rangeSegments(rng))
			top, _ := t.row("", segs, strings.Join(regText, "\n"), start, strings.Join(strokes, "\n"), strings.Join(modes, "\n"),
				strings.Join(bias, "\n"), strings.Join(cur, "\n"), strings.Join(speed, "\n"), clock(end.EndS-first.StartS), clock(end.EndS))
			d.tickBox(t.colX(0)+1.6, top+1.2, 3.6)
			last = end.EndS
		}
		t.row("", "", "Step ends", "", "", "", "", "", "", "", clock(last))
		t.end()
	}
	return nil
}

// rangeSegments returns the paper numbers (from 1) of segments segs.
func rangeSegments(segs []int) []int {
	out := make([]int, len(segs))
	for i, s := range segs {
		out[i] = s + 1
	}
	return out
}

// mergeGroups adds the condition groups of add to into, merging those of
// the same conditions.
func mergeGroups(into, add []condGroup) []condGroup {
	for _, g := range add {
		merged := false
		for i := range into {
			h := &into[i]
			if h.mode == g.mode && h.dwell == g.dwell && h.bias == g.bias && h.current == g.current && h.speed == g.speed {
				h.kinds = append(h.kinds, g.kinds...)
				h.time += g.time
				merged = true
				break
			}
		}
		if !merged {
			into = append(into, g)
		}
	}
	return into
}

// localRegistration stands for a local registration among the fiducials
// of pdfActionRanges' rows (no fiducial has an empty name).
const localRegistration = ""

// pdfActionRanges prints the list of every action of a plan with more
// than maxListedStrokes strokes in order, summarised: each action between
// the segments (conditioning, survey, dose, anneal, …) on a row of its
// own with a box to tick, as the full list has it, and the segments'
// actions in ranges of up to segmentBlock consecutive segments of one
// lithography step, the segment table's ranges: what the row's segments
// do (registrations, strokes by their paper numbers, changes of
// conditions, verification images, …) and when. Every action is still in
// the action CSV and the plan JSON. O(actions).
func pdfActionRanges(ctx context.Context, d *pdfDoc, p *planner.Plan, numbers []int) error {
	d.heading("Every action, in order", 20)
	kinds := map[string]int{}
	var order []string
	for i := range p.Strokes {
		s := &p.Strokes[i]
		name := strokeKindName(s.Mode, s.Kind)
		if kinds[name] == 0 {
			order = append(order, name)
		}
		kinds[name]++
	}
	var parts []string
	for _, name := range order {
		parts = append(parts, thousands(kinds[name])+" "+name)
	}
	k := segmentBlock(len(p.Segments))
	d.para(fmt.Sprintf("This plan has %s strokes (%s) and %s actions: a list of every one would run to thousands of pages. Below, "+
		"each action between the segments has a row of its own, and each row of the segments' actions covers up to %d consecutive "+
		"segments, as the segment table does: its registrations, the paper numbers of its strokes, its changes of conditions and "+
		"verification images. The action CSV (dimerpath export DESIGN.json -o PLAN.csv) lists every action in writing order, one a row, "+
		"with each stroke's number on paper (stroke_number), its id, its start and end, its conditions and its whole path; the plan JSON "+
		"holds the same.",
		thousands(len(p.Strokes)), strings.Join(parts, ", "), thousands(len(p.Actions)), k), fontBody)
	t := newTable(d, font{size: 7.5},
		tableColumn{title: "Done", share: 6},
		tableColumn{title: "Segments", share: 12, right: true},
		tableColumn{title: "Actions", share: 58},
		tableColumn{title: "Starts at (h:mm:ss)", share: 12, right: true},
		tableColumn{title: "Duration (h:mm:ss)", share: 12, right: true},
	)
	t.start()
	tick := func(top float64) { d.tickBox(t.colX(0)+1.6, top+1.2, 3.6) }
	// The range being gathered: its segments, its actions by kind (in
	// the order they first come), its strokes' paper numbers, its times.
	var (
		segs       []int
		counts     = map[planner.ActionKind]int{}
		kindOrder  []planner.ActionKind
		fids       = map[string]int{}
		fidOrder   []string
		nums       []int
		from, upto float64
	)
	flush := func() {
		if len(segs) == 0 {
			return
		}
		var what []string
		strokesSaid := false
		for _, kind := range kindOrder {
			n := counts[kind]
			switch kind {
			case planner.ActRegister:
				var on []string
				for _, f := range fidOrder {
					where := "on " + f
					if f == localRegistration {
						where = "locally"
					}
					on = append(on, fmt.Sprintf("%s ×%s", where, thousands(fids[f])))
				}
				what = append(what, "register "+strings.Join(on, ", "))
			case planner.ActWrite, planner.ActDwell:
				if strokesSaid {
					continue // written strokes and dwell points share one list
				}
				strokesSaid = true
				what = append(what, "write "+plural("stroke", len(nums))+" "+numberRanges(nums))
			case planner.ActSwitch:
				what = append(what, thousands(n)+" "+plural("change", n)+" of conditions")
			case planner.ActVerify:
				what = append(what, thousands(n)+" "+plural("verification image", n))
			default:
				what = append(what, fmt.Sprintf("%s ×%s", kind, thousands(n)))
			}
		}
		top, _ := t.row("", numberRanges(rangeSegments(segs)), capitalise(strings.Join(what, "; ")), clock(from), clock(upto-from))
		tick(top)
		segs, nums, kindOrder, fidOrder = segs[:0], nums[:0], kindOrder[:0], fidOrder[:0]
		clear(counts)
		clear(fids)
	}
	for i := range p.Actions {
		if i%2000 == 0 {
			if err := ctx.Err(); err != nil {
				return err
			}
		}
		a := &p.Actions[i]
		if a.Segment < 0 || a.Segment >= len(p.Segments) {
			// Between the segments: a row of its own.
			flush()
			what := a.Note
			if what == "" {
				what = string(a.Kind)
			}
			top, _ := t.row("", "–", capitalise(what), clock(a.StartS), clock(a.DurationS))
			tick(top)
			continue
		}
		if n := len(segs); n == 0 || segs[n-1] != a.Segment {
			if n == k || (n > 0 && p.Segments[segs[0]].Step != p.Segments[a.Segment].Step) {
				flush()
			}
			if len(segs) == 0 {
				from = a.StartS
			}
			segs = append(segs, a.Segment)
		}
		upto = a.StartS + a.DurationS
		if a.Kind == planner.ActMove {
			continue // implied by the next stroke's start, as in the full list
		}
		if counts[a.Kind] == 0 {
			kindOrder = append(kindOrder, a.Kind)
		}
		counts[a.Kind]++
		switch a.Kind {
		case planner.ActRegister:
			s := &p.Segments[a.Segment]
			on := s.Fiducial
			if s.Registration == planner.RegLocal || on == "" {
				on = localRegistration
			}
			if fids[on] == 0 {
				fidOrder = append(fidOrder, on)
			}
			fids[on]++
		case planner.ActWrite, planner.ActDwell:
			if a.Stroke >= 0 && a.Stroke < len(numbers) {
				nums = append(nums, numbers[a.Stroke])
			}
		}
	}
	flush()
	t.end()
	return nil
}

// drawSegmentAreas draws, in place of the strokes and moves of a plan
// too large to draw one by one, the area each segment's strokes cover
// (their bounding box), alternating two greys so that neighbouring
// segments stay apart.
func drawSegmentAreas(c canvas, sc *scene, v view) {
	p := sc.plan
	c.group(tag{id: "segment-areas", class: "segments"}, noPen, noPaint)
	for i := range p.Segments {
		bb := r2.EmptyRect()
		for _, id := range p.Segments[i].Strokes {
			bb = bb.Union(strokeBounds(&p.Strokes[id]))
		}
		if bb.IsEmpty() {
			continue
		}
		b := v.box(bb)
		// At least a hairline, so a segment of one row of windows shows.
		minW := 0.15 * c.mm()
		if b.w < minW {
			b.x, b.w = b.x-(minW-b.w)/2, minW
		}
		if b.h < minW {
			b.y, b.h = b.y-(minW-b.h)/2, minW
		}
		g := grey(0.25)
		if i%2 == 1 {
			g = 0.55
		}
		c.rect(b, noPen, solid(g), tag{id: fmt.Sprintf("segment-area-%d", i+1), class: "segment-area"})
	}
	c.endGroup()
}

// regionBounds returns the bounding box of a region's rectangles.
func regionBounds(r regionShape) r2.Rect {
	bb := r2.EmptyRect()
	for _, q := range r.rects {
		bb = bb.Union(q)
	}
	return bb
}

// summaryNote is the overview caption's sentence for a summarised
// overview.
func summaryNote(sc *scene) string {
	if !sc.summarised() {
		return ""
	}
	s := fmt.Sprintf(" More than %s strokes: each segment is drawn as the area its strokes cover (in alternating greys), and the moves "+
		"are left out (every stroke and move is in the action CSV).", thousands(maxDrawnStrokes))
	for _, r := range sc.regions {
		if len(r.rects) > maxRegionRects {
			s += " Regions of more than " + thousands(maxRegionRects) + " runs of sites are drawn as their bounding box."
			break
		}
	}
	return s
}

// maxSummaryLabels bounds the segment numbers on a summarised overview.
const maxSummaryLabels = 120

// segmentLabelStep returns every how many segments the overview numbers
// one: every segment, or for a summarised plan the first of every range
// of the segment table, or of every few ranges, so that at most about
// maxSummaryLabels are numbered.
func (sc *scene) segmentLabelStep() int {
	if !sc.summarised() {
		return 1
	}
	n := len(sc.plan.Segments)
	block := segmentBlock(n)
	rows := (n + block - 1) / block
	return block * max(1, (rows+maxSummaryLabels-1)/maxSummaryLabels)
}

// ordinal writes n as "16th", "2nd", "first" for 1.
func ordinal(n int) string {
	if n == 1 {
		return "first"
	}
	suffix := "th"
	if n%100 < 11 || n%100 > 13 {
		switch n % 10 {
		case 1:
			suffix = "st"
		case 2:
			suffix = "nd"
		case 3:
			suffix = "rd"
		}
	}
	return strconv.Itoa(n) + suffix
}

// segmentActionBounds returns, per segment, the half-open range of the
// plan's actions that belong to it, found in one pass ([len, 0) for a
// segment without actions).
func segmentActionBounds(p *planner.Plan) [][2]int {
	bounds := make([][2]int, len(p.Segments))
	for i := range bounds {
		bounds[i] = [2]int{len(p.Actions), 0}
	}
	for i, a := range p.Actions {
		if a.Segment >= 0 && a.Segment < len(bounds) {
			b := &bounds[a.Segment]
			b[0], b[1] = min(b[0], i), max(b[1], i+1)
		}
	}
	return bounds
}
