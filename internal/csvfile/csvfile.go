// Package csvfile reads dimerpath's CSV inputs (point lists, calibration
// measurements) within bounds, and gives their errors one shape: the
// file, the line, the column by its name, a short prefix of the bad value
// and what is wrong. A regular file larger than the caller's limit is
// refused by its size before it is read, and a line longer than MaxLine
// is refused as soon as it is seen, so memory stays small whatever the
// input (a file with no line breaks included).
package csvfile

import (
	"encoding/csv"
	"errors"
	"fmt"
	"io"
	"os"
	"strconv"
	"strings"

	"dimerpath/internal/jsonfile"
)

// MaxLine is the longest line a CSV input may have, in bytes.
const MaxLine = 64 << 10

// ErrTooLarge is wrapped by the error of an input beyond its limit.
var ErrTooLarge = jsonfile.ErrTooLarge

// Error is a bad line of a CSV file.
type Error struct {
	File string
	// Line is 1-based; 0 for the file as a whole.
	Line int
	// Column names the bad field by its header ("width_nm", "y"), or is
	// empty for the whole line.
	Column string
	// Value is the bad field as written (cut to jsonfile.MaxQuote bytes
	// when shown).
	Value string
	// Kind is the caller's sentinel ("bad measurement"), or nil.
	Kind error
	Err  error
}

// Error returns "file:line: column = "value": problem", leaving out what
// is not known.
func (e *Error) Error() string {
	var b strings.Builder
	b.WriteString(e.File)
	if e.Line > 0 {
		fmt.Fprintf(&b, ":%d", e.Line)
	}
	if b.Len() > 0 {
		b.WriteString(": ")
	}
	if e.Column != "" {
		b.WriteString(e.Column)
		b.WriteString(" = ")
		b.WriteString(strconv.Quote(jsonfile.Prefix(e.Value, jsonfile.MaxQuote)))
		b.WriteString(": ")
	}
	b.WriteString(e.Err.Error())
	return b.String()
}

// Unwrap returns Kind and Err.
func (e *Error) Unwrap() []error {
	if e.Kind == nil {
		return []error{e.Err}
	}
	return []error{e.Kind, e.Err}
}

// Reader reads the records of a CSV file: fields separated by commas,
// leading spaces trimmed, any number of fields, lines starting with '#'
// skipped, a byte-order mark at the start ignored.
type Reader struct {
	cr   *csv.Reader
	in   *boundedReader
	file string
	kind error
}

// NewReader returns a Reader of r, at most limit bytes; file names the
// input in errors and kind is wrapped by each of them. When r is a
// regular *os.File larger than limit it is refused at once.
func NewReader(r io.Reader, file string, limit int64, kind error) (*Reader, error) {
	if f, ok := r.(*os.File); ok {
		if st, err := f.Stat(); err == nil && st.Mode().IsRegular() && st.Size() > limit {
			return nil, &Error{File: file, Kind: kind, Err: tooLarge(fmt.Sprintf("the file holds %s, more than the %s limit for this kind of file",
				jsonfile.Bytes(st.Size()), jsonfile.Bytes(limit)))}
		}
	}
	in := &boundedReader{r: r, left: limit, line: 1}
	cr := csv.NewReader(in)
	cr.Comment = '#'
	cr.FieldsPerRecord = -1
	cr.TrimLeadingSpace = true
	cr.ReuseRecord = true
	return &Reader{cr: cr, in: in, file: file, kind: kind}, nil
}

// Read returns the next record and the line it starts on; io.EOF at the
// end, an *Error for a malformed or over-long input.
func (r *Reader) Read() ([]string, int, error) {
	rec, err := r.cr.Read()
	if err == io.EOF {
		return nil, 0, io.EOF
	}
	if err != nil {
		var pe *csv.ParseError
		if errors.As(err, &pe) {
			if r.in.err != nil {
				return nil, 0, r.Errorf(r.in.line, "", "", "%w", r.in.err)
			}
			return nil, 0, r.Errorf(pe.Line, "", "", "%w", pe.Err)
		}
		return nil, 0, r.Errorf(r.in.line, "", "", "%w", err)
	}
	line, _ := r.cr.FieldPos(0)
	if line == 1 && len(rec) > 0 {
		rec[0] = strings.TrimPrefix(rec[0], "\ufeff")
	}
	return rec, line, nil
}

// Errorf returns an *Error at line (column and value may be empty).
func (r *Reader) Errorf(line int, column, value, format string, args ...any) *Error {
	return &Error{File: r.file, Line: line, Column: column, Value: value, Kind: r.kind, Err: fmt.Errorf(format, args...)}
}

// boundedReader passes at most left bytes through and refuses a line
// longer than MaxLine, counting lines for the message.
type boundedReader struct {
	r    io.Reader
	left int64
	run  int // bytes since the last newline
	line int
	err  error
}

func (b *boundedReader) Read(p []byte) (int, error) {
	if b.err != nil {
		return 0, b.err
	}
	if b.left <= 0 {
		// One more byte tells a file of exactly the limit from a longer one.
		var one [1]byte
		if n, _ := io.ReadFull(b.r, one[:]); n == 0 {
			return 0, io.EOF
		}
		b.err = tooLarge("more bytes than the limit for this kind of file")
		return 0, b.err
	}
	if int64(len(p)) > b.left {
		p = p[:b.left]
	}
	n, err := b.r.Read(p)
	b.left -= int64(n)
	for _, c := range p[:n] {
		if c == '\n' {
			b.line++
			b.run = 0
			continue
		}
		b.run++
		if b.run > MaxLine {
			b.err = fmt.Errorf("line longer than %s, the limit (is this a CSV file?)", jsonfile.Bytes(MaxLine))
			return 0, b.err
		}
	}
	return n, err
}

// tooLarge is an error that says msg and wraps ErrTooLarge.
type tooLarge string

func (e tooLarge) Error() string { return string(e) }
func (e tooLarge) Unwrap() error { return ErrTooLarge }
