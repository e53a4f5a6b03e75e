package editor

import (
	"errors"
	"fmt"
	"runtime/debug"

	"dimerpath/planner"
)

// A PanicError is a panic recovered from background work (Guard): a bug
// in dimerpath, never a problem of the user's design.
type PanicError struct {
	Value any    // what the panic carried
	Stack []byte // the panicking goroutine's stack
}

// Error returns the panic's value, marked as a bug.
func (e *PanicError) Error() string {
	return fmt.Sprintf("internal error (a bug in dimerpath): panic: %v", e.Value)
}

// Guard calls f and returns its error; a panic in f is recovered and
// returned as a *PanicError. The window runs every background job (plan,
// check, comparison, export, autosave) through it, so a bug there is
// reported instead of closing the window with the user's unsaved work.
// Jobs work on a copy of the design (Session.DesignCopy), so the
// session, its design and its undo history are untouched by the panic.
func Guard(f func() error) (err error) {
	defer func() {
		if v := recover(); v != nil {
			err = &PanicError{Value: v, Stack: debug.Stack()}
		}
	}()
	return f()
}

// BugDetails reports whether err is a bug in dimerpath rather than a
// problem of the design or the profile (a panic Guard recovered, or an
// internal error the planner reports, planner.ErrInternal), and returns
// its details for a bug report: the message and, where known, the stack.
func BugDetails(err error) (details string, ok bool) {
	var pe *PanicError
	var ie *planner.InternalError
	switch {
	case errors.As(err, &pe):
		return err.Error() + "\n\n" + string(pe.Stack), true
	case errors.As(err, &ie):
		if len(ie.Stack) > 0 {
			return err.Error() + "\n\n" + string(ie.Stack), true
		}
		return err.Error(), true
	case errors.Is(err, planner.ErrInternal):
		return err.Error(), true
	}
	return "", false
}
