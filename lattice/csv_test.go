package lattice

import (
	"errors"
	"fmt"
	"strings"
	"testing"

	"dimerpath/internal/csvfile"
)

func TestReadPointsCSV(t *testing.T) {
	s := mustSurface(t, 100, 100)
	on := s.Position(Site{0, 10, 20, 1})
	off := s.Position(Site{0, 30, 40, 0})
	in := fmt.Sprintf("# array from a script\nx_nm,y_nm\n%.6f,%.6f\n\n# moved by 0.15 nm\n%.6f, %.6f\n",
		on.X, on.Y, off.X+0.15, off.Y)
	pts, err := ReadPointsCSV(strings.NewReader(in), "pts.csv")
	if err != nil {
		t.Fatal(err)
	}
	if len(pts) != 2 || pts[0].Line != 3 || pts[1].Line != 6 {
		t.Fatalf("points %+v; want lines 3 and 6", pts)
	}
	sites, offs, err := s.SnapSites("pts.csv", pts)
	if err != nil {
		t.Fatal(err)
	}
	if sites[0] != (Site{0, 10, 20, 1}) || sites[1] != (Site{0, 30, 40, 0}) {
		t.Errorf("sites %v", sites)
	}
	if len(offs) != 1 || offs[0].Line != 6 || offs[0].OffNM < 0.149 || offs[0].OffNM > 0.151 {
		t.Errorf("off-lattice report %v; want line 6, 0.15 nm", offs)
	}
	// Window centres: a P window centred on a dimer is on the lattice.
	c := s.DimerCentre(0, 50, 60)
	ws, offs, err := s.SnapWindows("w.csv", PhosphineWindow, []CSVPoint{{Line: 1, At: c}})
	if err != nil || len(offs) != 0 || ws[0].FirstDimer != 59 || ws[0].Row != 50 {
		t.Errorf("SnapWindows = %v, %v, %v", ws, offs, err)
	}
}

func TestReadPointsCSVRefuses(t *testing.T) {
	tests := []struct {
		in     string
		line   int
		column string
		msg    string
	}{
		{"1,2\n3,x\n", 2, "y", `bad.csv:2: y = "x": not a finite number of nm`},
		{"x,y\n1,2\n3,NaN\n", 3, "y", "not a finite number"},
		{"1,2,3\n", 1, "", "bad.csv:1: has 3 fields"},
		{"1,2\n\"3,4\n", 2, "", ""},
		{"x,y\n" + strings.Repeat("1", 100000) + ",2\n", 2, "", "bad.csv:2: line longer than 64 KiB, the limit"},
	}
	for _, tc := range tests {
		_, err := ReadPointsCSV(strings.NewReader(tc.in), "bad.csv")
		ce, ok := errors.AsType[*csvfile.Error](err)
		if !ok || ce.Line != tc.line || ce.Column != tc.column || !strings.Contains(err.Error(), tc.msg) {
			t.Errorf("ReadPointsCSV(%.40q) = %v; want line %d column %q %q", tc.in, err, tc.line, tc.column, tc.msg)
		}
	}
	s := mustSurface(t, 100, 100)
	_, _, err := s.SnapSites("far.csv", []CSVPoint{{Line: 4, At: pt(500, 5)}, {Line: 9, At: pt(5, -1)}})
	var oe *OffFieldError
	if !errors.As(err, &oe) || len(oe.Lines) != 2 || oe.Lines[1] != 9 {
		t.Errorf("SnapSites off the field: %v", err)
	}
}

func FuzzReadPointsCSV(f *testing.F) {
	for _, s := range []string{"x,y\n1,2\n", "# c\n1,2\n3,4\n", "1,2,3", "\"", "1,NaN\n", "a,b\nc,d\n"} {
		f.Add([]byte(s))
	}
	s, _ := NewSurface(100, 100)
	f.Fuzz(func(t *testing.T, data []byte) {
		pts, err := ReadPointsCSV(strings.NewReader(string(data)), "fuzz.csv")
		if err != nil {
			return
		}
		sites, _, err := s.SnapSites("fuzz.csv", pts)
		if err == nil {
			for _, site := range sites {
				if !s.Valid(site) {
					t.Fatalf("snapped to invalid site %v", site)
				}
			}
		}
	})
}
