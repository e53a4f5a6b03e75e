package synth

import (
	"math"
	"testing"
)

// TestLayerLattice checks the dimer lattices derived from the diamond
// structure against hand arithmetic on it: the row spacing √2·a and dimer
// pitch a/√2 (CODATA-derived 0.768 and 0.384 nm), rows turned by 90° from
// one atomic layer to the next, and the registry across a step: the layer
// above moves the dimer centres across its own rows by a quarter row
// spacing, the layer below along its own rows by half a dimer pitch.
func TestLayerLattice(t *testing.T) {
	base, up, down := layerLattice(0), layerLattice(1), layerLattice(-1)
	for name, l := range map[string]crystalLayer{"base": base, "up": up, "down": down} {
		if math.Abs(l.acrossLen-math.Sqrt2) > 1e-12 || math.Abs(l.alongLen-1/math.Sqrt2) > 1e-12 {
			t.Errorf("%s: row spacing %g a, pitch %g a; want √2 a and a/√2", name, l.acrossLen, l.alongLen)
		}
	}
	if d := base.along[0]*up.along[0] + base.along[1]*up.along[1]; math.Abs(d) > 1e-12 {
		t.Errorf("rows do not turn by 90° one layer up: along·along = %g", d)
	}
	if d := base.along[0]*down.along[0] + base.along[1]*down.along[1]; math.Abs(d) > 1e-12 {
		t.Errorf("rows do not turn by 90° one layer down: along·along = %g", d)
	}
	// Offsets of the new centres from the base lattice, in the new
	// terrace's own (along, across) frame, reduced to the base lattice's
	// periods projected there (pitch a/√2 across, since the base rows run
	// along the new across direction; row spacing √2·a along).
	rel := func(l crystalLayer) (along, across float64) {
		d := [2]float64{l.centre[0] - base.centre[0], l.centre[1] - base.centre[1]}
		along = d[0]*l.along[0] + d[1]*l.along[1]
		across = d[0]*l.across[0] + d[1]*l.across[1]
		return math.Mod(math.Abs(along), 1/math.Sqrt2), math.Mod(math.Abs(across), 1/math.Sqrt2)
	}
	q := math.Sqrt2 / 4 // a quarter row spacing = half a pitch, in units of a
	if a, x := rel(up); math.Abs(a) > 1e-12 || math.Abs(x-q) > 1e-12 {
		t.Errorf("step up: centres move (along %g, across %g) a mod a/√2; want (0, %g)", a, x, q)
	}
	if a, x := rel(down); math.Abs(a-q) > 1e-12 || math.Abs(x) > 1e-12 {
		t.Errorf("step down: centres move (along %g, across %g) a mod a/√2; want (%g, 0)", a, x, q)
	}
	if h := hOffset(); math.Abs(h-0.177) > 0.005 {
		t.Errorf("H offset %g nm, far from the 1.77 Å of the literature", h)
	}
}
