package survey

import (
	"math"

	"github.com/golang/geo/r2"

	"dimerpath/lattice"
	"dimerpath/lattice/design"
)

// DesignSurvey returns the analysis as a design's survey: the image file
// (as the design will name it), the calibration, and the terraces, steps
// and defects in the survey's own frame; placed with the image's
// lower-left corner at offset (field nm) and its x axis at rotationDeg in
// the field (see design.Survey).
func (a *Analysis) DesignSurvey(image string, offset r2.Point, rotationDeg float64) *design.Survey {
	pts := func(ps []r2.Point) [][2]float64 {
		out := make([][2]float64, len(ps))
		for i, p := range ps {
			out[i] = [2]float64{p.X, p.Y}
		}
		return out
	}
	s := &design.Survey{
		Image: image, OffsetNM: [2]float64{offset.X, offset.Y}, RotationDeg: rotationDeg,
		SizePx: [2]int{a.Width, a.Height}, ScaleNMPerPx: a.ScaleNMPerPx, SkewDeg: a.SkewDeg,
	}
	for _, t := range a.Terraces {
		st := design.SurveyTerrace{RowsDeg: t.RowsDeg, PolygonNM: pts(t.Polygon), DimerNM: [2]float64{t.DimerNM.X, t.DimerNM.Y}}
		if t.UpFrom >= 0 {
			u := t.UpFrom
			st.UpFrom = &u
		}
		s.Terraces = append(s.Terraces, st)
	}
	for _, st := range a.Steps {
		s.Steps = append(s.Steps, design.SurveyStep{PolylineNM: pts(st.Polyline)})
	}
	for _, d := range a.Defects {
		kind := design.DefectDark
		if d.Bright {
			kind = design.DefectBright
		}
		h := d.HeightNM
		if a.ZSource == "" {
			h = 0 // grey levels, no height
		}
		s.Defects = append(s.Defects, design.SurveyDefect{
			AtNM: [2]float64{d.AtNM.X, d.AtNM.Y}, Kind: kind, HeightNM: h, SizeNM: d.SizeNM, Class: d.Class,
		})
	}
	return s
}

// AlignRotation returns the field angle, in (−45°, 45°], at which to lay
// the image so that the dimer rows of its largest terrace run along the
// field's x or y axis, whichever is nearer, as a design's terraces do.
func (a *Analysis) AlignRotation() float64 {
	r := -a.RotationDeg
	for r <= -45 {
		r += 90
	}
	for r > 45 {
		r -= 90
	}
	return r
}

// RowsInField returns the direction the largest terrace's rows take in
// the field when the image is laid at rotationDeg.
func (a *Analysis) RowsInField(rotationDeg float64) lattice.RowDirection {
	angle := math.Mod(math.Abs(a.RotationDeg+rotationDeg), 180)
	if angle > 45 && angle < 135 {
		return lattice.RowsAlongY
	}
	return lattice.RowsAlongX
}

// Lay turns the analysis into the design's survey: where the old survey
// sat (when old is not nil), or else centred on the layout's core (the
// named regions, or every atomic-precision region) and turned so that
// the rows of the image's largest terrace run along the rows of the
// terrace under the core.
func (a *Analysis) Lay(l *design.Layout, old *design.Survey, image string, regions []string) *design.Survey {
	if old != nil {
		return a.DesignSurvey(image, r2.Point{X: old.OffsetNM[0], Y: old.OffsetNM[1]}, old.RotationDeg)
	}
	centre, terrace := coreCentre(l, regions)
	rot := a.AlignRotation()
	if terrace >= 0 && a.RowsInField(rot) != l.Surface.Terraces[terrace].Rows {
		rot += 90
		if rot > 90 {
			rot -= 180
		}
	}
	s := a.DesignSurvey(image, r2.Point{}, rot)
	mid := s.ToField(s.PixelToSurvey(float64(a.Width)/2, float64(a.Height)/2))
	s.OffsetNM = [2]float64{centre.X - mid.X, centre.Y - mid.Y}
	return s
}

// coreCentre returns the centre of the core's bounding box and the
// terrace at it (-1 off every terrace); the core is the named regions,
// or every atomic-precision region.
func coreCentre(l *design.Layout, regions []string) (r2.Point, int) {
	want := map[string]bool{}
	for _, n := range regions {
		want[n] = true
	}
	b := r2.EmptyRect()
	for i := range l.Regions {
		rl := &l.Regions[i]
		if len(regions) > 0 && !want[rl.Region.Name] {
			continue
		}
		if _, ap := design.KeepOutClass(rl); len(regions) == 0 && !ap {
			continue
		}
		if !rl.Bounds.IsEmpty() {
			b = b.Union(rl.Bounds)
		}
	}
	if b.IsEmpty() {
		b = l.Surface.Field
	}
	c := b.Center()
	return c, l.Surface.TerraceAt(c)
}
