package lattice

import (
	"encoding/json"
	"testing"

	"github.com/RoaringBitmap/roaring/v2"
	"github.com/golang/geo/r2"
)

// The benchmarks of issue 2: painting a 1 µm x 1 µm rectangle (6.8·10^6
// sites), the union of two such sets, counting, and the run-length JSON
// round trip, each in sites per second; and the same operations on a
// roaring bitmap (github.com/RoaringBitmap/roaring/v2), the library
// alternative to the per-row bitset, for the choice in DEVELOPERS.md.

func benchSurface(b *testing.B) *Surface {
	s, err := NewSurface(2000, 2000)
	if err != nil {
		b.Fatal(err)
	}
	return s
}

var square1um = RectFromCorners(r2.Point{X: 100, Y: 100}, r2.Point{X: 1100, Y: 1100})
var square1umShifted = RectFromCorners(r2.Point{X: 600, Y: 600}, r2.Point{X: 1600, Y: 1600})

// roaringKey packs a site of terrace 0 into 32 bits: row in the high 16,
// in-row index in the low 16 (enough for a 2 µm field; the real set has
// no such limit).
func roaringKey(row, index int) uint64 { return uint64(row)<<16 | uint64(index) }

// toRoaring paints the same sites into a roaring bitmap, one AddRange
// per run: the library's fastest path for painting spans.
func toRoaring(set *SiteSet) *roaring.Bitmap {
	rb := roaring.New()
	for r := range set.Runs() {
		rb.AddRange(roaringKey(r.Row, r.Start), roaringKey(r.Row, r.End()))
	}
	rb.RunOptimize()
	return rb
}

// paintRoaring rasterises a into a roaring bitmap from the same scanline
// spans as Surface.Paint: AddRange where both sides of a dimer range are
// in, one Add per site where only one side is.
func paintRoaring(s *Surface, a Area) *roaring.Bitmap {
	rb := roaring.New()
	s.rasterise(a, func(t, r, d0, d1, side int) {
		if side < 0 {
			rb.AddRange(roaringKey(r, 2*d0), roaringKey(r, 2*d1+2))
			return
		}
		for d := d0; d <= d1; d++ {
			rb.Add(uint32(roaringKey(r, 2*d+side)))
		}
	})
	return rb
}

func BenchmarkPaint1umSquare(b *testing.B) {
	s := benchSurface(b)
	probe := NewSiteSet()
	n := s.Paint(probe, square1um)
	b.Run("bitset", func(b *testing.B) {
		b.ReportAllocs()
		for b.Loop() {
			set := NewSiteSet()
			s.Paint(set, square1um)
		}
		b.ReportMetric(float64(n)*float64(b.N)/b.Elapsed().Seconds(), "sites/s")
	})
	b.Run("roaring", func(b *testing.B) {
		// The same scanline spans, set with AddRange: the fair best case
		// for the library.
		b.ReportAllocs()
		for b.Loop() {
			paintRoaring(s, square1um)
		}
		b.ReportMetric(float64(n)*float64(b.N)/b.Elapsed().Seconds(), "sites/s")
	})
}

func BenchmarkUnion1umSquares(b *testing.B) {
	s := benchSurface(b)
	a, c := NewSiteSet(), NewSiteSet()
	s.Paint(a, square1um)
	s.Paint(c, square1umShifted)
	n := a.Count() + c.Count()
	want := a.Clone().Union(c).Count()
	b.Run("bitset", func(b *testing.B) {
		b.ReportAllocs()
		var u *SiteSet
		for b.Loop() {
			u = a.Clone().Union(c)
		}
		if u.Count() != want {
			b.Fatalf("union has %d sites, want %d", u.Count(), want)
		}
		b.ReportMetric(float64(n)*float64(b.N)/b.Elapsed().Seconds(), "sites/s")
	})
	ra, rc := toRoaring(a), toRoaring(c)
	b.Run("roaring", func(b *testing.B) {
		b.ReportAllocs()
		var u *roaring.Bitmap
		for b.Loop() {
			u = roaring.Or(ra, rc)
		}
		if int(u.GetCardinality()) != want {
			b.Fatalf("roaring union has %d sites, want %d", u.GetCardinality(), want)
		}
		b.ReportMetric(float64(n)*float64(b.N)/b.Elapsed().Seconds(), "sites/s")
	})
}

func BenchmarkCount1umSquare(b *testing.B) {
	s := benchSurface(b)
	a := NewSiteSet()
	n := s.Paint(a, square1um)
	b.Run("bitset", func(b *testing.B) {
		for b.Loop() {
			if a.Count() != n {
				b.Fatal("count")
			}
		}
		b.ReportMetric(float64(n)*float64(b.N)/b.Elapsed().Seconds(), "sites/s")
	})
	ra := toRoaring(a)
	b.Run("roaring", func(b *testing.B) {
		for b.Loop() {
			if int(ra.GetCardinality()) != n {
				b.Fatal("count")
			}
		}
		b.ReportMetric(float64(n)*float64(b.N)/b.Elapsed().Seconds(), "sites/s")
	})
}

// BenchmarkRLERoundTrip encodes a painted 1 µm² square and a sparse
// array of 10^4 windows as run-length JSON and decodes them again.
func BenchmarkRLERoundTrip(b *testing.B) {
	s := benchSurface(b)
	square := NewSiteSet()
	s.Paint(square, square1um)
	windows := NewSiteSet()
	for j := range 100 {
		for i := range 100 {
			s.AddWindow(windows, Window{Template: &PhosphineWindow, Row: 100 + 6*j, FirstDimer: 100 + 10*i})
		}
	}
	for _, tc := range []struct {
		name string
		set  *SiteSet
	}{{"square", square}, {"windows", windows}} {
		b.Run(tc.name, func(b *testing.B) {
			n := tc.set.Count()
			data, _ := json.Marshal(tc.set)
			b.ReportAllocs()
			for b.Loop() {
				data, _ = json.Marshal(tc.set)
				var back SiteSet
				if err := json.Unmarshal(data, &back); err != nil {
					b.Fatal(err)
				}
			}
			b.ReportMetric(float64(n)*float64(b.N)/b.Elapsed().Seconds(), "sites/s")
			b.ReportMetric(float64(len(data)), "bytes")
		})
	}
}

// BenchmarkPaintShapes paints a 1 µm² diamond (every row needs its own
// span) and a 1 µm long, 40 nm wide polyline.
func BenchmarkPaintShapes(b *testing.B) {
	s := benchSurface(b)
	diamond := Polygon{{X: 600, Y: 0}, {X: 1307, Y: 707}, {X: 600, Y: 1414}, {X: -107, Y: 707}}
	line := Polyline{Points: []r2.Point{{X: 100, Y: 100}, {X: 800, Y: 814}, {X: 1500, Y: 120}}, WidthNM: 40}
	for _, tc := range []struct {
		name string
		a    Area
	}{{"polygon", diamond}, {"polyline", line}} {
		n := s.Paint(NewSiteSet(), tc.a)
		b.Run(tc.name+"/bitset", func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				s.Paint(NewSiteSet(), tc.a)
			}
			b.ReportMetric(float64(n)*float64(b.N)/b.Elapsed().Seconds(), "sites/s")
		})
		b.Run(tc.name+"/roaring", func(b *testing.B) {
			b.ReportAllocs()
			for b.Loop() {
				paintRoaring(s, tc.a)
			}
			b.ReportMetric(float64(n)*float64(b.N)/b.Elapsed().Seconds(), "sites/s")
		})
	}
}

// roaringRuns calls f for each run of consecutive values, built from
// the library's batch iterator (its documented fast way to walk values).
func roaringRuns(rb *roaring.Bitmap, f func(start, end uint64)) {
	it := rb.ManyIterator()
	buf := make([]uint32, 4096)
	var start, next uint64
	open := false
	for {
		n := it.NextMany(buf)
		if n == 0 {
			break
		}
		for _, v := range buf[:n] {
			x := uint64(v)
			if open && x == next {
				next++
				continue
			}
			if open {
				f(start, next)
			}
			start, next, open = x, x+1, true
		}
	}
	if open {
		f(start, next)
	}
}

// BenchmarkRuns walks the runs of a painted diamond (the planner turns
// runs into strokes), and BenchmarkContains looks up 10^5 sites.
func BenchmarkRuns(b *testing.B) {
	s := benchSurface(b)
	a := NewSiteSet()
	n := s.Paint(a, Polygon{{X: 600, Y: 0}, {X: 1307, Y: 707}, {X: 600, Y: 1414}, {X: -107, Y: 707}})
	b.Run("bitset", func(b *testing.B) {
		for b.Loop() {
			got := 0
			for r := range a.Runs() {
				got += r.Len
			}
			if got != n {
				b.Fatal(got, n)
			}
		}
		b.ReportMetric(float64(n)*float64(b.N)/b.Elapsed().Seconds(), "sites/s")
	})
	ra := toRoaring(a)
	b.Run("roaring", func(b *testing.B) {
		for b.Loop() {
			got := 0
			roaringRuns(ra, func(s, e uint64) { got += int(e - s) })
			if got != n {
				b.Fatal(got, n)
			}
		}
		b.ReportMetric(float64(n)*float64(b.N)/b.Elapsed().Seconds(), "sites/s")
	})
}

func BenchmarkContains(b *testing.B) {
	s := benchSurface(b)
	a := NewSiteSet()
	s.Paint(a, Polygon{{X: 600, Y: 0}, {X: 1307, Y: 707}, {X: 600, Y: 1414}, {X: -107, Y: 707}})
	probes := make([]Site, 100_000)
	for i := range probes {
		probes[i] = Site{Row: (i * 7919) % 1900, Dimer: (i * 104729) % 3700, Side: i & 1}
	}
	b.Run("bitset", func(b *testing.B) {
		for b.Loop() {
			for _, p := range probes {
				a.Contains(p)
			}
		}
		b.ReportMetric(float64(len(probes))*float64(b.N)/b.Elapsed().Seconds(), "lookups/s")
	})
	ra := toRoaring(a)
	b.Run("roaring", func(b *testing.B) {
		for b.Loop() {
			for _, p := range probes {
				ra.Contains(uint32(roaringKey(p.Row, p.Index())))
			}
		}
		b.ReportMetric(float64(len(probes))*float64(b.N)/b.Elapsed().Seconds(), "lookups/s")
	})
}
