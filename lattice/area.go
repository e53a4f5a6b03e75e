package lattice

import (
	"math"

	"github.com/golang/geo/r1"
	"github.com/golang/geo/r2"
)

// Area is a plane figure in field nm that the lattice rasterises into
// sites (see Surface.Paint). Implementations report, for one line of
// sites, which parts of the line they cover, so rasterising costs one
// call per lattice line instead of one test per site.
type Area interface {
	// Bounds returns a rectangle holding the whole area (it may be
	// larger than the area, never smaller).
	Bounds() r2.Rect
	// Spans appends to dst the intervals of the along-row field
	// coordinate that the area covers on the line where the across-row
	// field coordinate equals across, for rows running in direction d
	// (for RowsAlongX the line is y = across and the intervals are in x).
	// The appended intervals are normalized (see NormalizeIntervals). It
	// returns the extended slice.
	Spans(dst []r1.Interval, d RowDirection, across float64) []r1.Interval
}

// Compile-time checks that the shapes implement Area.
var (
	_ Area = Rect{}
	_ Area = Polygon(nil)
	_ Area = Polyline{}
)

// spanEps is the slack, in nm, by which area boundaries are widened so
// that a site lying exactly on a boundary (up to rounding) is inside.
const spanEps = 1e-9

// Rect is an axis-aligned rectangle in field nm; its boundary belongs to
// it, so a site exactly on an edge is inside.
type Rect struct{ r2.Rect }

// RectFromCorners returns the rectangle with opposite corners a and b,
// in either order.
func RectFromCorners(a, b r2.Point) Rect { return Rect{r2.RectFromPoints(a, b)} }

// Bounds returns the rectangle itself.
func (r Rect) Bounds() r2.Rect { return r.Rect }

// Spans implements Area.
func (r Rect) Spans(dst []r1.Interval, d RowDirection, across float64) []r1.Interval {
	if r.IsEmpty() {
		return dst
	}
	alongI, acrossI := r.X, r.Y
	if d == RowsAlongY {
		alongI, acrossI = r.Y, r.X
	}
	if across < acrossI.Lo-spanEps || across > acrossI.Hi+spanEps {
		return dst
	}
	return append(dst, r1.Interval{Lo: alongI.Lo - spanEps, Hi: alongI.Hi + spanEps})
}

// Polygon is a simple or self-intersecting polygon in field nm, its
// vertices in either winding order, with inside decided by the even-odd
// rule (as PolygonContains). Points exactly on an edge may fall either
// way. Complexity of Spans: O(vertices) per line.
type Polygon []r2.Point

// Bounds returns the bounding box of the vertices.
func (p Polygon) Bounds() r2.Rect { return r2.RectFromPoints(p...) }

// Spans implements Area.
func (p Polygon) Spans(dst []r1.Interval, d RowDirection, across float64) []r1.Interval {
	if len(p) < 3 {
		return dst
	}
	start := len(dst)
	// Collect the crossings of the line into dst's spare room as Lo
	// values, then pair them up: the even-odd rule makes [c0,c1), [c2,c3)...
	var xs [16]float64
	cross := xs[:0]
	j := len(p) - 1
	for i := range p {
		a, b := p[i], p[j]
		j = i
		au, av := a.X, a.Y
		bu, bv := b.X, b.Y
		if d == RowsAlongY {
			au, av, bu, bv = a.Y, a.X, b.Y, b.X
		}
		if (av > across) != (bv > across) {
			cross = append(cross, au+(across-av)*(bu-au)/(bv-av))
		}
	}
	if len(cross) < 2 {
		return dst
	}
	sortFloats(cross)
	for k := 0; k+1 < len(cross); k += 2 {
		dst = append(dst, r1.Interval{Lo: cross[k] - spanEps, Hi: cross[k+1] + spanEps})
	}
	// Widening may make neighbouring spans touch; keep them disjoint.
	merged := NormalizeIntervals(dst[start:])
	return dst[:start+len(merged)]
}

// sortFloats sorts a short slice by insertion (crossing lists are tiny).
func sortFloats(v []float64) {
	for i := 1; i < len(v); i++ {
		x := v[i]
		j := i - 1
		for j >= 0 && v[j] > x {
			v[j+1] = v[j]
			j--
		}
		v[j+1] = x
	}
}

// Polyline is a path through Points drawn with a round pen WidthNM wide:
// the points within WidthNM/2 of the path, so ends and joints are
// rounded. A single point gives a disc. Complexity of Spans:
// O(segments) per line.
type Polyline struct {
	Points  []r2.Point
	WidthNM float64
}

// Bounds returns the bounding box of the points grown by half the width.
func (l Polyline) Bounds() r2.Rect {
	if len(l.Points) == 0 {
		return r2.EmptyRect()
	}
	h := l.WidthNM / 2
	return r2.RectFromPoints(l.Points...).ExpandedByMargin(h)
}

// Spans implements Area.
func (l Polyline) Spans(dst []r1.Interval, d RowDirection, across float64) []r1.Interval {
	h := l.WidthNM / 2
	if !(h > 0) || len(l.Points) == 0 {
		return dst
	}
	start := len(dst)
	pts := l.Points
	if len(pts) == 1 {
		pts = []r2.Point{pts[0], pts[0]}
	}
	for i := 0; i+1 < len(pts); i++ {
		a, b := pts[i], pts[i+1]
		if d == RowsAlongY {
			a, b = r2.Point{X: a.Y, Y: a.X}, r2.Point{X: b.Y, Y: b.X}
		}
		if lo, hi, ok := capsuleSpan(a, b, h, across); ok {
			dst = append(dst, r1.Interval{Lo: lo - spanEps, Hi: hi + spanEps})
		}
	}
	merged := NormalizeIntervals(dst[start:])
	return dst[:start+len(merged)]
}

// capsuleSpan returns the x interval where the line y = c meets the set
// of points within h of segment ab. The set is convex, so the interval is
// the hull of its parts: the two end discs and the band along the
// segment.
func capsuleSpan(a, b r2.Point, h, c float64) (lo, hi float64, ok bool) {
	lo, hi = math.Inf(1), math.Inf(-1)
	disc := func(p r2.Point) {
		dy := c - p.Y
		if dy*dy <= h*h {
			dx := math.Sqrt(h*h - dy*dy)
			lo, hi = min(lo, p.X-dx), max(hi, p.X+dx)
		}
	}
	disc(a)
	disc(b)
	v := b.Sub(a)
	if n := v.Norm(); n > 0 {
		// The band is the parallelogram with corners a±w, b±w, w the
		// normal of length h; intersect its four edges with the line.
		w := v.Ortho().Mul(h / n)
		corners := [4]r2.Point{a.Add(w), b.Add(w), b.Sub(w), a.Sub(w)}
		for i := range corners {
			p, q := corners[i], corners[(i+1)%4]
			if (p.Y-c)*(q.Y-c) > 0 || p.Y == q.Y {
				if p.Y == c && q.Y == c {
					lo, hi = min(lo, p.X, q.X), max(hi, p.X, q.X)
				}
				continue
			}
			x := p.X + (c-p.Y)*(q.X-p.X)/(q.Y-p.Y)
			lo, hi = min(lo, x), max(hi, x)
		}
	}
	return lo, hi, lo <= hi
}
