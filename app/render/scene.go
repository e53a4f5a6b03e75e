package render

import (
	"github.com/golang/geo/r2"

	"dimerpath/lattice"
	"dimerpath/planner"
)

// RouteOf reduces a plan to the route overlay: strokes coloured by
// segment and as wide as their mode's line, idle moves, and the
// fiducials segments register on.
func RouteOf(p *planner.Plan) *RouteOverlay {
	width := map[planner.WriteMode]float64{}
	raster := map[planner.WriteMode]float64{}
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
		case st.Mode == planner.AP:
			// AP lines follow dimer rows; drawn at most a row wide they
			// do not overlap their neighbours.
			w = min(w, 0.9*lattice.RowSpacing)
		}
		rt.Strokes = append(rt.Strokes, RouteStroke{Path: st.Path, WidthNM: w, Segment: st.Segment, Bounds: b})
	}
	for _, a := range p.Actions {
		if a.Kind == planner.ActMove && a.From != a.To {
			rt.Moves = append(rt.Moves, [2]r2.Point{a.From, a.To})
		}
	}
	seen := map[r2.Point]bool{}
	for _, sg := range p.Segments {
		if !seen[sg.FiducialAt] {
			seen[sg.FiducialAt] = true
			rt.Registrations = append(rt.Registrations, sg.FiducialAt)
		}
	}
	return rt
}
