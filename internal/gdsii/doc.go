// Package gdsii reads and writes GDSII stream files, the interchange
// format of mask layouts: a library of named structures (cells), each
// holding BOUNDARY polygons, PATHs, TEXT labels and references to other
// structures, single (SREF) or in a regular array (AREF), placed with a
// transformation (reflection about x, magnification, rotation).
//
// # Format
//
// A stream is a sequence of records: a 2-byte big-endian length (the
// whole record, header included, even, at least 4), a record type byte,
// a data type byte, then the data: 2-byte or 4-byte big-endian signed
// integers, bit arrays, 8-byte reals or an ASCII string padded with a NUL
// to an even length. Reals are in the excess-64 base-16 form of IBM
// System/360 (sign bit, 7-bit exponent, 56-bit mantissa): see Real8 and
// PutReal8. Coordinates are 4-byte integers in database units; UNITS
// gives a database unit in user units and in metres.
//
// # Reading
//
// Read checks every record against what remains of the input and its
// own type, bounds the number of structures, elements and points it
// keeps (ReadLimits), refuses reals that make no sense where they stand
// (a magnification that is not positive and finite, a unit of zero), and
// reports every problem as an *Error naming the record and its byte
// offset. It never panics and never allocates more than the limits
// allow, whatever the input. Library.Flatten expands the hierarchy into
// polygons, paths and labels in the top structure's coordinates: it
// detects reference cycles and unresolved names, and counts what an
// expansion would give before making it, so a 32767 x 32767 AREF is
// refused with its count rather than expanded.
//
// # Writing
//
// Write checks the library (names, layer numbers, point counts, reals
// that fit the 8-byte form) before it writes a byte, and WriteFile writes
// through internal/atomicfile so a failed write leaves any earlier file
// as it was.
//
// The record layout follows the published GDSII Stream Format Manual
// (Calma, release 6.0, 1987), which the format's users treat as its open
// specification.
package gdsii
