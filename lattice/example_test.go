package lattice_test

import (
	"encoding/json"
	"fmt"
	"slices"
	"strings"

	"github.com/golang/geo/r1"
	"github.com/golang/geo/r2"

	"dimerpath/lattice"
)

// Paint a 10 nm x 5 nm rectangle and a P window, and count their sites.
func ExampleSurface_Paint() {
	surf, _ := lattice.NewSurface(100, 100) // one terrace, rows along x
	set := lattice.NewSiteSet()
	n := surf.Paint(set, lattice.RectFromCorners(r2.Point{X: 20, Y: 20}, r2.Point{X: 30, Y: 25}))
	fmt.Println(n, "sites in the rectangle")
	w, _ := surf.PlaceWindow(lattice.PhosphineWindow, r2.Point{X: 50, Y: 50})
	fmt.Println(w, surf.AddWindow(set, w), "sites")
	fmt.Println(set.Count(), "in all")
	// Output:
	// 338 sites in the rectangle
	// P@T0:R65:D129-131 6 sites
	// 344 in all
}

// Across a single-height step the dimer rows turn by 90° and the dimer
// centres move by a/(2√2): across the new rows for a step up, along them
// for a step down.
func ExampleTerrace_AcrossStep() {
	lower := lattice.Terrace{Name: "lower", Rows: lattice.RowsAlongX}
	for _, dir := range []lattice.StepDirection{lattice.StepUp, lattice.StepDown} {
		t := lower.AcrossStep(dir)
		fmt.Printf("%s: rows along %v, offset (%.4f, %.4f) nm\n", dir, t.Rows, t.Offset.X, t.Offset.Y)
	}
	// Output:
	// up: rows along y, offset (0.1920, 0.0000) nm
	// down: rows along y, offset (0.0000, 0.1920) nm
}

func ExampleSiteSet_MarshalJSON() {
	set := lattice.NewSiteSet()
	set.AddRun(0, 12, 100, 106) // dimers 50..52 of row 12: a P window
	set.Add(lattice.Site{Terrace: 0, Row: 12, Dimer: 60, Side: 1})
	b, _ := json.Marshal(set)
	fmt.Println(string(b))
	// Output:
	// {"sites":7,"rows":[[0,12,100,6,121,1]]}
}

func ExampleReadPointsCSV() {
	surf, _ := lattice.NewSurface(100, 100)
	csv := "# donor array from a script\nx_nm,y_nm\n10.0,10.0\n10.9,10.0\n"
	pts, err := lattice.ReadPointsCSV(strings.NewReader(csv), "array.csv")
	if err != nil {
		fmt.Println(err)
		return
	}
	windows, off, _ := surf.SnapWindows("array.csv", lattice.PhosphineWindow, pts)
	for _, w := range windows {
		fmt.Println(w)
	}
	for _, o := range off {
		fmt.Println(o)
	}
	// Output:
	// P@T0:R13:D25-27
	// P@T0:R13:D27-29
	// line 4: (10.900, 10.000) nm is 0.148 nm from the nearest lattice position (10.753, 9.985)
}

// The tunnel gap between an island and a lead nine intact dimer rows
// away: 9 · 0.76806 nm.
func ExampleCellIndex_Gap() {
	surf, _ := lattice.NewSurface(100, 100)
	island, lead := lattice.NewSiteSet(), lattice.NewSiteSet()
	for row := 10; row <= 20; row++ {
		island.AddRun(0, row, 100, 160) // dimers 50..79
	}
	for row := 30; row <= 60; row++ {
		lead.AddRun(0, row, 120, 140)
	}
	a, b := lattice.NewCellIndex(surf, island), lattice.NewCellIndex(surf, lead)
	d, at := a.Gap(b)
	fmt.Printf("gap %.3f nm = %.0f rows, at y = %.2f nm\n", d, d/lattice.RowSpacing, at.Y)
	_, _, near := a.GapWithin(b, 5)
	fmt.Println("within 5 nm:", near)
	// Output:
	// gap 6.913 nm = 9 rows, at y = 19.20 nm
	// within 5 nm: false
}

// A field point in a terrace's lattice frame, and back: on a terrace
// beyond a step the rows run along y.
func ExampleFrame() {
	lower := lattice.Terrace{Name: "lower", Rows: lattice.RowsAlongX}
	f := lower.AcrossStep(lattice.StepDown).Frame()
	along, across := f.ToLocal(r2.Point{X: 10, Y: 20})
	fmt.Printf("along %.4f nm = %.2f dimer pitches, across %.4f nm = %.2f rows\n",
		along, along/lattice.DimerPitch, across, across/lattice.RowSpacing)
	fmt.Println(f.ToField(along, across))
	// Output:
	// along 19.8080 nm = 51.58 dimer pitches, across 10.0000 nm = 13.02 rows
	// (10.000000000000, 20.000000000000)
}

// A drag from (10.1, 20.3) to (14.9, 22.2) nm snaps to whole dimers of
// whole rows: dimers 26..39 (x/DimerPitch = 26.3 and 38.8, rounded) of
// rows 26..29 (y/RowSpacing = 26.4 and 28.9).
func ExampleFrame_SnapRect() {
	surf, _ := lattice.NewSurface(100, 100)
	r := surf.Frame(0).SnapRect(r2.Point{X: 10.1, Y: 20.3}, r2.Point{X: 14.9, Y: 22.2})
	fmt.Printf("%.1f x %.1f pitches x rows\n", r.Size().X/lattice.DimerPitch, r.Size().Y/lattice.RowSpacing)
	set := lattice.NewSiteSet()
	fmt.Println(surf.Paint(set, lattice.Rect{Rect: r}), "sites")
	// Output:
	// 14.0 x 4.0 pitches x rows
	// 112 sites
}

// Moving a shape by a lattice vector keeps it on the same pattern of
// sites.
func ExampleFrame_LatticeVector() {
	f := lattice.Frame{Rows: lattice.RowsAlongX}
	v := f.LatticeVector(r2.Point{X: 1, Y: 1})
	fmt.Printf("(%.5f, %.5f) nm: %.0f pitches, %.0f row\n", v.X, v.Y, v.X/lattice.DimerPitch, v.Y/lattice.RowSpacing)
	// Output:
	// (1.15209, 0.76806) nm: 3 pitches, 1 row
}

// The dimers of a row that exist: a step's slanted edge cuts the rows of
// the lower terrace.
func ExampleSurface_RowDimers() {
	lower := lattice.Terrace{Name: "lower", Rows: lattice.RowsAlongX}
	upper := lower.AcrossStep(lattice.StepUp)
	upper.Name = "upper"
	upper.Boundary = []r2.Point{{X: 30, Y: 0}, {X: 50, Y: 0}, {X: 50, Y: 20}, {X: 20, Y: 20}}
	surf, _ := lattice.NewSurface(50, 20, lower, upper)
	for _, row := range []int{0, 13, 26} {
		fmt.Println("row", row, surf.RowDimers(nil, 0, row))
	}
	// Output:
	// row 0 [{0 79}]
	// row 13 [{0 66}]
	// row 26 [{0 53}]
}

// The dimers whose cells meet a small window of the field: dimers 26..28
// (x = d·0.38403 nm) of rows 13 and 14 (y = r·0.76806 nm).
func ExampleSurface_Dimers() {
	surf, _ := lattice.NewSurface(100, 100)
	win := r2.RectFromPoints(r2.Point{X: 10, Y: 10}, r2.Point{X: 10.8, Y: 11})
	for d := range surf.Dimers(win) {
		fmt.Println(d, surf.DimerCentre(d.Terrace, d.Row, d.Dimer))
	}
	// Output:
	// T0:R13:D26:0 (9.984809723437, 9.984809723437)
	// T0:R13:D27:0 (10.368840866647, 9.984809723437)
	// T0:R13:D28:0 (10.752872009856, 9.984809723437)
	// T0:R14:D26:0 (9.984809723437, 10.752872009856)
	// T0:R14:D27:0 (10.368840866647, 10.752872009856)
	// T0:R14:D28:0 (10.752872009856, 10.752872009856)
}

// Interval lists in linear time: a terrace's spans less a taken part.
func ExampleSubtractIntervals() {
	terrace := []r1.Interval{{Lo: 0, Hi: 10}, {Lo: 20, Hi: 30}}
	shape := []r1.Interval{{Lo: 5, Hi: 25}}
	fmt.Println(lattice.IntersectIntervals(nil, terrace, shape))
	fmt.Println(lattice.SubtractIntervals(nil, terrace, shape))
	// Output:
	// [[5.0000000, 10.0000000] [20.0000000, 25.0000000]]
	// [[0.0000000, 5.0000000] [25.0000000, 30.0000000]]
}

// Range queries on one row of a set: counts, sides, gaps.
func ExampleRowBits() {
	set := lattice.NewSiteSet()
	set.AddRun(0, 5, 10, 20) // dimers 5..9, both sides
	set.Add(lattice.Site{Terrace: 0, Row: 5, Dimer: 12, Side: 1})
	row := set.Row(0, 5)
	fmt.Println(row.Count(0, 64), row.Any(22, 26, lattice.Side0), row.Any(22, 26, lattice.Side1))
	fmt.Println(slices.Collect(row.Gaps(16, 26, lattice.Side1)))
	fmt.Println(row.DimerExtent(lattice.BothSides))
	fmt.Println(row.RunCount(), set.RunCount())
	// Output:
	// 11 false true
	// [21 23]
	// 5 12
	// 2 2
}

// A set stores a terrace's rows from the first holding a site, and a
// row's words from the first holding one: a site 5000 dimers along row
// 900 takes one word.
func ExampleSiteSet_RowRange() {
	set := lattice.NewSiteSet()
	set.Add(lattice.Site{Terrace: 0, Row: 900, Dimer: 5000})
	set.AddRun(0, 902, 10000, 10010)
	fmt.Println(set.RowRange(0))
	row := set.Row(0, 900)
	fmt.Println(row.Start(), row.End(), set.StorageWords())
	// Output:
	// 900 903
	// 9984 10048 2
}

// A site painted on one side grows to its whole dimer.
func ExampleSiteSet_WholeDimers() {
	set := lattice.NewSiteSet()
	set.Add(lattice.Site{Terrace: 0, Row: 2, Dimer: 7, Side: 1})
	for s := range set.WholeDimers().All() {
		fmt.Println(s)
	}
	// Output:
	// T0:R2:D7:0
	// T0:R2:D7:1
}
