// Package jsonfile reads and writes dimerpath's JSON files (designs,
// instrument profiles, plans) the same strict way.
//
// Reading: ReadFile and ReadAll refuse an input larger than the caller's
// limit before holding it whole (a regular file by its size, without
// reading it). Decode fills a Go value from the file by its json tags and
// refuses, each with its JSON path, line and column: syntax errors, fields
// the type does not have, keys in another case than the tag's, values of
// the wrong type, numbers that are not finite (the bare NaN and Infinity
// tokens hand-edited files hold, and 1e400), fractions where a whole
// number is wanted, over-long strings and lists, and nesting deeper than a
// limit. It reports every problem of a file in one run, up to a limit,
// and never quotes more than a short prefix of a value. Locate finds the
// line and column of problems found later, by a check of the decoded
// value's meaning. TopString reads a file's "format" field even when the
// rest is malformed.
//
// Errors: every problem is a Problem (path, line, column, value, message)
// and every failed read an *Error that lists them and wraps the caller's
// sentinel, so callers tell a design from a plan by errors.Is.
//
// Writing: Marshal and Writer lay a value out by a Style, so that a file
// diffs well (one element or field a line where it matters, short lists
// on one line), refusing a NaN or an infinity with its path.
package jsonfile
