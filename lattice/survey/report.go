package survey

import (
	"math"

	"github.com/golang/geo/r2"
)

// Report is the analysis as the command line writes it with --json: one
// object whose keys scripts may rely on. Positions are in nm in the true
// frame (from the image's lower-left corner, x along the image's x axis,
// by the measured scale); a value the image does not measure is null.
type Report struct {
	File   string `json:"file"`
	SizePx [2]int `json:"size_px"`
	// ScaleNMPerPx is the measured scale in x and y, NominalNMPerPx the
	// one from the size given (null without one).
	ScaleNMPerPx   [2]float64  `json:"scale_nm_per_px"`
	ScaleSD        [2]*float64 `json:"scale_sd_nm_per_px"`
	NominalNMPerPx *[2]float64 `json:"nominal_nm_per_px"`
	// RotationDeg is the angle from the image's x axis to the dimer rows
	// of the largest terrace, counter-clockwise, in (−90, 90].
	RotationDeg float64  `json:"rotation_deg"`
	RotationSD  *float64 `json:"rotation_sd_deg"`
	// SkewDeg: the image's y axis leans from the normal to its x axis by
	// this angle towards +x.
	SkewDeg        float64         `json:"skew_deg"`
	SkewSD         *float64        `json:"skew_sd_deg"`
	DimersResolved bool            `json:"dimers_resolved"`
	ZScale         *string         `json:"z_scale"`
	NoiseNM        float64         `json:"noise_nm"`
	ThresholdSD    float64         `json:"threshold_sd"`
	Terraces       []TerraceReport `json:"terraces"`
	Steps          []StepReport    `json:"steps"`
	Defects        []DefectReport  `json:"defects"`
	Notes          []string        `json:"notes"`
}

// TerraceReport is one terrace of a Report.
type TerraceReport struct {
	RowsDeg   float64      `json:"rows_deg"`
	PolygonNM [][2]float64 `json:"polygon_nm"`
	// UpFrom is the index of the terrace this one is one step up from, or
	// null.
	UpFrom   *int     `json:"up_from"`
	HeightNM *float64 `json:"height_nm"`
	AreaNM2  float64  `json:"area_nm2"`
	// DimerNM is a dimer centre of its lattice (its lattice phase);
	// AlongKnown says whether its place along the rows was measured.
	DimerNM    [2]float64 `json:"dimer_nm"`
	AlongKnown bool       `json:"dimer_along_known"`
}

// StepReport is one step edge of a Report.
type StepReport struct {
	PolylineNM [][2]float64 `json:"polyline_nm"`
	Terraces   [2]int       `json:"terraces"`
	Upper      *int         `json:"upper"`
	HeightNM   *float64     `json:"height_nm"`
}

// DefectReport is one defect of a Report.
type DefectReport struct {
	AtNM           [2]float64 `json:"at_nm"`
	Kind           string     `json:"kind"`
	HeightNM       *float64   `json:"height_nm"`
	SizeNM         float64    `json:"size_nm"`
	Class          string     `json:"class"`
	Terrace        int        `json:"terrace"`
	SignificanceSD float64    `json:"significance_sd"`
}

// Report returns the analysis as its command-line JSON.
func (a *Analysis) Report() Report {
	num := func(v float64) *float64 {
		if math.IsNaN(v) || math.IsInf(v, 0) {
			return nil
		}
		return &v
	}
	height := func(v float64) *float64 {
		if a.ZSource == "" {
			return nil
		}
		return num(v)
	}
	pts := func(ps []r2.Point) [][2]float64 {
		out := make([][2]float64, len(ps))
		for i, p := range ps {
			out[i] = [2]float64{p.X, p.Y}
		}
		return out
	}
	r := Report{
		File: a.Name, SizePx: [2]int{a.Width, a.Height},
		ScaleNMPerPx: a.ScaleNMPerPx,
		ScaleSD:      [2]*float64{num(a.ScaleSD[0]), num(a.ScaleSD[1])},
		RotationDeg:  a.RotationDeg, RotationSD: num(a.RowsSD),
		SkewDeg: a.SkewDeg, SkewSD: num(a.SkewSD),
		DimersResolved: a.DimersResolved[0] || a.DimersResolved[1],
		NoiseNM:        a.NoiseNM, ThresholdSD: a.ThresholdSD,
		Terraces: []TerraceReport{}, Steps: []StepReport{}, Defects: []DefectReport{}, Notes: a.Notes,
	}
	if r.Notes == nil {
		r.Notes = []string{}
	}
	if a.NominalNMPerPx[0] > 0 {
		n := a.NominalNMPerPx
		r.NominalNMPerPx = &n
	}
	if a.ZSource != "" {
		z := a.ZSource
		r.ZScale = &z
	}
	for _, t := range a.Terraces {
		tr := TerraceReport{
			RowsDeg: t.RowsDeg, PolygonNM: pts(t.Polygon), HeightNM: height(t.HeightNM), AreaNM2: t.AreaNM2,
			DimerNM: [2]float64{t.DimerNM.X, t.DimerNM.Y}, AlongKnown: t.AlongKnown,
		}
		if t.UpFrom >= 0 {
			u := t.UpFrom
			tr.UpFrom = &u
		}
		r.Terraces = append(r.Terraces, tr)
	}
	for _, s := range a.Steps {
		sr := StepReport{PolylineNM: pts(s.Polyline), Terraces: s.Terraces}
		if s.Upper >= 0 {
			u := s.Upper
			sr.Upper = &u
			sr.HeightNM = height(s.HeightNM)
		}
		r.Steps = append(r.Steps, sr)
	}
	for _, d := range a.Defects {
		r.Defects = append(r.Defects, DefectReport{
			AtNM: [2]float64{d.AtNM.X, d.AtNM.Y}, Kind: d.Kind(), HeightNM: height(d.HeightNM),
			SizeNM: d.SizeNM, Class: d.Class, Terrace: d.Terrace, SignificanceSD: d.SignificanceSD,
		})
	}
	return r
}
