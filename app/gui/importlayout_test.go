package gui

import (
	"testing"

	"github.com/golang/geo/r2"
)

func TestFrameOf(t *testing.T) {
	f, err := frameOf(" 5000", "-7000.5", "90")
	if err != nil || f.OffsetNM != (r2.Point{X: 5000, Y: -7000.5}) || f.RotationDeg != 90 {
		t.Errorf("frameOf = %+v, %v", f, err)
	}
	for _, bad := range [][3]string{{"x", "0", "0"}, {"0", "NaN", "0"}, {"0", "0", "Inf"}, {"1e12", "0", "0"}} {
		if _, err := frameOf(bad[0], bad[1], bad[2]); err == nil {
			t.Errorf("frameOf%v accepted", bad)
		}
	}
}
