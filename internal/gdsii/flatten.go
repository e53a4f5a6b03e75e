package gdsii

import (
	"errors"
	"fmt"
	"math"
	"strings"

	"dimerpath/internal/angle"
)

// Vec is a point in database units after flattening (rotation and
// magnification leave the integer grid).
type Vec struct{ X, Y float64 }

// Affine maps (x, y) to (A·x + B·y + E, C·x + D·y + F).
type Affine struct{ A, B, C, D, E, F float64 }

// Identity is the affine map that changes nothing.
var Identity = Affine{A: 1, D: 1}

// Apply returns the image of (x, y).
func (a Affine) Apply(x, y float64) Vec {
	return Vec{a.A*x + a.B*y + a.E, a.C*x + a.D*y + a.F}
}

// Then returns the map that applies a, then b.
func (a Affine) Then(b Affine) Affine {
	return Affine{
		A: b.A*a.A + b.B*a.C, B: b.A*a.B + b.B*a.D,
		C: b.C*a.A + b.D*a.C, D: b.C*a.B + b.D*a.D,
		E: b.A*a.E + b.B*a.F + b.E, F: b.C*a.E + b.D*a.F + b.F,
	}
}

// Scale returns the factor by which a scales lengths (the square root
// of the determinant's magnitude).
func (a Affine) Scale() float64 { return math.Sqrt(math.Abs(a.A*a.D - a.B*a.C)) }

// Matrix returns the transform as an affine map placing a structure at
// origin: reflect about x, scale, rotate, translate. Angles that are
// whole multiples of 90° give exact matrices.
func (t Transform) Matrix(origin Vec) Affine {
	m := t.Scale()
	s, c := angle.SinCos(t.AngleDeg)
	ry := 1.0
	if t.Reflect {
		ry = -1
	}
	return Affine{A: m * c, B: -m * s * ry, C: m * s, D: m * c * ry, E: origin.X, F: origin.Y}
}

// FlatPolygon is a boundary in the top structure's coordinates.
type FlatPolygon struct {
	Layer, Datatype int16
	XY              []Vec
}

// FlatPath is a path in the top structure's coordinates; Width is scaled
// by the references' magnifications (an absolute width is not).
type FlatPath struct {
	Layer, Datatype, PathType int16
	Width                     float64
	XY                        []Vec
}

// FlatText is a label in the top structure's coordinates.
type FlatText struct {
	Layer, TextType int16
	At              Vec
	String          string
}

// Flat is a structure with its hierarchy expanded.
type Flat struct {
	Polygons []FlatPolygon
	Paths    []FlatPath
	Texts    []FlatText
}

// FlattenLimits bound an expansion; Flatten counts what it would make
// before making it.
type FlattenLimits struct {
	Elements int64 // polygons, paths and labels made
	Points   int64 // their points
	Depth    int   // nesting of references
}

// DefaultFlattenLimits: 10^7 elements, 5·10^7 points (about 800 MB of
// coordinates), 64 levels.
var DefaultFlattenLimits = FlattenLimits{Elements: 10_000_000, Points: 50_000_000, Depth: 64}

// FlattenOptions say which elements to keep and how far to go.
type FlattenOptions struct {
	// Keep reports whether to keep elements of a layer and data (or
	// text) type; nil keeps everything. Dropped layers cost nothing.
	Keep func(layer, datatype int16) bool
	// KeepText reports whether to keep labels of a layer and text type;
	// nil leaves labels to Keep.
	KeepText func(layer, texttype int16) bool
	Limits   FlattenLimits // zero fields take DefaultFlattenLimits'
}

// ErrCycle is wrapped by the error for structures that reference
// themselves, directly or through others.
var ErrCycle = errors.New("reference cycle")

type counts struct{ elements, points, polygons float64 }

// Flatten expands the structure named top (empty: every structure that
// no other references, together) into polygons, paths and labels in its
// coordinates, applying every reference's reflection, magnification,
// rotation and placement, and each array's columns and rows. It refuses
// reference cycles (ErrCycle), references to undefined structures,
// absolute magnifications or angles (not supported), nesting deeper
// than the depth limit and expansions beyond the limits (ErrLimit),
// with an *Error naming the reference's record and byte offset.
func (l *Library) Flatten(top string, opt FlattenOptions) (*Flat, error) {
	lim := opt.Limits
	if lim.Elements <= 0 {
		lim.Elements = DefaultFlattenLimits.Elements
	}
	if lim.Points <= 0 {
		lim.Points = DefaultFlattenLimits.Points
	}
	if lim.Depth <= 0 {
		lim.Depth = DefaultFlattenLimits.Depth
	}
	keep := opt.Keep
	if keep == nil {
		keep = func(int16, int16) bool { return true }
	}
	keepText := opt.KeepText
	if keepText == nil {
		keepText = keep
	}
	byName := make(map[string]*Structure, len(l.Structures))
	for _, s := range l.Structures {
		byName[s.Name] = s
	}
	var tops []*Structure
	if top == "" {
		tops = l.Tops()
		if len(tops) == 0 && len(l.Structures) > 0 {
			// Every structure is referenced: there is a cycle.
			tops = l.Structures[:1]
		}
	} else {
		s := byName[top]
		if s == nil {
			return nil, fmt.Errorf("gdsii: no structure %q in library %q", top, l.Name)
		}
		tops = []*Structure{s}
	}

	// First count, depth first with the path kept to name a cycle.
	memo := map[*Structure]counts{}
	state := map[*Structure]int{} // 1 on the path, 2 done
	var path []string
	var count func(s *Structure, depth int) (counts, error)
	count = func(s *Structure, depth int) (counts, error) {
		if c, ok := memo[s]; ok {
			return c, nil
		}
		if depth > lim.Depth {
			return counts{}, fmt.Errorf("gdsii: references nest deeper than %d levels at structure %q: %w", lim.Depth, s.Name, ErrLimit)
		}
		state[s] = 1
		path = append(path, s.Name)
		var c counts
		for _, b := range s.Boundaries {
			if keep(b.Layer, b.Datatype) {
				c.elements++
				c.polygons++
				c.points += float64(len(b.XY))
			}
		}
		for _, p := range s.Paths {
			if keep(p.Layer, p.Datatype) {
				c.elements++
				c.points += float64(len(p.XY))
			}
		}
		for _, t := range s.Texts {
			if keepText(t.Layer, t.TextType) {
				c.elements++
				c.points++
			}
		}
		for _, r := range s.Refs {
			child := byName[r.Name]
			refErr := func(format string, a ...any) error {
				return &Error{Offset: r.Offset, Record: refRecord(r), Err: fmt.Errorf(format, a...)}
			}
			if child == nil {
				return counts{}, refErr("structure %q references %q, which the library does not define", s.Name, r.Name)
			}
			if r.Trans.AbsMag || r.Trans.AbsAngle {
				return counts{}, refErr("structure %q references %q with an absolute magnification or angle, which is not supported", s.Name, r.Name)
			}
			if state[child] == 1 {
				return counts{}, refErr("structure %q references %q: %w %s -> %s", s.Name, r.Name, ErrCycle, strings.Join(path[indexOf(path, child.Name):], " -> "), child.Name)
			}
			cc, err := count(child, depth+1)
			if err != nil {
				return counts{}, err
			}
			n := float64(r.Instances())
			c.elements += n * cc.elements
			c.polygons += n * cc.polygons
			c.points += n * cc.points
			if c.elements > float64(lim.Elements) || c.points > float64(lim.Points) {
				return counts{}, refErr("structure %q: expanding %s of %q (%d x %d) gives %.3g elements with %.3g points, more than the limits of %d and %d: %w",
					s.Name, refRecord(r), r.Name, max(r.Cols, 1), max(r.Rows, 1), c.elements, c.points, lim.Elements, lim.Points, ErrLimit)
			}
		}
		path = path[:len(path)-1]
		state[s] = 2
		memo[s] = c
		return c, nil
	}
	var total counts
	for _, s := range tops {
		c, err := count(s, 0)
		if err != nil {
			return nil, err
		}
		total.elements += c.elements
		total.polygons += c.polygons
		total.points += c.points
		if total.elements > float64(lim.Elements) || total.points > float64(lim.Points) {
			return nil, fmt.Errorf("gdsii: the top structures expand to %.3g elements with %.3g points, more than the limits of %d and %d: %w",
				total.elements, total.points, lim.Elements, lim.Points, ErrLimit)
		}
	}
	if len(tops) == 0 {
		return &Flat{}, nil
	}
	// Then expand into one backing array of points.
	f := &Flat{Polygons: make([]FlatPolygon, 0, int(total.polygons))}
	pts := make([]Vec, 0, int(total.points))
	// mapped returns the images of xy under m in the next len(xy) points.
	mapped := func(xy []Point, m Affine) []Vec {
		start := len(pts)
		pts = pts[:start+len(xy)]
		out := pts[start : start+len(xy) : start+len(xy)]
		for i, p := range xy {
			out[i] = m.Apply(float64(p.X), float64(p.Y))
		}
		return out
	}
	var expand func(s *Structure, m Affine)
	expand = func(s *Structure, m Affine) {
		if memo[s].elements == 0 {
			return
		}
		for _, b := range s.Boundaries {
			if !keep(b.Layer, b.Datatype) {
				continue
			}
			xy := mapped(b.XY, m)
			f.Polygons = append(f.Polygons, FlatPolygon{Layer: b.Layer, Datatype: b.Datatype, XY: xy})
		}
		for _, p := range s.Paths {
			if !keep(p.Layer, p.Datatype) {
				continue
			}
			xy := mapped(p.XY, m)
			w := float64(p.Width)
			if w < 0 {
				w = -w
			} else {
				w *= m.Scale()
			}
			f.Paths = append(f.Paths, FlatPath{Layer: p.Layer, Datatype: p.Datatype, PathType: p.PathType, Width: w, XY: xy})
		}
		for _, t := range s.Texts {
			if keepText(t.Layer, t.TextType) {
				f.Texts = append(f.Texts, FlatText{Layer: t.Layer, TextType: t.TextType, At: m.Apply(float64(t.At.X), float64(t.At.Y)), String: t.String})
			}
		}
		for _, r := range s.Refs {
			child := byName[r.Name]
			if !r.IsArray() {
				expand(child, r.Trans.Matrix(Vec{float64(r.Origin.X), float64(r.Origin.Y)}).Then(m))
				continue
			}
			o := Vec{float64(r.Origin.X), float64(r.Origin.Y)}
			col := Vec{(float64(r.ColEnd.X) - o.X) / float64(r.Cols), (float64(r.ColEnd.Y) - o.Y) / float64(r.Cols)}
			row := Vec{(float64(r.RowEnd.X) - o.X) / float64(r.Rows), (float64(r.RowEnd.Y) - o.Y) / float64(r.Rows)}
			for j := 0; j < r.Rows; j++ {
				for i := 0; i < r.Cols; i++ {
					at := Vec{o.X + float64(i)*col.X + float64(j)*row.X, o.Y + float64(i)*col.Y + float64(j)*row.Y}
					expand(child, r.Trans.Matrix(at).Then(m))
				}
			}
		}
	}
	for _, s := range tops {
		expand(s, Identity)
	}
	return f, nil
}

func refRecord(r Ref) string {
	if r.IsArray() {
		return "AREF"
	}
	return "SREF"
}

func indexOf(path []string, name string) int {
	for i, n := range path {
		if n == name {
			return i
		}
	}
	return 0
}
