package lattice

import (
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"

	"github.com/golang/geo/r2"

	"dimerpath/internal/csvfile"
)

// OffLatticeNM is the distance from the nearest site (or window centre)
// beyond which an imported point is reported as off the lattice.
const OffLatticeNM = 0.1

// MaxCSVPoints bounds the points one CSV import reads.
const MaxCSVPoints = 10_000_000

// CSVPoint is one position read from a CSV file, in field nm, with the
// line it stands on.
type CSVPoint struct {
	Line int
	At   r2.Point
}

// MaxCSVBytes bounds a point file (256 MiB: MaxCSVPoints short lines);
// a larger file is refused before it is read.
const MaxCSVBytes = 256 << 20

// ReadPointsCSV reads positions in nm, one "x,y" per line, as written by
// a script that lays out an array. Lines starting with # are comments;
// the first line may be a header (any line whose fields are not both
// numbers, before the first point). name is used in errors. A malformed
// line stops the read with a *csvfile.Error naming its line and column
// (x or y). At most MaxCSVPoints points, MaxCSVBytes bytes and
// csvfile.MaxLine bytes a line are read.
func ReadPointsCSV(r io.Reader, name string) ([]CSVPoint, error) {
	cr, err := csvfile.NewReader(r, name, MaxCSVBytes, nil)
	if err != nil {
		return nil, err
	}
	columns := [2]string{"x", "y"}
	var pts []CSVPoint
	first := true
	for {
		rec, line, err := cr.Read()
		if err == io.EOF {
			return pts, nil
		}
		if err != nil {
			return nil, err
		}
		if len(rec) == 1 && strings.TrimSpace(rec[0]) == "" {
			continue
		}
		if len(rec) != 2 {
			return nil, cr.Errorf(line, "", "", "has %d fields; want 2, x and y in nm", len(rec))
		}
		var xy [2]float64
		bad := -1
		for k, f := range rec {
			v, err := strconv.ParseFloat(strings.TrimSpace(f), 64)
			if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
				bad = k
				break
			}
			xy[k] = v
		}
		if bad >= 0 {
			if first {
				first = false
				continue // a header line
			}
			return nil, cr.Errorf(line, columns[bad], rec[bad], "not a finite number of nm")
		}
		first = false
		if len(pts) >= MaxCSVPoints {
			return nil, cr.Errorf(line, "", "", "more than %d points, the limit", MaxCSVPoints)
		}
		pts = append(pts, CSVPoint{Line: line, At: r2.Point{X: xy[0], Y: xy[1]}})
	}
}

// OffLattice is an imported point that lies more than OffLatticeNM from
// the site or window centre it was snapped to.
type OffLattice struct {
	CSVPoint
	Snapped r2.Point // where it went
	OffNM   float64  // how far it moved
}

// String formats the report line, for example
// "line 12: (10.300, 4.000) nm is 0.142 nm from the nearest site".
func (o OffLattice) String() string {
	return fmt.Sprintf("line %d: (%.3f, %.3f) nm is %.3f nm from the nearest lattice position (%.3f, %.3f)", o.Line, o.At.X, o.At.Y, o.OffNM, o.Snapped.X, o.Snapped.Y)
}

// OffFieldError lists the imported points that lie on no terrace.
type OffFieldError struct {
	File  string
	Lines []int
}

func (e *OffFieldError) Error() string {
	const show = 20
	ls := make([]string, 0, show)
	for i, l := range e.Lines {
		if i == show {
			ls = append(ls, fmt.Sprintf("and %d more", len(e.Lines)-show))
			break
		}
		ls = append(ls, strconv.Itoa(l))
	}
	return fmt.Sprintf("%s: %d point(s) lie outside the field or on no terrace: line(s) %s", e.File, len(e.Lines), strings.Join(ls, ", "))
}

// SnapSites snaps each point to its nearest site (Snap). It returns the
// sites in input order and every point more than OffLatticeNM from its
// site; points on no terrace give an *OffFieldError naming their lines
// (file names the input).
func (s *Surface) SnapSites(file string, pts []CSVPoint) ([]Site, []OffLattice, error) {
	sites := make([]Site, 0, len(pts))
	var off []OffLattice
	var outside []int
	for _, p := range pts {
		site, d, ok := s.Snap(p.At)
		if !ok {
			outside = append(outside, p.Line)
			continue
		}
		sites = append(sites, site)
		if d > OffLatticeNM {
			off = append(off, OffLattice{CSVPoint: p, Snapped: s.Position(site), OffNM: d})
		}
	}
	if len(outside) > 0 {
		return nil, nil, &OffFieldError{File: file, Lines: outside}
	}
	return sites, off, nil
}

// SnapWindows places a window of template t at each point taken as a
// window centre (PlaceWindow) and reports every point more than
// OffLatticeNM from its window's centre; points on no terrace give an
// *OffFieldError.
func (s *Surface) SnapWindows(file string, t WindowTemplate, pts []CSVPoint) ([]Window, []OffLattice, error) {
	ws := make([]Window, 0, len(pts))
	var off []OffLattice
	var outside []int
	for _, p := range pts {
		w, ok := s.PlaceWindow(t, p.At)
		if !ok {
			outside = append(outside, p.Line)
			continue
		}
		ws = append(ws, w)
		c := s.WindowCentre(w)
		if d := p.At.Sub(c).Norm(); d > OffLatticeNM {
			off = append(off, OffLattice{CSVPoint: p, Snapped: c, OffNM: d})
		}
	}
	if len(outside) > 0 {
		return nil, nil, &OffFieldError{File: file, Lines: outside}
	}
	return ws, off, nil
}
