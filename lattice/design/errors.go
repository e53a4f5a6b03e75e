package design

import (
	"errors"

	"dimerpath/internal/jsonfile"
)

// ErrInvalid is wrapped by the *jsonfile.Error of every design that
// cannot be read or does not validate, for errors.Is.
var ErrInvalid = errors.New("invalid design")

// MaxProblems is the most problems one error lists.
const MaxProblems = jsonfile.MaxProblems

// problems collects the problems of one design, each at its JSON path
// with a message that quotes the bad value.
type problems struct{ jsonfile.Problems }

func (ps *problems) add(path, format string, args ...any) { ps.Addf(path, format, args...) }

// err returns a *jsonfile.Error naming file and wrapping ErrInvalid, or
// nil when there is no problem.
func (ps *problems) err(file string) error { return ps.Err(file, ErrInvalid) }
