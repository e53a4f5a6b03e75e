package render

import (
	"sort"

	"dimerpath/lattice"
)

// coverage levels: a pixel's share of painted sites is shown in this
// many steps.
const levels = 16

// drawCoverage draws each pixel by the share of its sites that are
// painted, using popcounts over each pixel's index range of each row.
func (r *Renderer) drawCoverage(sc *Scene, v View) {
	w := v.W
	clear(r.total)
	clear(r.best)
	clear(r.owner)
	nt := len(sc.Surface.Terraces)
	for li, L := range sc.Layers {
		if L.Sites == nil || li >= maxLayers {
			continue
		}
		x0, y0, x1, y1 := screenBox(L.Bounds, v)
		if x0 >= x1 {
			continue
		}
		for t := 0; t < min(nt, L.Sites.TerraceCount()); t++ {
			tb := &r.tabs[t]
			setRows := L.Sites.RowCount(t)
			if setRows == 0 {
				continue
			}
			for y := y0; y < y1; y++ {
				terr := r.terr[y*w : y*w+w]
				// line is all zero here; the pixels [tx0, tx1) are the
				// ones this row may have counted into, cleared again after
				// the merge.
				line := r.line
				any := false
				tx0, tx1 := x1, x0
				if tb.alongOfX {
					rr := tb.across[y]
					hi := min(int(rr.hi), setRows)
					if int(rr.lo) >= hi {
						continue
					}
					for row := int(rr.lo); row < hi; row++ {
						words := L.Sites.Row(t, row)
						fd, ld := words.DimerExtent(lattice.BothSides)
						if fd < 0 {
							continue
						}
						first, last := 2*fd, 2*ld+2 // in-row indices [first, last) of the painted dimers
						// Only the pixels over the row's painted span: along
						// grows with x on a RowsAlongX terrace.
						xa := x0 + sort.Search(x1-x0, func(i int) bool { return int(tb.along[x0+i].hi) > first })
						xb := x0 + sort.Search(x1-x0, func(i int) bool { return int(tb.along[x0+i].lo) >= last })
						tx0, tx1 = min(tx0, xa), max(tx1, xb)
						n := words.End()
						for x := xa; x < xb; x++ {
							if int(terr[x]) != t {
								continue
							}
							a := tb.along[x]
							lo, hi := int(a.lo), min(int(a.hi), n)
							if lo >= hi {
								continue
							}
							if c := uint32(words.Count(lo, hi)); c != 0 {
								line[x] += c
								any = true
							}
						}
					}
				} else {
					a := tb.along[y]
					if a.lo >= a.hi {
						continue
					}
					tx0, tx1 = x0, x1
					for x := x0; x < x1; x++ {
						if int(terr[x]) != t {
							continue
						}
						rr := tb.across[x]
						var c uint32
						for row := int(rr.lo); row < min(int(rr.hi), setRows); row++ {
							c += uint32(L.Sites.Row(t, row).Count(int(a.lo), int(a.hi)))
						}
						if c != 0 {
							line[x] = c
							any = true
						}
					}
				}
				if !any {
					continue
				}
				base := y * w
				for x := tx0; x < tx1; x++ {
					c := line[x]
					if c == 0 {
						continue
					}
					line[x] = 0
					c = min(c, 0xffff)
					i := base + x
					r.total[i] = uint16(min(uint32(r.total[i])+c, 0xffff))
					if uint16(c) > r.best[i] {
						r.best[i] = uint16(c)
						r.owner[i] = uint16(li + 1)
					}
				}
			}
		}
	}
	r.buildLUT(sc)
	bg := r.background()
	// Per pixel row, each terrace's background: constant along the row
	// for RowsAlongX terraces, per column for RowsAlongY.
	var rowBG [128]uint32
	nt = min(nt, len(rowBG))
	for y := range v.H {
		for t := range nt {
			tb := &r.tabs[t]
			if tb.alongOfX {
				rowBG[t] = bg.terrace[t%len(ColTerrace)][tb.shade[y]]
			}
		}
		base := y * w
		terr := r.terr[base : base+w]
		total := r.total[base : base+w]
		pix := r.pix[base : base+w]
		for x, t := range terr {
			if t < 0 {
				if t == -2 {
					pix[x] = bg.outside
				} else {
					pix[x] = bg.noTerrace
				}
				continue
			}
			tb := &r.tabs[t]
			n := total[x]
			if n == 0 {
				if tb.alongOfX {
					pix[x] = rowBG[t]
				} else {
					pix[x] = bg.terrace[int(t)%len(ColTerrace)][tb.shade[x]]
				}
				continue
			}
			var a, c rng
			if tb.alongOfX {
				a, c = tb.along[x], tb.across[y]
			} else {
				a, c = tb.along[y], tb.across[x]
			}
			capacity := uint32(a.hi-a.lo) * uint32(c.hi-c.lo)
			if capacity == 0 {
				pix[x] = bg.noTerrace
				continue
			}
			lvl := (uint32(n)*levels + capacity - 1) / capacity
			if lvl > levels {
				lvl = levels
			}
			pix[x] = r.lut[int(r.owner[base+x]-1)*(levels+1)+int(lvl)]
			r.stats.Pixels++
		}
	}
}

type backgrounds struct {
	outside, noTerrace uint32
	terrace            [][3]uint32
}

// background returns the packed background colours, computed once.
func (r *Renderer) background() *backgrounds {
	if r.bg != nil {
		return r.bg
	}
	b := &backgrounds{outside: packRGBA(ColOutside), noTerrace: packRGBA(ColNoTerrace)}
	b.terrace = make([][3]uint32, len(ColTerrace))
	for i, c := range ColTerrace {
		// plain, trough between rows, hatch line
		b.terrace[i] = [3]uint32{packRGBA(c), packRGBA(Mix(c, RGB(0, 0, 0), 0.3)), packRGBA(Mix(c, ColHatch, 0.6))}
	}
	r.bg = b
	return b
}

// buildLUT fills the colour of every (layer, coverage level).
func (r *Renderer) buildLUT(sc *Scene) {
	n := len(sc.Layers) * (levels + 1)
	r.lut = grow(r.lut, n)
	for li, L := range sc.Layers {
		c := sc.layerColor(L)
		for l := 0; l <= levels; l++ {
			f := 0.3 + 0.7*float64(l)/levels
			r.lut[li*(levels+1)+l] = packRGBA(Mix(ColTerrace[0], c, f))
		}
	}
}
