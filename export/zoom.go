package export

import (
	"cmp"
	"fmt"
	"math"
	"slices"
	"strconv"
	"strings"

	"github.com/golang/geo/r2"

	"dimerpath/internal/unionfind"
	"dimerpath/lattice"
	"dimerpath/lattice/design"
	"dimerpath/planner"
)

// Atomic-precision areas: AP strokes closer than apClusterGapNM are
// drawn in one zoomed figure; a cluster wider than apZoomMaxNM is cut
// into tiles so the dimer rows stay visible. The thresholds are our own
// choice for an A4 figure 180 mm wide (45 nm gives 4 mm per nm, a dimer
// every 1.5 mm).
const (
	apClusterGapNM = 6
	apZoomMaxNM    = 45
	apZoomPadNM    = 1.5
	apZoomMinNM    = 8
	// maxZoomAreas bounds the zoomed figures in one report; the rest are
	// counted on the last zoom page.
	maxZoomAreas = 48
)

// apArea is one zoomed figure: a field window and the AP strokes in it.
type apArea struct {
	win     r2.Rect
	strokes []int // stroke IDs, in writing order
}

func strokeBounds(s *planner.Stroke) r2.Rect {
	r := r2.EmptyRect()
	for _, q := range s.Path {
		r = r.AddPoint(q)
	}
	return r
}

// apAreas clusters the plan's AP strokes by single linkage on a grid of
// apClusterGapNM cells (strokes whose bounding boxes, grown by half the
// gap, share a cell are joined), tiles large clusters, and returns the
// areas in writing order (by their first stroke, number[id] giving each
// stroke's place, as StrokeNumbers does) with the number left out beyond
// maxZoomAreas. O(strokes · cells per stroke).
func apAreas(p *planner.Plan, number []int) (areas []apArea, omitted int) {
	var ids []int
	var bounds []r2.Rect
	for _, i := range writingOrder(number) {
		if p.Strokes[i].Mode == design.ModeAP {
			ids = append(ids, i)
			bounds = append(bounds, strokeBounds(&p.Strokes[i]))
		}
	}
	byNumber := func(a, b int) int { return cmp.Compare(number[a], number[b]) }
	if len(ids) == 0 {
		return nil, 0
	}
	sets := unionfind.New(len(ids))
	type cell struct{ x, y int }
	owner := map[cell]int{}
	const g = apClusterGapNM
	join := func(i int, q r2.Point) {
		// The cells of a g/2 box around q: strokes closer than about g
		// share one.
		for cx := int(math.Floor((q.X - g/2) / g)); cx <= int(math.Floor((q.X+g/2)/g)); cx++ {
			for cy := int(math.Floor((q.Y - g/2) / g)); cy <= int(math.Floor((q.Y+g/2)/g)); cy++ {
				k := cell{cx, cy}
				if o, ok := owner[k]; ok {
					sets.Union(o, i)
				} else {
					owner[k] = i
				}
			}
		}
	}
	for i, id := range ids {
		// Sample each path every g/2, so the work follows the path's
		// length (checkPlan keeps positions within a bounded field).
		path := p.Strokes[id].Path
		join(i, path[0])
		for k := 1; k < len(path); k++ {
			a, b := path[k-1], path[k]
			n := int(math.Ceil(b.Sub(a).Norm() / (g / 2)))
			for j := 1; j <= n; j++ {
				join(i, a.Add(b.Sub(a).Mul(float64(j)/float64(n))))
			}
		}
	}
	clusters := map[int][]int{}
	var roots []int
	for i := range ids {
		r := sets.Find(i)
		if _, ok := clusters[r]; !ok {
			roots = append(roots, r)
		}
		clusters[r] = append(clusters[r], i)
	}
	slices.Sort(roots) // the root is the cluster's first stroke written
	pk := newPacker()
	for _, r := range roots {
		members := clusters[r]
		bb := r2.EmptyRect()
		for _, m := range members {
			bb = bb.Union(bounds[m])
		}
		sz := bb.Size()
		if sz.X <= apZoomMaxNM && sz.Y <= apZoomMaxNM {
			st := make([]int, len(members))
			for i, m := range members {
				st[i] = ids[m]
			}
			pk.add(bb, st)
			continue
		}
		nx := max(1, int(math.Ceil(sz.X/apZoomMaxNM)))
		ny := max(1, int(math.Ceil(sz.Y/apZoomMaxNM)))
		tw, th := sz.X/float64(nx), sz.Y/float64(ny)
		tiles := make([][]int, nx*ny)
		for _, m := range members {
			b := bounds[m]
			x0, x1 := tileIndex(b.X.Lo, bb.X.Lo, tw, nx), tileIndex(b.X.Hi, bb.X.Lo, tw, nx)
			y0, y1 := tileIndex(b.Y.Lo, bb.Y.Lo, th, ny), tileIndex(b.Y.Hi, bb.Y.Lo, th, ny)
			for tx := x0; tx <= x1; tx++ {
				for ty := y0; ty <= y1; ty++ {
					tiles[ty*nx+tx] = append(tiles[ty*nx+tx], ids[m])
				}
			}
		}
		// Tiles in reading order: top row first, left to right.
		for ty := ny - 1; ty >= 0; ty-- {
			for tx := range nx {
				st := tiles[ty*nx+tx]
				if len(st) == 0 {
					continue
				}
				win := r2.RectFromPoints(
					r2.Point{X: bb.X.Lo + float64(tx)*tw, Y: bb.Y.Lo + float64(ty)*th},
					r2.Point{X: bb.X.Lo + float64(tx+1)*tw, Y: bb.Y.Lo + float64(ty+1)*th})
				// Tiles overlap by the padding, so a stroke cut at a tile
				// edge shows on both.
				win = atLeast(win.ExpandedByMargin(apZoomPadNM), apZoomMinNM)
				slices.SortFunc(st, byNumber)
				areas = append(areas, apArea{win: win, strokes: st})
			}
		}
	}
	for _, g := range pk.groups {
		slices.SortFunc(g.strokes, byNumber)
		areas = append(areas, apArea{win: atLeast(g.bb.ExpandedByMargin(apZoomPadNM), apZoomMinNM), strokes: g.strokes})
	}
	slices.SortStableFunc(areas, func(a, b apArea) int { return byNumber(a.strokes[0], b.strokes[0]) })
	if len(areas) > maxZoomAreas {
		omitted = len(areas) - maxZoomAreas
		areas = areas[:maxZoomAreas]
	}
	return areas, omitted
}

// packer gathers small clusters into shared figures: a cluster joins
// the first group near it whose bounding box, with it, still fits
// apZoomMaxNM; groups are found through a grid of apZoomMaxNM cells, so
// packing n clusters takes O(n) time for any spread.
type packer struct {
	groups []*packGroup
	cells  map[[2]int][]*packGroup
}

type packGroup struct {
	bb      r2.Rect
	strokes []int
}

func newPacker() *packer { return &packer{cells: map[[2]int][]*packGroup{}} }

func packCell(p r2.Point) [2]int {
	return [2]int{int(math.Floor(p.X / apZoomMaxNM)), int(math.Floor(p.Y / apZoomMaxNM))}
}

func (pk *packer) add(bb r2.Rect, strokes []int) {
	c := packCell(bb.Center())
	for dx := -1; dx <= 1; dx++ {
		for dy := -1; dy <= 1; dy++ {
			for _, g := range pk.cells[[2]int{c[0] + dx, c[1] + dy}] {
				if u := g.bb.Union(bb).Size(); u.X <= apZoomMaxNM && u.Y <= apZoomMaxNM {
					g.bb = g.bb.Union(bb)
					g.strokes = append(g.strokes, strokes...)
					return
				}
			}
		}
	}
	g := &packGroup{bb: bb, strokes: strokes}
	pk.groups = append(pk.groups, g)
	pk.cells[c] = append(pk.cells[c], g)
}

func tileIndex(v, lo, w float64, n int) int {
	if w <= 0 {
		return 0
	}
	return max(0, min(n-1, int((v-lo)/w)))
}

// atLeast grows r about its centre to at least size nm on each side.
func atLeast(r r2.Rect, size float64) r2.Rect {
	c, sz := r.Center(), r.Size()
	return r2.RectFromCenterSize(c, r2.Point{X: math.Max(sz.X, size), Y: math.Max(sz.Y, size)})
}

// withAspect grows r about its centre to the width/height ratio of b.
func withAspect(r r2.Rect, b box) r2.Rect {
	c, sz := r.Center(), r.Size()
	want := b.w / b.h
	if sz.X/sz.Y < want {
		sz.X = sz.Y * want
	} else {
		sz.Y = sz.X / want
	}
	return r2.RectFromCenterSize(c, sz)
}

// areaCaption describes an area: its regions, strokes and segments.
func areaCaption(p *planner.Plan, a apArea, number []int) (regions, strokes string) {
	seen := map[string]bool{}
	var names []string
	segLo, segHi := math.MaxInt, -1
	for _, id := range a.strokes {
		s := &p.Strokes[id]
		if !seen[s.Region] {
			seen[s.Region] = true
			names = append(names, s.Region)
		}
		segLo, segHi = min(segLo, s.Segment), max(segHi, s.Segment)
	}
	slices.SortFunc(names, cmp.Compare)
	segs := fmt.Sprintf("segment %d", segLo+1)
	if segHi > segLo {
		segs = fmt.Sprintf("segments %d–%d", segLo+1, segHi+1)
	}
	n := len(a.strokes)
	word := "strokes"
	if n == 1 {
		word = "stroke"
	}
	nums := make([]int, len(a.strokes))
	for i, id := range a.strokes {
		nums[i] = number[id]
	}
	return strings.Join(names, ", "), fmt.Sprintf("%d %s (%s) in %s", n, word, numberRanges(nums), segs)
}

// Styles of the zoomed figures.
var (
	greyLattice   grey = 0.72
	greyToClear   grey = 0.2
	greyFootprint grey = 0.87
	penCentre          = pen{width: 0.3, grey: 0, round: true}
)

// drawZoom draws area a in dev: the lattice's H sites faintly, the sites
// each region clears darker, the strokes' footprints and centre lines
// with their direction, dwell points, and stroke numbers where they fit.
func drawZoom(c canvas, sc *scene, a apArea, dev box, idx int) {
	p := sc.plan
	u := c.mm()
	win := withAspect(a.win, dev)
	v := fitView(win, dev)
	frame := v.frame()
	c.group(tag{id: fmt.Sprintf("ap-area-%d", idx+1), class: "ap-area"}, noPen, noPaint)
	c.rect(frame, noPen, solid(1), tag{})
	c.clip(frame)

	// FE strokes passing through, for context: footprint and centre.
	for i := range p.Strokes {
		s := &p.Strokes[i]
		if s.Mode != design.ModeFE || !strokeBounds(s).ExpandedByMargin(sc.feWidth).Intersects(win) {
			continue
		}
		pts := zoomPath(v, s)
		c.polyline(pts, false, pen{width: sc.feWidth * v.s / u, grey: 0.93, round: true}, noPaint, tag{class: "fe-footprint"})
		c.polyline(pts, false, pen{width: 0.2, grey: 0.5, dash: []float64{1, 0.7}}, noPaint, tag{class: "fe-centre"})
	}
	// Every AP stroke in the window is drawn, also those of a
	// neighbouring tile that reach into it; only the area's own strokes
	// are numbered.
	var inWin []int
	for i := range p.Strokes {
		if s := &p.Strokes[i]; s.Mode == design.ModeAP && strokeBounds(s).ExpandedByMargin(sc.apWidth).Intersects(win) {
			inWin = append(inWin, i)
		}
	}
	// AP footprints under the lattice, so the sites stay visible.
	for _, id := range inWin {
		s := &p.Strokes[id]
		if s.Kind == planner.StrokeDwell {
			continue
		}
		c.polyline(zoomPath(v, s), false, pen{width: sc.apWidth * v.s / u, grey: greyFootprint, round: true}, noPaint, tag{class: "ap-footprint"})
	}
	if sc.surf != nil {
		lat, clear, bonds := latticeDots(sc, win)
		r := math.Min(math.Max(0.07*v.s, 0.18*u), 1.0*u)
		// Each dimer as a faint bar joining its two H sites: the rows
		// read as ladders.
		c.segments(mapPts(v, bonds), pen{width: math.Max(0.08*v.s/u, 0.12), grey: 0.86}, tag{class: "dimers"})
		c.dots(mapPts(v, lat), r, greyLattice, tag{class: "lattice"})
		c.dots(mapPts(v, clear), r*1.5, greyToClear, tag{class: "sites-to-clear"})
	}
	// Centre lines with an arrowhead at the end: the writing direction.
	arrow := math.Max(1.2*u, 0)
	for _, id := range inWin {
		s := &p.Strokes[id]
		pts := zoomPath(v, s)
		if s.Kind == planner.StrokeDwell {
			q, d := pts[0], math.Max(1.4*u, 0.3*v.s)
			c.polyline([]vec{{q.x - d, q.y}, {q.x + d, q.y}}, false, pen{width: 0.35}, noPaint, tag{class: "dwell"})
			c.polyline([]vec{{q.x, q.y - d}, {q.x, q.y + d}}, false, pen{width: 0.35}, noPaint, tag{class: "dwell"})
			c.circle(q, d*0.65, pen{width: 0.3}, noPaint, tag{class: "dwell"})
			continue
		}
		c.polyline(pts, false, penCentre, noPaint, sc.strokeTag(s))
		if n := len(pts); n >= 2 {
			drawArrowHead(c, pts[n-2], pts[n-1], arrow)
		}
	}
	c.endClip()
	c.rect(frame, penField, noPaint, tag{})

	// Stroke numbers on paper at each stroke's start.
	if len(a.strokes) <= 150 {
		drawStrokeNumbers(c, sc, v, frame, a.strokes, inWin, arrow)
	}
	c.endGroup()
}

// drawStrokeNumbers labels each stroke of ids (in writing order) whose
// start lies in frame with its number on paper, boxed in white. A label
// stands on its stroke's own row, in line with the stroke just before its
// start, so it never sits between two rows nor on the arrowhead of a
// stroke written the other way (every arrowhead and dwell marker of the
// strokes drawn, drawn, is kept clear); where that place is taken it
// moves further back along the line, and only then around the start.
func drawStrokeNumbers(c canvas, sc *scene, v view, frame box, ids, drawn []int, arrow float64) {
	p, u := sc.plan, c.mm()
	lab := &labeler{bounds: frame}
	f := font{size: 6}
	dwellSize := math.Max(1.4*u, 0.3*v.s)
	for _, id := range drawn {
		s := &p.Strokes[id]
		pts := zoomPath(v, s)
		if s.Kind == planner.StrokeDwell {
			q := pts[0]
			lab.block(box{q.x - dwellSize, q.y - dwellSize, 2 * dwellSize, 2 * dwellSize})
			continue
		}
		if n := len(pts); n >= 2 {
			lab.block(arrowHeadBox(pts[n-2], pts[n-1], arrow))
		}
	}
	for _, id := range ids {
		s := &p.Strokes[id]
		pts := zoomPath(v, s)
		q := pts[0]
		if !frame.containsPt(q) {
			continue
		}
		txt := strconv.Itoa(sc.number[id])
		w, h := c.textWidth(txt, f)+0.8*u, textHeight(c, f)+0.8*u
		gap := 0.6 * u
		dir := vec{1, 0} // a dwell's label stands left of it
		if s.Kind == planner.StrokeDwell {
			gap = dwellSize
		} else if k := firstStep(pts); k > 0 {
			dir = pts[k].sub(q).scale(1 / pts[k].sub(q).norm())
		}
		b, ok := lab.placeBehind(q, dir, w, h, gap)
		if !ok {
			b, ok = lab.place(q, w, h, gap)
		}
		if ok {
			c.rect(b, noPen, paint{fill: true, grey: 1}, tag{})
			c.text(vec{b.x + 0.4*u, b.bottom() - 0.4*u}, txt, f, anchorStart, tag{class: "stroke-number"})
		}
	}
}

// firstStep returns the index of the first point of pts away from
// pts[0], or 0 when there is none.
func firstStep(pts []vec) int {
	for k := 1; k < len(pts); k++ {
		if pts[k].sub(pts[0]).norm() > 1e-9 {
			return k
		}
	}
	return 0
}

// arrowHeadBox is the bounding box of the arrowhead drawArrowHead draws.
func arrowHeadBox(from, to vec, size float64) box {
	d := to.sub(from)
	l := d.norm()
	if l < 1e-9 {
		return box{to.x, to.y, 0, 0}
	}
	d = d.scale(1 / l)
	n := vec{-d.y, d.x}
	back := to.sub(d.scale(size))
	a, b := back.add(n.scale(size*0.45)), back.sub(n.scale(size*0.45))
	x0, x1 := math.Min(to.x, math.Min(a.x, b.x)), math.Max(to.x, math.Max(a.x, b.x))
	y0, y1 := math.Min(to.y, math.Min(a.y, b.y)), math.Max(to.y, math.Max(a.y, b.y))
	return box{x0, y0, x1 - x0, y1 - y0}
}

func zoomPath(v view, s *planner.Stroke) []vec { return mapPts(v, s.Path) }

func mapPts(v view, ps []r2.Point) []vec {
	out := make([]vec, len(ps))
	for i, q := range ps {
		out[i] = v.pt(q)
	}
	return out
}

func drawArrowHead(c canvas, from, to vec, size float64) {
	d := to.sub(from)
	l := d.norm()
	if l < 1e-9 {
		return
	}
	d = d.scale(1 / l)
	n := vec{-d.y, d.x}
	back := to.sub(d.scale(size))
	c.polyline([]vec{to, back.add(n.scale(size * 0.45)), back.sub(n.scale(size * 0.45))}, true, pen{width: 0.1}, solid(0), tag{class: "arrow"})
}

// latticeDots returns the H sites of the surface inside win, those of
// them that some pattern region clears, and the dimers as pairs of their
// two sites' positions.
func latticeDots(sc *scene, win r2.Rect) (all, clear, bonds []r2.Point) {
	surf := sc.surf
	for dimer := range surf.Dimers(win) {
		a := surf.Position(dimer)
		b := surf.Position(surf.Partner(dimer))
		if win.ContainsPoint(a) || win.ContainsPoint(b) {
			bonds = append(bonds, a, b)
		}
		for side, q := range [2]r2.Point{a, b} {
			if !win.ContainsPoint(q) {
				continue
			}
			site := dimer
			site.Side = side
			if sc.clears(site) {
				clear = append(clear, q)
			} else {
				all = append(all, q)
			}
		}
	}
	return all, clear, bonds
}

// clears reports whether an AP or hybrid region of the pattern holds
// site.
func (sc *scene) clears(site lattice.Site) bool {
	for _, r := range sc.regions {
		if r.mode != design.ModeFE && r.sites.Contains(site) {
			return true
		}
	}
	return false
}
