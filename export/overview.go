package export

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/golang/geo/r2"

	"dimerpath/lattice"
	"dimerpath/lattice/design"
	"dimerpath/planner"
)

// maxSegmentLabels bounds the numbered segment markers on the overview;
// beyond it the figure says how many it left out (the table has them all).
const maxSegmentLabels = 600

// overviewResult says what the overview could not show.
type overviewResult struct {
	unlabelled int // segments whose number found no free place
}

// drawOverview draws the whole field through v: terraces, regions,
// strokes, moves, fiducials and numbered segment starts, then the axes.
// Groups carry SVG ids: terraces, regions, strokes (strokes-fe,
// strokes-ap), moves, fiducials, segment-labels.
//
// v may show only part of the field (the device-area figure): drawing is
// clipped to the frame and strokes outside it are skipped.
func drawOverview(c canvas, sc *scene, v view) overviewResult {
	p := sc.plan
	frame := v.frame()
	c.group(tag{id: "field", class: "field"}, noPen, solid(1))
	c.rect(frame, noPen, solid(1), tag{})
	c.endGroup()
	whole := v.win.Contains(sc.field())
	if !whole {
		c.clip(frame)
	}
	margin := math.Max(sc.feWidth, sc.apWidth)
	shown := func(s *planner.Stroke) bool {
		return whole || strokeBounds(s).ExpandedByMargin(margin).Intersects(v.win)
	}

	drawRegions(c, sc, v, frame)
	drawTerraceEdges(c, sc, v)
	drawReferences(c, sc, v)

	if sc.summarised() {
		drawSegmentAreas(c, sc, v)
	} else {
		drawStrokesAndMoves(c, sc, v, shown)
	}

	// Labels go on top of the strokes, so nothing covers them.
	lab := &labeler{bounds: frame}
	drawTerraceLabels(c, sc, v, lab)
	drawFiducials(c, p.Fiducials, v, lab)
	res := overviewResult{}
	c.group(tag{id: "segment-labels", class: "labels"}, penLabel, fillLabel)
	step, tried := sc.segmentLabelStep(), 0
	for i := range p.Segments {
		if i%step != 0 || !sc.hasWrite[i] || !frame.containsPt(v.pt(sc.writeFrom[i])) {
			continue
		}
		if tried++; tried > maxSegmentLabels {
			res.unlabelled++
			continue
		}
		if !segmentMarker(c, lab, v.pt(sc.writeFrom[i]), strconv.Itoa(i+1), tag{id: fmt.Sprintf("segment-label-%d", i+1)}) {
			res.unlabelled++
		}
	}
	c.endGroup()
	if !whole {
		c.endClip()
	}
	c.rect(frame, penField, noPaint, tag{id: "field-edge"})
	drawAxes(c, v)
	return res
}

// drawStrokesAndMoves draws every stroke shown and every move: FE
// strokes, then the moves, then AP strokes and dwells on top.
func drawStrokesAndMoves(c canvas, sc *scene, v view, shown func(*planner.Stroke) bool) {
	p := sc.plan
	pts := make([]vec, 0, 16)
	path := func(s *planner.Stroke) []vec {
		pts = pts[:0]
		for _, q := range s.Path {
			pts = append(pts, v.pt(q))
		}
		return pts
	}
	c.group(tag{id: "strokes", class: "strokes"}, noPen, noPaint)
	fe, ol, ap := fePen(c, sc, v.s), outlinePen(c, sc, v.s), apPen(c, sc, v.s)
	c.group(tag{id: "strokes-fe", class: "fe"}, fe, noPaint)
	for i := range p.Strokes {
		s := &p.Strokes[i]
		if s.Mode != design.ModeFE || !shown(s) {
			continue
		}
		pn := fe
		if s.Kind == planner.StrokeOutline {
			pn = ol
		}
		c.polyline(path(s), false, pn, noPaint, sc.strokeTag(s))
	}
	c.endGroup()
	c.endGroup()

	c.group(tag{id: "moves", class: "moves"}, penMove, noPaint)
	for i, a := range p.Actions {
		if a.Kind != planner.ActMove {
			continue
		}
		pn, cls := penMove, "move"
		if sc.toFiducial[i] {
			pn, cls = penToFid, "move to-fiducial"
		}
		c.polyline([]vec{v.pt(a.From), v.pt(a.To)}, false, pn, noPaint, tag{class: cls})
	}
	c.endGroup()

	c.group(tag{id: "strokes-ap", class: "strokes ap"}, ap, noPaint)
	dot := math.Max(0.55*c.mm(), sc.apWidth*v.s/2)
	for i := range p.Strokes {
		s := &p.Strokes[i]
		if s.Mode == design.ModeFE || !shown(s) {
			continue
		}
		switch s.Kind {
		case planner.StrokeDwell:
			c.circle(v.pt(s.Path[0]), dot, noPen, solid(0), sc.strokeTag(s))
		case planner.StrokeOutline:
			c.polyline(path(s), false, ol, noPaint, sc.strokeTag(s))
		default:
			c.polyline(path(s), false, ap, noPaint, sc.strokeTag(s))
		}
	}
	c.endGroup()
}

// strokeTag names a stroke's element by its number on paper
// ("stroke-12") and classes it by mode, kind, segment on paper and id in
// the plan file ("stroke ap line seg-2 id-141").
func (sc *scene) strokeTag(s *planner.Stroke) tag {
	return tag{id: "stroke-" + strconv.Itoa(sc.number[s.ID]), class: fmt.Sprintf("stroke %s %s seg-%d id-%d", s.Mode, s.Kind, s.Segment+1, s.ID)}
}

// drawRegions fills each region's site rectangles, clipped to clip.
func drawRegions(c canvas, sc *scene, v view, clip box) {
	if len(sc.regions) == 0 {
		return
	}
	c.group(tag{id: "regions", class: "regions"}, noPen, noPaint)
	for _, r := range sc.regions {
		f := regionPaint(r.mode)
		c.group(tag{id: "region-" + xmlID(r.name), class: "region " + r.mode.String()}, noPen, f)
		if sc.summarised() && len(r.rects) > maxRegionRects {
			if b := v.box(regionBounds(r)); b.overlaps(clip) {
				c.rect(clipBox(b, clip), noPen, f, tag{})
			}
			c.endGroup()
			continue
		}
		for _, q := range r.rects {
			b := v.box(q)
			if !b.overlaps(clip) {
				continue
			}
			c.rect(clipBox(b, clip), noPen, f, tag{})
		}
		c.endGroup()
	}
	c.endGroup()
}

// clipBox returns the part of b inside clip.
func clipBox(b, clip box) box {
	x0, y0 := math.Max(b.x, clip.x), math.Max(b.y, clip.y)
	x1, y1 := math.Min(b.right(), clip.right()), math.Min(b.bottom(), clip.bottom())
	return box{x0, y0, math.Max(0, x1-x0), math.Max(0, y1-y0)}
}

// xmlID turns a name into a string safe as an XML id.
func xmlID(s string) string {
	b := make([]byte, 0, len(s))
	for i := 0; i < len(s); i++ {
		ch := s[i]
		if ch >= 'a' && ch <= 'z' || ch >= 'A' && ch <= 'Z' || ch >= '0' && ch <= '9' || ch == '-' || ch == '_' || ch == '.' {
			b = append(b, ch)
		} else {
			b = append(b, '_')
		}
	}
	return string(b)
}

// drawTerraceEdges outlines the bounded terraces: the step edges.
func drawTerraceEdges(c canvas, sc *scene, v view) {
	if sc.surf == nil {
		return
	}
	c.group(tag{id: "terraces", class: "terraces"}, penTerrace, noPaint)
	for _, t := range sc.surf.Terraces {
		if len(t.Boundary) < 3 {
			continue
		}
		pts := make([]vec, 0, len(t.Boundary)+1)
		for _, q := range t.Boundary {
			pts = append(pts, v.pt(q))
		}
		c.polyline(pts, true, penTerrace, noPaint, tag{class: "terrace"})
	}
	c.endGroup()
}

// drawReferences draws the reference overlays' polygons as dash-dot
// outlines: layout geometry for orientation, not written.
func drawReferences(c canvas, sc *scene, v view) {
	if len(sc.refs) == 0 {
		return
	}
	c.group(tag{id: "references", class: "references"}, penReference, noPaint)
	for _, r := range sc.refs {
		c.group(tag{id: "reference-" + xmlID(r.Name), class: "reference"}, penReference, noPaint)
		for _, poly := range r.Polygons {
			if len(poly) < 2 {
				continue
			}
			pts := make([]vec, len(poly))
			for i, q := range poly {
				pts[i] = v.pt(q)
			}
			c.polyline(pts, true, penReference, noPaint, tag{})
		}
		c.endGroup()
	}
	c.endGroup()
}

// drawTerraceLabels names each terrace and its row direction, in a free
// place of lab.
func drawTerraceLabels(c canvas, sc *scene, v view, lab *labeler) {
	if sc.surf == nil {
		return
	}
	frame := v.frame()
	c.group(tag{id: "terrace-labels", class: "terraces"}, noPen, noPaint)
	for i, t := range sc.surf.Terraces {
		at, ok := terraceLabelPoint(sc.surf, i, v.win)
		if !ok {
			continue
		}
		s := t.Name + "  rows " + map[lattice.RowDirection]string{lattice.RowsAlongX: "↔", lattice.RowsAlongY: "↕"}[t.Rows]
		f := font{size: 6.5, grey: 0.25}
		w := c.textWidth(s, f)
		p := v.pt(at)
		b := box{p.x - w/2 - 0.8*c.mm(), p.y - textHeight(c, f)/2 - 0.8*c.mm(), w + 1.6*c.mm(), textHeight(c, f) + 1.6*c.mm()}
		if !frame.contains(b) || !lab.free(b) {
			continue
		}
		lab.block(b)
		c.rect(b, noPen, solid(1), tag{class: "terrace-label"})
		c.text(vec{p.x, b.bottom() - 0.8*c.mm()}, s, f, anchorMiddle, tag{class: "terrace-label"})
	}
	c.endGroup()
}

// terraceLabelPoint returns a point of win on terrace i, towards its top
// left, for the terrace's label; ok is false if none of a 12 x 12 sample
// grid lies on it.
func terraceLabelPoint(surf *lattice.Surface, i int, win r2.Rect) (r2.Point, bool) {
	sz := win.Size()
	var best r2.Point
	found := false
	const n = 12
	for gy := n - 1; gy >= 1; gy-- {
		for gx := 1; gx < n; gx++ {
			q := r2.Point{X: win.X.Lo + sz.X*float64(gx)/n, Y: win.Y.Lo + sz.Y*float64(gy)/n}
			if surf.TerraceAt(q) != i {
				continue
			}
			// The point must be well inside: its neighbours on the grid
			// are on the terrace too.
			dx, dy := sz.X/n, sz.Y/n
			if surf.TerraceAt(q.Add(r2.Point{X: dx})) != i || surf.TerraceAt(q.Sub(r2.Point{X: dx})) != i ||
				surf.TerraceAt(q.Add(r2.Point{Y: dy})) != i {
				continue
			}
			return q, true
		}
	}
	return best, found
}

// drawFiducials draws each fiducial as a circled cross with its name.
func drawFiducials(c canvas, fids []planner.Fiducial, v view, lab *labeler) {
	c.group(tag{id: "fiducials", class: "fiducials"}, penFiducial, noPaint)
	r := 1.8 * c.mm()
	for _, f := range fids {
		p := v.pt(f.At)
		c.group(tag{id: "fiducial-" + xmlID(f.Name), class: "fiducial"}, penFiducial, noPaint)
		c.circle(p, r, penFiducial, solid(1), tag{})
		c.polyline([]vec{{p.x - r*1.5, p.y}, {p.x + r*1.5, p.y}}, false, penFiducial, noPaint, tag{})
		c.polyline([]vec{{p.x, p.y - r*1.5}, {p.x, p.y + r*1.5}}, false, penFiducial, noPaint, tag{})
		lab.block(box{p.x - r*1.5, p.y - r*1.5, 3 * r, 3 * r})
		w := c.textWidth(f.Name, fontLabel)
		h := textHeight(c, fontLabel)
		if b, ok := lab.place(p, w+1.2*c.mm(), h+1.2*c.mm(), r*1.6); ok {
			c.rect(b, noPen, solid(1), tag{})
			c.text(vec{b.x + 0.6*c.mm(), b.bottom() - 0.6*c.mm()}, f.Name, fontLabel, anchorStart, tag{class: "fiducial-name"})
		}
		c.endGroup()
	}
	c.endGroup()
}

// segmentMarker draws a boxed segment number near anchor, with a leader
// line when it had to move away; it reports whether it found room.
func segmentMarker(c canvas, lab *labeler, anchor vec, s string, tg tag) bool {
	f := fontLabel
	w := c.textWidth(s, f) + 1.6*c.mm()
	h := textHeight(c, f) + 1.4*c.mm()
	b, ok := lab.place(anchor, w, h, 1.2*c.mm())
	if !ok {
		return false
	}
	c.group(tg, penLabel, fillLabel)
	if d := b.centre().sub(anchor); d.norm() > 2.5*c.mm() {
		c.polyline([]vec{anchor, nearestOnBox(b, anchor)}, false, penLeader, noPaint, tag{})
	}
	c.circle(anchor, 0.5*c.mm(), noPen, solid(0), tag{})
	c.rect(b, penLabel, fillLabel, tag{})
	c.text(vec{b.x + b.w/2, b.bottom() - 0.7*c.mm()}, s, f, anchorMiddle, tag{})
	c.endGroup()
	return true
}

func nearestOnBox(b box, p vec) vec {
	return vec{math.Max(b.x, math.Min(p.x, b.right())), math.Max(b.y, math.Min(p.y, b.bottom()))}
}

// drawAxes draws nm ticks and labels below and left of the view's frame.
func drawAxes(c canvas, v view) {
	frame := v.frame()
	u := c.mm()
	c.group(tag{id: "axes", class: "axes"}, penField, noPaint)
	sz := v.win.Size()
	tickPen := pen{width: 0.2, grey: 0}
	for _, ax := range []struct {
		lo, hi float64
		n      int
		horiz  bool
	}{{v.win.X.Lo, v.win.X.Hi, int(frame.w / (22 * u)), true}, {v.win.Y.Lo, v.win.Y.Hi, int(frame.h / (14 * u)), false}} {
		span := sz.X
		if !ax.horiz {
			span = sz.Y
		}
		step := niceStep(span, max(2, ax.n))
		for _, t := range ticks(ax.lo, ax.hi, step) {
			lbl := sig(t, 6)
			if ax.horiz {
				x := v.pt(r2.Point{X: t, Y: v.win.Y.Lo}).x
				c.polyline([]vec{{x, frame.bottom()}, {x, frame.bottom() + 1.2*u}}, false, tickPen, noPaint, tag{})
				c.text(vec{x, frame.bottom() + 1.2*u + textHeight(c, fontTick) + 0.6*u}, lbl, fontTick, anchorMiddle, tag{})
			} else {
				y := v.pt(r2.Point{X: v.win.X.Lo, Y: t}).y
				c.polyline([]vec{{frame.x - 1.2*u, y}, {frame.x, y}}, false, tickPen, noPaint, tag{})
				c.text(vec{frame.x - 1.8*u, y + textHeight(c, fontTick)/2}, lbl, fontTick, anchorEnd, tag{})
			}
		}
	}
	c.text(vec{frame.right(), frame.bottom() + 2*textHeight(c, fontTick) + 3*u}, "x (nm)", fontTick, anchorEnd, tag{})
	c.text(vec{frame.x, frame.y - 1.5*u}, "y (nm)", fontTick, anchorStart, tag{})
	c.endGroup()
}

// drawScaleBar draws a bar of a round length no longer than maxLen
// device units at (x, y) (its left end, top), and returns its height.
func drawScaleBar(c canvas, v view, at vec, maxLen float64) float64 {
	u := c.mm()
	l := niceBelow(maxLen / v.s)
	w := l * v.s
	h := 1.2 * u
	c.group(tag{id: "scale-bar", class: "scale-bar"}, noPen, solid(0))
	c.rect(box{at.x, at.y, w / 2, h}, pen{width: 0.2}, solid(0), tag{})
	c.rect(box{at.x + w/2, at.y, w / 2, h}, pen{width: 0.2}, solid(1), tag{})
	c.text(vec{at.x + w + 1.5*u, at.y + h/2 + textHeight(c, fontSmall)/2}, lengthLabel(l), fontSmall, anchorStart, tag{})
	c.endGroup()
	return h
}

// labeler places labels where they overlap no earlier label or blocked
// area, trying positions around the anchor at growing distances.
type labeler struct {
	bounds box
	placed []box
}

func (l *labeler) block(b box) { l.placed = append(l.placed, b) }

func (l *labeler) free(b box) bool {
	if !l.bounds.contains(b) {
		return false
	}
	for _, o := range l.placed {
		if b.overlaps(o) {
			return false
		}
	}
	return true
}

// place returns a free box w x h near anchor and blocks it; ok is false
// when none of the candidates is free.
func (l *labeler) place(anchor vec, w, h, gap float64) (box, bool) {
	dirs := [8]vec{{1, -1}, {1, 1}, {-1, -1}, {-1, 1}, {1, 0}, {-1, 0}, {0, -1}, {0, 1}}
	for _, dist := range []float64{1, 2.5, 4.5, 7} {
		for _, d := range dirs {
			// The box's near corner or edge sits dist·gap from anchor.
			cx := anchor.x + d.x*(dist*gap+w/2)
			cy := anchor.y + d.y*(dist*gap+h/2)
			b := box{cx - w/2, cy - h/2, w, h}
			if l.free(b) {
				l.block(b)
				return b, true
			}
		}
	}
	return box{}, false
}

// placeBehind returns a free box w x h centred on the line through
// anchor along dir, behind anchor (against dir), its near edge gap from
// anchor and then further back, and blocks it; ok is false when none of
// those places is free.
func (l *labeler) placeBehind(anchor, dir vec, w, h, gap float64) (box, bool) {
	half := math.Abs(dir.x)*w/2 + math.Abs(dir.y)*h/2 // the box's reach along dir
	for _, dist := range []float64{1, 2.5, 4.5} {
		c := anchor.sub(dir.scale(dist*gap + half))
		b := box{c.x - w/2, c.y - h/2, w, h}
		if l.free(b) {
			l.block(b)
			return b, true
		}
	}
	return box{}, false
}

// legendEntry is one symbol and its meaning.
type legendEntry struct {
	label string
	draw  func(c canvas, b box)
}

// overviewLegend returns the legend entries for what the plan holds.
func overviewLegend(c canvas, sc *scene, s float64) []legendEntry {
	p := sc.plan
	var has struct{ apLine, dwell, raster, outline, move, toFid bool }
	for i := range p.Strokes {
		switch st := &p.Strokes[i]; {
		case st.Kind == planner.StrokeDwell:
			has.dwell = true
		case st.Kind == planner.StrokeOutline:
			has.outline = true
		case st.Mode == design.ModeFE:
			has.raster = true
		default:
			has.apLine = true
		}
	}
	for i, a := range p.Actions {
		if a.Kind == planner.ActMove {
			if sc.toFiducial[i] {
				has.toFid = true
			} else {
				has.move = true
			}
		}
	}
	line := func(pn pen) func(c canvas, b box) {
		return func(c canvas, b box) {
			y := b.y + b.h/2
			c.polyline([]vec{{b.x + 0.5*c.mm(), y}, {b.right() - 0.5*c.mm(), y}}, false, pn, noPaint, tag{})
		}
	}
	swatch := func(f paint) func(c canvas, b box) {
		return func(c canvas, b box) { c.rect(b.inset(0.3*c.mm()), pen{width: 0.15, grey: 0.4}, f, tag{}) }
	}
	var out []legendEntry
	modes := map[design.Mode]bool{}
	for _, r := range sc.regions {
		modes[r.mode] = true
	}
	ap, fe := design.ModeAP.Abbrev(), design.ModeFE.Abbrev()
	if modes[design.ModeAP] || modes[""] {
		out = append(out, legendEntry{ap + " region (sites to clear)", swatch(fillAPRegion)})
	}
	if modes[design.ModeFE] {
		out = append(out, legendEntry{fe + " region", swatch(fillFERegion)})
	}
	if modes[design.ModeHybrid] {
		out = append(out, legendEntry{design.ModeHybrid.Abbrev() + " region", swatch(fillHybrid)})
	}
	if sc.summarised() {
		// Segment areas stand for the strokes and moves (bigplan.go).
		has = struct{ apLine, dwell, raster, outline, move, toFid bool }{}
		out = append(out, legendEntry{"area of one segment's strokes (alternately dark and light)", func(c canvas, b box) {
			h := b.inset(0.3 * c.mm())
			c.rect(box{h.x, h.y, h.w / 2, h.h}, noPen, solid(0.25), tag{})
			c.rect(box{h.x + h.w/2, h.y, h.w / 2, h.h}, noPen, solid(0.55), tag{})
		}})
	}
	if has.apLine {
		out = append(out, legendEntry{ap + " stroke (along a dimer row)", line(pen{width: 0.6, round: true})})
	}
	if has.dwell {
		out = append(out, legendEntry{ap + " dwell point (dopant window)", func(c canvas, b box) {
			c.circle(b.centre(), 0.6*c.mm(), noPen, solid(0), tag{})
		}})
	}
	if has.raster {
		out = append(out, legendEntry{fe + " raster fill", line(pen{width: 1.2, grey: 0.55, round: true})})
	}
	if has.outline {
		out = append(out, legendEntry{"outline pass", line(outlinePen(c, sc, s))})
	}
	if has.move {
		out = append(out, legendEntry{"tip move, not writing", line(penMove)})
	}
	if has.toFid {
		out = append(out, legendEntry{"move to a fiducial", line(penToFid)})
	}
	if len(p.Fiducials) > 0 {
		out = append(out, legendEntry{"fiducial (register here)", func(c canvas, b box) {
			q, r := b.centre(), 1.3*c.mm()
			c.circle(q, r, penFiducial, solid(1), tag{})
			c.polyline([]vec{{q.x - r*1.4, q.y}, {q.x + r*1.4, q.y}}, false, penFiducial, noPaint, tag{})
			c.polyline([]vec{{q.x, q.y - r*1.4}, {q.x, q.y + r*1.4}}, false, penFiducial, noPaint, tag{})
		}})
	}
	if len(p.Segments) > 0 {
		out = append(out, legendEntry{"segment start, numbered", func(c canvas, b box) {
			bb := box{b.x + b.w/2 - 1.8*c.mm(), b.y + 0.3*c.mm(), 3.6 * c.mm(), b.h - 0.6*c.mm()}
			c.rect(bb, penLabel, fillLabel, tag{})
			c.text(vec{bb.x + bb.w/2, bb.bottom() - 0.7*c.mm()}, "3", fontLabel, anchorMiddle, tag{})
		}})
	}
	if sc.surf != nil {
		for _, t := range sc.surf.Terraces {
			if len(t.Boundary) >= 3 {
				out = append(out, legendEntry{"terrace edge (step)", line(penTerrace)})
				break
			}
		}
	}
	if len(sc.refs) > 0 {
		names := make([]string, len(sc.refs))
		for i, r := range sc.refs {
			names[i] = r.Name
		}
		out = append(out, legendEntry{"reference layout, not written: " + strings.Join(names, ", "), line(penReference)})
	}
	return out
}

// drawLegend lays entries out in rows within width, from top-left at,
// and returns the height used.
func drawLegend(c canvas, entries []legendEntry, at vec, width float64) float64 {
	u := c.mm()
	symW, rowH := 9*u, 4.6*u
	x, y := at.x, at.y
	c.group(tag{id: "legend", class: "legend"}, noPen, noPaint)
	for _, e := range entries {
		w := symW + 1.5*u + c.textWidth(e.label, fontSmall) + 5*u
		if x > at.x && x+w > at.x+width {
			x, y = at.x, y+rowH
		}
		e.draw(c, box{x, y, symW, 3.2 * u})
		c.text(vec{x + symW + 1.5*u, y + 1.6*u + textHeight(c, fontSmall)/2}, e.label, fontSmall, anchorStart, tag{})
		x += w
	}
	c.endGroup()
	if len(entries) == 0 {
		return 0
	}
	return y - at.y + rowH
}

// deviceArea returns the field window around the atomic-precision
// strokes, when they sit in a small part of the field (their extent,
// with a margin, under 40 % of the field's shorter side), so that a
// second overview can show them and the moves between them.
func deviceArea(sc *scene) (r2.Rect, bool) {
	bb := r2.EmptyRect()
	for i := range sc.plan.Strokes {
		if s := &sc.plan.Strokes[i]; s.Mode == design.ModeAP {
			bb = bb.Union(strokeBounds(s))
		}
	}
	if bb.IsEmpty() {
		return bb, false
	}
	sz := bb.Size()
	bb = bb.ExpandedByMargin(math.Max(10, 0.15*math.Max(sz.X, sz.Y)))
	f := sc.field().Size()
	if math.Max(bb.Size().X, bb.Size().Y) > 0.4*math.Min(f.X, f.Y) {
		return bb, false
	}
	return bb, true
}
