package render

import (
	"cmp"
	"image/color"
	"math"
	"slices"

	"github.com/golang/geo/r2"

	"dimerpath/lattice"
	"dimerpath/lattice/design"
	"dimerpath/planner"
)

// Scene is what one frame of the lattice view shows. The renderer only
// reads it. Layers and overlays are prepared by the editor state when the
// design, plan or selection change, not per frame.
type Scene struct {
	Surface *lattice.Surface
	// Layers are the regions of the current variant, bottom first: where
	// two overlap, the one with more sites in a pixel colours it.
	Layers []Layer
	// DimLayers mutes the region colours so that a route drawn over them
	// stands out.
	DimLayers bool
	Route     *RouteOverlay
	Fiducials []r2.Point
	Marks     []Mark
	Preview   *Preview
	// Selected outlines, in field nm.
	Selected []r2.Rect
	// SelectedShape is the extent of the selected shape (nm), drawn with
	// corner handles, or nil.
	SelectedShape *r2.Rect
	// References are the design's reference overlays (imported chip
	// layouts), polygons in field nm, drawn as dashed outlines.
	References []Reference
	// Survey is the design's survey topograph and what it found, or nil.
	Survey *SurveyOverlay
}

// SurveyOverlay is a survey as the view draws it, in field nm: its image
// under the lattice, its outline, its step edges, its defects and the
// placements found on it.
type SurveyOverlay struct {
	// Grey holds W x H grey levels, line 0 at the bottom (nil: no image).
	// Pixel point (u, v) lies at Origin + u·U + v·V; pixel (i, j) covers
	// [i, i+1) x [j, j+1).
	Grey         []uint8
	W, H         int
	Origin, U, V r2.Point
	Opacity      float64 // of the image, 0 to 1
	Outline      []r2.Point
	Steps        [][]r2.Point
	Defects      []DefectMark
	Placements   []PlacementMark
}

// DefectMark is one defect of a survey.
type DefectMark struct {
	At       r2.Point
	RadiusNM float64 // half its apparent width
	Bright   bool
	ByHand   bool // added or moved by hand
	Selected bool
}

// PlacementMark is one placement found for the core: the core's extent
// moved there, and its rank (1 is the best).
type PlacementMark struct {
	Bounds r2.Rect
	Rank   int
	Chosen bool
}

// Reference is one reference overlay: its polygons and their extent.
type Reference struct {
	Polygons [][]r2.Point
	Bounds   []r2.Rect // of each polygon, so the view skips those out of sight
}

// Layer is one region's sites as the view draws them.
type Layer struct {
	Sites *lattice.SiteSet
	Color color.NRGBA
	// Bounds is the field rectangle (nm) holding every site of Sites; the
	// renderer skips the pixels outside it.
	Bounds   r2.Rect
	Selected bool
}

// layerColor is the colour the view gives layer L of sc: muted when
// the scene dims its layers, lightened when L is selected.
func (sc *Scene) layerColor(L Layer) color.NRGBA {
	c := L.Color
	if sc.DimLayers {
		c = desaturate(c)
	}
	if L.Selected {
		c = Mix(c, RGB(0xff, 0xff, 0xff), 0.3)
	}
	return c
}

// Mark is a design-rule finding drawn on the view.
type Mark struct {
	At       r2.Point // the position the finding names, field nm
	Error    bool     // error (red) or warning (amber)
	Selected bool
}

// Preview is a tool's shape while it is being drawn, in field nm.
type Preview struct {
	Points  []r2.Point
	Closed  bool    // a polygon rather than a polyline
	WidthNM float64 // a line's width; 0 draws the centre line only
	Rect    bool    // Points[0] and Points[1] are opposite corners
	// BrushNM, when > 0, draws a circle of this radius at Points[0].
	BrushNM float64
	// Cells are filled under the outline: the elements an array about to
	// be placed would write.
	Cells []r2.Rect
}

// RouteOverlay is a plan's route reduced to what the view draws.
type RouteOverlay struct {
	Strokes []RouteStroke
	Moves   [][2]r2.Point
	// Registrations are the fiducial positions segments register on
	// (coarse registrations), LocalRegistrations where segments image
	// the lattice and the written features beside their first stroke
	// (local ones): the view draws them apart.
	Registrations      []r2.Point
	LocalRegistrations []r2.Point

	// dots, filled by RouteOf, hold each stroke as the zoomed-out frame
	// needs it, packed for a pass over a million strokes (drawRoute);
	// without them every stroke takes the general path.
	dots []routeDot
	// longMoves lists the moves by their span (the larger of a move's
	// extents along x and y, nm), longest first, so a frame visits only
	// the moves long enough to show.
	longMoves []spanned
	// strokeGrid and moveGrid find the strokes and moves near a zoomed
	// view (nil for a small plan).
	strokeGrid, moveGrid *routeGrid
}

// spanned is a move's index and span, nm.
type spanned struct {
	i    int32
	span float32
}

// routeDot is one stroke reduced to what decides whether it is drawn as
// a 2 x 2 block: its centre and extent, its width, its colour packed.
// A dwell (a one-point path) is drawn as a disk of at least 2.5 pixels
// however small: its extent is +Inf, so it never is a block.
type routeDot struct {
	x, y   float32 // centre of the bounds, nm
	extent float32 // the larger side of the bounds, nm
	width  float32 // WidthNM
	col    uint32  // SegmentColor, packed as the frame's pixels
}

// RouteStroke is one written stroke: a path of a given width, or a dwell
// point when Path has one point.
type RouteStroke struct {
	Path    []r2.Point
	WidthNM float64
	Segment int
	Bounds  r2.Rect
}

// RouteOf reduces a plan to the route overlay: strokes coloured by
// segment and as wide as their mode's line, idle moves, and the
// fiducials segments register on.
func RouteOf(p *planner.Plan) *RouteOverlay {
	width := map[design.Mode]float64{}
	raster := map[design.Mode]float64{}
	for _, c := range p.Conditions {
		// A mode may be listed more than once (AP lines and AP dwells);
		// lines are drawn as wide as the widest.
		width[c.Mode] = max(width[c.Mode], c.LineWidthNM)
		// Raster lines are drawn narrower than written, at most 60 % of
		// their pitch, so the gaps show the raster's direction instead of
		// a solid block hiding the region.
		if c.PitchNM > 0 {
			raster[c.Mode] = min(c.LineWidthNM, 0.6*c.PitchNM)
		} else if _, ok := raster[c.Mode]; !ok {
			raster[c.Mode] = c.LineWidthNM
		}
	}
	rt := &RouteOverlay{}
	for _, st := range p.Strokes {
		if len(st.Path) == 0 {
			continue
		}
		b := r2.EmptyRect()
		for _, q := range st.Path {
			b = b.AddPoint(q)
		}
		w := width[st.Mode]
		switch {
		case st.Kind == planner.StrokeRaster:
			w = raster[st.Mode]
		case st.Mode == design.ModeAP:
			// AP lines follow dimer rows; drawn at most a row wide they
			// do not overlap their neighbours.
			w = min(w, 0.9*lattice.RowSpacing)
		}
		rt.Strokes = append(rt.Strokes, RouteStroke{Path: st.Path, WidthNM: w, Segment: st.Segment, Bounds: b})
		c, sz := b.Center(), b.Size()
		ext := float32(max(sz.X, sz.Y))
		if len(st.Path) == 1 {
			ext = float32(math.Inf(1))
		}
		rt.dots = append(rt.dots, routeDot{x: float32(c.X), y: float32(c.Y), extent: ext, width: float32(w),
			col: packRGBA(SegmentColor(st.Segment))})
	}
	for _, a := range p.Actions {
		if a.Kind == planner.ActMove && a.From != a.To {
			rt.longMoves = append(rt.longMoves, spanned{int32(len(rt.Moves)), float32(max(math.Abs(a.To.X-a.From.X), math.Abs(a.To.Y-a.From.Y)))})
			rt.Moves = append(rt.Moves, [2]r2.Point{a.From, a.To})
		}
	}
	// Moves are all drawn alike, so the order they are drawn in does not
	// change the frame.
	slices.SortFunc(rt.longMoves, func(a, b spanned) int { return cmp.Compare(b.span, a.span) })
	bounds := make([]r2.Rect, len(rt.Strokes))
	for i, st := range rt.Strokes {
		// Dwells are drawn as disks of at least 2.5 px: grown by the
		// width here, by the pixels in drawRoute's margin.
		bounds[i] = st.Bounds.ExpandedByMargin(st.WidthNM)
	}
	rt.strokeGrid = newRouteGrid(bounds)
	bounds = bounds[:0]
	for _, m := range rt.Moves {
		bounds = append(bounds, r2.RectFromPoints(m[0], m[1]))
	}
	rt.moveGrid = newRouteGrid(bounds)
	seen := map[r2.Point]bool{}
	for _, sg := range p.Segments {
		if !seen[sg.FiducialAt] {
			seen[sg.FiducialAt] = true
			if sg.Registration == planner.RegLocal {
				rt.LocalRegistrations = append(rt.LocalRegistrations, sg.FiducialAt)
			} else {
				rt.Registrations = append(rt.Registrations, sg.FiducialAt)
			}
		}
	}
	return rt
}
