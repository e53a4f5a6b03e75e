package jsonfile

import (
	"errors"
	"fmt"
	"math"
	"strconv"
	"strings"
	"unicode/utf8"
)

// Sentinels wrapped by an *Error whose problems include one of that kind;
// test with errors.Is.
var (
	// ErrSyntax: the input is not well-formed JSON.
	ErrSyntax = errors.New("not valid JSON")
	// ErrTooLarge: the input is larger than the reader's limit.
	ErrTooLarge = errors.New("file too large")
)

// MaxProblems is the most problems one *Error lists by default.
const MaxProblems = 500

// MaxQuote is the most bytes of a value quoted in a message; a longer
// value is cut and ends with "…".
const MaxQuote = 40

// Problem is one thing wrong with a file or a value.
type Problem struct {
	// Path is the JSON path of the bad value, for example
	// "variants[1].regions[3].shapes[0].points_nm[1][0]", or "" for the
	// file as a whole.
	Path string
	// Line and Column are the 1-based position of the value in the file
	// (the column counts characters, not bytes), or 0 when unknown.
	Line, Column int
	// Value is the bad value (a float64, an int, a string, a bool) when
	// Message does not quote it itself, else nil. Keeping the Go value
	// lets a form show it in its own units.
	Value any
	// Message says what is wrong.
	Message string
	// Err is a sentinel for errors.Is (ErrSyntax, ErrTooLarge, or the
	// caller's own), or nil.
	Err error
}

// String returns "path = value: message", "path: message" without a
// value, or the message alone for the file as a whole; never the
// position (Error adds it).
func (p Problem) String() string {
	var b strings.Builder
	b.WriteString(p.Path)
	if p.Value != nil {
		if p.Path == "" {
			b.WriteString("value")
		}
		b.WriteString(" = ")
		b.WriteString(Quote(p.Value))
	}
	if b.Len() > 0 {
		b.WriteString(": ")
	}
	b.WriteString(p.Message)
	return b.String()
}

// Error lists every problem found in one file or value.
type Error struct {
	// File names the file, or is empty for a value not read from one.
	File string
	// Kind is the caller's sentinel saying what the input failed to be
	// (for example "invalid design"); errors.Is matches it. May be nil.
	Kind     error
	Problems []Problem
	// Omitted counts the problems found beyond the listed ones.
	Omitted int
}

// Error returns one line per problem, each "file:line:column: problem"
// (the editors' and compilers' convention), "file: problem" where the
// position is unknown, and "line L, column C: problem" without a file.
func (e *Error) Error() string {
	var b strings.Builder
	for i, p := range e.Problems {
		if i > 0 {
			b.WriteByte('\n')
		}
		switch {
		case e.File != "" && p.Line > 0:
			fmt.Fprintf(&b, "%s:%d:%d: ", e.File, p.Line, p.Column)
		case e.File != "":
			b.WriteString(e.File)
			b.WriteString(": ")
		case p.Line > 0:
			fmt.Fprintf(&b, "line %d, column %d: ", p.Line, p.Column)
		}
		b.WriteString(p.String())
	}
	if e.Omitted > 0 {
		if len(e.Problems) > 0 {
			b.WriteByte('\n')
		}
		if e.File != "" {
			b.WriteString(e.File)
			b.WriteString(": ")
		}
		fmt.Fprintf(&b, "%d more problems not shown (the first %d are listed)", e.Omitted, len(e.Problems))
	}
	if b.Len() == 0 && e.Kind != nil {
		b.WriteString(e.Kind.Error())
	}
	return b.String()
}

// Unwrap returns Kind and the distinct sentinels of the problems.
func (e *Error) Unwrap() []error {
	var out []error
	if e.Kind != nil {
		out = append(out, e.Kind)
	}
	for _, p := range e.Problems {
		if p.Err != nil && !containsErr(out, p.Err) {
			out = append(out, p.Err)
		}
	}
	return out
}

func containsErr(list []error, err error) bool {
	for _, e := range list {
		if e == err {
			return true
		}
	}
	return false
}

// Problems collects problems up to a limit.
type Problems struct {
	// Max is the most problems kept (MaxProblems when 0).
	Max     int
	list    []Problem
	omitted int
}

// Add records p, or counts it as omitted beyond the limit.
func (ps *Problems) Add(p Problem) {
	limit := ps.Max
	if limit <= 0 {
		limit = MaxProblems
	}
	if len(ps.list) >= limit {
		ps.omitted++
		return
	}
	ps.list = append(ps.list, p)
}

// Addf records a problem at path with a formatted message.
func (ps *Problems) Addf(path, format string, args ...any) {
	ps.Add(Problem{Path: path, Message: fmt.Sprintf(format, args...)})
}

// AddValue records a problem at path with its bad value and a message.
func (ps *Problems) AddValue(path string, value any, format string, args ...any) {
	ps.Add(Problem{Path: path, Value: value, Message: fmt.Sprintf(format, args...)})
}

// Len returns the number of problems found, listed or not.
func (ps *Problems) Len() int { return len(ps.list) + ps.omitted }

// List returns the listed problems.
func (ps *Problems) List() []Problem { return ps.list }

// Err returns an *Error for file wrapping kind, or nil when there is no
// problem.
func (ps *Problems) Err(file string, kind error) error {
	if ps.Len() == 0 {
		return nil
	}
	return &Error{File: file, Kind: kind, Problems: ps.list, Omitted: ps.omitted}
}

// Text is a value quoted as it stands in the file (JSON text such as 9,
// "x" or [1, 2]), not as a Go string.
type Text string

// Quote formats a value for a message: numbers in their shortest exact
// form (1e+306, 0.9999999999, never hundreds of digits), NaN and
// infinities by name, strings quoted and cut to MaxQuote bytes.
func Quote(v any) string {
	switch x := v.(type) {
	case nil:
		return "null"
	case float64:
		return Number(x)
	case float32:
		return Number(float64(x))
	case string:
		return strconv.Quote(Prefix(x, MaxQuote))
	case Text:
		return Prefix(string(x), MaxQuote)
	case [2]float64:
		return "[" + Number(x[0]) + ", " + Number(x[1]) + "]"
	case fmt.Stringer:
		return Prefix(x.String(), MaxQuote)
	}
	return Prefix(fmt.Sprint(v), MaxQuote)
}

// Number formats x in its shortest form that reads back exactly, with an
// exponent from 1e+06 and below 1e-04 (strconv's 'g'), so a message never
// holds a 309-digit number.
func Number(x float64) string {
	switch {
	case math.IsNaN(x):
		return "NaN"
	case math.IsInf(x, 1):
		return "+Inf"
	case math.IsInf(x, -1):
		return "-Inf"
	}
	return strconv.FormatFloat(x, 'g', -1, 64)
}

// Approx formats a computed value for a message with 4 significant
// digits (6.364e-06, 4.082e+08, 1773): a model's output, where the exact
// digits mean nothing to the reader.
func Approx(x float64) string {
	switch {
	case math.IsNaN(x), math.IsInf(x, 0):
		return Number(x)
	}
	return strconv.FormatFloat(x, 'g', 4, 64)
}

// Prefix returns s cut to at most n bytes on a rune boundary, with "…"
// appended when it was cut.
func Prefix(s string, n int) string {
	if len(s) <= n {
		return s
	}
	cut := n
	for cut > 0 && !utf8.RuneStart(s[cut]) {
		cut--
	}
	return s[:cut] + "…"
}
