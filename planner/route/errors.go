package route

import (
	"errors"
	"fmt"
)

// Sentinel errors wrapped by *InputError; test with errors.Is.
var (
	// ErrNotFinite marks a coordinate, speed or time that is NaN or infinite.
	ErrNotFinite = errors.New("not a finite number")
	// ErrRange marks a coordinate too large to square safely (see
	// MaxCoordinate).
	ErrRange = errors.New("out of range")
	// ErrNegative marks a speed or time below zero.
	ErrNegative = errors.New("must not be negative")
	// ErrGroup marks a group list that does not match the items.
	ErrGroup = errors.New("bad group")
	// ErrCycle marks precedence pairs between groups that form a cycle.
	ErrCycle = errors.New("precedence between groups has a cycle")
	// ErrTooMany marks a problem too large for the engine's int32 indices.
	ErrTooMany = errors.New("too many items")
)

// MaxCoordinate bounds the magnitude of every coordinate, so that
// squared distances cannot overflow.
const MaxCoordinate = 1e15

// MaxItems is the largest number of items Solve accepts.
const MaxItems = 1 << 28

// InputError reports a bad field of a Problem. Field names the field as
// Go code would, for example "Items[3].B.X" or "Before[1]".
type InputError struct {
	Field string
	Value string
	Err   error
}

func (e *InputError) Error() string {
	return fmt.Sprintf("route: %s = %s: %v", e.Field, e.Value, e.Err)
}

func (e *InputError) Unwrap() error { return e.Err }
