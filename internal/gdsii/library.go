package gdsii

import (
	"fmt"
	"math"
	"time"
)

// Point is a position in database units.
type Point struct{ X, Y int32 }

// Library is a GDSII library: its units and its structures.
type Library struct {
	// Name is the library name (LIBNAME).
	Name string
	// UserUnit is the size of a database unit in user units (the first
	// UNITS real), MetresPerUnit its size in metres (the second): 1 pm
	// database units with 1 nm user units are 1e-3 and 1e-12.
	UserUnit, MetresPerUnit float64
	// Modified is written as the library's and each structure's
	// modification and access time; the zero time writes zeros, so the
	// same library gives the same bytes.
	Modified time.Time
	// Structures in file order; names are unique.
	Structures []*Structure
	// Skipped counts the elements read but not kept, by record name (BOX,
	// NODE), so a caller can say what it left out.
	Skipped map[string]int
}

// Structure is one named cell.
type Structure struct {
	Name       string
	Boundaries []Boundary
	Paths      []Path
	Texts      []Text
	Refs       []Ref
	// Offset is the byte offset of its BGNSTR record in the file read
	// (0 for a structure made in memory), for error messages.
	Offset int64
}

// Boundary is a filled polygon. XY holds its vertices without the
// closing repeat of the first, which the file has and Write adds.
type Boundary struct {
	Layer, Datatype int16
	XY              []Point
}

// Path is a polyline of the given width: PathType 0 ends flush with
// the end points, 1 rounded, 2 extended by half the width.
type Path struct {
	Layer, Datatype int16
	PathType        int16
	Width           int32 // database units; negative means absolute (not scaled by references)
	XY              []Point
}

// Text is a label at a point.
type Text struct {
	Layer, TextType int16
	At              Point
	String          string
	// Presentation holds the font and justification bits, kept as read.
	Presentation uint16
	Trans        Transform
}

// Transform places an element or a referenced structure: the points are
// reflected about the x axis (when Reflect), scaled by Mag, rotated by
// AngleDeg counter-clockwise, then moved to the reference's origin.
type Transform struct {
	Reflect bool
	// Mag is the magnification; 0 means 1.
	Mag float64
	// AngleDeg is the rotation in degrees, counter-clockwise.
	AngleDeg float64
	// AbsMag and AbsAngle mark a magnification or angle that does not
	// compound with the parents' (the STRANS absolute bits).
	AbsMag, AbsAngle bool
}

// IsIdentity reports whether t leaves points where they are.
func (t Transform) IsIdentity() bool {
	return !t.Reflect && (t.Mag == 0 || t.Mag == 1) && t.AngleDeg == 0 && !t.AbsMag && !t.AbsAngle
}

// Scale returns the magnification, 1 when Mag is 0.
func (t Transform) Scale() float64 {
	if t.Mag == 0 {
		return 1
	}
	return t.Mag
}

// Ref places a structure once (SREF, Cols = Rows = 0) or as a Cols x Rows
// array (AREF). An array's instance (i, j) lies at
// Origin + i·(ColEnd−Origin)/Cols + j·(RowEnd−Origin)/Rows, each with the
// transform.
type Ref struct {
	Name       string
	Trans      Transform
	Origin     Point
	Cols, Rows int
	// ColEnd and RowEnd are the AREF's second and third points: the
	// origin displaced by Cols column pitches and by Rows row pitches.
	ColEnd, RowEnd Point
	// Offset is the byte offset of the element's first record in the
	// file read (0 when made in memory).
	Offset int64
}

// IsArray reports whether r is an AREF.
func (r Ref) IsArray() bool { return r.Cols > 0 || r.Rows > 0 }

// Instances returns the number of placements r makes: Cols·Rows for an
// array, 1 otherwise.
func (r Ref) Instances() int64 {
	if r.IsArray() {
		return int64(r.Cols) * int64(r.Rows)
	}
	return 1
}

// Structure returns the structure with the given name, or nil.
func (l *Library) Structure(name string) *Structure {
	for _, s := range l.Structures {
		if s.Name == name {
			return s
		}
	}
	return nil
}

// Tops returns the structures no other structure references, in file
// order.
func (l *Library) Tops() []*Structure {
	used := map[string]bool{}
	for _, s := range l.Structures {
		for _, r := range s.Refs {
			used[r.Name] = true
		}
	}
	var tops []*Structure
	for _, s := range l.Structures {
		if !used[s.Name] {
			tops = append(tops, s)
		}
	}
	return tops
}

// checkUnits returns an error unless the two UNITS reals describe a
// plausible database unit: positive and finite, a user unit not larger
// than a million database units and a database unit between 1e-15 m
// (a femtometre) and 1 m.
func checkUnits(user, metres float64) error {
	switch {
	case !(user > 0) || math.IsInf(user, 0):
		return fmt.Errorf("database unit in user units %g: want a positive finite number", user)
	case !(metres >= 1e-15 && metres <= 1):
		return fmt.Errorf("database unit in metres %g: want 1e-15 to 1", metres)
	case user > 1e6 || user < 1e-15:
		return fmt.Errorf("database unit in user units %g: want 1e-15 to 1e6", user)
	}
	return nil
}

// MaxMag bounds magnifications, read or written: a larger one would put
// every coordinate of a referenced structure beyond the 32-bit range.
const MaxMag = 1e6

// checkTransform returns an error for a magnification that is not
// positive and finite up to MaxMag, or an angle that is not finite.
func checkTransform(t Transform) error {
	if t.Mag != 0 && !(t.Mag > 0 && t.Mag <= MaxMag) {
		return fmt.Errorf("magnification %g: want more than 0 and at most %g", t.Mag, float64(MaxMag))
	}
	if math.IsNaN(t.AngleDeg) || math.IsInf(t.AngleDeg, 0) || math.Abs(t.AngleDeg) > 1e6 {
		return fmt.Errorf("angle %g°: want a finite angle", t.AngleDeg)
	}
	return nil
}
