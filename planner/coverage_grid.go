package planner

import (
	"math"

	"github.com/golang/geo/r1"
	"github.com/golang/geo/r2"

	"dimerpath/lattice"
)

// terraceGrid marks, in cells of terraceCellNM, where each terrace of a
// many-terrace surface lies (with a one-cell margin), so that a stroke
// piece is only rasterised onto the rows of terraces it comes near.
type terraceGrid struct {
	nx, ny int
	cells  [][]bool // [terrace][cell]
}

const terraceCellNM = 20.0

func newTerraceGrid(surf *lattice.Surface) *terraceGrid {
	g := &terraceGrid{nx: int(math.Ceil(surf.Width()/terraceCellNM)) + 1, ny: int(math.Ceil(surf.Height()/terraceCellNM)) + 1}
	g.cells = make([][]bool, len(surf.Terraces))
	raw := make([][]bool, len(surf.Terraces))
	for t := range raw {
		raw[t] = make([]bool, g.nx*g.ny)
		g.cells[t] = make([]bool, g.nx*g.ny)
	}
	// Each cell is sampled at its corners, edge midpoints and centre:
	// points every half cell, each shared by the cells that meet there.
	sx, sy := 2*g.nx+1, 2*g.ny+1
	at := make([]int8, sx*sy) // terrace indices are below lattice.MaxTerraces (64)
	for j := range sy {
		for i := range sx {
			p := r2.Point{X: min(float64(i)*(terraceCellNM/2), surf.Width()), Y: min(float64(j)*(terraceCellNM/2), surf.Height())}
			at[j*sx+i] = int8(surf.TerraceAt(p))
		}
	}
	for j := 0; j < g.ny; j++ {
		for i := 0; i < g.nx; i++ {
			for dj := range 3 {
				for di := range 3 {
					if t := int(at[(2*j+dj)*sx+2*i+di]); t >= 0 {
						raw[t][j*g.nx+i] = true
					}
				}
			}
		}
	}
	for t := range raw {
		for j := 0; j < g.ny; j++ {
			for i := 0; i < g.nx; i++ {
				if !raw[t][j*g.nx+i] {
					continue
				}
				for dj := -1; dj <= 1; dj++ {
					for di := -1; di <= 1; di++ {
						if ii, jj := i+di, j+dj; ii >= 0 && jj >= 0 && ii < g.nx && jj < g.ny {
							g.cells[t][jj*g.nx+ii] = true
						}
					}
				}
			}
		}
	}
	return g
}

// reaches reports whether the piece a→b comes near terrace t: some point
// of it, sampled every half cell, lies in a cell marked for t (cells
// carry a one-cell margin of 20 nm, more than any footprint's reach).
func (g *terraceGrid) reaches(t int, a, b r2.Point) bool {
	L := b.Sub(a).Norm()
	steps := max(1, int(math.Ceil(L/(terraceCellNM/2))))
	for k := 0; k <= steps; k++ {
		p := a.Add(b.Sub(a).Mul(float64(k) / float64(steps)))
		if g.marked(t, int(math.Floor(p.X/terraceCellNM)), int(math.Floor(p.Y/terraceCellNM))) {
			return true
		}
	}
	return false
}

func (g *terraceGrid) marked(t, i, j int) bool {
	return i >= 0 && j >= 0 && i < g.nx && j < g.ny && g.cells[t][j*g.nx+i]
}

// holds reports whether the box of r may hold a site of its terrace.
func (g *terraceGrid) holds(surf *lattice.Surface, r siteRect) bool {
	box := surf.Frame(r.t).FieldRect(r1.Interval{Lo: r.u0, Hi: r.u1}, r1.Interval{Lo: r.y0, Hi: r.y1})
	i0, i1 := int(math.Floor(box.X.Lo/terraceCellNM)), int(math.Floor(box.X.Hi/terraceCellNM))
	j0, j1 := int(math.Floor(box.Y.Lo/terraceCellNM)), int(math.Floor(box.Y.Hi/terraceCellNM))
	for j := max(j0, 0); j <= j1 && j < g.ny; j++ {
		for i := max(i0, 0); i <= i1 && i < g.nx; i++ {
			if g.cells[r.t][j*g.nx+i] {
				return true
			}
		}
	}
	return false
}
