package survey

import (
	"math"
	"slices"
)

// Shade returns the topograph as grey levels for display, one byte a
// pixel, line 0 at the bottom: a plane taken out robustly and each scan
// line's median subtracted (the usual levelling, common practice), then
// the levels between the 1st and the 99th percentile spread over 0–255,
// so the dimer rows show whatever the file's unit or range.
func Shade(t *Topograph) []uint8 {
	g := toGrid(t)
	// What levelling leaves below this is rounding, not relief.
	flat := 0.0
	for _, v := range g.v {
		flat = max(flat, math.Abs(v))
	}
	flat *= 1e-9
	subtractPlane(g)
	line := make([]float64, g.w)
	for j := 0; j < g.h; j++ {
		row := g.v[j*g.w : (j+1)*g.w]
		copy(line, row)
		m := median(line)
		for i := range row {
			row[i] -= m
		}
	}
	step := max(1, len(g.v)/200000)
	sample := make([]float64, 0, len(g.v)/step+1)
	for i := 0; i < len(g.v); i += step {
		sample = append(sample, g.v[i])
	}
	slices.Sort(sample)
	lo, hi := sample[len(sample)/100], sample[len(sample)-1-len(sample)/100]
	out := make([]uint8, len(g.v))
	if !(hi-lo > flat) {
		for i := range out {
			out[i] = 128
		}
		return out
	}
	k := 255 / (hi - lo)
	for i, v := range g.v {
		out[i] = uint8(math.Round(min(max((v-lo)*k, 0), 255)))
	}
	return out
}
