// Package angle holds the one sine-and-cosine of an angle in degrees that
// the GDSII transforms (internal/gdsii) and the chip frame (lattice) share:
// exact at multiples of 90°, so a layout turned by a quarter turn lands on
// the same integer grid.
package angle

import "math"

// SinCos returns the sine and cosine of an angle in degrees, exactly 0
// and ±1 at multiples of 90° (math.Sincos of π/2 gives 6e-17, not 0).
func SinCos(deg float64) (s, c float64) {
	r := math.Mod(deg, 360)
	if r < 0 {
		r += 360
	}
	switch r {
	case 0:
		return 0, 1
	case 90:
		return 1, 0
	case 180:
		return 0, -1
	case 270:
		return -1, 0
	}
	return math.Sincos(r * math.Pi / 180)
}
