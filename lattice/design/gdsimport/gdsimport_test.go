package gdsimport

import (
	"bytes"
	"math"
	"os"
	"path/filepath"
	"strings"
	"testing"

	"github.com/golang/geo/r2"

	"dimerpath/internal/gdsii"
	"dimerpath/lattice"
)

// micronLayout is a layout drawn in µm user units with 1 nm database
// units (1e-3 µm, 1e-9 m), as many mask tools write: a 2 x 1 µm
// rectangle on 5/0, a 100 nm-wide path on 6/0, placed twice (once
// reflected and turned), and two marks.
func micronLayout(t testing.TB) []byte {
	t.Helper()
	lib := &gdsii.Library{Name: "MASK.DB", UserUnit: 1e-3, MetresPerUnit: 1e-9, Structures: []*gdsii.Structure{
		{Name: "PAD",
			Boundaries: []gdsii.Boundary{{Layer: 5, XY: []gdsii.Point{{X: 0, Y: 0}, {X: 2000, Y: 0}, {X: 2000, Y: 1000}, {X: 0, Y: 1000}}}},
			Paths:      []gdsii.Path{{Layer: 6, Width: 100, PathType: 2, XY: []gdsii.Point{{X: 0, Y: 2000}, {X: 1000, Y: 2000}, {X: 1000, Y: 3000}}}}},
		{Name: "TOP",
			Texts: []gdsii.Text{{Layer: 63, At: gdsii.Point{X: 10000, Y: 10000}, String: "A"}, {Layer: 63, At: gdsii.Point{X: 14000, Y: 10000}, String: "B"}},
			Refs: []gdsii.Ref{{Name: "PAD", Origin: gdsii.Point{X: 10000, Y: 11000}},
				{Name: "PAD", Origin: gdsii.Point{X: 20000, Y: 11000}, Trans: gdsii.Transform{Reflect: true, AngleDeg: 90}}}},
	}}
	var buf bytes.Buffer
	if err := gdsii.Write(&buf, lib); err != nil {
		t.Fatal(err)
	}
	return buf.Bytes()
}

func area(p []r2.Point) float64 {
	a := 0.0
	for i := range p {
		q := p[(i+1)%len(p)]
		a += p[i].X*q.Y - q.X*p[i].Y
	}
	return math.Abs(a) / 2
}

func TestReadConvertsUnitsAndFlattens(t *testing.T) {
	l, err := Read(bytes.NewReader(micronLayout(t)), "mask.gds", Options{Layers: []Layer{{Layer: 5, AnyDatatype: true}, {Layer: 6}}})
	if err != nil {
		t.Fatal(err)
	}
	// 2 rectangles and 2 x 2 path segments.
	if len(l.Polygons) != 6 || l.Paths != 4 || len(l.Labels) != 2 {
		t.Fatalf("%d polygons (%d from paths), %d labels; want 6 (4), 2", len(l.Polygons), l.Paths, len(l.Labels))
	}
	// The rectangle is 2000 x 1000 nm wherever it is placed; the second
	// copy is reflected then turned by 90°: (x, y) -> (y, x) + origin.
	if a := area(l.Polygons[0].Points); math.Abs(a-2e6) > 1e-6 {
		t.Errorf("rectangle area %g nm², want 2e6", a)
	}
	want := []r2.Point{{X: 20000, Y: 11000}, {X: 20000, Y: 13000}, {X: 21000, Y: 13000}, {X: 21000, Y: 11000}}
	for i, p := range l.Polygons[1].Points {
		if p.Sub(want[i]).Norm() > 1e-9 {
			t.Errorf("reflected, turned rectangle point %d = %v, want %v", i, p, want[i])
		}
	}
	// A type-2 path segment 1000 nm long, 100 wide, extended 50 at both
	// ends: 1100 x 100.
	if a := area(l.Polygons[2].Points); math.Abs(a-1100*100) > 1e-6 {
		t.Errorf("path segment area %g, want %g", a, 1100.0*100)
	}
}

func TestFrameFromMarks(t *testing.T) {
	l, err := Read(bytes.NewReader(micronLayout(t)), "mask.gds", Options{Layers: []Layer{{Layer: 5}}})
	if err != nil {
		t.Fatal(err)
	}
	d := designWithFiducials(t, r2.Point{X: 100, Y: 200}, r2.Point{X: 100, Y: 4200})
	// A (10, 10) µm and B (14, 10) µm are 4 µm apart along x; the
	// fiducials 4 µm apart along y: a turn of -90°.
	f, err := l.FrameFromMarks(d, [2]Mark{{"A", "F1"}, {"B", "F2"}})
	if err != nil {
		t.Fatal(err)
	}
	if math.Abs(f.RotationDeg-270) > 1e-9 || f.ToChip(r2.Point{X: 100, Y: 200}).Sub(r2.Point{X: 10000, Y: 10000}).Norm() > 1e-6 {
		t.Errorf("frame %+v", f)
	}
	d2 := designWithFiducials(t, r2.Point{X: 100, Y: 200}, r2.Point{X: 100, Y: 4300})
	if _, err := l.FrameFromMarks(d2, [2]Mark{{"A", "F1"}, {"B", "F2"}}); err == nil {
		t.Error("marks 4000 nm apart matched to fiducials 4100 nm apart")
	}
}

func TestParseLayerAndMarks(t *testing.T) {
	for s, want := range map[string]Layer{"5": {Layer: 5, AnyDatatype: true}, "5/3": {Layer: 5, Datatype: 3}, " 12/0 ": {Layer: 12}} {
		if got, err := ParseLayer(s); err != nil || got != want {
			t.Errorf("ParseLayer(%q) = %v, %v; want %v", s, got, err, want)
		}
	}
	for _, s := range []string{"", "a", "5/", "-1", "5/x", "40000"} {
		if _, err := ParseLayer(s); err == nil {
			t.Errorf("ParseLayer(%q) accepted", s)
		}
	}
	if m, err := ParseMarks("A=F1, B = F2"); err != nil || m != [2]Mark{{"A", "F1"}, {"B", "F2"}} {
		t.Errorf("ParseMarks = %v, %v", m, err)
	}
	for _, s := range []string{"A=F1", "A=F1,B", "=F1,B=F2", "A=F1,B=F2,C=F3"} {
		if _, err := ParseMarks(s); err == nil {
			t.Errorf("ParseMarks(%q) accepted", s)
		}
	}
}

// FuzzRead feeds the import arbitrary bytes: it must refuse them or
// read, map and rasterise them onto a small lattice, never panic.
func FuzzRead(f *testing.F) {
	f.Add(micronLayout(f))
	surf, err := lattice.NewSurface(50, 50)
	if err != nil {
		f.Fatal(err)
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		l, err := Read(bytes.NewReader(data), "fuzz.gds", Options{Layers: []Layer{{Layer: 5, AnyDatatype: true}, {Layer: 6, AnyDatatype: true}},
			Limits: gdsii.FlattenLimits{Elements: 10000, Points: 100000, Depth: 16}})
		if err != nil {
			return
		}
		l.Sites(surf, lattice.ChipFrame{OffsetNM: r2.Point{X: 10000, Y: 11000}})
		l.Reference("r", lattice.ChipFrame{})
	})
}

// Issue 16: a layout larger than MaxFileBytes is refused by its size,
// before a byte is read (a valid 1 GiB layout took 48 s and 1.5 GB
// before its 10^7th element was refused).
func TestReadRefusesALargeLayout(t *testing.T) {
	path := filepath.Join(t.TempDir(), "chip.gds")
	f, err := os.Create(path)
	if err != nil {
		t.Fatal(err)
	}
	f.Write(micronLayout(t))
	f.Truncate(1 << 30) // sparse: no disk, no time
	f.Close()
	want := "chip.gds: the file holds 1 GiB, more than the 256 MiB limit for a GDSII layout"
	if _, err := ReadFile(path, Options{Layers: []Layer{{Layer: 5, AnyDatatype: true}}}); err == nil || !strings.Contains(err.Error(), want) {
		t.Errorf("ReadFile = %v; want %q", err, want)
	}
	if _, err := Inspect(path); err == nil || !strings.Contains(err.Error(), want) {
		t.Errorf("Inspect = %v; want %q", err, want)
	}
}
