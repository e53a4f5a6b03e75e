// Package units formats physical quantities for people to read: the one
// place where the command line, the GUI and the printed plan turn a
// duration in seconds into text, so that all three show a time the same
// way.
//
// Every formatter takes the value in its SI unit (seconds), accepts any
// float64 and never panics: NaN and ±Inf print as "–", a finite value of
// any size prints as a value of that quantity (never as an overflowed
// integer).
package units
