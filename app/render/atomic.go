package render

import (
	"math"

	"dimerpath/lattice"
)

// Atomic-mode geometry, in nm: the drawn radius of an H site and the
// half-width of the dimer bond between the two sites of a dimer.
const (
	siteRadius   = 0.105
	bondHalfWide = 0.045
)

func (r *Renderer) buildAtomicTables(tb *axisTables, nAlong, nAcross int, alongStart, alongDir, acrossStart, acrossDir, s float64) {
	tb.aDimer = grow(tb.aDimer, nAlong)
	tb.aDu2 = grow(tb.aDu2, nAlong)
	tb.aBond = grow(tb.aBond, nAlong)
	tb.cRow = grow(tb.cRow, nAcross)
	tb.cSide = grow(tb.cSide, nAcross)
	tb.cDv2 = grow(tb.cDv2, nAcross)
	tb.cBond = grow(tb.cBond, nAcross)
	nDim := tb.nIdx / 2
	dmin, dmax := math.MaxInt, -1
	for i := range nAlong {
		a := alongStart + alongDir*(float64(i)+0.5)*s
		d := int(math.Round(a / lattice.DimerPitch))
		du := a - lattice.DimerAlong(d)
		if d < 0 || d >= nDim {
			tb.aDimer[i] = -1
			continue
		}
		tb.aDimer[i] = int32(d)
		tb.aDu2[i] = float32(du * du)
		tb.aBond[i] = math.Abs(du) < bondHalfWide
		dmin, dmax = min(dmin, d), max(dmax, d)
	}
	rmin, rmax := math.MaxInt, -1
	for j := range nAcross {
		c := acrossStart + acrossDir*(float64(j)+0.5)*s
		row := int(math.Round(c / lattice.RowSpacing))
		dc := c - lattice.RowAcross(row)
		if row < 0 || row >= tb.nRows {
			tb.cRow[j] = -1
			continue
		}
		tb.cRow[j] = int32(row)
		if dc >= 0 {
			tb.cSide[j] = 1
		} else {
			tb.cSide[j] = 0
		}
		dv := math.Abs(dc) - lattice.HOffset
		tb.cDv2[j] = float32(dv * dv)
		tb.cBond[j] = math.Abs(dc) < lattice.HOffset
		rmin, rmax = min(rmin, row), max(rmax, row)
	}
	if dmax < 0 || rmax < 0 {
		tb.r0, tb.r1, tb.i0, tb.i1 = 0, -1, 0, -1
		return
	}
	tb.r0, tb.r1 = rmin, rmax
	tb.i0, tb.i1 = 2*dmin, 2*dmax+1
}

// drawAtomic draws every visible H site as a dot (clean: faint; painted:
// its region's colour), the dimer bond between the two sites of each
// dimer, and the troughs between dimer rows.
func (r *Renderer) drawAtomic(sc *Scene, v View) {
	surf := sc.Surface
	nt := len(surf.Terraces)
	// Owner of every visible site, per terrace.
	total := 0
	for t := range nt {
		tb := &r.tabs[t]
		tb.gridOff = total
		if tb.r1 >= tb.r0 {
			total += (tb.r1 - tb.r0 + 1) * (tb.i1 - tb.i0 + 1)
		}
	}
	r.grid = grow(r.grid, total)
	clear(r.grid)
	for li, L := range sc.Layers {
		if L.Sites == nil || li >= maxLayers {
			continue
		}
		for t := 0; t < min(nt, L.Sites.TerraceCount()); t++ {
			tb := &r.tabs[t]
			ni := tb.i1 - tb.i0 + 1
			for row := tb.r0; row <= tb.r1; row++ {
				g := r.grid[tb.gridOff+(row-tb.r0)*ni:]
				for idx := range L.Sites.Row(t, row).Sites(tb.i0, tb.i1+1, lattice.BothSides) {
					g[idx-tb.i0] = uint16(li + 1)
				}
			}
		}
	}
	// Colours: per layer dot, bond and tint (the cell around a painted
	// site), then the clean ones.
	r.alut = grow(r.alut, 3*len(sc.Layers))
	base := ColTerrace[0]
	for li, L := range sc.Layers {
		c := sc.layerColor(L)
		r.alut[3*li] = packRGBA(c)
		r.alut[3*li+1] = packRGBA(Mix(base, c, 0.6))
		r.alut[3*li+2] = packRGBA(Mix(base, c, 0.22))
	}
	bg := r.background()
	cleanH, bond := packRGBA(ColCleanH), packRGBA(ColBond)
	const r2max = float32(siteRadius * siteRadius)
	w := v.W
	for y := range v.H {
		for x := range w {
			i := y*w + x
			t := r.terr[i]
			if t < 0 {
				if t == -2 {
					r.pix[i] = bg.outside
				} else {
					r.pix[i] = bg.noTerrace
				}
				continue
			}
			tb := &r.tabs[t]
			ai, ci := x, y
			if !tb.alongOfX {
				ai, ci = y, x
			}
			d, row := tb.aDimer[ai], tb.cRow[ci]
			if d < 0 || row < 0 {
				r.pix[i] = bg.noTerrace
				continue
			}
			idx := 2*int(d) + int(tb.cSide[ci])
			o := r.grid[tb.gridOff+(int(row)-tb.r0)*(tb.i1-tb.i0+1)+idx-tb.i0]
			switch {
			case tb.aDu2[ai]+tb.cDv2[ci] < r2max:
				if o > 0 {
					r.pix[i] = r.alut[3*int(o-1)]
					r.stats.Pixels++
				} else {
					r.pix[i] = cleanH
				}
			case tb.aBond[ai] && tb.cBond[ci]:
				if o > 0 {
					r.pix[i] = r.alut[3*int(o-1)+1]
				} else {
					r.pix[i] = bond
				}
			case o > 0:
				r.pix[i] = r.alut[3*int(o-1)+2]
			default:
				r.pix[i] = bg.terrace[int(t)%len(ColTerrace)][tb.shade[ci]&1]
			}
		}
	}
}
