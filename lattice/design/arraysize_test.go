package design

import (
	"errors"
	"fmt"
	"math"
	"strings"
	"testing"

	"dimerpath/lattice"
)

func TestParseArraySize(t *testing.T) {
	for _, c := range []struct {
		in         string
		cols, rows int
		ok         bool
	}{
		{"1000x500", 1000, 500, true}, {" 20 X 3 ", 20, 3, true}, {"7", 7, 7, true},
		{"", 0, 0, false}, {"10x", 0, 0, false}, {"x10", 0, 0, false}, {"1.5x2", 0, 0, false}, {"ten", 0, 0, false},
	} {
		t.Run(c.in, func(t *testing.T) {
			cols, rows, err := ParseArraySize(c.in)
			if (err == nil) != c.ok || (c.ok && (cols != c.cols || rows != c.rows)) {
				t.Errorf("ParseArraySize(%q) = %d, %d, %v; want %d, %d, ok %v", c.in, cols, rows, err, c.cols, c.rows, c.ok)
			}
			if err != nil && !errors.Is(err, ErrArraySize) {
				t.Errorf("error %v does not wrap ErrArraySize", err)
			}
		})
	}
}

func TestWithArraySize(t *testing.T) {
	// 20 x 20 P windows (3 dimers) at 5 dimers by 2 rows from (10, 10)
	// on a 2 µm field with rows along x: a dimer exists while its centre
	// is in the field, so from the first window's dimers the copies that
	// fit follow from the lattice's pitches (CODATA 2018 geometry).
	d := windowArrayDesign(20, 20, 5)
	firstDimer := int(math.Round(10/lattice.DimerPitch - 1)) // the P window is centred on the dimer nearest x = 10
	lastDimer := int(math.Floor(2000 / lattice.DimerPitch))
	firstRow, lastRow := int(math.Round(10/lattice.RowSpacing)), int(math.Floor(2000/lattice.RowSpacing))
	fitCols := (lastDimer-(firstDimer+2))/5 + 1
	fitRows := (lastRow-firstRow)/2 + 1
	d.Variants[0].Regions = append(d.Variants[0].Regions, Region{Name: "marks", Role: RoleOther,
		Shapes: []Shape{{Kind: ShapeArray, Array: &Array{Of: &Shape{Kind: ShapeDimer, Points: [][2]float64{{1500, 1500}}}, Cols: 3, Rows: 3, PitchDimers: 4, PitchRows: 4}},
			{Kind: ShapeArray, Array: &Array{Of: &Shape{Kind: ShapeSite, Points: [][2]float64{{1600, 1600}}}, Cols: 2, Rows: 2, PitchDimers: 4, PitchRows: 4}}}})
	refs, err := d.Arrays("")
	if err != nil {
		t.Fatal(err)
	}
	var names []string
	for _, r := range refs {
		names = append(names, r.Name())
	}
	if got := strings.Join(names, " "); got != "donors marks marks#2" {
		t.Fatalf("arrays %q", got)
	}
	ref, err := d.Array("", "donors")
	if err != nil || ref.Cols != 20 || ref.Of != ShapeWindow {
		t.Fatalf("Array(donors) = %+v, %v", ref, err)
	}
	if _, err := d.Array("", "nothing"); err == nil || !strings.Contains(err.Error(), `"donors", "marks", "marks#2"`) {
		t.Errorf("unknown array: %v", err)
	}

	if _, err := d.WithArraySize("", ref, fitCols, fitRows); err != nil {
		t.Errorf("the largest array that fits is refused: %v", err)
	}
	big, err := d.WithArraySize("", ref, 1000, 1200)
	if err != nil {
		t.Fatal(err)
	}
	if a := big.Variants[0].Regions[0].Shapes[0].Array; a.Cols != 1000 || a.Rows != 1200 {
		t.Errorf("resized to %dx%d", a.Cols, a.Rows)
	}
	if a := d.Variants[0].Regions[0].Shapes[0].Array; a.Cols != 20 || a.Rows != 20 {
		t.Errorf("the original changed to %dx%d", a.Cols, a.Rows)
	}
	if err := big.Validate(); err != nil {
		t.Errorf("the resized design does not validate: %v", err)
	}
	lay, err := big.Lay("")
	if err != nil {
		t.Fatal(err)
	}
	if n := len(lay.Regions[0].Windows); n != 1000*1200 {
		t.Errorf("%d windows laid out", n)
	}

	for _, c := range []struct {
		ref        ArrayRef
		cols, rows int
		want       string
	}{
		{ref, 1100, 10, "column 1100, row 1 lies off the lattice"},
		{ref, 1100, 10, fmt.Sprintf("at most %d columns and %d rows fit", fitCols, fitRows)},
		{ref, fitCols + 1, 1, fmt.Sprintf("column %d, row 1 lies off", fitCols+1)},
		{ref, 1, fitRows + 1, fmt.Sprintf("column 1, row %d lies off", fitRows+1)},
		{ref, 10, 1300, "column 1, row 1300"},
		{ref, 2001, 2000, "4002000 copies, more than the limit"},
		{ref, 0, 5, "at least 1 x 1"},
		{refs[1], 400, 3, "column 400"},
		{refs[2], 3, 200, "row 200"},
	} {
		_, err := d.WithArraySize("", c.ref, c.cols, c.rows)
		if err == nil || !errors.Is(err, ErrArraySize) || !strings.Contains(err.Error(), c.want) {
			t.Errorf("WithArraySize(%s, %dx%d) = %v, want an ErrArraySize saying %q", c.ref.Name(), c.cols, c.rows, err, c.want)
		}
	}
}
