package route

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"math"
	"strconv"
	"strings"
)

// ErrCSV is wrapped by every *CSVError.
var ErrCSV = errors.New("bad item file")

// CSVError reports a bad line of an item file.
type CSVError struct {
	File  string // as given to ReadCSV
	Line  int    // 1-based; 0 for the file as a whole
	Field string // "x", "y", "x1", ... or "" for the whole line
	Value string
	Msg   string
}

func (e *CSVError) Error() string {
	var b strings.Builder
	b.WriteString(e.File)
	if e.Line > 0 {
		fmt.Fprintf(&b, ":%d", e.Line)
	}
	if e.Field != "" {
		fmt.Fprintf(&b, ": field %s = %q", e.Field, e.Value)
	}
	b.WriteString(": ")
	b.WriteString(e.Msg)
	return b.String()
}

func (e *CSVError) Unwrap() error { return ErrCSV }

// MaxLineBytes bounds one line of an item or TSPLIB file, so a file
// without line breaks is refused after a bounded read.
const MaxLineBytes = 1 << 20

// ScanError words a line scanner's error for a user: an over-long line
// names the limit instead of bufio's "token too long".
func ScanError(err error) error {
	if errors.Is(err, bufio.ErrTooLong) {
		return fmt.Errorf("line longer than %d KiB, the limit", MaxLineBytes>>10)
	}
	return err
}

var (
	pointFields  = []string{"x", "y"}
	strokeFields = []string{"x1", "y1", "x2", "y2"}
)

// ReadCSV reads items from comma-separated text: "x,y" per line for
// points, or "x1,y1,x2,y2" per line for strokes when strokes is set.
// Blank lines and lines starting with '#' are skipped, and the first
// other line may be a header of non-numeric names. Fields may be padded
// with spaces and wrapped in double quotes. file names the input in errors, which are *CSVError and
// name the line and the field. At most MaxItems items are read.
func ReadCSV(r io.Reader, file string, strokes bool) ([]Item, error) {
	names := pointFields
	if strokes {
		names = strokeFields
	}
	sc := bufio.NewScanner(r)
	sc.Buffer(make([]byte, 64*1024), MaxLineBytes)
	var items []Item
	line := 0
	header := true // a header may still come
	vals := make([]float64, len(names))
	for sc.Scan() {
		line++
		text := strings.TrimSpace(sc.Text())
		if line == 1 {
			text = strings.TrimPrefix(text, "\uFEFF") // a byte-order mark
		}
		if text == "" || text[0] == '#' {
			continue
		}
		fields := strings.Split(text, ",")
		if header && isHeader(fields) {
			header = false
			if len(fields) != len(names) {
				return nil, &CSVError{File: file, Line: line, Msg: fmt.Sprintf("header has %d fields, want %d (%s)%s",
					len(fields), len(names), strings.Join(names, ","), hint(strokes, len(fields)))}
			}
			continue
		}
		header = false
		if len(fields) != len(names) {
			return nil, &CSVError{File: file, Line: line, Msg: fmt.Sprintf("%d fields, want %d (%s)%s",
				len(fields), len(names), strings.Join(names, ","), hint(strokes, len(fields)))}
		}
		for i, f := range fields {
			f = unquote(strings.TrimSpace(f))
			v, err := strconv.ParseFloat(f, 64)
			if err != nil || !finite(v) {
				return nil, &CSVError{File: file, Line: line, Field: names[i], Value: f, Msg: "not a finite number"}
			}
			if math.Abs(v) > MaxCoordinate {
				return nil, &CSVError{File: file, Line: line, Field: names[i], Value: f,
					Msg: fmt.Sprintf("magnitude above %g", MaxCoordinate)}
			}
			vals[i] = v
		}
		if len(items) >= MaxItems {
			return nil, &CSVError{File: file, Line: line, Msg: fmt.Sprintf("more than %d items", MaxItems)}
		}
		a := Point{X: vals[0], Y: vals[1]}
		b := a
		if strokes {
			b = Point{X: vals[2], Y: vals[3]}
		}
		items = append(items, Item{A: a, B: b})
	}
	if err := sc.Err(); err != nil {
		return nil, &CSVError{File: file, Line: line + 1, Msg: ScanError(err).Error()}
	}
	return items, nil
}

// unquote removes one pair of double quotes around a field, as
// spreadsheets write them.
func unquote(f string) string {
	if len(f) >= 2 && f[0] == '"' && f[len(f)-1] == '"' {
		return strings.TrimSpace(f[1 : len(f)-1])
	}
	return f
}

// isHeader reports whether no field is a number.
func isHeader(fields []string) bool {
	for _, f := range fields {
		if _, err := strconv.ParseFloat(unquote(strings.TrimSpace(f)), 64); err == nil {
			return false
		}
	}
	return true
}

func hint(strokes bool, got int) string {
	switch {
	case !strokes && got == 4:
		return "; for strokes x1,y1,x2,y2 ask for strokes (--strokes)"
	case strokes && got == 2:
		return "; for points x,y leave out --strokes"
	}
	return ""
}
