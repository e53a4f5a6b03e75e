package lattice_test

import (
	"encoding/json"
	"fmt"
	"strings"

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

// Across a single-height step the dimer rows turn by 90° and the lattice
// shifts by a/(2√2).
func ExampleTerrace_AcrossStep() {
	lower := lattice.Terrace{Name: "lower", Rows: lattice.RowsAlongX}
	upper := lower.AcrossStep()
	fmt.Printf("rows along %v, offset (%.4f, %.4f) nm\n", upper.Rows, upper.Offset.X, upper.Offset.Y)
	// Output:
	// rows along y, offset (0.0000, 0.1920) nm
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
