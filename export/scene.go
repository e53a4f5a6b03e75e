package export

import (
	"cmp"
	"math"
	"slices"

	"github.com/golang/geo/r2"

	"dimerpath/lattice"
	"dimerpath/lattice/design"
	"dimerpath/planner"
)

// Pattern is what the figures draw beneath the route: the lattice
// (terraces, dimer rows, sites) and each region's sites. It is optional:
// without it the figures show the plan's strokes, moves and fiducials
// alone. The exporters only read it.
type Pattern struct {
	Surface *lattice.Surface
	Regions []PatternRegion
	// References are chip-layout overlays (design.Reference), drawn as
	// outlines on the overview: for orientation, never written.
	References []PatternReference
}

// PatternReference is one reference overlay's name and polygons in
// field nm.
type PatternReference struct {
	Name     string
	Polygons [][]r2.Point
}

// PatternOf returns the pattern of a laid-out design variant: its
// lattice and every region's sites (shared with l, not copied).
func PatternOf(l *design.Layout) *Pattern {
	pat := &Pattern{Surface: l.Surface}
	for _, r := range l.Regions {
		pat.Regions = append(pat.Regions, PatternRegion{Name: r.Region.Name, Sites: r.Sites})
	}
	for _, ref := range l.Design.References {
		pr := PatternReference{Name: ref.Name}
		for _, poly := range ref.PolygonsNM {
			q := make([]r2.Point, len(poly))
			for i, v := range poly {
				q[i] = r2.Point{X: v[0], Y: v[1]}
			}
			pr.Polygons = append(pr.Polygons, q)
		}
		pat.References = append(pat.References, pr)
	}
	return pat
}

// PatternRegion is one region's name (as in Plan.Modes) and the H sites
// it depassivates.
type PatternRegion struct {
	Name  string
	Sites *lattice.SiteSet
}

// scene is the plan prepared for drawing: region outlines as merged
// rectangles, the planned mode of each region, line widths.
type scene struct {
	plan    *planner.Plan
	surf    *lattice.Surface // nil without a pattern
	refs    []PatternReference
	regions []regionShape
	modeOf  map[string]design.Mode // region name -> planned mode (ap, fe, hybrid)
	apWidth float64                // AP line width, nm
	feWidth float64                // FE line width, nm
	// toFiducial[i] reports whether action i is the move to a fiducial
	// before a coarse registration.
	toFiducial []bool
	// writeFrom[s] is the start of segment s's first write or dwell, and
	// hasWrite[s] whether it has one.
	writeFrom []r2.Point
	hasWrite  []bool
	// number[id] is stroke id's number on paper (StrokeNumbers).
	number []int
	// summary lets the overview summarise a plan too large to draw
	// stroke by stroke (the printed plan; see summarised).
	summary bool
}

// regionShape is a region drawn as field rectangles, one per run of
// sites on a row, with runs of equal extent on neighbouring rows merged.
type regionShape struct {
	name  string
	mode  design.Mode
	sites *lattice.SiteSet
	rects []r2.Rect
}

func newScene(p *planner.Plan, pat *Pattern) *scene {
	sc := &scene{plan: p, modeOf: map[string]design.Mode{}, apWidth: 0.8, feWidth: 4, number: StrokeNumbers(p)}
	for _, m := range p.Modes {
		sc.modeOf[m.Region] = m.Mode
	}
	for _, c := range p.Conditions {
		if c.LineWidthNM > 0 {
			if c.Mode == design.ModeFE {
				sc.feWidth = c.LineWidthNM
			} else {
				sc.apWidth = c.LineWidthNM
			}
		}
	}
	if pat != nil {
		sc.refs = pat.References
	}
	if pat != nil && pat.Surface != nil {
		sc.surf = pat.Surface
		for _, r := range pat.Regions {
			if r.Sites == nil {
				continue
			}
			sc.regions = append(sc.regions, regionShape{name: r.Name, mode: sc.modeOf[r.Name], sites: r.Sites,
				rects: runRects(pat.Surface, r.Sites)})
		}
	}
	sc.toFiducial = make([]bool, len(p.Actions))
	for i := 0; i+1 < len(p.Actions); i++ {
		next := p.Actions[i+1]
		// A local registration images the lattice where the tip is: the
		// move before it goes to the work, not to a fiducial.
		local := next.Segment >= 0 && next.Segment < len(p.Segments) && p.Segments[next.Segment].Registration == planner.RegLocal
		sc.toFiducial[i] = p.Actions[i].Kind == planner.ActMove && next.Kind == planner.ActRegister && !local
	}
	sc.writeFrom = make([]r2.Point, len(p.Segments))
	sc.hasWrite = make([]bool, len(p.Segments))
	for _, a := range p.Actions {
		if (a.Kind == planner.ActWrite || a.Kind == planner.ActDwell) && a.Segment >= 0 && !sc.hasWrite[a.Segment] {
			sc.writeFrom[a.Segment] = a.From
			sc.hasWrite[a.Segment] = true
		}
	}
	for i, s := range p.Segments {
		if !sc.hasWrite[i] && len(s.Strokes) > 0 {
			sc.writeFrom[i] = p.Strokes[s.Strokes[0]].Path[0]
			sc.hasWrite[i] = true
		}
	}
	return sc
}

// field returns the field rectangle in nm.
func (sc *scene) field() r2.Rect {
	return r2.RectFromPoints(r2.Point{}, r2.Point{X: sc.plan.FieldWidthNM, Y: sc.plan.FieldHeightNM})
}

// runRects returns the rectangles covering set's runs on surf, merging
// equal runs on consecutive rows. O(runs).
func runRects(surf *lattice.Surface, set *lattice.SiteSet) []r2.Rect {
	type key struct{ t, start, end int }
	type open struct {
		lastRow int
		rect    r2.Rect
	}
	var out []r2.Rect
	live := map[key]*open{}
	curT, curRow := -1, -1
	flush := func(keep func(k key, o *open) bool) {
		for k, o := range live {
			if !keep(k, o) {
				out = append(out, o.rect)
				delete(live, k)
			}
		}
	}
	for run := range set.Runs() {
		if run.Terrace >= len(surf.Terraces) {
			break
		}
		if run.Terrace != curT || run.Row != curRow {
			// Runs that did not continue onto this row are finished.
			t, row := run.Terrace, run.Row
			flush(func(k key, o *open) bool { return k.t == t && o.lastRow >= row-1 })
			curT, curRow = run.Terrace, run.Row
		}
		r := runRect(surf, run)
		k := key{run.Terrace, run.Start, run.End()}
		if o, ok := live[k]; ok && o.lastRow == run.Row-1 {
			o.rect = o.rect.Union(r)
			o.lastRow = run.Row
			continue
		} else if ok {
			out = append(out, o.rect)
		}
		live[k] = &open{lastRow: run.Row, rect: r}
	}
	flush(func(key, *open) bool { return false })
	// The map visits in random order; files must not.
	slices.SortFunc(out, func(a, b r2.Rect) int {
		if c := cmp.Compare(a.Y.Lo, b.Y.Lo); c != 0 {
			return c
		}
		return cmp.Compare(a.X.Lo, b.X.Lo)
	})
	return out
}

// runRect returns the field rectangle of one run: the cells of its
// dimers, one row spacing across.
func runRect(surf *lattice.Surface, run lattice.Run) r2.Rect {
	return surf.DimerCells(run.Terrace, run.Row, lattice.DimerRange{Lo: run.Start >> 1, Hi: (run.End()-1)>>1 + 1})
}

// view maps a field window in nm onto device units: device y grows
// downwards, field y upwards.
type view struct {
	win    r2.Rect // visible field window, nm
	origin vec     // device position of the window's top-left corner
	s      float64 // device units per nm
}

// fitView returns the view showing win centred in dev at the largest
// scale that fits.
func fitView(win r2.Rect, dev box) view {
	sz := win.Size()
	s := math.Min(dev.w/sz.X, dev.h/sz.Y)
	o := vec{dev.x + (dev.w-sz.X*s)/2, dev.y + (dev.h-sz.Y*s)/2}
	return view{win: win, origin: o, s: s}
}

func (v view) pt(p r2.Point) vec {
	return vec{v.origin.x + (p.X-v.win.X.Lo)*v.s, v.origin.y + (v.win.Y.Hi-p.Y)*v.s}
}

// box returns the device box of field rectangle r.
func (v view) box(r r2.Rect) box {
	a := v.pt(r2.Point{X: r.X.Lo, Y: r.Y.Hi})
	return box{a.x, a.y, r.Size().X * v.s, r.Size().Y * v.s}
}

func (v view) frame() box { return v.box(v.win) }

// Styles of the pattern figures. Modes and kinds are told apart by line
// weight, dash and grey, so they survive black-and-white printing.
var (
	penField     = pen{width: 0.3, grey: 0}
	penTerrace   = pen{width: 0.6, grey: 0.55, dash: []float64{4, 1.5}}
	penReference = pen{width: 0.45, grey: 0.1, dash: []float64{2.4, 0.7, 0.5, 0.7}}
	penMove      = pen{width: 0.2, grey: 0.15, dash: []float64{1.4, 0.9}}
	penToFid     = pen{width: 0.25, grey: 0.15, dash: []float64{0.2, 0.7}, round: true}
	penFiducial  = pen{width: 0.35, grey: 0}
	penLabel     = pen{width: 0.25, grey: 0}
	penLeader    = pen{width: 0.15, grey: 0.3}
	fillAPRegion = paint{fill: true, grey: 0.78}
	fillFERegion = paint{fill: true, grey: 0.93, hatch: hatchDiag, hatchGrey: 0.6, hatchStep: 1.6}
	fillHybrid   = paint{fill: true, grey: 0.86, hatch: hatchBackDiag, hatchGrey: 0.55, hatchStep: 1.6}
	fillLabel    = solid(1)
	fontLabel    = font{size: 7, bold: true}
	fontSmall    = font{size: 7}
	fontTick     = font{size: 6.5, grey: 0.2}
)

// apPen and fePen return the stroke pens at scale s (device per nm):
// the real line width, but never thinner than legible on paper.
func apPen(c canvas, sc *scene, s float64) pen {
	return pen{width: math.Max(sc.apWidth*s/c.mm(), 0.45), grey: 0, round: true}
}

func fePen(c canvas, sc *scene, s float64) pen {
	return pen{width: math.Max(sc.feWidth*s/c.mm(), 0.3), grey: 0.55, round: true}
}

func outlinePen(c canvas, sc *scene, s float64) pen {
	return pen{width: 0.35, grey: 0.25, dash: []float64{2, 0.8, 0.4, 0.8}}
}

func regionPaint(mode design.Mode) paint {
	switch mode {
	case design.ModeFE:
		return fillFERegion
	case design.ModeHybrid:
		return fillHybrid
	}
	return fillAPRegion
}
