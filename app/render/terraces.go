package render

import (
	"math"
	"slices"

	"github.com/golang/geo/r2"

	"dimerpath/lattice"
)

// axisTables holds, for one terrace, the lattice range each pixel column
// and pixel row covers. For a RowsAlongX terrace the columns give site
// indices along the row and the pixel rows give dimer rows; for
// RowsAlongY the other way round.
type axisTables struct {
	// along and across are indexed by column or row depending on the
	// terrace's direction (see alongOfX).
	along, across []rng
	shade         []uint8 // per across pixel: 0 plain, 1 trough, 2 hatch
	alongOfX      bool    // along indexes columns (RowsAlongX)
	nRows, nIdx   int
	// Atomic mode.
	aDimer []int32 // nearest dimer per along pixel, -1 outside
	aDu2   []float32
	aBond  []bool
	cRow   []int32 // nearest row per across pixel, -1 outside
	cSide  []uint8
	cDv2   []float32
	cBond  []bool
	// Visible window of the owner grid.
	r0, r1, i0, i1 int
	gridOff        int
}

// rng is a half-open range [lo, hi) of rows or site indices.
type rng struct{ lo, hi int32 }

// prepareTerraces sets r.terr to the terrace of every pixel (by pixel
// centre) and builds each terrace's axis tables. Terraces with a
// boundary are scan-converted row by row; the first terrace that holds a
// point wins, as in lattice.Surface.TerraceAt.
func (r *Renderer) prepareTerraces(surf *lattice.Surface, v View) {
	w, h := v.W, v.H
	nt := len(surf.Terraces)
	if len(r.tabs) < nt {
		r.tabs = append(r.tabs, make([]axisTables, nt-len(r.tabs))...)
	}
	fallback := -1
	for i := range surf.Terraces {
		if len(surf.Terraces[i].Boundary) < 3 {
			fallback = i
			break
		}
	}
	// Field extent in pixels.
	fx0, fy1 := v.ToScreen(r2.Point{X: 0, Y: 0})
	fx1, fy0 := v.ToScreen(r2.Point{X: surf.Width(), Y: surf.Height()})
	cx0, cx1 := pixelSpan(fx0, fx1, w)
	cy0, cy1 := pixelSpan(fy0, fy1, h)
	base := int8(-1)
	if fallback >= 0 {
		base = int8(fallback)
	}
	for y := range h {
		row := r.terr[y*w : y*w+w]
		if y < cy0 || y >= cy1 {
			fill(row, -2)
			continue
		}
		fill(row[:cx0], -2)
		fill(row[cx0:cx1], base)
		fill(row[cx1:], -2)
	}
	// Bounded terraces, last first, so the first one ends on top.
	for t := nt - 1; t >= 0; t-- {
		poly := surf.Terraces[t].Boundary
		if len(poly) < 3 {
			continue
		}
		for y := cy0; y < cy1; y++ {
			yc := v.ToField(0, float64(y)+0.5).Y
			r.xs = r.xs[:0]
			j := len(poly) - 1
			for i := range poly {
				a, b := poly[i], poly[j]
				if (a.Y > yc) != (b.Y > yc) {
					r.xs = append(r.xs, a.X+(yc-a.Y)*(b.X-a.X)/(b.Y-a.Y))
				}
				j = i
			}
			slices.Sort(r.xs)
			row := r.terr[y*w : y*w+w]
			for k := 0; k+1 < len(r.xs); k += 2 {
				sx0, _ := v.ToScreen(r2.Point{X: r.xs[k]})
				sx1, _ := v.ToScreen(r2.Point{X: r.xs[k+1]})
				a, b := pixelSpan(sx0, sx1, w)
				a, b = max(a, cx0), min(b, cx1)
				if a < b {
					fill(row[a:b], int8(t))
				}
			}
		}
	}
	for t := range nt {
		r.buildTables(surf, t, v)
	}
}

// pixelSpan returns the pixels [a, b) whose centres lie in [x0, x1),
// clipped to [0, n).
func pixelSpan(x0, x1 float64, n int) (int, int) {
	a := int(math.Ceil(x0 - 0.5))
	b := int(math.Ceil(x1 - 0.5))
	return min(max(a, 0), n), min(max(b, 0), n)
}

// buildTables fills r.tabs[t] for the view.
func (r *Renderer) buildTables(surf *lattice.Surface, t int, v View) {
	tb := &r.tabs[t]
	tb.alongOfX = surf.Terraces[t].Rows == lattice.RowsAlongX
	tb.nRows = surf.RowCount(t)
	tb.nIdx = lattice.SitesPerDimer * surf.DimerCount(t)
	// The top-left corner of the frame in the terrace's lattice frame:
	// the along and across coordinates of the left edge of column 0 and
	// the top edge of row 0. Along grows with x on a RowsAlongX terrace
	// and falls with the pixel row on a RowsAlongY one (y is down).
	alongStart, acrossStart := surf.Frame(t).ToLocal(v.ToField(0, 0))
	var nAlong, nAcross int
	var alongDir, acrossDir float64
	if tb.alongOfX {
		nAlong, nAcross = v.W, v.H
		alongDir, acrossDir = 1, -1
	} else {
		nAlong, nAcross = v.H, v.W
		alongDir, acrossDir = -1, 1
	}
	s := v.Scale
	tb.along = growRng(tb.along, nAlong)
	tb.across = growRng(tb.across, nAcross)
	tb.shade = grow(tb.shade, nAcross)
	nDim := tb.nIdx / 2
	for i := range nAlong {
		lo, hi := alongStart+alongDir*float64(i)*s, alongStart+alongDir*float64(i+1)*s
		if lo > hi {
			lo, hi = hi, lo
		}
		d0, d1 := cellRange(lo, hi, lattice.DimerPitch, nDim)
		tb.along[i] = rng{int32(2 * d0), int32(2 * d1)}
	}
	// Row-direction hatching every few rows when single rows are too
	// fine to see; the pitch is a whole number of rows so the hatch
	// moves with the lattice.
	hatchRows := 0
	if s > lattice.RowSpacing/3 {
		hatchRows = int(math.Ceil(14 * s / lattice.RowSpacing))
	}
	for i := range nAcross {
		lo, hi := acrossStart+acrossDir*float64(i)*s, acrossStart+acrossDir*float64(i+1)*s
		if lo > hi {
			lo, hi = hi, lo
		}
		r0, r1 := cellRange(lo, hi, lattice.RowSpacing, tb.nRows)
		tb.across[i] = rng{int32(r0), int32(r1)}
		mid := (lo + hi) / 2 / lattice.RowSpacing
		var sh uint8
		switch {
		case hatchRows > 0:
			// A hatch line on the pixel holding the centre of a row whose
			// number is a multiple of hatchRows.
			hr := float64(hatchRows)
			m := math.Floor(math.Floor(hi/lattice.RowSpacing)/hr) * hr
			if m >= math.Ceil(lo/lattice.RowSpacing) && m >= 0 {
				sh = 2
			}
		case math.Abs(mid-math.Round(mid)) > 0.36:
			sh = 1
		}
		tb.shade[i] = sh
	}
	if s <= atomicScale {
		r.buildAtomicTables(tb, nAlong, nAcross, alongStart, alongDir, acrossStart, acrossDir, s)
	}
}

// cellRange returns the lattice cells [a, b) of pitch p that a pixel
// covering [lo, hi) shows, clipped to [0, n): the cells whose centres it
// holds when the pixel is larger than a cell, else the one cell under
// its centre.
func cellRange(lo, hi, p float64, n int) (int, int) {
	var a, b int
	if hi-lo >= p {
		a, b = int(math.Ceil(lo/p)), int(math.Ceil(hi/p))
	} else {
		a = int(math.Round((lo + hi) / 2 / p))
		b = a + 1
	}
	a, b = max(a, 0), min(b, n)
	if a >= b {
		return 0, 0
	}
	return a, b
}
