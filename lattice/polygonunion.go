package lattice

import (
	"math"

	"github.com/golang/geo/r1"
	"github.com/golang/geo/r2"
)

// PolygonUnion is the union of many polygons, each inside by the
// even-odd rule (as Polygon), indexed so that rasterising it looks only
// at the polygons that reach the lattice line at hand: a layout of 10^6
// small polygons paints in one pass over the lattice lines. It is
// read-only once made.
type PolygonUnion struct {
	polys  []Polygon
	boxes  []r2.Rect
	bounds r2.Rect
	index  [2]lineIndex // by row direction: polygons by their extent across the rows
}

var _ Area = (*PolygonUnion)(nil)

// lineIndex buckets polygons by their extent along one field axis: the
// polygons reaching coordinate v are among items[start[k]:start[k+1]]
// for k = floor((v-lo)/size).
type lineIndex struct {
	lo, size float64
	start    []int32
	items    []int32
}

// maxUnionBuckets bounds the buckets of a PolygonUnion's index per axis.
const maxUnionBuckets = 1 << 16

// NewPolygonUnion indexes the polygons (those of fewer than 3 points
// hold nothing and are left out). Polygons are shared, not copied.
// Cost: O(polygons + Σ buckets each spans) time and memory.
func NewPolygonUnion(polys []Polygon) *PolygonUnion {
	u := &PolygonUnion{bounds: r2.EmptyRect()}
	for _, p := range polys {
		if len(p) < 3 {
			continue
		}
		b := p.Bounds()
		u.polys = append(u.polys, p)
		u.boxes = append(u.boxes, b)
		u.bounds = u.bounds.AddRect(b)
	}
	if len(u.polys) == 0 {
		return u
	}
	for d := RowsAlongX; d <= RowsAlongY; d++ {
		u.index[d] = u.buildIndex(d)
	}
	return u
}

// acrossOf returns a box's extent across rows running in direction d.
func acrossOf(b r2.Rect, d RowDirection) r1.Interval {
	if d == RowsAlongY {
		return b.X
	}
	return b.Y
}

func (u *PolygonUnion) buildIndex(d RowDirection) lineIndex {
	ext := acrossOf(u.bounds, d)
	// Buckets about as wide as a typical polygon, at most maxUnionBuckets.
	typical := 0.0
	for _, b := range u.boxes {
		typical += acrossOf(b, d).Length()
	}
	typical /= float64(len(u.boxes))
	size := math.Max(typical, ext.Length()/maxUnionBuckets)
	if !(size > 0) {
		size = 1
	}
	n := int(ext.Length()/size) + 1
	ix := lineIndex{lo: ext.Lo, size: size, start: make([]int32, n+1)}
	span := func(b r2.Rect) (int, int) {
		a := acrossOf(b, d)
		return ix.bucket(a.Lo - spanEps), ix.bucket(a.Hi + spanEps)
	}
	for _, b := range u.boxes {
		k0, k1 := span(b)
		for k := k0; k <= k1; k++ {
			ix.start[k+1]++
		}
	}
	for k := 0; k < n; k++ {
		ix.start[k+1] += ix.start[k]
	}
	ix.items = make([]int32, ix.start[n])
	fill := append([]int32(nil), ix.start[:n]...)
	for i, b := range u.boxes {
		k0, k1 := span(b)
		for k := k0; k <= k1; k++ {
			ix.items[fill[k]] = int32(i)
			fill[k]++
		}
	}
	return ix
}

// bucket returns the bucket of coordinate v, clamped to the index.
func (ix *lineIndex) bucket(v float64) int {
	k := int(math.Floor((v - ix.lo) / ix.size))
	return min(max(k, 0), len(ix.start)-2)
}

// Len returns the number of polygons.
func (u *PolygonUnion) Len() int { return len(u.polys) }

// Bounds implements Area.
func (u *PolygonUnion) Bounds() r2.Rect { return u.bounds }

// Spans implements Area: the union of the spans of the polygons whose
// extent across the rows holds the line.
func (u *PolygonUnion) Spans(dst []r1.Interval, d RowDirection, across float64) []r1.Interval {
	if len(u.polys) == 0 {
		return dst
	}
	ext := acrossOf(u.bounds, d)
	if across < ext.Lo-spanEps || across > ext.Hi+spanEps {
		return dst
	}
	ix := &u.index[d]
	k := ix.bucket(across)
	start := len(dst)
	for _, i := range ix.items[ix.start[k]:ix.start[k+1]] {
		if a := acrossOf(u.boxes[i], d); across < a.Lo-spanEps || across > a.Hi+spanEps {
			continue
		}
		dst = u.polys[i].Spans(dst, d, across)
	}
	merged := NormalizeIntervals(dst[start:])
	return dst[:start+len(merged)]
}
