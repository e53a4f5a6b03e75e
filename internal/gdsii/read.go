package gdsii

import (
	"bufio"
	"bytes"
	"encoding/binary"
	"errors"
	"fmt"
	"io"
	"math"
	"strings"
	"time"
)

// Error is a problem with one record of a stream: its byte offset from
// the start of the input and its name.
type Error struct {
	Offset int64
	Record string
	Err    error
}

func (e *Error) Error() string {
	if e.Record == "" {
		return fmt.Sprintf("byte %d: %v", e.Offset, e.Err)
	}
	return fmt.Sprintf("%s record at byte %d: %v", e.Record, e.Offset, e.Err)
}

func (e *Error) Unwrap() error { return e.Err }

// ErrLimit is wrapped by errors about input beyond ReadLimits or
// FlattenLimits.
var ErrLimit = errors.New("beyond the limit")

// ReadLimits bound what Read keeps, so a hostile file cannot exhaust
// memory; each is checked as records arrive.
type ReadLimits struct {
	Bytes      int64 // input size
	Structures int
	Elements   int // elements of every kind, in all structures
	Points     int // XY points kept, in all elements
}

// DefaultReadLimits are generous for device and test-chip layouts (a
// 32-bit address space of points would need 16 GB): 1 GiB of input,
// 10^5 structures, 10^7 elements, 5·10^7 points.
var DefaultReadLimits = ReadLimits{Bytes: 1 << 30, Structures: 100_000, Elements: 10_000_000, Points: 50_000_000}

// Read reads a GDSII stream with DefaultReadLimits.
func Read(r io.Reader) (*Library, error) { return ReadLimited(r, DefaultReadLimits) }

// ReadLimited reads a GDSII stream. Errors are *Error values naming the
// record and its byte offset; limits exceeded wrap ErrLimit.
func ReadLimited(r io.Reader, lim ReadLimits) (*Library, error) {
	rd := &reader{in: bufio.NewReaderSize(r, 1<<16), lim: lim}
	lib, err := rd.library()
	if err != nil {
		return nil, err
	}
	return lib, nil
}

type reader struct {
	in  *bufio.Reader
	lim ReadLimits
	off int64 // offset of the next record

	// the record just read
	typ, dt byte
	at      int64
	data    []byte
	buf     [MaxRecordLen]byte

	nStructures, nElements, points int
}

// dataType says which payload each record type must carry; records not
// listed are accepted with any payload and skipped.
var dataType = map[byte]byte{
	recHeader: dtInt16, recBgnLib: dtInt16, recLibName: dtString, recUnits: dtReal8,
	recEndLib: dtNone, recBgnStr: dtInt16, recStrName: dtString, recEndStr: dtNone,
	recBoundary: dtNone, recPath: dtNone, recSRef: dtNone, recARef: dtNone, recText: dtNone,
	recLayer: dtInt16, recDatatype: dtInt16, recWidth: dtInt32, recXY: dtInt32, recEndEl: dtNone,
	recSName: dtString, recColRow: dtInt16, recNode: dtNone, recTextType: dtInt16,
	recPresentation: dtBits, recString: dtString, recSTrans: dtBits, recMag: dtReal8,
	recAngle: dtReal8, recPathType: dtInt16, recBox: dtNone, recBoxType: dtInt16,
	recNodeType: dtInt16,
}

var dataTypeNames = [...]string{"no data", "bit array", "2-byte integer", "4-byte integer", "4-byte real", "8-byte real", "string"}

func dataTypeName(dt byte) string {
	if int(dt) < len(dataTypeNames) {
		return dataTypeNames[dt]
	}
	return fmt.Sprintf("data type %d", dt)
}

// fail returns an *Error about the record just read.
func (rd *reader) fail(format string, a ...any) error {
	return &Error{Offset: rd.at, Record: recordName(rd.typ), Err: fmt.Errorf(format, a...)}
}

func (rd *reader) limit(what string, max int) error {
	return &Error{Offset: rd.at, Record: recordName(rd.typ), Err: fmt.Errorf("more than %d %s: %w", max, what, ErrLimit)}
}

// next reads one record, checking its length against what remains and
// its data type against its record type.
func (rd *reader) next() error {
	rd.at = rd.off
	var h [4]byte
	n, err := io.ReadFull(rd.in, h[:])
	if err != nil {
		if n == 0 && errors.Is(err, io.EOF) {
			return &Error{Offset: rd.at, Err: errors.New("the stream ends without ENDLIB")}
		}
		if errors.Is(err, io.ErrUnexpectedEOF) {
			return &Error{Offset: rd.at, Err: fmt.Errorf("the stream ends inside a record header (%d of 4 bytes)", n)}
		}
		return &Error{Offset: rd.at, Err: err}
	}
	length := int(binary.BigEndian.Uint16(h[:2]))
	rd.typ, rd.dt = h[2], h[3]
	if length < 4 {
		return rd.fail("record length %d is less than its 4-byte header", length)
	}
	if length%2 != 0 {
		return rd.fail("record length %d is odd", length)
	}
	if rd.lim.Bytes > 0 && rd.off+int64(length) > rd.lim.Bytes {
		return rd.fail("the stream is longer than %d bytes: %w", rd.lim.Bytes, ErrLimit)
	}
	rd.data = rd.buf[:length-4]
	if n, err := io.ReadFull(rd.in, rd.data); err != nil {
		if errors.Is(err, io.EOF) || errors.Is(err, io.ErrUnexpectedEOF) {
			return rd.fail("record length %d runs past the end of the stream: only %d of its %d data bytes remain", length, n, length-4)
		}
		return rd.fail("%v", err)
	}
	rd.off += int64(length)
	if want, ok := dataType[rd.typ]; ok && rd.dt != want {
		return rd.fail("data type is %s, want %s", dataTypeName(rd.dt), dataTypeName(want))
	}
	size := map[byte]int{dtBits: 2, dtInt16: 2, dtInt32: 4, dtReal4: 4, dtReal8: 8}[rd.dt]
	if size > 0 && len(rd.data)%size != 0 {
		return rd.fail("%d data bytes are not a whole number of %d-byte values", len(rd.data), size)
	}
	if rd.dt == dtNone && len(rd.data) != 0 {
		if _, known := dataType[rd.typ]; known {
			return rd.fail("carries %d data bytes, want none", len(rd.data))
		}
	}
	return nil
}

// int16s returns the record's 2-byte values, wanting at least min and at
// most max of them (max < 0: any number).
func (rd *reader) int16s(min, max int) ([]int16, error) {
	n := len(rd.data) / 2
	if n < min || (max >= 0 && n > max) {
		return nil, rd.countErr(n, min, max)
	}
	v := make([]int16, n)
	for i := range v {
		v[i] = int16(binary.BigEndian.Uint16(rd.data[2*i:]))
	}
	return v, nil
}

func (rd *reader) countErr(n, min, max int) error {
	switch {
	case min == max:
		return rd.fail("holds %d values, want %d", n, min)
	case max < 0:
		return rd.fail("holds %d values, want at least %d", n, min)
	}
	return rd.fail("holds %d values, want %d to %d", n, min, max)
}

func (rd *reader) int16() (int16, error) {
	v, err := rd.int16s(1, 1)
	if err != nil {
		return 0, err
	}
	return v[0], nil
}

func (rd *reader) int32() (int32, error) {
	if len(rd.data) != 4 {
		return 0, rd.countErr(len(rd.data)/4, 1, 1)
	}
	return int32(binary.BigEndian.Uint32(rd.data)), nil
}

func (rd *reader) bits() (uint16, error) {
	if len(rd.data) != 2 {
		return 0, rd.countErr(len(rd.data)/2, 1, 1)
	}
	return binary.BigEndian.Uint16(rd.data), nil
}

func (rd *reader) reals(n int) ([]float64, error) {
	if len(rd.data) != 8*n {
		return nil, rd.countErr(len(rd.data)/8, n, n)
	}
	v := make([]float64, n)
	for i := range v {
		v[i] = Real8([8]byte(rd.data[8*i:]))
	}
	return v, nil
}

// str returns the record's string without its NUL padding. Names and
// labels must be printable ASCII or UTF-8 text without control bytes.
func (rd *reader) str() (string, error) {
	s := strings.TrimRight(string(rd.data), "\x00")
	for i, r := range s {
		if r < 0x20 || r == 0x7F || r == '\uFFFD' {
			return "", rd.fail("string holds the control or invalid byte 0x%02X at position %d", s[i], i)
		}
	}
	return s, nil
}

// xy returns the record's points, counted against the limit.
func (rd *reader) xy() ([]Point, error) {
	n := len(rd.data) / 8
	if len(rd.data)%8 != 0 {
		return nil, rd.fail("%d data bytes are not whole x, y pairs", len(rd.data))
	}
	if rd.points += n; rd.lim.Points > 0 && rd.points > rd.lim.Points {
		return nil, rd.limit("points", rd.lim.Points)
	}
	p := make([]Point, n)
	for i := range p {
		p[i].X = int32(binary.BigEndian.Uint32(rd.data[8*i:]))
		p[i].Y = int32(binary.BigEndian.Uint32(rd.data[8*i+4:]))
	}
	return p, nil
}

func (rd *reader) expect(typ byte) error {
	if err := rd.next(); err != nil {
		return err
	}
	if rd.typ != typ {
		return rd.fail("found here, want %s", recordName(typ))
	}
	return nil
}

func (rd *reader) library() (*Library, error) {
	// A stream starts with a 6-byte HEADER record: look before reading
	// a length that may be anything.
	if h, err := rd.in.Peek(4); err == nil && !bytes.Equal(h, []byte{0, 6, recHeader, dtInt16}) {
		return nil, &Error{Offset: 0, Err: errors.New("not a GDSII stream: it does not start with a HEADER record")}
	}
	if err := rd.next(); err != nil {
		return nil, err
	}
	if _, err := rd.int16s(1, 1); err != nil {
		return nil, err
	}
	if err := rd.expect(recBgnLib); err != nil {
		return nil, err
	}
	ts, err := rd.int16s(12, 12)
	if err != nil {
		return nil, err
	}
	lib := &Library{Modified: timeOf(ts), Skipped: map[string]int{}}
	haveName, haveUnits := false, false
	// The library header: LIBNAME and UNITS, with optional records
	// between (REFLIBS, FONTS, FORMAT and masks, ...), then structures.
	for {
		if err := rd.next(); err != nil {
			return nil, err
		}
		switch rd.typ {
		case recLibName:
			if lib.Name, err = rd.str(); err != nil {
				return nil, err
			}
			haveName = true
		case recUnits:
			u, err := rd.reals(2)
			if err != nil {
				return nil, err
			}
			if err := checkUnits(u[0], u[1]); err != nil {
				return nil, rd.fail("%v", err)
			}
			lib.UserUnit, lib.MetresPerUnit = u[0], u[1]
			haveUnits = true
		case recLibDirSize, recSrfName, recLibSecur, recRefLibs, recFonts, recAttrTable,
			recGenerations, recFormat, recMask, recEndMasks:
		case recBgnStr, recEndLib:
			if !haveName {
				return nil, rd.fail("found before the LIBNAME record")
			}
			if !haveUnits {
				return nil, rd.fail("found before the UNITS record")
			}
			return rd.structures(lib)
		default:
			return nil, rd.fail("does not belong in the library header")
		}
	}
}

// structures reads from the first BGNSTR (the record just read) to
// ENDLIB.
func (rd *reader) structures(lib *Library) (*Library, error) {
	names := map[string]int64{}
	for {
		switch rd.typ {
		case recEndLib:
			return lib, nil
		case recBgnStr:
			if rd.nStructures++; rd.lim.Structures > 0 && rd.nStructures > rd.lim.Structures {
				return nil, rd.limit("structures", rd.lim.Structures)
			}
			if _, err := rd.int16s(12, 12); err != nil {
				return nil, err
			}
			s := &Structure{Offset: rd.at}
			if err := rd.expect(recStrName); err != nil {
				return nil, err
			}
			var err error
			if s.Name, err = rd.str(); err != nil {
				return nil, err
			}
			if s.Name == "" {
				return nil, rd.fail("structure name is empty")
			}
			if at, dup := names[s.Name]; dup {
				return nil, rd.fail("structure %q is defined twice (first at byte %d)", s.Name, at)
			}
			names[s.Name] = s.Offset
			if err := rd.elements(lib, s); err != nil {
				return nil, err
			}
			lib.Structures = append(lib.Structures, s)
		default:
			return nil, rd.fail("found between structures, want BGNSTR or ENDLIB")
		}
		if err := rd.next(); err != nil {
			return nil, err
		}
	}
}

// elements reads a structure's elements up to its ENDSTR.
func (rd *reader) elements(lib *Library, s *Structure) error {
	for {
		if err := rd.next(); err != nil {
			return err
		}
		switch rd.typ {
		case 0x34: // STRCLASS, written by some tools after STRNAME
			continue
		case recEndStr:
			return nil
		case recBoundary, recPath, recSRef, recARef, recText, recNode, recBox:
			if rd.nElements++; rd.lim.Elements > 0 && rd.nElements > rd.lim.Elements {
				return rd.limit("elements", rd.lim.Elements)
			}
			if err := rd.element(lib, s); err != nil {
				return err
			}
		default:
			return rd.fail("found in structure %q, want an element or ENDSTR", s.Name)
		}
	}
}

// element reads one element, from its first record (just read) to
// ENDEL, and adds it to s.
func (rd *reader) element(lib *Library, s *Structure) error {
	kind, start := rd.typ, rd.at
	var (
		layer, datatype, texttype, pathtype int16
		width                               int32
		xy                                  []Point
		sname, text                         string
		colrow                              []int16
		trans                               Transform
		pres                                uint16
		have                                = map[byte]bool{}
		err                                 error
	)
	for {
		if err := rd.next(); err != nil {
			return err
		}
		if rd.typ == recEndEl {
			break
		}
		if have[rd.typ] && rd.typ != recPropAttr && rd.typ != recPropValue {
			return rd.fail("appears twice in one %s element", recordName(kind))
		}
		have[rd.typ] = true
		switch rd.typ {
		case recLayer:
			layer, err = rd.int16()
		case recDatatype, recBoxType, recNodeType:
			datatype, err = rd.int16()
		case recTextType:
			texttype, err = rd.int16()
		case recPathType:
			pathtype, err = rd.int16()
		case recWidth:
			width, err = rd.int32()
		case recXY:
			xy, err = rd.xy()
		case recSName:
			sname, err = rd.str()
		case recString:
			text, err = rd.str()
		case recColRow:
			colrow, err = rd.int16s(2, 2)
		case recPresentation:
			pres, err = rd.bits()
		case recSTrans:
			var b uint16
			b, err = rd.bits()
			trans.Reflect = b&0x8000 != 0
			trans.AbsMag = b&0x0004 != 0
			trans.AbsAngle = b&0x0002 != 0
		case recMag:
			var v []float64
			if v, err = rd.reals(1); err == nil {
				trans.Mag = v[0]
				if e := checkTransform(Transform{Mag: v[0]}); e != nil {
					err = rd.fail("%v", e)
				}
			}
		case recAngle:
			var v []float64
			if v, err = rd.reals(1); err == nil {
				trans.AngleDeg = v[0]
				if e := checkTransform(Transform{AngleDeg: v[0]}); e != nil {
					err = rd.fail("%v", e)
				}
			}
		case recElFlags, recPlex, recPropAttr, recPropValue, recBgnExtn, recEndExtn, 0x18 /* SPACING */ :
		default:
			return rd.fail("does not belong in a %s element (ENDEL missing?)", recordName(kind))
		}
		if err != nil {
			return err
		}
	}
	bad := func(format string, a ...any) error {
		return &Error{Offset: start, Record: recordName(kind), Err: fmt.Errorf(format, a...)}
	}
	need := func(recs ...byte) error {
		for _, r := range recs {
			if !have[r] {
				return bad("has no %s record", recordName(r))
			}
		}
		return nil
	}
	switch kind {
	case recBoundary:
		if err := need(recLayer, recDatatype, recXY); err != nil {
			return err
		}
		if len(xy) > 1 && xy[0] == xy[len(xy)-1] {
			xy = xy[:len(xy)-1]
		}
		if len(xy) < 3 {
			return bad("has %d distinct points, a polygon needs 3 or more", len(xy))
		}
		s.Boundaries = append(s.Boundaries, Boundary{Layer: layer, Datatype: datatype, XY: xy})
	case recPath:
		if err := need(recLayer, recDatatype, recXY); err != nil {
			return err
		}
		if len(xy) < 1 {
			return bad("has no points")
		}
		if pathtype < 0 || pathtype > 4 {
			return bad("path type %d is not 0 to 4", pathtype)
		}
		s.Paths = append(s.Paths, Path{Layer: layer, Datatype: datatype, PathType: pathtype, Width: width, XY: xy})
	case recText:
		if err := need(recLayer, recTextType, recXY, recString); err != nil {
			return err
		}
		if len(xy) != 1 {
			return bad("has %d points, want 1", len(xy))
		}
		s.Texts = append(s.Texts, Text{Layer: layer, TextType: texttype, At: xy[0], String: text, Presentation: pres, Trans: trans})
	case recSRef, recARef:
		if err := need(recSName, recXY); err != nil {
			return err
		}
		if sname == "" {
			return bad("references an empty structure name")
		}
		r := Ref{Name: sname, Trans: trans, Offset: start}
		if kind == recSRef {
			if len(xy) != 1 {
				return bad("has %d points, want 1", len(xy))
			}
			r.Origin = xy[0]
		} else {
			if err := need(recColRow); err != nil {
				return err
			}
			if len(xy) != 3 {
				return bad("has %d points, want 3", len(xy))
			}
			if colrow[0] < 1 || colrow[1] < 1 {
				return bad("has %d columns and %d rows; an array needs at least 1 of each (at most 32767)", colrow[0], colrow[1])
			}
			r.Cols, r.Rows = int(colrow[0]), int(colrow[1])
			r.Origin, r.ColEnd, r.RowEnd = xy[0], xy[1], xy[2]
		}
		s.Refs = append(s.Refs, r)
	case recNode, recBox:
		lib.Skipped[recordName(kind)]++
	}
	return nil
}

// timeOf returns the modification time of a BGNLIB or BGNSTR record
// (the first six values), or the zero time when they are all zero or
// not a date.
func timeOf(v []int16) time.Time {
	if len(v) < 6 || (v[0] == 0 && v[1] == 0 && v[2] == 0) {
		return time.Time{}
	}
	year := int(v[0])
	if year < 1900 {
		year += 1900 // the manual's two-digit years
	}
	if v[1] < 1 || v[1] > 12 || v[2] < 1 || v[2] > 31 || v[3] < 0 || v[3] > 23 || v[4] < 0 || v[4] > 59 || v[5] < 0 || v[5] > 60 {
		return time.Time{}
	}
	return time.Date(year, time.Month(v[1]), int(v[2]), int(v[3]), int(v[4]), int(v[5]), 0, time.UTC)
}

// isFinite reports whether v is neither NaN nor infinite.
func isFinite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }
