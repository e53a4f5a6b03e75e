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
// to this program's. A design that does not validate is not written.
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
	return atomicfile.WriteBytes(path, data, 0o644)
}
