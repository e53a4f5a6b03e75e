package gdsii

import (
	"bufio"
	"encoding/binary"
	"fmt"
	"io"
	"math"
	"time"

	"dimerpath/internal/atomicfile"
)

// MaxNameLen is the longest structure name Write accepts: the manual's
// 32 characters, which every reader takes.
const MaxNameLen = 32

// MaxStringLen is the longest TEXT string Write accepts (the manual's 512).
const MaxStringLen = 512

// Validate returns an error naming the first part of the library Write
// cannot write faithfully: units without an 8-byte real form or out of
// range, an empty, long, non-ASCII or duplicate structure name, a
// reference to a structure the library lacks, a polygon of fewer than 3
// or more than MaxXY−1 points, a path without points, a layer or data
// type outside 0..32767 (the manual's range is 0..255; larger numbers
// are a common extension), an array of no columns or rows, or a
// transform out of range.
func (l *Library) Validate() error {
	if err := checkUnits(l.UserUnit, l.MetresPerUnit); err != nil {
		return fmt.Errorf("gdsii: library %q: %v", l.Name, err)
	}
	if err := checkName("library", l.Name, 0); err != nil {
		return err
	}
	names := map[string]bool{}
	for _, s := range l.Structures {
		if err := checkName("structure", s.Name, MaxNameLen); err != nil {
			return err
		}
		if names[s.Name] {
			return fmt.Errorf("gdsii: structure %q is defined twice", s.Name)
		}
		names[s.Name] = true
	}
	for _, s := range l.Structures {
		where := func(kind string, i int) string { return fmt.Sprintf("gdsii: structure %q: %s %d", s.Name, kind, i) }
		for i, b := range s.Boundaries {
			if len(b.XY) < 3 || len(b.XY) > MaxXY-1 {
				return fmt.Errorf("%s: %d points, want 3 to %d", where("boundary", i), len(b.XY), MaxXY-1)
			}
			if err := checkLayer(b.Layer, b.Datatype); err != nil {
				return fmt.Errorf("%s: %v", where("boundary", i), err)
			}
		}
		for i, p := range s.Paths {
			if len(p.XY) < 1 || len(p.XY) > MaxXY {
				return fmt.Errorf("%s: %d points, want 1 to %d", where("path", i), len(p.XY), MaxXY)
			}
			if err := checkLayer(p.Layer, p.Datatype); err != nil {
				return fmt.Errorf("%s: %v", where("path", i), err)
			}
			if p.PathType < 0 || p.PathType > 4 {
				return fmt.Errorf("%s: path type %d is not 0 to 4", where("path", i), p.PathType)
			}
		}
		for i, t := range s.Texts {
			if err := checkLayer(t.Layer, t.TextType); err != nil {
				return fmt.Errorf("%s: %v", where("text", i), err)
			}
			if len(t.String) > MaxStringLen {
				return fmt.Errorf("%s: %d characters, at most %d", where("text", i), len(t.String), MaxStringLen)
			}
			if err := checkTransform(t.Trans); err != nil {
				return fmt.Errorf("%s: %v", where("text", i), err)
			}
		}
		for i, r := range s.Refs {
			if !names[r.Name] {
				return fmt.Errorf("%s: references %q, which the library does not define", where("reference", i), r.Name)
			}
			if r.IsArray() && (r.Cols < 1 || r.Rows < 1 || r.Cols > math.MaxInt16 || r.Rows > math.MaxInt16) {
				return fmt.Errorf("%s: %d x %d array, want 1 to %d of each", where("reference", i), r.Cols, r.Rows, math.MaxInt16)
			}
			if err := checkTransform(r.Trans); err != nil {
				return fmt.Errorf("%s: %v", where("reference", i), err)
			}
		}
	}
	return nil
}

func checkName(what, name string, maxLen int) error {
	if name == "" {
		return fmt.Errorf("gdsii: %s name is empty", what)
	}
	if maxLen > 0 && len(name) > maxLen {
		return fmt.Errorf("gdsii: %s name %q is longer than %d characters", what, name, maxLen)
	}
	for i := 0; i < len(name); i++ {
		if c := name[i]; c < 0x21 || c > 0x7E {
			return fmt.Errorf("gdsii: %s name %q holds a character other than printable ASCII", what, name)
		}
	}
	return nil
}

func checkLayer(layer, datatype int16) error {
	if layer < 0 || datatype < 0 {
		return fmt.Errorf("layer %d/%d: want 0 to 32767", layer, datatype)
	}
	return nil
}

// WriteFile writes the library to path through a temporary file renamed
// into place (internal/atomicfile): on any error path is left as it was.
func WriteFile(path string, l *Library) error {
	if err := l.Validate(); err != nil {
		return fmt.Errorf("%s: %w", path, err)
	}
	return atomicfile.Write(path, 0o644, func(w io.Writer) error { return Write(w, l) })
}

// Write validates the library (Validate) and writes it as a GDSII
// stream, release 6 (HEADER 600): polygons closed, each structure's
// elements in the order boundaries, paths, texts, references.
func Write(w io.Writer, l *Library) error {
	if err := l.Validate(); err != nil {
		return err
	}
	bw, ok := w.(*bufio.Writer)
	if !ok {
		bw = bufio.NewWriter(w)
	}
	e := &encoder{w: bw}
	stamp := timeRecord(l.Modified)
	e.int16s(recHeader, 600)
	e.int16s(recBgnLib, append(stamp, stamp...)...)
	e.str(recLibName, l.Name)
	e.reals(recUnits, l.UserUnit, l.MetresPerUnit)
	for _, s := range l.Structures {
		e.int16s(recBgnStr, append(stamp, stamp...)...)
		e.str(recStrName, s.Name)
		for _, b := range s.Boundaries {
			e.none(recBoundary)
			e.int16s(recLayer, b.Layer)
			e.int16s(recDatatype, b.Datatype)
			e.xy(append(b.XY[:len(b.XY):len(b.XY)], b.XY[0]))
			e.none(recEndEl)
		}
		for _, p := range s.Paths {
			e.none(recPath)
			e.int16s(recLayer, p.Layer)
			e.int16s(recDatatype, p.Datatype)
			if p.PathType != 0 {
				e.int16s(recPathType, p.PathType)
			}
			if p.Width != 0 {
				e.int32(recWidth, p.Width)
			}
			e.xy(p.XY)
			e.none(recEndEl)
		}
		for _, t := range s.Texts {
			e.none(recText)
			e.int16s(recLayer, t.Layer)
			e.int16s(recTextType, t.TextType)
			if t.Presentation != 0 {
				e.bits(recPresentation, t.Presentation)
			}
			e.trans(t.Trans)
			e.xy([]Point{t.At})
			e.str(recString, t.String)
			e.none(recEndEl)
		}
		for _, r := range s.Refs {
			if r.IsArray() {
				e.none(recARef)
			} else {
				e.none(recSRef)
			}
			e.str(recSName, r.Name)
			e.trans(r.Trans)
			if r.IsArray() {
				e.int16s(recColRow, int16(r.Cols), int16(r.Rows))
				e.xy([]Point{r.Origin, r.ColEnd, r.RowEnd})
			} else {
				e.xy([]Point{r.Origin})
			}
			e.none(recEndEl)
		}
		e.none(recEndStr)
	}
	e.none(recEndLib)
	if e.err != nil {
		return e.err
	}
	return bw.Flush()
}

// encoder writes records, keeping the first error.
type encoder struct {
	w   *bufio.Writer
	err error
	buf []byte
}

func (e *encoder) record(typ, dt byte, data []byte) {
	if e.err != nil {
		return
	}
	n := 4 + len(data)
	if n > MaxRecordLen {
		e.err = fmt.Errorf("gdsii: %s record of %d bytes is longer than %d", recordName(typ), n, MaxRecordLen)
		return
	}
	var h [4]byte
	binary.BigEndian.PutUint16(h[:], uint16(n))
	h[2], h[3] = typ, dt
	if _, err := e.w.Write(h[:]); err != nil {
		e.err = err
		return
	}
	if _, err := e.w.Write(data); err != nil {
		e.err = err
	}
}

func (e *encoder) none(typ byte) { e.record(typ, dtNone, nil) }

func (e *encoder) int16s(typ byte, v ...int16) {
	e.buf = e.buf[:0]
	for _, x := range v {
		e.buf = binary.BigEndian.AppendUint16(e.buf, uint16(x))
	}
	e.record(typ, dtInt16, e.buf)
}

func (e *encoder) int32(typ byte, v int32) {
	e.buf = binary.BigEndian.AppendUint32(e.buf[:0], uint32(v))
	e.record(typ, dtInt32, e.buf)
}

func (e *encoder) bits(typ byte, v uint16) {
	e.buf = binary.BigEndian.AppendUint16(e.buf[:0], v)
	e.record(typ, dtBits, e.buf)
}

func (e *encoder) reals(typ byte, v ...float64) {
	e.buf = e.buf[:0]
	for _, x := range v {
		b, err := PutReal8(x)
		if err != nil && e.err == nil {
			e.err = fmt.Errorf("gdsii: %s: %w", recordName(typ), err)
		}
		e.buf = append(e.buf, b[:]...)
	}
	e.record(typ, dtReal8, e.buf)
}

func (e *encoder) str(typ byte, s string) {
	e.buf = append(e.buf[:0], s...)
	if len(e.buf)%2 != 0 {
		e.buf = append(e.buf, 0)
	}
	e.record(typ, dtString, e.buf)
}

func (e *encoder) xy(p []Point) {
	e.buf = e.buf[:0]
	for _, q := range p {
		e.buf = binary.BigEndian.AppendUint32(e.buf, uint32(q.X))
		e.buf = binary.BigEndian.AppendUint32(e.buf, uint32(q.Y))
	}
	e.record(recXY, dtInt32, e.buf)
}

// trans writes STRANS, MAG and ANGLE where t is not the identity.
func (e *encoder) trans(t Transform) {
	if t.IsIdentity() {
		return
	}
	var b uint16
	if t.Reflect {
		b |= 0x8000
	}
	if t.AbsMag {
		b |= 0x0004
	}
	if t.AbsAngle {
		b |= 0x0002
	}
	e.bits(recSTrans, b)
	if t.Mag != 0 && t.Mag != 1 {
		e.reals(recMag, t.Mag)
	}
	if t.AngleDeg != 0 {
		e.reals(recAngle, t.AngleDeg)
	}
}

// timeRecord returns the six 2-byte values of a modification time.
func timeRecord(t time.Time) []int16 {
	if t.IsZero() {
		return make([]int16, 6)
	}
	t = t.UTC()
	return []int16{int16(t.Year()), int16(t.Month()), int16(t.Day()), int16(t.Hour()), int16(t.Minute()), int16(t.Second())}
}
