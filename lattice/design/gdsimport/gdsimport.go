// Package gdsimport brings a mask layout (GDSII) into a design: it reads
// a library (internal/gdsii), flattens its hierarchy with every
// reference's reflection, rotation and magnification, keeps the layers
// asked for, maps them from chip to field coordinates (a given offset and
// rotation, or two named marks matched to two fiducials), and either
// keeps them as a reference overlay (design.Reference) or rasterises them
// onto the lattice as a region's sites.
//
// Coordinates: the layout's database units are converted to nm with the
// library's own UNITS (metres per database unit), so a layout drawn in
// µm user units reads the same as one in nm. Chip and field frames are
// related by lattice.ChipFrame. Paths become polygons: each segment a
// rectangle its width wide, extended by half the width at joints and,
// for path types 1 and 2, at the ends (a round end is taken as square).
package gdsimport

import (
	"errors"
	"fmt"
	"io"
	"math"
	"os"
	"path/filepath"
	"slices"
	"strconv"
	"strings"

	"github.com/golang/geo/r2"

	"dimerpath/internal/gdsii"
	"dimerpath/internal/jsonfile"
	"dimerpath/lattice"
	"dimerpath/lattice/design"
)

// Layer selects layout elements by layer and, unless AnyDatatype, by
// data type.
type Layer struct {
	Layer, Datatype int16
	AnyDatatype     bool
}

// ParseLayer reads "L" (every data type of layer L) or "L/D".
func ParseLayer(s string) (Layer, error) {
	ls, ds, hasD := strings.Cut(strings.TrimSpace(s), "/")
	l, err := strconv.ParseInt(ls, 10, 16)
	if err != nil || l < 0 {
		return Layer{}, fmt.Errorf("layer %q: want L or L/D, whole numbers 0 to 32767", s)
	}
	if !hasD {
		return Layer{Layer: int16(l), AnyDatatype: true}, nil
	}
	d, err := strconv.ParseInt(ds, 10, 16)
	if err != nil || d < 0 {
		return Layer{}, fmt.Errorf("layer %q: want L or L/D, whole numbers 0 to 32767", s)
	}
	return Layer{Layer: int16(l), Datatype: int16(d)}, nil
}

func (l Layer) String() string {
	if l.AnyDatatype {
		return strconv.Itoa(int(l.Layer))
	}
	return fmt.Sprintf("%d/%d", l.Layer, l.Datatype)
}

func (l Layer) matches(layer, datatype int16) bool {
	return l.Layer == layer && (l.AnyDatatype || l.Datatype == datatype)
}

// Polygon is a flattened layout polygon in chip nm.
type Polygon struct {
	Layer, Datatype int16
	Points          []r2.Point
}

// Label is a flattened TEXT element in chip nm.
type Label struct {
	Text            string
	Layer, TextType int16
	At              r2.Point
}

// Layout is a layout read and flattened: the polygons of the chosen
// layers and every label, in chip nm.
type Layout struct {
	File     string
	Top      string // the structure flattened, or "" for every top structure
	Layers   []Layer
	Polygons []Polygon
	Labels   []Label
	// Found counts the polygons and paths of every layer/data type in the
	// library's structures (each element once, not per placement), so a
	// caller can say which layers exist when the chosen ones hold nothing.
	Found map[string]int
	// Paths is how many of the polygons came from PATH elements.
	Paths int
	// ZeroWidthPaths are paths left out: they cover nothing.
	ZeroWidthPaths int
	// Skipped counts elements read but not imported (BOX, NODE).
	Skipped map[string]int
}

// Options say what to read.
type Options struct {
	Layers []Layer // the layers to import; at least one
	Top    string  // the structure to flatten; "" takes every top structure
	Limits gdsii.FlattenLimits
}

// MaxFileBytes is the largest layout ReadFile, Inspect and Read take:
// far more than the cells around one scan field hold (the largest field
// is 20 µm across), and small enough that a layout at the limit is read
// in seconds. A larger file is refused by its size before it is read.
const MaxFileBytes = 256 << 20

// readLimits are gdsii's default limits within MaxFileBytes.
var readLimits = func() gdsii.ReadLimits {
	l := gdsii.DefaultReadLimits
	l.Bytes = MaxFileBytes
	return l
}()

// openLayout opens the layout at path, refusing a regular file larger
// than MaxFileBytes by its size; errors name the file.
func openLayout(path string) (*os.File, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	if st, err := f.Stat(); err == nil && st.Mode().IsRegular() && st.Size() > MaxFileBytes {
		f.Close()
		return nil, fmt.Errorf("%s: the file holds %s, more than the %s limit for a GDSII layout (save the cells around the scan field as a layout of their own)",
			path, jsonfile.Bytes(st.Size()), jsonfile.Bytes(MaxFileBytes))
	}
	return f, nil
}

// ReadFile reads the layout at path; errors name the file.
func ReadFile(path string, opt Options) (*Layout, error) {
	f, err := openLayout(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	return Read(f, path, opt)
}

// Read reads a layout from r (name is used in errors). It refuses a
// stream gdsii.Read refuses, an unknown top structure, and expansions
// beyond the limits, naming the file, record and byte offset.
func Read(r io.Reader, name string, opt Options) (*Layout, error) {
	if len(opt.Layers) == 0 {
		return nil, errors.New("no layer chosen: give at least one layer to import")
	}
	lib, err := gdsii.ReadLimited(r, readLimits)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", name, err)
	}
	nmPerUnit := lib.MetresPerUnit * 1e9
	want := func(layer, datatype int16) bool {
		return slices.ContainsFunc(opt.Layers, func(l Layer) bool { return l.matches(layer, datatype) })
	}
	flat, err := lib.Flatten(opt.Top, gdsii.FlattenOptions{Keep: want, KeepText: func(int16, int16) bool { return true }, Limits: opt.Limits})
	if err != nil {
		return nil, fmt.Errorf("%s: %w", name, err)
	}
	out := &Layout{File: name, Top: opt.Top, Layers: opt.Layers, Skipped: lib.Skipped, Found: found(lib)}
	nm := func(v gdsii.Vec) r2.Point { return r2.Point{X: v.X * nmPerUnit, Y: v.Y * nmPerUnit} }
	// One backing array for every polygon's points: a flattened array of
	// 10^6 windows would otherwise cost 10^6 allocations.
	n := 0
	for _, p := range flat.Polygons {
		n += len(p.XY)
	}
	backing := make([]r2.Point, 0, n)
	out.Polygons = make([]Polygon, 0, len(flat.Polygons))
	for _, p := range flat.Polygons {
		start := len(backing)
		for _, v := range p.XY {
			backing = append(backing, nm(v))
		}
		out.Polygons = append(out.Polygons, Polygon{Layer: p.Layer, Datatype: p.Datatype, Points: backing[start:len(backing):len(backing)]})
	}
	for _, p := range flat.Paths {
		pts := make([]r2.Point, len(p.XY))
		for i, v := range p.XY {
			pts[i] = nm(v)
		}
		quads := pathQuads(pts, p.Width*nmPerUnit, p.PathType)
		if len(quads) == 0 {
			out.ZeroWidthPaths++
		}
		for _, q := range quads {
			out.Polygons = append(out.Polygons, Polygon{Layer: p.Layer, Datatype: p.Datatype, Points: q})
			out.Paths++
		}
	}
	for _, t := range flat.Texts {
		out.Labels = append(out.Labels, Label{Text: t.String, Layer: t.Layer, TextType: t.TextType, At: nm(t.At)})
	}
	return out, nil
}

// found counts the polygons and paths per layer/data type of every
// structure, each element once (not per placement): enough to name the
// layers a layout has.
func found(lib *gdsii.Library) map[string]int {
	counts := map[string]int{}
	for _, s := range lib.Structures {
		for _, b := range s.Boundaries {
			counts[fmt.Sprintf("%d/%d", b.Layer, b.Datatype)]++
		}
		for _, p := range s.Paths {
			counts[fmt.Sprintf("%d/%d", p.Layer, p.Datatype)]++
		}
	}
	return counts
}

// pathQuads returns a path's segments as rectangles w wide, extended by
// w/2 at joints and, for path types 1 and 2, at the path's ends.
func pathQuads(pts []r2.Point, w float64, pathType int16) [][]r2.Point {
	if !(w > 0) || len(pts) < 2 {
		return nil
	}
	var out [][]r2.Point
	h := w / 2
	for i := 0; i+1 < len(pts); i++ {
		a, b := pts[i], pts[i+1]
		d := b.Sub(a)
		n := d.Norm()
		if n == 0 {
			continue
		}
		u := d.Mul(1 / n)
		if i > 0 || pathType == 1 || pathType == 2 {
			a = a.Sub(u.Mul(h))
		}
		if i+2 < len(pts) || pathType == 1 || pathType == 2 {
			b = b.Add(u.Mul(h))
		}
		v := u.Ortho().Mul(h)
		out = append(out, []r2.Point{a.Sub(v), b.Sub(v), b.Add(v), a.Add(v)})
	}
	return out
}

// Mark pairs a label of the layout with a fiducial of the design.
type Mark struct{ Label, Fiducial string }

// ParseMarks reads "LABEL=FIDUCIAL,LABEL=FIDUCIAL": two layout labels
// and the fiducials they stand for.
func ParseMarks(s string) ([2]Mark, error) {
	parts := strings.Split(s, ",")
	var m [2]Mark
	if len(parts) != 2 {
		return m, fmt.Errorf("%q: want two pairs, LABEL=FIDUCIAL,LABEL=FIDUCIAL", s)
	}
	for i, p := range parts {
		l, f, ok := strings.Cut(p, "=")
		if !ok || strings.TrimSpace(l) == "" || strings.TrimSpace(f) == "" {
			return m, fmt.Errorf("%q: want two pairs, LABEL=FIDUCIAL,LABEL=FIDUCIAL", s)
		}
		m[i] = Mark{Label: strings.TrimSpace(l), Fiducial: strings.TrimSpace(f)}
	}
	return m, nil
}

// MarkScaleTolerance is how far the distance between two marks on the
// chip may differ from that between their fiducials in the field, as a
// fraction: beyond it the marks do not match or the layout is scaled.
const MarkScaleTolerance = 0.01

// FrameFromMarks returns the chip frame that carries the two fiducials
// onto the two labels of the layout with the given texts. Each label
// must occur exactly once; the distances must agree within
// MarkScaleTolerance.
func (l *Layout) FrameFromMarks(d *design.Design, marks [2]Mark) (lattice.ChipFrame, error) {
	var chip, field [2]r2.Point
	for i, m := range marks {
		n := 0
		for _, lab := range l.Labels {
			if lab.Text == m.Label {
				chip[i] = lab.At
				n++
			}
		}
		switch n {
		case 0:
			return lattice.ChipFrame{}, fmt.Errorf("%s: no label %q in the layout (it has %s)", l.File, m.Label, l.labelList())
		case 1:
		default:
			return lattice.ChipFrame{}, fmt.Errorf("%s: label %q occurs %d times: a mark must be named once", l.File, m.Label, n)
		}
		j := slices.IndexFunc(d.Fiducials, func(f design.Fiducial) bool { return f.Name == m.Fiducial })
		if j < 0 {
			names := make([]string, len(d.Fiducials))
			for k, f := range d.Fiducials {
				names[k] = strconv.Quote(f.Name)
			}
			return lattice.ChipFrame{}, fmt.Errorf("design %q has no fiducial %q (it has %s)", d.Name, m.Fiducial, strings.Join(names, ", "))
		}
		field[i] = r2.Point{X: d.Fiducials[j].AtNM[0], Y: d.Fiducials[j].AtNM[1]}
	}
	f, scale, err := lattice.ChipFrameFromMarks(field[0], field[1], chip[0], chip[1])
	if err != nil {
		return f, fmt.Errorf("marks %q and %q: %v", marks[0].Label, marks[1].Label, err)
	}
	if math.Abs(scale-1) > MarkScaleTolerance {
		return f, fmt.Errorf("marks %q and %q are %.1f nm apart on the chip but fiducials %q and %q %.1f nm apart in the field (%.2f%% off, more than %.0f%%): wrong marks, or a layout drawn at another scale",
			marks[0].Label, marks[1].Label, chip[1].Sub(chip[0]).Norm(), marks[0].Fiducial, marks[1].Fiducial, field[1].Sub(field[0]).Norm(), 100*math.Abs(scale-1), 100*MarkScaleTolerance)
	}
	return f, nil
}

func (l *Layout) labelList() string {
	seen := map[string]bool{}
	var names []string
	for _, lab := range l.Labels {
		if !seen[lab.Text] && len(names) < 10 {
			seen[lab.Text] = true
			names = append(names, strconv.Quote(lab.Text))
		}
	}
	if len(names) == 0 {
		return "no labels"
	}
	return strings.Join(names, ", ")
}

// FieldPolygons returns the layout's polygons in field nm through f.
func (l *Layout) FieldPolygons(f lattice.ChipFrame) []lattice.Polygon {
	n := 0
	for _, p := range l.Polygons {
		n += len(p.Points)
	}
	backing := make([]r2.Point, 0, n)
	out := make([]lattice.Polygon, len(l.Polygons))
	for i, p := range l.Polygons {
		start := len(backing)
		for _, v := range p.Points {
			backing = append(backing, f.ToField(v))
		}
		out[i] = lattice.Polygon(backing[start:len(backing):len(backing)])
	}
	return out
}

// Sites rasterises the layout's polygons, mapped through f, onto surf:
// every existing site whose position lies inside one of them
// (lattice.PolygonUnion).
func (l *Layout) Sites(surf *lattice.Surface, f lattice.ChipFrame) *lattice.SiteSet {
	set := lattice.NewSiteSet()
	surf.Paint(set, lattice.NewPolygonUnion(l.FieldPolygons(f)))
	return set
}

// Reference returns the layout as a design reference named name,
// mapped through f.
func (l *Layout) Reference(name string, f lattice.ChipFrame) design.Reference {
	r := design.Reference{Name: name, File: l.File, ChipOffsetNM: [2]float64{f.OffsetNM.X, f.OffsetNM.Y}, ChipRotationDeg: f.RotationDeg}
	for _, ly := range l.Layers {
		r.Layers = append(r.Layers, ly.String())
	}
	for _, p := range l.FieldPolygons(f) {
		q := make([][2]float64, len(p))
		for i, v := range p {
			// Femtometres are far below any layout's grid: rounding
			// keeps the design file short.
			q[i] = [2]float64{math.Round(v.X*1e6) / 1e6, math.Round(v.Y*1e6) / 1e6}
		}
		r.PolygonsNM = append(r.PolygonsNM, q)
	}
	return r
}

// DefaultName names an import after the layout file and its layers:
// "chip 13-2".
func (l *Layout) DefaultName() string {
	base := strings.TrimSuffix(filepath.Base(l.File), filepath.Ext(l.File))
	var ls []string
	for _, ly := range l.Layers {
		ls = append(ls, strings.ReplaceAll(ly.String(), "/", "-"))
	}
	return base + " " + strings.Join(ls, "+")
}

// AddRegion adds to the named variant (empty: the first) a region of
// the given role whose painted sites are sites. It refuses a name the
// variant already uses and an unknown role.
func AddRegion(d *design.Design, variant, name string, role design.Role, sites *lattice.SiteSet) error {
	v, err := d.Variant(variant)
	if err != nil {
		return err
	}
	if !slices.Contains([]design.Role{design.RoleDevice, design.RoleGate, design.RoleLead, design.RolePad, design.RoleDonor, design.RoleOther}, role) {
		return fmt.Errorf("unknown role %q (want device, gate, lead, pad, donor or other)", role)
	}
	if v.Region(name) != nil {
		return fmt.Errorf("variant %q already has a region %q: choose another --name", v.Name, name)
	}
	v.Regions = append(v.Regions, design.Region{Name: name, Role: role, Painted: sites})
	return nil
}

// AddReference adds r to the design's references, refusing a name
// already used.
func AddReference(d *design.Design, r design.Reference) error {
	for _, o := range d.References {
		if o.Name == r.Name {
			return fmt.Errorf("design %q already has a reference %q: choose another --name", d.Name, r.Name)
		}
	}
	d.References = append(d.References, r)
	return nil
}

// Contents is what a layout holds, for choosing what to import: its
// layers with their element counts (each element once, not per
// placement), sorted by layer and data type, and its labels flattened
// to chip nm.
type Contents struct {
	Layers []LayerCount
	Labels []Label
	Tops   []string
}

// LayerCount is one layer/data type and how many polygons and paths it
// holds.
type LayerCount struct {
	Layer    Layer
	Elements int
}

// Inspect reads the layout at path and says what it holds.
func Inspect(path string) (*Contents, error) {
	f, err := openLayout(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	lib, err := gdsii.ReadLimited(f, readLimits)
	if err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	c := &Contents{}
	for k, n := range found(lib) {
		l, err := ParseLayer(k)
		if err == nil {
			c.Layers = append(c.Layers, LayerCount{Layer: l, Elements: n})
		}
	}
	slices.SortFunc(c.Layers, func(a, b LayerCount) int {
		if a.Layer.Layer != b.Layer.Layer {
			return int(a.Layer.Layer) - int(b.Layer.Layer)
		}
		return int(a.Layer.Datatype) - int(b.Layer.Datatype)
	})
	for _, t := range lib.Tops() {
		c.Tops = append(c.Tops, t.Name)
	}
	flat, err := lib.Flatten("", gdsii.FlattenOptions{Keep: func(int16, int16) bool { return false }, KeepText: func(int16, int16) bool { return true }})
	if err != nil {
		return nil, fmt.Errorf("%s: %w", path, err)
	}
	nmPerUnit := lib.MetresPerUnit * 1e9
	for _, t := range flat.Texts {
		c.Labels = append(c.Labels, Label{Text: t.String, Layer: t.Layer, TextType: t.TextType, At: r2.Point{X: t.At.X * nmPerUnit, Y: t.At.Y * nmPerUnit}})
	}
	return c, nil
}
