package lattice

import (
	"math/rand/v2"
	"testing"

	"github.com/golang/geo/r2"
)

// Painting a PolygonUnion gives the sites a brute-force test of every
// site against every polygon gives (inside any one of them), across a
// step where the rows turn.
func TestPolygonUnionMatchesBruteForce(t *testing.T) {
	s := twoTerraces(t)
	rng := rand.New(rand.NewPCG(11, 13))
	for trial := range 20 {
		var polys []Polygon
		n := 1 + rng.IntN(40)
		for range n {
			c := r2.Point{X: 200 * rng.Float64(), Y: 100 * rng.Float64()}
			size := 0.5 + 15*rng.Float64()*rng.Float64()
			k := 3 + rng.IntN(4)
			var p Polygon
			for range k {
				p = append(p, c.Add(r2.Point{X: size * (rng.Float64() - 0.5), Y: size * (rng.Float64() - 0.5)}))
			}
			polys = append(polys, p)
		}
		u := NewPolygonUnion(polys)
		got := NewSiteSet()
		s.Paint(got, u)
		want := bruteForce(s, func(p r2.Point) bool {
			for _, q := range polys {
				if PolygonContains(q, p) {
					return true
				}
			}
			return false
		})
		// Sites within 1e-9 nm of an edge may fall either way.
		if d := symmetricDifference(got, want); d != 0 {
			t.Errorf("trial %d (%d polygons): %d sites differ from the brute-force test", trial, n, d)
		}
	}
}
