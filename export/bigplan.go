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
	// maxListedStrokes is the most strokes the stroke list prints one a
	// row (about 85 pages); beyond it the list is left to the files.
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
	bounds := make([][2]int, n)
	for i := range bounds {
		bounds[i] = [2]int{len(p.Actions), 0}
	}
	for i, a := range p.Actions {
		if a.Segment >= 0 && a.Segment < n {
			b := &bounds[a.Segment]
			b[0], b[1] = min(b[0], i), max(b[1], i+1)
		}
	}
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

// pdfStrokeListSummary stands for the list of every action of a plan
// with more than maxListedStrokes strokes: what the list would hold, and
// where it is.
func pdfStrokeListSummary(d *pdfDoc, p *planner.Plan) {
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
	d.para(fmt.Sprintf("This plan has %s strokes (%s) and %s actions: a list of every one would run to thousands of pages, so it is "+
		"not printed. The action CSV (dimerpath export DESIGN.json -o PLAN.csv) lists every action in writing order, one a row, with "+
		"each stroke's number on paper (stroke_number), its id, its start and end, its conditions and its whole path; the plan JSON "+
		"holds the same. The segment table above gives each range of segments its stroke numbers, and the figures below number the "+
		"strokes of each atomic-precision area shown.",
		thousands(len(p.Strokes)), strings.Join(parts, ", "), thousands(len(p.Actions))), fontBody)
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
