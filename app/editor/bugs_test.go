package editor_test

import (
	"errors"
	"fmt"
	"strings"
	"testing"

	"dimerpath/app/editor"
	"dimerpath/planner"
)

func TestGuard(t *testing.T) {
	plain := errors.New("the design has no variant B")
	cases := []struct {
		name    string
		f       func() error
		wantErr error // errors.Is target, nil for none
		panics  bool
	}{
		{"no error", func() error { return nil }, nil, false},
		{"an error passes through", func() error { return plain }, plain, false},
		{"a panic becomes a PanicError", func() error { panic("index out of range") }, nil, true},
		{"a panic with an error value", func() error { panic(plain) }, nil, true},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			err := editor.Guard(c.f)
			var pe *editor.PanicError
			if got := errors.As(err, &pe); got != c.panics {
				t.Fatalf("Guard() = %v: a PanicError %v, want %v", err, got, c.panics)
			}
			if c.panics {
				if !strings.Contains(string(pe.Stack), "bugs_test.go") {
					t.Errorf("the stack does not reach the panicking function:\n%s", pe.Stack)
				}
				if _, bug := editor.BugDetails(err); !bug {
					t.Error("BugDetails does not take a recovered panic for a bug")
				}
				return
			}
			if !errors.Is(err, c.wantErr) {
				t.Errorf("Guard() = %v, want %v", err, c.wantErr)
			}
		})
	}
}

func TestBugDetails(t *testing.T) {
	internal := &planner.InternalError{Message: "Monte Carlo quantile out of order", Stack: []byte("goroutine 7 [running]")}
	cases := []struct {
		name     string
		err      error
		bug      bool
		contains []string
	}{
		{"nil", nil, false, nil},
		{"a problem of the design", errors.New("variant A: region lead has no sites"), false, nil},
		{"the planner's internal error", internal, true, []string{"Monte Carlo quantile", "goroutine 7"}},
		{"wrapped", fmt.Errorf("planning variant A: %w", internal), true, []string{"planning variant A", "goroutine 7"}},
		{"ErrInternal alone", fmt.Errorf("x: %w", planner.ErrInternal), true, []string{"x: "}},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			details, bug := editor.BugDetails(c.err)
			if bug != c.bug {
				t.Fatalf("BugDetails(%v) bug = %v, want %v", c.err, bug, c.bug)
			}
			for _, want := range c.contains {
				if !strings.Contains(details, want) {
					t.Errorf("BugDetails(%v) = %q, lacks %q", c.err, details, want)
				}
			}
		})
	}
}

// A job that panics comes back as an error the window can report,
// instead of ending the program with the user's unsaved work.
func ExampleGuard() {
	err := editor.Guard(func() error {
		var m map[string]int
		m["x"]++ // a bug: assignment to a nil map
		return nil
	})
	_, bug := editor.BugDetails(err)
	fmt.Println(bug)
	fmt.Println(strings.SplitN(err.Error(), "\n", 2)[0])
	// Output:
	// true
	// internal error (a bug in dimerpath): panic: assignment to entry in nil map
}
