package export

import (
	"errors"
	"fmt"
	"strings"
)

// Sentinel errors, wrapped by *PlanError; test with errors.Is.
var (
	// ErrNotPlan: the input is JSON but not a dimerpath plan file
	// (wrong or missing "format").
	ErrNotPlan = errors.New("not a dimerpath plan file")
	// ErrSyntax: the input is not well-formed JSON.
	ErrSyntax = errors.New("malformed JSON")
	// ErrVersion: the file's format version is newer than this program
	// reads (or not a version at all).
	ErrVersion = errors.New("unsupported plan file version")
	// ErrInvalid: a value is out of range or inconsistent with the rest
	// of the plan.
	ErrInvalid = errors.New("invalid plan")
	// ErrTooLarge: the input exceeds MaxPlanFileBytes.
	ErrTooLarge = errors.New("plan file too large")
	// ErrFormat: an output file name whose extension names no export
	// format.
	ErrFormat = errors.New("unknown export format")
)

// PlanError reports a plan that cannot be written or a plan file that
// cannot be read. Field is the JSON path of the offending value in the
// plan file's schema (for example "strokes[12].path_nm[0]"), Value its
// text; Line is set for syntax errors.
type PlanError struct {
	File  string // file name, when known
	Line  int    // 1-based line of a syntax error, or 0
	Field string
	Value string
	Err   error
}

func (e *PlanError) Error() string {
	var b strings.Builder
	if e.File != "" {
		b.WriteString(e.File)
		if e.Line > 0 {
			fmt.Fprintf(&b, ":%d", e.Line)
		}
		b.WriteString(": ")
	} else if e.Line > 0 {
		fmt.Fprintf(&b, "line %d: ", e.Line)
	}
	if e.Field != "" {
		b.WriteString(e.Field)
		if e.Value != "" {
			b.WriteString(" = ")
			b.WriteString(e.Value)
		}
		b.WriteString(": ")
	}
	b.WriteString(e.Err.Error())
	return b.String()
}

func (e *PlanError) Unwrap() error { return e.Err }

// invalid returns a *PlanError for field with value v (formatted with
// %v, strings quoted) and the reason, wrapping ErrInvalid.
func invalid(field string, v any, format string, args ...any) *PlanError {
	val := ""
	switch x := v.(type) {
	case nil:
	case string:
		val = fmt.Sprintf("%q", x)
	default:
		val = fmt.Sprintf("%v", x)
	}
	return &PlanError{Field: field, Value: val, Err: fmt.Errorf("%w: %s", ErrInvalid, fmt.Sprintf(format, args...))}
}
