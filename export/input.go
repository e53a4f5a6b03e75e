package export

import (
	"bytes"
	"errors"
	"fmt"
	"io"
	"os"

	"dimerpath/internal/jsonfile"
	"dimerpath/lattice/design"
)

// headBytes is how much of an input ReadInput reads to tell a plan from a
// design: files dimerpath writes name their format first.
const headBytes = 64 << 10

// IsPlanFile reports whether data, a whole file or its start, is a
// dimerpath plan file rather than a design: by its top-level "format"
// field alone, found however malformed the rest is (a plan with
// "total_s": NaN is a bad plan, not a design).
func IsPlanFile(data []byte) bool {
	format, _ := jsonfile.TopString(data, "format")
	return format == PlanFormat
}

// ReadInput reads a file given to export: a plan file or a design, told
// apart by IsPlanFile on its first 64 KiB, within the size limit of its
// kind (MaxPlanFileBytes or design.MaxFileBytes), which a regular file
// is checked against before it is read.
func ReadInput(path string) (data []byte, isPlan bool, err error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, false, err
	}
	defer f.Close()
	if st, err := f.Stat(); err == nil && st.IsDir() {
		return nil, false, fmt.Errorf("%s is a directory, not a design or plan file", path)
	}
	head := make([]byte, headBytes)
	n, err := io.ReadFull(f, head)
	if err != nil && !errors.Is(err, io.EOF) && !errors.Is(err, io.ErrUnexpectedEOF) {
		return nil, false, fmt.Errorf("%s: %w", path, err)
	}
	head = head[:n]
	isPlan = IsPlanFile(head)
	if n < headBytes {
		return head, isPlan, nil // the whole file
	}
	limit, kind := int64(design.MaxFileBytes), design.ErrInvalid
	if isPlan {
		limit, kind = MaxPlanFileBytes, nil
	}
	if _, err := f.Seek(0, io.SeekStart); err != nil {
		// Not seekable (a pipe): read on after the head.
		rest, err := jsonfile.ReadAll(io.MultiReader(bytes.NewReader(head), f), path, limit, kind)
		return rest, isPlan, err
	}
	data, err = jsonfile.ReadAll(f, path, limit, kind)
	return data, isPlan, err
}
