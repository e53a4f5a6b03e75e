// Package atomicfile writes files so that a reader sees either the old
// content or the complete new content, never a half-written file: the
// data goes to a temporary file in the same directory, is synced, and is
// renamed over the target only when everything succeeded.
package atomicfile

import (
	"bufio"
	"fmt"
	"io"
	"os"
	"path/filepath"
)

// Write calls fill with a buffered writer on a temporary file next to
// path and, if fill and the flush, sync and close all succeed, renames
// the temporary file to path. On any error the temporary file is removed,
// path is left as it was, and the error names path.
func Write(path string, perm os.FileMode, fill func(w io.Writer) error) (err error) {
	dir, base := filepath.Split(path)
	if dir == "" {
		dir = "."
	}
	tmp, err := os.CreateTemp(dir, "."+base+".tmp-*")
	if err != nil {
		return fmt.Errorf("%s: %w", path, err)
	}
	defer func() {
		if err != nil {
			tmp.Close()
			os.Remove(tmp.Name())
		}
	}()
	bw := bufio.NewWriterSize(tmp, 1<<16)
	if err = fill(bw); err != nil {
		return fmt.Errorf("%s: %w", path, err)
	}
	if err = bw.Flush(); err != nil {
		return fmt.Errorf("%s: %w", path, err)
	}
	if err = tmp.Chmod(perm); err != nil {
		return fmt.Errorf("%s: %w", path, err)
	}
	if err = tmp.Sync(); err != nil {
		return fmt.Errorf("%s: %w", path, err)
	}
	if err = tmp.Close(); err != nil {
		return fmt.Errorf("%s: %w", path, err)
	}
	if err = os.Rename(tmp.Name(), path); err != nil {
		return fmt.Errorf("%s: %w", path, err)
	}
	return nil
}

// WriteBytes writes data to path atomically (see Write).
func WriteBytes(path string, data []byte, perm os.FileMode) error {
	return Write(path, perm, func(w io.Writer) error {
		_, err := w.Write(data)
		return err
	})
}
