package lattice

import (
	"math"
	"testing"

	"github.com/golang/geo/r2"
)

func TestChipFrame(t *testing.T) {
	f := ChipFrame{OffsetNM: r2.Point{X: 100, Y: -50}, RotationDeg: 90}
	// A quarter turn counter-clockwise takes (1, 0) to (0, 1).
	if got := f.ToChip(r2.Point{X: 1, Y: 0}); got != (r2.Point{X: 100, Y: -49}) {
		t.Errorf("ToChip(1, 0) = %v, want (100, -49)", got)
	}
	for _, deg := range []float64{0, 30, 90, 180, 270, -45, 1e3} {
		f := ChipFrame{OffsetNM: r2.Point{X: 3e5, Y: 7}, RotationDeg: deg}
		p := r2.Point{X: 1234.5, Y: -67.25}
		if back := f.ToField(f.ToChip(p)); back.Sub(p).Norm() > 1e-9 {
			t.Errorf("%g°: ToField(ToChip(%v)) = %v", deg, p, back)
		}
	}
}

func TestChipFrameFromMarks(t *testing.T) {
	want := ChipFrame{OffsetNM: r2.Point{X: -2500, Y: 40000}, RotationDeg: 33}
	a, b := r2.Point{X: 300, Y: 1000}, r2.Point{X: 1700, Y: 1000}
	got, scale, err := ChipFrameFromMarks(a, b, want.ToChip(a), want.ToChip(b))
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(got.RotationDeg-33) > 1e-9 || got.OffsetNM.Sub(want.OffsetNM).Norm() > 1e-6 || math.Abs(scale-1) > 1e-12 {
		t.Errorf("frame %+v scale %g, want %+v scale 1", got, scale, want)
	}
	if _, _, err := ChipFrameFromMarks(a, a, a, b); err == nil {
		t.Error("coinciding field marks accepted")
	}
}
