package editor

import (
	"github.com/golang/geo/r2"

	"dimerpath/app/render"
)

// SceneOptions choose what the lattice view overlays.
type SceneOptions struct {
	Route    bool // the plan's route, when the current variant has one
	Findings bool // design-rule findings
	// Survey shows the design's survey: its image at SurveyOpacity (0
	// to 1; 0 shows only its outline, step edges, defects and the
	// placements found).
	Survey        bool
	SurveyOpacity float64
}

// MaxStrayMarks caps the stray sites of a plan drawn on the lattice.
const MaxStrayMarks = 2000

// Scene returns what the lattice view draws for the current variant.
func (s *Session) Scene(o SceneOptions) *render.Scene {
	sc := &render.Scene{Surface: s.surf}
	sel := map[int]bool{}
	for _, i := range s.sel {
		sel[i] = true
	}
	for i := range s.Variant().Regions {
		sc.Layers = append(sc.Layers, render.Layer{
			Sites:    s.RegionSites(i),
			Color:    s.RegionColour(i),
			Bounds:   s.RegionBounds(i),
			Selected: sel[i],
		})
		if sel[i] {
			if b := s.RegionBounds(i); !b.IsEmpty() {
				sc.Selected = append(sc.Selected, b)
			}
		}
	}
	if b := s.SelectedShapeBounds(); !b.IsEmpty() {
		sc.SelectedShape = &b
	}
	for _, f := range s.d.Fiducials {
		sc.Fiducials = append(sc.Fiducials, r2.Point{X: f.AtNM[0], Y: f.AtNM[1]})
	}
	sc.References = s.referenceOverlays()
	sc.Survey = s.surveyOverlay(o)
	if o.Route {
		if p, _ := s.Plan(); p != nil {
			sc.Route = render.RouteOf(p)
			sc.DimLayers = true
		}
	}
	if o.Findings {
		for i, f := range s.findings {
			sc.Marks = append(sc.Marks, render.Mark{At: f.At, Error: f.Error, Selected: i == s.chosen})
		}
		// The plan's coverage errors at their places: each site outside
		// every region that clears above the stray limit (the first
		// MaxStrayMarks; the plan panel and files name them all).
		if p, stale := s.Plan(); p != nil && !stale {
			for i, st := range p.Coverage.StraySites {
				if i == MaxStrayMarks {
					break
				}
				sc.Marks = append(sc.Marks, render.Mark{At: st.At, Error: true})
			}
		}
	}
	sc.Preview = s.Preview()
	return sc
}
