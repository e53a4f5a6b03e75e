package design

import (
	"fmt"

	"dimerpath/internal/atomicfile"
	"dimerpath/internal/jsonfile"
)

// Marshal returns the design as indented JSON (objects one field a line,
// short lists of numbers on one line: jsonfile.Readable), without
// validating it.
func Marshal(d *Design) ([]byte, error) {
	data, err := jsonfile.Marshal(d, jsonfile.Readable)
	if err != nil {
		return nil, fmt.Errorf("design: %w", err)
	}
	return data, nil
}

// Save validates d and writes it to path atomically: to a temporary file
// in the same directory, renamed over path only once it is complete, so
// a failed save leaves the old file untouched. It sets Format and Version
// to this program's. A design that does not validate is not written, nor
// one whose file would be larger than MaxFileBytes, which Load refuses.
func Save(path string, d *Design) error {
	d.Format, d.Version = FormatName, FormatVersion
	if err := d.Validate(); err != nil {
		if e, ok := err.(*jsonfile.Error); ok {
			e.File = path
		}
		return err
	}
	data, err := Marshal(d)
	if err != nil {
		return err
	}
	// Never write a file Load refuses.
	if len(data) > MaxFileBytes {
		ps := problems{}
		ps.Add(jsonfile.Problem{Message: "the design would take " + jsonfile.Bytes(int64(len(data))) + ", more than the " +
			jsonfile.Bytes(MaxFileBytes) + " a design file may hold (paint fewer scattered sites, or use shapes)", Err: jsonfile.ErrTooLarge})
		return ps.err(path)
	}
	return atomicfile.WriteBytes(path, data, 0o644)
}
