package export

import (
	"errors"
	"fmt"

	"dimerpath/internal/jsonfile"
)

// Sentinel errors, wrapped by the *jsonfile.Error of a plan that cannot
// be written or a plan file that cannot be read; test with errors.Is.
var (
	// ErrNotPlan: the input is JSON but not a dimerpath plan file
	// (wrong or missing "format").
	ErrNotPlan = errors.New("not a dimerpath plan file")
	// ErrSyntax: the input is not well-formed JSON.
	ErrSyntax = jsonfile.ErrSyntax
	// ErrVersion: the file's format version is newer than this program
	// reads (or not a version at all).
	ErrVersion = errors.New("unsupported plan file version")
	// ErrInvalid: a value is out of range or inconsistent with the rest
	// of the plan.
	ErrInvalid = errors.New("invalid plan")
	// ErrTooLarge: the input exceeds MaxPlanFileBytes.
	ErrTooLarge = jsonfile.ErrTooLarge
	// ErrFormat: an output file name whose extension names no export
	// format.
	ErrFormat = errors.New("unknown export format")
)

// invalid returns a *jsonfile.Error wrapping ErrInvalid for the value v
// at path (in the plan file's schema) and the reason.
func invalid(path string, v any, format string, args ...any) *jsonfile.Error {
	return &jsonfile.Error{Kind: ErrInvalid, Problems: []jsonfile.Problem{{Path: path, Value: v, Message: fmt.Sprintf(format, args...)}}}
}
