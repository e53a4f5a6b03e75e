package export

import (
	"context"
	"fmt"
	"io"
	"math"
	"strings"
	"time"

	"github.com/golang/geo/r2"

	"dimerpath/internal/gdsii"
	"dimerpath/lattice"
	"dimerpath/lattice/design"
)

// GDS units: a database unit of 1 pm (the lattice's 0.384 nm pitch
// needs sub-nm resolution) and a user unit of 1 nm.
const (
	GDSUserUnit      = 1e-3  // a database unit in user units (nm)
	GDSMetresPerUnit = 1e-12 // a database unit in metres
	gdsPerNM         = 1000  // database units per nm
)

// GDSOptions are what a GDSII export needs besides the layout.
type GDSOptions struct {
	// Layers is the layer table; the zero value takes DefaultGDSLayers.
	Layers GDSLayers
	// Chip places the STM field on the chip.
	Chip lattice.ChipFrame
	// Date is written as the library's modification time; the zero
	// time writes zeros, so the same inputs give the same bytes.
	Date time.Time
}

// GDSSummary counts what a GDSII export wrote.
type GDSSummary struct {
	Structures int // the top structure and the window cells
	Polygons   int // BOUNDARY elements
	Texts      int // TEXT labels
	// ArrayRefs are the AREFs written for arrays of windows, holding
	// ArrayWindows windows in all; Windows are the windows written one by
	// one.
	ArrayRefs, ArrayWindows, Windows int
	// SkippedWindows are windows left out because some of their dimers do
	// not exist on their terrace (the window-lattice check reports them).
	SkippedWindows int
	// Banded counts terrace outlines of a region cut into bands of rows
	// because one polygon would have more than a GDSII record's points.
	Banded int
}

// WriteGDSFile writes the layout as a GDSII library to path through a
// temporary file renamed into place; see GDSLibraryOf.
func WriteGDSFile(ctx context.Context, path string, l *design.Layout, opt GDSOptions) (GDSSummary, error) {
	lib, sum, err := GDSLibraryOf(ctx, l, opt)
	if err != nil {
		return sum, fmt.Errorf("%s: %w", path, err)
	}
	return sum, gdsii.WriteFile(path, lib)
}

// WriteGDS writes the layout as a GDSII stream to w; see GDSLibraryOf.
func WriteGDS(ctx context.Context, w io.Writer, l *design.Layout, opt GDSOptions) (GDSSummary, error) {
	lib, sum, err := GDSLibraryOf(ctx, l, opt)
	if err != nil {
		return sum, err
	}
	return sum, gdsii.Write(w, lib)
}

// GDSLibraryOf returns the layout as a GDSII library in chip
// coordinates (opt.Chip), database unit 1 pm, user unit 1 nm. The top
// structure, named after the design and variant, holds:
//   - the field and the scan field as rectangles;
//   - each terrace as the outline of its sites' cells (lattice.Outline),
//     on the terraces layer with data type base + terrace index;
//   - each fiducial as a cross MarkSizeNM across with its name as TEXT;
//   - each region as the outline of its sites' cells, merged per region
//     and terrace, holes joined in by zero-width cuts (GDSII polygons hold
//     no holes), on the layer of its role and drawn mode, with its name as
//     TEXT at the centre of its bounding box;
//   - each dopant window as a rectangle over its dimers' cells on the
//     windows layer, and each array of windows whose every copy is
//     written (on the lattice and not erased) as an AREF of a window cell
//     holding the window on the windows layer and on its region's layer;
//     those sites are then left out of the region's outline.
func GDSLibraryOf(ctx context.Context, l *design.Layout, opt GDSOptions) (*gdsii.Library, GDSSummary, error) {
	if opt.Layers.Regions == nil {
		opt.Layers = DefaultGDSLayers()
	}
	if err := opt.Chip.Validate(); err != nil {
		return nil, GDSSummary{}, err
	}
	g := &gdsBuilder{l: l, opt: opt, surf: l.Surface, cells: map[string]*gdsii.Structure{}}
	top := &gdsii.Structure{Name: topName(l.Design.Name, l.Variant.Name)}
	g.top = top
	lib := &gdsii.Library{
		Name: gdsName(l.Design.Name, "DIMERPATH", gdsii.MaxNameLen-3) + ".DB", UserUnit: GDSUserUnit, MetresPerUnit: GDSMetresPerUnit,
		Modified: opt.Date, Structures: []*gdsii.Structure{top},
	}
	ly := opt.Layers
	surf := l.Surface
	g.rect(ly.Field, surf.Field)
	scan := l.Rules.ScanFieldNM
	g.rect(ly.ScanField, r2.RectFromPoints(r2.Point{}, r2.Point{X: scan[0], Y: scan[1]}))

	all := lattice.NewSiteSet()
	surf.Paint(all, lattice.Rect{Rect: surf.Field})
	for t := range surf.Terraces {
		g.outline(GDSLayer{ly.Terraces.Layer, ly.Terraces.Datatype + int16(t)}, all, t)
	}
	for _, f := range l.Design.Fiducials {
		g.mark(ly.Fiducials, r2.Point{X: f.AtNM[0], Y: f.AtNM[1]}, f.Name)
	}
	for i := range l.Regions {
		if err := ctx.Err(); err != nil {
			return nil, g.sum, err
		}
		g.region(&l.Regions[i])
	}
	if g.err != nil {
		return nil, g.sum, g.err
	}
	for _, c := range g.cellOrder {
		lib.Structures = append(lib.Structures, g.cells[c])
	}
	g.sum.Structures = len(lib.Structures)
	return lib, g.sum, nil
}

type gdsBuilder struct {
	l         *design.Layout
	opt       GDSOptions
	surf      *lattice.Surface
	top       *gdsii.Structure
	cells     map[string]*gdsii.Structure
	cellOrder []string
	sum       GDSSummary
	err       error
}

// db returns the chip position of field point p in database units.
func (g *gdsBuilder) db(p r2.Point) gdsii.Point {
	return g.dbOf(g.opt.Chip.ToChip(p))
}

// dbOf converts a chip position in nm to database units.
func (g *gdsBuilder) dbOf(q r2.Point) gdsii.Point {
	x, y := math.Round(q.X*gdsPerNM), math.Round(q.Y*gdsPerNM)
	if math.Abs(x) > math.MaxInt32 || math.Abs(y) > math.MaxInt32 {
		if g.err == nil {
			g.err = fmt.Errorf("chip position (%.6g, %.6g) nm is beyond ±%.4g mm, the reach of 32-bit picometre coordinates: check --chip-offset", q.X, q.Y, math.MaxInt32*1e-9)
		}
		return gdsii.Point{}
	}
	return gdsii.Point{X: int32(x), Y: int32(y)}
}

func (g *gdsBuilder) polygon(s *gdsii.Structure, ly GDSLayer, ring []r2.Point, chip bool) {
	xy := make([]gdsii.Point, len(ring))
	for i, p := range ring {
		if chip {
			xy[i] = g.db(p)
		} else {
			xy[i] = g.dbOf(p)
		}
	}
	s.Boundaries = append(s.Boundaries, gdsii.Boundary{Layer: ly.Layer, Datatype: ly.Datatype, XY: xy})
	g.sum.Polygons++
}

func (g *gdsBuilder) rect(ly GDSLayer, r r2.Rect) {
	g.polygon(g.top, ly, []r2.Point{r.Lo(), {X: r.X.Hi, Y: r.Y.Lo}, r.Hi(), {X: r.X.Lo, Y: r.Y.Hi}}, true)
}

func (g *gdsBuilder) text(ly GDSLayer, at r2.Point, s string) {
	if len(s) > gdsii.MaxStringLen {
		s = s[:gdsii.MaxStringLen]
	}
	g.top.Texts = append(g.top.Texts, gdsii.Text{Layer: ly.Layer, TextType: ly.Datatype, At: g.db(at), String: s})
	g.sum.Texts++
}

// mark draws a cross MarkSizeNM across and a fifth of that wide at p,
// with the name as a label at its centre.
func (g *gdsBuilder) mark(ly GDSLayer, p r2.Point, name string) {
	a, w := g.opt.Layers.MarkSizeNM/2, g.opt.Layers.MarkSizeNM/10
	cross := []r2.Point{{X: w, Y: w}, {X: w, Y: a}, {X: -w, Y: a}, {X: -w, Y: w}, {X: -a, Y: w}, {X: -a, Y: -w},
		{X: -w, Y: -w}, {X: -w, Y: -a}, {X: w, Y: -a}, {X: w, Y: -w}, {X: a, Y: -w}, {X: a, Y: w}}
	for i := range cross {
		cross[i] = cross[i].Add(p)
	}
	g.polygon(g.top, ly, cross, true)
	g.text(ly, p, name)
}

// outline writes the outline of set's cells on terrace t; an outline
// with a polygon too long for one XY record is cut into bands of rows.
func (g *gdsBuilder) outline(ly GDSLayer, set *lattice.SiteSet, t int) {
	var emit func(r0, r1 int, polys []lattice.OutlinePolygon)
	emit = func(r0, r1 int, polys []lattice.OutlinePolygon) {
		fits := true
		for _, p := range polys {
			if len(p.Keyholed()) > gdsii.MaxXY-1 {
				fits = false
			}
		}
		if fits {
			for _, p := range polys {
				g.polygon(g.top, ly, p.Keyholed(), true)
			}
			return
		}
		if r1-r0 < 2 {
			if g.err == nil {
				g.err = fmt.Errorf("an outline on one dimer row of terrace %d has more than %d corners", t, gdsii.MaxXY-1)
			}
			return
		}
		mid := (r0 + r1) / 2
		emit(r0, mid, g.surf.OutlineRows(set, t, r0, mid))
		emit(mid, r1, g.surf.OutlineRows(set, t, mid, r1))
	}
	polys := g.surf.Outline(set, t)
	before := g.sum.Polygons
	emit(0, set.RowCount(t), polys)
	if g.sum.Polygons-before > len(polys) {
		g.sum.Banded++
	}
}

// region writes one region: its arrays of windows as AREFs where every
// copy is written, its other windows one by one, and the outline of the
// rest of its sites.
func (g *gdsBuilder) region(rl *design.RegionLayout) {
	ly := g.opt.Layers
	layer := ly.Region(rl.Region)
	rest := rl.Sites
	for i := range rl.Region.Shapes {
		sh := &rl.Region.Shapes[i]
		switch {
		case sh.Kind == design.ShapeWindow:
			if w, ok := g.place(sh); ok {
				g.window(w)
			}
		case sh.Kind == design.ShapeArray && sh.Array != nil && sh.Array.Of != nil && sh.Array.Of.Kind == design.ShapeWindow:
			w, ok := g.place(sh.Array.Of)
			if !ok {
				continue
			}
			a := sh.Array
			sites := lattice.NewSiteSet()
			for j := 0; j < a.Rows; j++ {
				for i := 0; i < a.Cols; i++ {
					w.Shifted(i*a.PitchDimers, j*a.PitchRows).AddTo(sites)
				}
			}
			if w.FirstDimer >= 0 && sites.Clone().Difference(rl.Sites).IsEmpty() {
				g.aref(w, a, layer)
				if rest == rl.Sites {
					rest = rl.Sites.Clone()
				}
				rest.Difference(sites)
				continue
			}
			for j := 0; j < a.Rows; j++ {
				for i := 0; i < a.Cols; i++ {
					g.window(w.Shifted(i*a.PitchDimers, j*a.PitchRows))
				}
			}
		}
	}
	for t := range g.surf.Terraces {
		g.outline(layer, rest, t)
	}
	if !rl.Bounds.IsEmpty() {
		g.text(layer, rl.Bounds.Center(), rl.Region.Name)
	}
}

func (g *gdsBuilder) place(sh *design.Shape) (lattice.Window, bool) {
	t, ok := g.l.Templates[sh.Template]
	if !ok || len(sh.Points) < 1 {
		return lattice.Window{}, false
	}
	return g.surf.PlaceWindow(t, r2.Point{X: sh.Points[0][0], Y: sh.Points[0][1]})
}

// windowRect returns the rectangle of a window's dimer cells centred on
// the origin, in the field's orientation.
func (g *gdsBuilder) windowRect(w lattice.Window) r2.Rect {
	half := g.surf.Terraces[w.Terrace].Rows.Join(float64(w.Template.Dimers)*lattice.DimerPitch/2, lattice.RowSpacing/2)
	return r2.RectFromCenterSize(r2.Point{}, half.Mul(2))
}

func (g *gdsBuilder) window(w lattice.Window) {
	if !g.surf.WindowExists(w) {
		g.sum.SkippedWindows++
		return
	}
	r := g.windowRect(w)
	c := g.surf.WindowCentre(w)
	g.rect(g.opt.Layers.Windows, r2.RectFromCenterSize(c, r.Size()))
	g.sum.Windows++
}

// aref writes an array of windows as AREFs of a window cell (more than
// one when the array has more than 32767 columns or rows).
func (g *gdsBuilder) aref(w lattice.Window, a *design.Array, layer GDSLayer) {
	along := g.surf.Terraces[w.Terrace].Rows
	name := fmt.Sprintf("WIN%d%s_%d_%d", w.Template.Dimers, strings.ToUpper(along.String()), layer.Layer, layer.Datatype)
	if _, ok := g.cells[name]; !ok {
		cell := &gdsii.Structure{Name: name}
		r := g.windowRect(w)
		ring := []r2.Point{r.Lo(), {X: r.X.Hi, Y: r.Y.Lo}, r.Hi(), {X: r.X.Lo, Y: r.Y.Hi}}
		g.polygon(cell, g.opt.Layers.Windows, ring, false)
		g.polygon(cell, layer, ring, false)
		g.cells[name] = cell
		g.cellOrder = append(g.cellOrder, name)
	}
	c0 := g.surf.WindowCentre(w)
	d0 := g.surf.DimerCentre(w.Terrace, w.Row, w.FirstDimer)
	colStep := g.surf.DimerCentre(w.Terrace, w.Row, w.FirstDimer+1).Sub(d0).Mul(float64(a.PitchDimers))
	rowStep := g.surf.DimerCentre(w.Terrace, w.Row+1, w.FirstDimer).Sub(d0).Mul(float64(a.PitchRows))
	nCols, nRows := a.Cols, a.Rows
	if along == lattice.RowsAlongY {
		// GDSII columns step along the cell's x axis and rows along its
		// y axis (gdspy reads an AREF no other way): on a terrace with
		// rows along y the array's rows are the GDSII columns.
		nCols, nRows, colStep, rowStep = nRows, nCols, rowStep, colStep
	}
	const most = math.MaxInt16
	for j0 := 0; j0 < nRows; j0 += most {
		for i0 := 0; i0 < nCols; i0 += most {
			cols, rows := min(most, nCols-i0), min(most, nRows-j0)
			o := c0.Add(colStep.Mul(float64(i0))).Add(rowStep.Mul(float64(j0)))
			ref := gdsii.Ref{
				Name: name, Cols: cols, Rows: rows,
				Origin: g.db(o),
				ColEnd: g.db(o.Add(colStep.Mul(float64(cols)))),
				RowEnd: g.db(o.Add(rowStep.Mul(float64(rows)))),
				Trans:  gdsii.Transform{AngleDeg: g.opt.Chip.RotationDeg},
			}
			g.top.Refs = append(g.top.Refs, ref)
			g.sum.ArrayRefs++
			g.sum.ArrayWindows += cols * rows
		}
	}
}

// gdsName turns s into a name of at most maxLen characters from the
// manual's set (letters, digits, _ ? $), or fallback when nothing is
// left; names starting WIN are kept for window cells.
func gdsName(s, fallback string, maxLen int) string {
	var b strings.Builder
	for _, r := range s {
		if b.Len() >= maxLen {
			break
		}
		switch {
		case r >= 'A' && r <= 'Z', r >= 'a' && r <= 'z', r >= '0' && r <= '9', r == '_', r == '?', r == '$':
			b.WriteRune(r)
		default:
			b.WriteByte('_')
		}
	}
	out := strings.Trim(b.String(), "_")
	if out == "" || strings.HasPrefix(out, "WIN") {
		out = strings.TrimRight(fallback+"_"+out, "_")
		out = out[:min(len(out), maxLen)]
	}
	return out
}

// topName names the top structure after the design and variant, the
// variant kept whole where it can be.
func topName(designName, variant string) string {
	v := gdsName(variant, "V", gdsii.MaxNameLen/2)
	return gdsName(designName, "TOP", gdsii.MaxNameLen-len(v)-1) + "_" + v
}
