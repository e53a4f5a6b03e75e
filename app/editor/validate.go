package editor

import (
	"errors"
	"strings"

	"dimerpath/internal/jsonfile"
	"dimerpath/lattice/design"
)

// An EditError is an edit the design's own rules refuse
// (design.Design.Validate, the rules a design file is read by). The
// session is left as it was.
type EditError struct {
	// Edit says what was asked, e.g. `rename region "island" to "lead"`.
	Edit string
	// Problems are what the rules say of the edited design that they did
	// not say before it, each at its path in the design file.
	Problems []jsonfile.Problem
}

// Error returns the edit and the rules' messages.
func (e *EditError) Error() string {
	msgs := make([]string, len(e.Problems))
	for i, p := range e.Problems {
		msgs[i] = p.Message
		if p.Value != nil {
			msgs[i] = jsonfile.Quote(p.Value) + ": " + p.Message
		}
	}
	return e.Edit + ": " + strings.Join(msgs, "; ")
}

// Unwrap returns design.ErrInvalid.
func (e *EditError) Unwrap() error { return design.ErrInvalid }

// problems returns what the design's rules say of the design now.
func (s *Session) problems() []jsonfile.Problem {
	var e *jsonfile.Error
	if err := s.d.Validate(); errors.As(err, &e) {
		return e.Problems
	}
	return nil
}

// validCommit applies an edit (apply returns its undo) as validEdit does,
// refused as what when the design's rules do not accept it, and commits
// it as one undo step (label, key and the change c: see commit).
func (s *Session) validCommit(what, label, key string, c Change, apply func() (undo func())) error {
	if err := s.validEdit(what, apply); err != nil {
		return err
	}
	s.commit(label, key, c)
	return nil
}

// validEdit applies an edit to the design (apply returns how to take it
// back) and asks the design's own rules about the result. When they find
// a problem the design did not have before, the edit is taken back and
// returned as an *EditError; problems the design already had are no
// reason to refuse it. It neither commits nor notifies.
//
// The rules are checked whole, twice (about 3 ms for a design of 10^7
// painted sites), which is fine for the edits made from panels and
// dialogs; gestures do not come through here.
func (s *Session) validEdit(what string, apply func() (undo func())) error {
	had := map[string]bool{}
	for _, p := range s.problems() {
		had[p.String()] = true
	}
	undo := apply()
	var added []jsonfile.Problem
	for _, p := range s.problems() {
		if !had[p.String()] {
			added = append(added, p)
		}
	}
	if len(added) == 0 {
		return nil
	}
	undo()
	return &EditError{Edit: what, Problems: added}
}
