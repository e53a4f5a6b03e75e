package design

import (
	"fmt"
	"math"

	"github.com/golang/geo/r2"
)

// Survey is a survey topograph of the surface under the design, what its
// analysis found (dimerpath survey), and where it sits in the field.
//
// Positions are in the survey's own frame: nm from the image's
// lower-left corner, x along the image's x axis, by the measured scale
// (the image's pixel point (u, v) lies at (ScaleNMPerPx[0]·u +
// ScaleNMPerPx[1]·sin(skew)·v, ScaleNMPerPx[1]·cos(skew)·v)). A point p
// of that frame lies in the field at OffsetNM + R(RotationDeg)·p, so
// moving or turning the survey to register it on the field moves
// everything it found with it.
type Survey struct {
	// Image is the topograph's file, relative to the design file's folder
	// (or absolute); empty when only the analysis is kept.
	Image string `json:"image,omitempty"`
	// OffsetNM is the field position of the image's lower-left corner,
	// RotationDeg the field angle of its x axis (counter-clockwise).
	OffsetNM    [2]float64 `json:"offset_nm"`
	RotationDeg float64    `json:"rotation_deg,omitempty"`
	// SizePx is the image's size in pixels, ScaleNMPerPx and SkewDeg its
	// calibration (see the type's comment).
	SizePx       [2]int     `json:"size_px"`
	ScaleNMPerPx [2]float64 `json:"scale_nm_per_px"`
	SkewDeg      float64    `json:"skew_deg,omitempty"`
	// Terraces, Steps and Defects are what the analysis found; a user may
	// add, move and delete defects by hand.
	Terraces []SurveyTerrace `json:"terraces,omitempty"`
	Steps    []SurveyStep    `json:"steps,omitempty"`
	Defects  []SurveyDefect  `json:"defects,omitempty"`
}

// SurveyTerrace is one terrace of a survey.
type SurveyTerrace struct {
	// RowsDeg is the angle of its dimer rows from the image's x axis.
	RowsDeg   float64      `json:"rows_deg"`
	PolygonNM [][2]float64 `json:"polygon_nm"`
	// UpFrom is the index of the terrace this one is one step up from, or
	// nil.
	UpFrom *int `json:"up_from,omitempty"`
	// DimerNM is the centre of one dimer of its lattice.
	DimerNM [2]float64 `json:"dimer_nm"`
}

// SurveyStep is one step edge of a survey.
type SurveyStep struct {
	PolylineNM [][2]float64 `json:"polyline_nm"`
}

// Defect kinds as a survey records them.
const (
	DefectBright = "bright"
	DefectDark   = "dark"
)

// SurveyDefect is one defect of a survey.
type SurveyDefect struct {
	AtNM [2]float64 `json:"at_nm"`
	// Kind is "bright" or "dark".
	Kind     string  `json:"kind"`
	HeightNM float64 `json:"height_nm,omitempty"`
	// SizeNM is its apparent full width at half maximum; the clearance
	// rule measures from its edge, SizeNM/2 from its centre.
	SizeNM float64 `json:"size_nm,omitempty"`
	// Class is its coarse class by appearance.
	Class string `json:"class,omitempty"`
	// ByHand marks a defect the user added or moved.
	ByHand bool `json:"by_hand,omitempty"`
}

// Limits of a survey in a design file.
const (
	MaxSurveyDefects = 100_000
	MaxSurveyPoints  = 1_000_000 // polygon and polyline points together
	MaxSurveySide    = 8192      // pixels
	// A topograph's pixel is between a picometre (far below any STM's
	// resolution) and a micrometre (far above a survey that shows dimer
	// rows): outside that, a scale is a typing error, and a tiny one
	// makes every survey point collapse onto the offset.
	MinSurveyScaleNM = 1e-3
	MaxSurveyScaleNM = 1000.0
)

// ToField returns the field position of the survey point p.
func (s *Survey) ToField(p r2.Point) r2.Point {
	sn, cs := math.Sincos(s.RotationDeg * math.Pi / 180)
	return r2.Point{X: s.OffsetNM[0] + cs*p.X - sn*p.Y, Y: s.OffsetNM[1] + sn*p.X + cs*p.Y}
}

// FromField returns the survey point at field position f.
func (s *Survey) FromField(f r2.Point) r2.Point {
	sn, cs := math.Sincos(s.RotationDeg * math.Pi / 180)
	dx, dy := f.X-s.OffsetNM[0], f.Y-s.OffsetNM[1]
	return r2.Point{X: cs*dx + sn*dy, Y: -sn*dx + cs*dy}
}

// PixelToSurvey returns the survey point of the image's pixel point (u,
// v) (pixel steps from the lower-left corner).
func (s *Survey) PixelToSurvey(u, v float64) r2.Point {
	sn, cs := math.Sincos(s.SkewDeg * math.Pi / 180)
	return r2.Point{X: s.ScaleNMPerPx[0]*u + s.ScaleNMPerPx[1]*sn*v, Y: s.ScaleNMPerPx[1] * cs * v}
}

// SurveyToPixel returns the image's pixel point of the survey point p
// (PixelToSurvey's inverse).
func (s *Survey) SurveyToPixel(p r2.Point) (u, v float64) {
	sn, cs := math.Sincos(s.SkewDeg * math.Pi / 180)
	v = p.Y / (s.ScaleNMPerPx[1] * cs)
	u = (p.X - s.ScaleNMPerPx[1]*sn*v) / s.ScaleNMPerPx[0]
	return u, v
}

// Covers reports whether the field point f lies on the survey's image.
func (s *Survey) Covers(f r2.Point) bool {
	u, v := s.SurveyToPixel(s.FromField(f))
	return u >= 0 && v >= 0 && u <= float64(s.SizePx[0]) && v <= float64(s.SizePx[1])
}

// Outline returns the image's outline in the field, counter-clockwise
// from its lower-left corner.
func (s *Survey) Outline() []r2.Point {
	w, h := float64(s.SizePx[0]), float64(s.SizePx[1])
	return []r2.Point{
		s.ToField(s.PixelToSurvey(0, 0)), s.ToField(s.PixelToSurvey(w, 0)),
		s.ToField(s.PixelToSurvey(w, h)), s.ToField(s.PixelToSurvey(0, h)),
	}
}

// FieldDefect is a survey's defect in field nm.
type FieldDefect struct {
	// Index is the defect's place in Survey.Defects.
	Index    int
	At       r2.Point
	RadiusNM float64 // half its apparent width
	SurveyDefect
}

// FieldDefects returns the survey's defects in field nm.
func (s *Survey) FieldDefects() []FieldDefect {
	out := make([]FieldDefect, len(s.Defects))
	for i, d := range s.Defects {
		out[i] = FieldDefect{Index: i, At: s.ToField(point(d.AtNM)), RadiusNM: d.SizeNM / 2, SurveyDefect: d}
	}
	return out
}

// FieldSteps returns the survey's step edges as field polylines.
func (s *Survey) FieldSteps() [][]r2.Point {
	out := make([][]r2.Point, len(s.Steps))
	for i, st := range s.Steps {
		for _, p := range st.PolylineNM {
			out[i] = append(out[i], s.ToField(point(p)))
		}
	}
	return out
}

func (d *Design) validateSurvey(ps *problems) {
	s := d.Survey
	if s == nil {
		return
	}
	const path = "survey"
	checkPoint(ps, path+".offset_nm", s.OffsetNM)
	if !finite(s.RotationDeg) || math.Abs(s.RotationDeg) > 360 {
		ps.add(path+".rotation_deg", "%g is not an angle within ±360°", s.RotationDeg)
	}
	if !finite(s.SkewDeg) || math.Abs(s.SkewDeg) > 30 {
		ps.add(path+".skew_deg", "%g is not a skew within ±30°", s.SkewDeg)
	}
	for k, v := range s.SizePx {
		if v < 1 || v > MaxSurveySide {
			ps.add(fmt.Sprintf("%s.size_px[%d]", path, k), "%d pixels: want 1 to %d", v, MaxSurveySide)
		}
	}
	for k, v := range s.ScaleNMPerPx {
		if !(v >= MinSurveyScaleNM && v <= MaxSurveyScaleNM) {
			ps.add(fmt.Sprintf("%s.scale_nm_per_px[%d]", path, k), "%g is not a scale in [%g, %g] nm per pixel", v, MinSurveyScaleNM, MaxSurveyScaleNM)
		}
	}
	points := 0
	coord := func(p string, q [2]float64) { checkPoint(ps, p, q) }
	for i, t := range s.Terraces {
		tp := fmt.Sprintf("%s.terraces[%d]", path, i)
		if !finite(t.RowsDeg) {
			ps.add(tp+".rows_deg", "%g is not a finite angle", t.RowsDeg)
		}
		if len(t.PolygonNM) < 3 {
			ps.add(tp+".polygon_nm", "has %d points; a polygon needs 3 or more", len(t.PolygonNM))
		}
		for k, q := range t.PolygonNM {
			coord(fmt.Sprintf("%s.polygon_nm[%d]", tp, k), q)
		}
		coord(tp+".dimer_nm", t.DimerNM)
		if t.UpFrom != nil && (*t.UpFrom < 0 || *t.UpFrom >= len(s.Terraces) || *t.UpFrom == i) {
			ps.add(tp+".up_from", "%d names no other terrace of the survey", *t.UpFrom)
		}
		points += len(t.PolygonNM)
	}
	for i, st := range s.Steps {
		sp := fmt.Sprintf("%s.steps[%d]", path, i)
		if len(st.PolylineNM) < 2 {
			ps.add(sp+".polyline_nm", "has %d points; a step edge needs 2 or more", len(st.PolylineNM))
		}
		for k, q := range st.PolylineNM {
			coord(fmt.Sprintf("%s.polyline_nm[%d]", sp, k), q)
		}
		points += len(st.PolylineNM)
	}
	if points > MaxSurveyPoints {
		ps.add(path, "the survey's terraces and steps hold %d points, more than the limit of %d", points, MaxSurveyPoints)
	}
	if len(s.Defects) > MaxSurveyDefects {
		ps.add(path+".defects", "%d defects, more than the limit of %d", len(s.Defects), MaxSurveyDefects)
		return
	}
	for i, df := range s.Defects {
		dp := fmt.Sprintf("%s.defects[%d]", path, i)
		coord(dp+".at_nm", df.AtNM)
		if df.Kind != DefectBright && df.Kind != DefectDark {
			ps.add(dp+".kind", "%q is not %q or %q", df.Kind, DefectBright, DefectDark)
		}
		if !finite(df.HeightNM) || math.Abs(df.HeightNM) > 100 {
			ps.add(dp+".height_nm", "%g is not an apparent height within ±100 nm", df.HeightNM)
		}
		if !finite(df.SizeNM) || df.SizeNM < 0 || df.SizeNM > 1000 {
			ps.add(dp+".size_nm", "%g is not a size in [0, 1000] nm", df.SizeNM)
		}
	}
}
