package export

import (
	"math"
	"strconv"
	"strings"
	"testing"

	"dimerpath/lattice"
	"dimerpath/planner"
)

// recordCanvas measures like measureCanvas and keeps the stroke numbers
// and arrowheads a figure draws.
type recordCanvas struct {
	measureCanvas
	numbers []drawnText
	arrows  [][]vec
}

type drawnText struct {
	at vec
	s  string
}

func (r *recordCanvas) text(at vec, s string, f font, a anchor, tg tag) {
	if tg.class == "stroke-number" {
		r.numbers = append(r.numbers, drawnText{at, s})
	}
}

func (r *recordCanvas) polyline(pts []vec, closed bool, p pen, f paint, tg tag) {
	if tg.class == "arrow" {
		r.arrows = append(r.arrows, pts)
	}
}

// Issue 13: in the zoomed atomic-precision figures of the demo plan every
// stroke's number on paper stands at its start, on its own dimer row (not
// between two rows), and covers no arrowhead, also of the strokes written
// leftwards on the neighbouring rows.
func TestZoomNumbersStandOnTheirRow(t *testing.T) {
	plans, err := demoPlans()
	if err != nil {
		t.Fatal(err)
	}
	lay, err := demoLayout()
	if err != nil {
		t.Fatal(err)
	}
	p := plans[lay.Variant.Name]
	sc := newScene(p, PatternOf(lay))
	areas, _ := apAreas(p, sc.number)
	if len(areas) == 0 {
		t.Fatal("the demo has no atomic-precision areas")
	}
	f := font{size: 6}
	labelled := 0
	for i, a := range areas {
		rc := &recordCanvas{measureCanvas: measureCanvas{unit: 1, metrics: sansMetrics()}}
		dev := box{0, 0, 180, 110} // an A4 figure, mm
		drawZoom(rc, sc, a, dev, i)
		v := fitView(withAspect(a.win, dev), dev)
		rowBand := lattice.RowSpacing * v.s // one dimer row, mm
		byNumber := map[int]int{}
		for _, id := range a.strokes {
			byNumber[sc.number[id]] = id
		}
		for _, n := range rc.numbers {
			num, err := strconv.Atoi(n.s)
			id, ok := byNumber[num]
			if err != nil || !ok {
				t.Errorf("area %d: number %q is no stroke of the area", i+1, n.s)
				continue
			}
			labelled++
			s := &p.Strokes[id]
			w, h := rc.textWidth(n.s, f)+0.8, textHeight(rc, f)+0.8
			lb := box{n.at.x - 0.4, n.at.y + 0.4 - h, w, h}
			start := v.pt(s.Path[0])
			// On its own row: the label's centre is within half a row of
			// the stroke's line (rows along x in the demo: the same y).
			if d := math.Abs(lb.centre().y - start.y); d > rowBand/2 {
				t.Errorf("area %d: number %d stands %.2f mm off its stroke's row (a row is %.2f mm): between rows", i+1, num, d, rowBand)
			}
			if d := math.Abs(lb.centre().x - start.x); d > w/2+3 {
				t.Errorf("area %d: number %d stands %.2f mm from its stroke's start", i+1, num, d)
			}
			for _, tri := range rc.arrows {
				for _, q := range tri {
					if q.x > lb.x && q.x < lb.right() && q.y > lb.y && q.y < lb.bottom() {
						t.Errorf("area %d: number %d covers an arrowhead at (%.1f, %.1f) mm", i+1, num, q.x, q.y)
					}
				}
			}
		}
	}
	// Every stroke whose start is drawn is numbered (the demo's areas are
	// all small enough to number).
	want := 0
	for _, a := range areas {
		dev := box{0, 0, 180, 110}
		v := fitView(withAspect(a.win, dev), dev)
		for _, id := range a.strokes {
			if v.frame().containsPt(v.pt(p.Strokes[id].Path[0])) {
				want++
			}
		}
	}
	if labelled != want {
		t.Errorf("%d strokes numbered in the figures, want %d (every stroke whose start is drawn)", labelled, want)
	}
}

// The demo's stroke numbers follow the writing order of the action list,
// 1, 2, 3 …, while the ids (the planner's order) do not: segment 1 was
// "strokes 142–179" on paper, written 155, 156 … 141.
func TestStrokeNumbersFollowTheActions(t *testing.T) {
	plans, err := demoPlans()
	if err != nil {
		t.Fatal(err)
	}
	for name, p := range plans {
		num := StrokeNumbers(p)
		next, outOfOrder := 1, false
		for _, a := range p.Actions {
			if a.Kind != planner.ActWrite && a.Kind != planner.ActDwell {
				continue
			}
			if num[a.Stroke] != next {
				t.Fatalf("%s: stroke %d written %d-th is number %d", name, a.Stroke, next, num[a.Stroke])
			}
			if a.Stroke != next-1 {
				outOfOrder = true
			}
			next++
		}
		if next != len(p.Strokes)+1 {
			t.Errorf("%s: %d strokes written, %d in the plan", name, next-1, len(p.Strokes))
		}
		if !outOfOrder {
			t.Errorf("%s: ids already follow the writing order; the test shows nothing", name)
		}
		if got := strings.Join(strings.Fields(numberRanges([]int{9, 3, 4, 5, 12, 1, 2, 13})), " "); got != "1–5, 9, 12–13" {
			t.Errorf("numberRanges = %q", got)
		}
	}
}
