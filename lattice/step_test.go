package lattice

import (
	"fmt"
	"math"
	"testing"

	"github.com/golang/geo/r2"
)

// This file checks Terrace.AcrossStep against the diamond structure
// itself, built atom by atom: silicon is an FCC lattice (cubic constant
// a) with a two-atom basis at (0,0,0) and (¼,¼,¼)a. A (001) terrace
// whose top layer lies at z = k·a/4 has lost the layer at (k+1)·a/4;
// each top atom keeps two bonds pointing to that removed layer (its
// dangling bonds), and two top atoms that shared a removed atom pair up
// into a dimer along those bonds. So every dimer centre lies under a
// removed atom, the dimer bond runs along the dangling bonds, and the
// dimer rows run across them. Nothing here uses dimerpath's own lattice
// constants: only a and the atoms.

// codataA is the silicon lattice constant in nm, CODATA 2018
// (5.431 020 511(89) Å).
const codataA = 0.5431020511

// vec3 is a position in units of a.
type vec3 struct{ x, y, z float64 }

// diamondAtoms returns every atom of the diamond lattice with |x|, |y| ≤
// n and z within [z0, z1] (units of a).
func diamondAtoms(n int, z0, z1 float64) []vec3 {
	fcc := []vec3{{0, 0, 0}, {0.5, 0.5, 0}, {0.5, 0, 0.5}, {0, 0.5, 0.5}}
	basis := []vec3{{0, 0, 0}, {0.25, 0.25, 0.25}}
	var out []vec3
	for i := -n; i <= n; i++ {
		for j := -n; j <= n; j++ {
			for k := int(math.Floor(z0)) - 1; k <= int(math.Ceil(z1))+1; k++ {
				for _, f := range fcc {
					for _, b := range basis {
						p := vec3{float64(i) + f.x + b.x, float64(j) + f.y + b.y, float64(k) + f.z + b.z}
						if math.Abs(p.x) <= float64(n) && math.Abs(p.y) <= float64(n) && p.z >= z0-1e-9 && p.z <= z1+1e-9 {
							out = append(out, p)
						}
					}
				}
			}
		}
	}
	return out
}

// terraceDimers returns, for the terrace whose top layer lies at z = k/4
// (units of a), the in-plane positions of all dimer centres of both
// registries and the in-plane direction of the dimer bonds (a unit
// vector): the two top atoms bonded to each atom of the removed layer
// k+1 pair into a dimer (nearest neighbours lie √3/4·a apart).
func terraceDimers(t *testing.T, k int) (centres []r2.Point, bond r2.Point) {
	t.Helper()
	top, removed := float64(k)/4, float64(k+1)/4
	atoms := diamondAtoms(6, top, removed)
	const nn2 = 3.0 / 16 // squared bond length, a²
	for _, r := range atoms {
		if math.Abs(r.z-removed) > 1e-9 {
			continue
		}
		var pair []vec3
		for _, s := range atoms {
			if math.Abs(s.z-top) > 1e-9 {
				continue
			}
			d := vec3{s.x - r.x, s.y - r.y, s.z - r.z}
			if math.Abs(d.x*d.x+d.y*d.y+d.z*d.z-nn2) < 1e-9 {
				pair = append(pair, s)
			}
		}
		if len(pair) != 2 {
			continue // at the edge of the block
		}
		mid := r2.Point{X: (pair[0].x + pair[1].x) / 2, Y: (pair[0].y + pair[1].y) / 2}
		if mid.Sub(r2.Point{X: r.x, Y: r.y}).Norm() > 1e-9 {
			t.Fatalf("layer %d: dimer centre %v is not under the removed atom %v", k, mid, r)
		}
		centres = append(centres, mid)
		b := r2.Point{X: pair[1].x - pair[0].x, Y: pair[1].y - pair[0].y}
		b = b.Mul(1 / b.Norm())
		if bond == (r2.Point{}) {
			bond = b
		} else if math.Abs(math.Abs(b.Dot(bond))-1) > 1e-9 {
			t.Fatalf("layer %d: dimer bonds %v and %v are not parallel", k, bond, b)
		}
	}
	if len(centres) < 100 {
		t.Fatalf("layer %d: only %d dimer centres", k, len(centres))
	}
	return centres, bond
}

// crystalMap puts the crystal's in-plane positions (units of a) into the
// field (nm): the rows of the lower terrace (across its dimer bonds) along
// x, its dimer bonds along ±y (flip), with the crystal point c0 (one of
// its dimer centres) at the field point o.
type crystalMap struct {
	rows, bond r2.Point // unit vectors in the crystal plane
	c0, o      r2.Point
}

func (m crystalMap) field(c r2.Point) r2.Point {
	d := c.Sub(m.c0).Mul(codataA)
	return m.o.Add(r2.Point{X: d.Dot(m.rows), Y: d.Dot(m.bond)})
}

func (m crystalMap) dir(c r2.Point) r2.Point { return r2.Point{X: c.Dot(m.rows), Y: c.Dot(m.bond)} }

// nearestTo returns the distance from p to the nearest of ps.
func nearestTo(ps []r2.Point, p r2.Point) float64 {
	best := math.Inf(1)
	for _, q := range ps {
		best = math.Min(best, q.Sub(p).Norm())
	}
	return best
}

// nearestPoint returns the one of ps nearest p.
func nearestPoint(ps []r2.Point, p r2.Point) r2.Point {
	best := ps[0]
	for _, q := range ps {
		if q.Sub(p).Norm() < best.Sub(p).Norm() {
			best = q
		}
	}
	return best
}

// latticeCentres returns the field positions of the dimer centres of
// terrace t within radius nm of its offset.
func latticeCentres(t Terrace, radius float64) []r2.Point {
	f := t.Frame()
	var out []r2.Point
	n := int(radius/0.38) + 1
	for r := -n; r <= n; r++ {
		for d := -2 * n; d <= 2*n; d++ {
			p := f.ToField(float64(d)*codataA/math.Sqrt2, float64(r)*codataA*math.Sqrt2)
			if p.Sub(t.Offset).Norm() <= radius {
				out = append(out, p)
			}
		}
	}
	return out
}

func TestAcrossStepMatchesDiamondLattice(t *testing.T) {
	for k := range 4 { // the four layers of the cubic cell: both sublattices, both orientations
		lowC, lowBond := terraceDimers(t, k)
		upC, upBond := terraceDimers(t, k+1)
		downC, downBond := terraceDimers(t, k-1)
		rows := r2.Point{X: -lowBond.Y, Y: lowBond.X}
		for _, flip := range []float64{1, -1} {
			for _, turn := range []float64{1, -1} {
				name := fmt.Sprintf("top layer %d, rows %+g, bonds %+g", k, turn, flip)
				t.Run(name, func(t *testing.T) {
					low := Terrace{Name: "low", Rows: RowsAlongX, Offset: r2.Point{X: 0.1, Y: 0.3}}
					m := crystalMap{rows: rows.Mul(turn), bond: lowBond.Mul(flip), c0: nearestPoint(lowC, r2.Point{}), o: low.Offset}
					field := func(cs []r2.Point) []r2.Point {
						out := make([]r2.Point, len(cs))
						for i, c := range cs {
							out[i] = m.field(c)
						}
						return out
					}
					// The map itself: the lower terrace's lattice is the
					// crystal's, one registry of it.
					lowF := field(lowC)
					for _, p := range latticeCentres(low, 2) {
						if d := nearestTo(lowF, p); d > 1e-9 {
							t.Fatalf("lower terrace dimer centre %v is %.3g nm from every crystal dimer centre", p, d)
						}
					}
					for _, c := range []struct {
						dir     StepDirection
						centres []r2.Point
						bond    r2.Point
					}{{StepUp, upC, upBond}, {StepDown, downC, downBond}} {
						want := field(c.centres)
						got := low.AcrossStep(c.dir)
						// Rows run across the dimer bonds: along y now.
						if b := m.dir(c.bond); got.Rows != RowsAlongY || math.Abs(b.X) < 1-1e-9 {
							t.Errorf("step %v: rows %v, crystal dimer bond along %v (want rows y, bonds x)", c.dir, got.Rows, b)
						}
						for _, reg := range []float64{0, RowSpacing / 2} {
							ter := got
							ter.Offset = ter.Offset.Add(ter.Rows.Join(0, reg))
							for _, p := range latticeCentres(ter, 2) {
								if d := nearestTo(want, p); d > 1e-9 {
									t.Fatalf("step %v (registry +%g nm): dimer centre %v is %.3g nm from every crystal dimer centre", c.dir, reg, p, d)
								}
							}
						}
						// The other direction's lattice misses every dimer
						// centre by a/2 (0.27 nm).
						wrong := low.AcrossStep(1 - c.dir)
						off := math.Inf(1)
						for _, p := range latticeCentres(wrong, 2) {
							off = math.Min(off, nearestTo(want, p))
						}
						if math.Abs(off-codataA/2) > 1e-9 {
							t.Errorf("step %v built as %v: dimer centres %.4f nm off, want a/2 = %.4f nm", c.dir, 1-c.dir, off, codataA/2)
						}
					}
				})
			}
		}
	}
}
