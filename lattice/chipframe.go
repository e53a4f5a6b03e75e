package lattice

import (
	"fmt"
	"math"

	"github.com/golang/geo/r2"

	"dimerpath/internal/angle"
)

// ChipFrame places the STM field on the chip: a field point p lies at
// Offset + R(RotationDeg)·p in chip coordinates (nm), R the
// counter-clockwise rotation. The chip frame is the one a mask layout
// (GDSII) is drawn in; the identity frame puts the field's lower-left
// corner at the chip origin.
type ChipFrame struct {
	OffsetNM    r2.Point
	RotationDeg float64
}

// sinCos returns the rotation's sine and cosine, exact at multiples of
// 90°.
func (f ChipFrame) sinCos() (s, c float64) { return angle.SinCos(f.RotationDeg) }

// ToChip returns the chip position of field point p.
func (f ChipFrame) ToChip(p r2.Point) r2.Point {
	s, c := f.sinCos()
	return r2.Point{X: f.OffsetNM.X + c*p.X - s*p.Y, Y: f.OffsetNM.Y + s*p.X + c*p.Y}
}

// ToField returns the field position of chip point q.
func (f ChipFrame) ToField(q r2.Point) r2.Point {
	s, c := f.sinCos()
	d := q.Sub(f.OffsetNM)
	return r2.Point{X: c*d.X + s*d.Y, Y: -s*d.X + c*d.Y}
}

// Validate returns an error for an offset or angle that is not finite.
func (f ChipFrame) Validate() error {
	if !finite(f.OffsetNM.X) || !finite(f.OffsetNM.Y) {
		return fmt.Errorf("chip offset %v nm is not finite", f.OffsetNM)
	}
	if !finite(f.RotationDeg) {
		return fmt.Errorf("chip rotation %g° is not finite", f.RotationDeg)
	}
	return nil
}

// ChipFrameFromMarks returns the frame that carries two field points
// (fiducials) onto two chip points (the same marks in the layout): the
// rotation of the vector between them and the offset that puts their
// midpoints together. It also returns the ratio of the chip distance to
// the field distance, 1 for a layout drawn at the field's scale, so the
// caller can refuse marks that do not match. The two field points must
// be apart.
func ChipFrameFromMarks(fieldA, fieldB, chipA, chipB r2.Point) (f ChipFrame, scale float64, err error) {
	df, dc := fieldB.Sub(fieldA), chipB.Sub(chipA)
	if df.Norm() == 0 || dc.Norm() == 0 {
		return ChipFrame{}, 0, fmt.Errorf("the two marks coincide: they give no direction")
	}
	rot := math.Atan2(dc.Y, dc.X) - math.Atan2(df.Y, df.X)
	deg := math.Mod(rot*180/math.Pi, 360)
	if deg < 0 {
		deg += 360
	}
	f = ChipFrame{RotationDeg: deg}
	midF := fieldA.Add(fieldB).Mul(0.5)
	midC := chipA.Add(chipB).Mul(0.5)
	f.OffsetNM = midC.Sub(f.ToChip(midF))
	return f, dc.Norm() / df.Norm(), nil
}
