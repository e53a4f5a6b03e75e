// Package designtest builds large designs in code for benchmarks and
// tests, so that no package stores them: the million-window donor array
// of the scale benchmarks (issue 14 §2) and its smaller and larger
// siblings.
package designtest

import (
	"fmt"

	"dimerpath/lattice"
	"dimerpath/lattice/design"
)

// Array pitch of WindowArray: an As window is 2 dimers, so 3 dimers
// along the row leave the one intact dimer the window-spacing rule asks
// between windows, and 2 rows across leave one clean row between them
// (the rule's facing rows): the densest array the default rules allow.
const (
	ArrayPitchDimers = 3
	ArrayPitchRows   = 2
	// arrayMarginNM is the clear margin around the array, inside which
	// the four fiducials sit.
	arrayMarginNM = 40
)

// WindowArray returns a design of one variant ("array") with one donor
// region ("donors") holding cols x rows arsenic windows (built-in As
// template: 2 dimers, 4 H sites) at ArrayPitchDimers x ArrayPitchRows,
// on one terrace with its rows along x, a fiducial in each corner of the
// field, and a field (and scan field rule) just large enough: 1000 x
// 1000 gives 10^6 windows and 4·10^6 sites on a 1.23 x 1.62 µm field.
// Fields beyond the default 2 µm scan field (2000 x 2000 windows: 2.4 x
// 3.2 µm) need a profile with a larger limits.scan_field_nm (FieldNM).
func WindowArray(cols, rows int) *design.Design {
	w := float64(cols*ArrayPitchDimers)*lattice.DimerPitch + 2*arrayMarginNM
	h := float64(rows*ArrayPitchRows)*lattice.RowSpacing + 2*arrayMarginNM
	w, h = roundUp(w), roundUp(h)
	scan := [2]float64{w, h}
	return &design.Design{
		Format: design.FormatName, Version: design.FormatVersion,
		Name:  fmt.Sprintf("As array %d x %d", cols, rows),
		Field: design.Field{WidthNM: w, HeightNM: h},
		Rules: &design.Rules{ScanFieldNM: &scan},
		Fiducials: []design.Fiducial{
			{Name: "SW", AtNM: [2]float64{15, 15}}, {Name: "SE", AtNM: [2]float64{w - 15, 15}},
			{Name: "NW", AtNM: [2]float64{15, h - 15}}, {Name: "NE", AtNM: [2]float64{w - 15, h - 15}},
		},
		Variants: []design.Variant{{Name: "array", Regions: []design.Region{{
			Name: "donors", Role: design.RoleDonor, Mode: design.ModeAP, Species: "As",
			Shapes: []design.Shape{{Kind: design.ShapeArray, Array: &design.Array{
				// The first window's centre: a dimer centre inside the margin.
				Of:          &design.Shape{Kind: design.ShapeWindow, Template: "As", Points: [][2]float64{{arrayMarginNM + lattice.DimerPitch, arrayMarginNM}}},
				Cols:        cols,
				Rows:        rows,
				PitchDimers: ArrayPitchDimers,
				PitchRows:   ArrayPitchRows,
			}}},
		}}}},
	}
}

// roundUp rounds a field side up to whole 10 nm.
func roundUp(x float64) float64 {
	return float64(int(x/10)+1) * 10
}

// FieldNM returns the longer side of d's field in nm: the scan field a
// profile must allow to plan it.
func FieldNM(d *design.Design) float64 {
	return max(d.Field.WidthNM, d.Field.HeightNM)
}
