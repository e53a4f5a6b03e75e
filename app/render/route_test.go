package render

import (
	"testing"

	"github.com/golang/geo/r2"

	"dimerpath/lattice/design"
	"dimerpath/lattice/design/designtest"
	"dimerpath/planner"
)

// arrayRoute returns the surface of a cols x rows donor array and a plan
// of one AP line per window, moves between them, segments of 220.
func arrayRoute(t *testing.T, cols, rows int) (*Scene, *planner.Plan) {
	t.Helper()
	lay, err := designtest.WindowArray(cols, rows).Lay("")
	if err != nil {
		t.Fatal(err)
	}
	surf := lay.Surface
	rl := lay.Regions[0]
	p := &planner.Plan{Conditions: []planner.Conditions{{Mode: design.ModeAP, Kind: planner.StrokeLine, LineWidthNM: 1}}}
	var prev r2.Point
	for i, w := range rl.Windows {
		a := surf.DimerCentre(w.Terrace, w.Row, w.FirstDimer)
		z := surf.DimerCentre(w.Terrace, w.Row, w.LastDimer())
		if i%7 == 3 {
			z = a // a dwell now and then
		}
		st := planner.Stroke{ID: i, Mode: design.ModeAP, Kind: planner.StrokeLine, Path: []r2.Point{a, z}, Segment: i / 220}
		if a == z {
			st.Kind, st.Path = planner.StrokeDwell, []r2.Point{a}
		}
		p.Strokes = append(p.Strokes, st)
		if i > 0 {
			p.Actions = append(p.Actions, planner.Action{Kind: planner.ActMove, From: prev, To: a})
		}
		prev = z
	}
	sc := &Scene{Surface: surf, Layers: []Layer{{Sites: rl.Sites, Color: RegionColor(0), Bounds: rl.Bounds}}, DimLayers: true}
	return sc, p
}

// TestRouteFastPathsDrawTheSameRoute draws the route of a 120 x 100
// array (12 000 strokes, enough for the grids) with RouteOf's packed
// dots, sorted moves and grids, and again with none of them (every
// stroke and move through the general path): zoomed in, where only the
// grids differ, the frames are the same but for the rounding of moves
// blended in another order; zoomed out, where strokes become 2 x 2
// blocks and moves under 2 pixels are left out, about as many pixels
// change and every stroke shows its colour.
func TestRouteFastPathsDrawTheSameRoute(t *testing.T) {
	sc, p := arrayRoute(t, 120, 100)
	fast := RouteOf(p)
	if fast.strokeGrid == nil || fast.moveGrid == nil || len(fast.dots) != len(fast.Strokes) {
		t.Fatal("RouteOf made no grids or dots for 12 000 strokes")
	}
	plain := &RouteOverlay{Strokes: fast.Strokes, Moves: fast.Moves, Registrations: fast.Registrations, LocalRegistrations: fast.LocalRegistrations}
	whole := FitView(sc.Surface.Field, 800, 600, 20)
	mid := sc.Surface.Field.Center()
	corner := r2.Point{X: 60, Y: 60}
	for _, c := range []struct {
		name  string
		v     View
		exact bool
	}{
		{"0.1 nm/px", whole.CenteredOn(mid, 0.1), true},
		{"atomic 0.04 nm/px", whole.CenteredOn(mid, 0.04), true},
		{"0.3 nm/px at the corner", whole.CenteredOn(corner, 0.3), true},
		{"whole field", whole, false},
		{"1 nm/px", whole.CenteredOn(mid, 1), false},
	} {
		t.Run(c.name, func(t *testing.T) {
			frame := func(rt *RouteOverlay) []uint32 {
				var r Renderer
				s := *sc
				s.Route = rt
				r.Render(&s, c.v)
				return append([]uint32(nil), r.pix...)
			}
			base, a, b := frame(nil), frame(fast), frame(plain)
			differ, routed, routedA, routedB := 0, 0, 0, 0
			for i := range a {
				if a[i] != base[i] {
					routedA++
				}
				if b[i] != base[i] {
					routedB++
				}
				if a[i] != base[i] || b[i] != base[i] {
					routed++
					// Moves are drawn in another order (by length), which
					// moves their antialiased blends by a unit or two.
					if !closePixels(a[i], b[i], 2) {
						differ++
					}
				}
			}
			if routed == 0 {
				t.Fatal("no route drawn")
			}
			if c.exact {
				if differ != 0 {
					t.Errorf("%d of %d route pixels differ between the grid and the plain path", differ, routed)
				}
				return
			}
			// Zoomed out the packed path draws blocks, not antialiased
			// capsules, and leaves out moves too short to show: about as
			// many pixels, and every stroke's own colour at its centre.
			if r := float64(routedA) / float64(routedB); r < 0.6 || r > 1.6 {
				t.Errorf("the packed path changes %d pixels, the plain path %d", routedA, routedB)
			}
			palette := map[uint32]bool{}
			for i := range segmentPalette {
				palette[packRGBA(SegmentColor(i))] = true
			}
			missing := 0
			for _, st := range fast.Strokes {
				x, y := c.v.ToScreen(st.Bounds.Center())
				xi, yi := int(x), int(y)
				if xi < 0 || yi < 0 || xi >= c.v.W || yi >= c.v.H {
					continue
				}
				if !palette[a[yi*c.v.W+xi]] {
					missing++
				}
			}
			if missing > 0 {
				t.Errorf("%d strokes show no segment colour at their centre", missing)
			}
		})
	}
}

// TestRouteGridFindsEveryItemNearAView checks routeGrid.near against a
// scan of every item's bounds, for views across the array.
func TestRouteGridFindsEveryItemNearAView(t *testing.T) {
	_, p := arrayRoute(t, 120, 100)
	rt := RouteOf(p)
	bounds := make([]r2.Rect, len(rt.Moves))
	for i, m := range rt.Moves {
		bounds[i] = r2.RectFromPoints(m[0], m[1])
	}
	g := rt.moveGrid
	for _, view := range []r2.Rect{
		r2.RectFromPoints(r2.Point{X: 0, Y: 0}, r2.Point{X: 20, Y: 20}),
		r2.RectFromPoints(r2.Point{X: 70, Y: 100}, r2.Point{X: 75, Y: 103}),
		r2.RectFromPoints(r2.Point{X: 100, Y: 50}, r2.Point{X: 400, Y: 60}),
		r2.RectFromPoints(r2.Point{X: -50, Y: -50}, r2.Point{X: -10, Y: -10}),
	} {
		got := map[int32]bool{}
		for _, i := range g.near(view, nil) {
			got[i] = true
		}
		for i, b := range bounds {
			if b.Intersects(view) && !got[int32(i)] {
				t.Errorf("view %v: move %d (%v) not found", view, i, b)
				break
			}
		}
	}
}

// closePixels reports whether packed pixels a and b differ by at most d
// in every channel.
func closePixels(a, b uint32, d int) bool {
	for s := 0; s < 32; s += 8 {
		x, y := int(a>>s&0xff), int(b>>s&0xff)
		if x-y > d || y-x > d {
			return false
		}
	}
	return true
}

// Issue 11: coarse registrations (on a fiducial) and local ones (the
// lattice beside the work) are drawn apart, each place once.
func TestRouteRegistrationsByKind(t *testing.T) {
	fid, here := r2.Point{X: 10, Y: 10}, r2.Point{X: 50, Y: 60}
	p := &planner.Plan{Segments: []planner.Segment{
		{Registration: planner.RegCoarse, Fiducial: "F", FiducialAt: fid},
		{Registration: planner.RegLocal, FiducialAt: here},
		{Registration: planner.RegLocal, FiducialAt: here},
		{Registration: planner.RegCoarse, Fiducial: "F", FiducialAt: fid},
	}}
	rt := RouteOf(p)
	if len(rt.Registrations) != 1 || rt.Registrations[0] != fid {
		t.Errorf("coarse registrations %v, want [%v]", rt.Registrations, fid)
	}
	if len(rt.LocalRegistrations) != 1 || rt.LocalRegistrations[0] != here {
		t.Errorf("local registrations %v, want [%v]", rt.LocalRegistrations, here)
	}
}
