package planner

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestBandMemo: bandMemo and uFactorMemo give band's and uFactor's
// values bit for bit, with sites far beyond a piece's ends (where Φ
// leaves fastPhi's table) at a few repeated offsets and at fresh ones.
func TestBandMemo(t *testing.T) {
	rng := rand.New(rand.NewPCG(25, 26))
	m := newTailMemo()
	const sigma, lo, hi = 0.7, 10.0, 13.5
	p := piece{kind: pieceParallel, a0: lo, a1: hi, sigma: sigma}
	offsets := []float64{8.2806, 9.0, 10.92, 12.8, 20.5, 3, 0.5}
	for range 50000 {
		off := offsets[rng.IntN(len(offsets))] * sigma
		if rng.IntN(3) == 0 {
			off = rng.Float64() * 40 * sigma
		}
		x := hi + off
		if rng.IntN(2) == 0 {
			x = lo - off
		}
		if got, want := bandMemo(lo, hi, sigma, x, m), band(lo, hi, sigma, x); math.Float64bits(got) != math.Float64bits(want) {
			t.Fatalf("bandMemo at %v = %v, band %v", x, got, want)
		}
		if got, want := p.uFactorMemo(x, m), p.uFactor(x); math.Float64bits(got) != math.Float64bits(want) {
			t.Fatalf("uFactorMemo at %v = %v, uFactor %v", x, got, want)
		}
	}
}
