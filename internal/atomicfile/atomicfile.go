// Package atomicfile writes files so that a reader sees either the old
// content or the complete new content, never a half-written file: the
// data goes to a temporary file in the same directory, is synced, and is
// renamed over the target only when everything succeeded.
//
// The temporary file is named after the target and says what it is
// (".plan.pdf.dimerpath-unfinished-PID-RANDOM"), so that one left behind
// by a killed process is recognisable; the next write into the directory
// removes those whose process is gone. Check tells before any work
// whether a target can be written at all.
package atomicfile

import (
	"bufio"
	"errors"
	"fmt"
	"io"
	"io/fs"
	"os"
	"path/filepath"
	"strconv"
	"strings"
	"syscall"
	"time"
)

// marker is the part of a temporary file's name that says dimerpath is
// writing it; the writer's process id and a random suffix follow.
const marker = ".dimerpath-unfinished-"

// staleAge is the age after which an unfinished file is removed even if
// a process of its id runs (the id may have been reused).
const staleAge = 24 * time.Hour

// TempPattern returns the os.CreateTemp pattern of the temporary files
// for target base name base.
func TempPattern(base string) string {
	return "." + base + marker + strconv.Itoa(os.Getpid()) + "-*"
}

// IsTemp reports whether name (a base name) is one of this package's
// temporary files.
func IsTemp(name string) bool {
	_, ok := tempOwner(name)
	return ok
}

// tempOwner returns the process id in a temporary file's name.
func tempOwner(name string) (int, bool) {
	if !strings.HasPrefix(name, ".") {
		return 0, false
	}
	i := strings.LastIndex(name, marker)
	if i < 0 {
		return 0, false
	}
	pid, _, ok := strings.Cut(name[i+len(marker):], "-")
	if !ok {
		return 0, false
	}
	n, err := strconv.Atoi(pid)
	return n, err == nil && n > 0
}

// alive reports whether a process of that id runs.
func alive(pid int) bool {
	if pid == os.Getpid() {
		return true
	}
	err := syscall.Kill(pid, 0)
	return err == nil || errors.Is(err, syscall.EPERM)
}

// CleanStale removes, from dir, the temporary files of this package left
// by processes that are gone (killed while writing), and those older
// than a day. It returns the names removed; errors are ignored (a file
// another process removed first, a directory that cannot be listed).
func CleanStale(dir string) []string {
	entries, err := os.ReadDir(dir)
	if err != nil {
		return nil
	}
	var removed []string
	for _, e := range entries {
		pid, ok := tempOwner(e.Name())
		if !ok || e.IsDir() {
			continue
		}
		stale := !alive(pid)
		if !stale {
			if info, err := e.Info(); err == nil && time.Since(info.ModTime()) > staleAge {
				stale = true
			}
		}
		if stale && os.Remove(filepath.Join(dir, e.Name())) == nil {
			removed = append(removed, e.Name())
		}
	}
	return removed
}

// Check reports, before any work is done, whether path can be written:
// that it is not a directory and that its directory exists and takes a
// new file (it creates, writes, syncs and removes a small probe file of
// this package's naming, so a read-only or full file system shows now,
// not after the work). The error names path.
func Check(path string) error {
	if st, err := os.Stat(path); err == nil && st.IsDir() {
		return fmt.Errorf("%s is a directory: give a file name to write", path)
	}
	dir := filepath.Dir(path)
	st, err := os.Stat(dir)
	switch {
	case errors.Is(err, fs.ErrNotExist):
		return fmt.Errorf("%s: the directory %s does not exist", path, dir)
	case err != nil:
		return fmt.Errorf("%s: %w", path, plain(err))
	case !st.IsDir():
		return fmt.Errorf("%s: %s is not a directory", path, dir)
	}
	probe, err := os.CreateTemp(dir, TempPattern(filepath.Base(path)))
	if err != nil {
		return fmt.Errorf("%s: cannot create a file in %s: %w", path, dir, plain(err))
	}
	defer os.Remove(probe.Name())
	_, err = probe.Write(make([]byte, 4096))
	if err == nil {
		err = probe.Sync()
	}
	if cerr := probe.Close(); err == nil {
		err = cerr
	}
	if err != nil {
		return fmt.Errorf("%s: cannot write in %s: %w", path, dir, plain(err))
	}
	return nil
}

// plain drops the file name from an *fs.PathError (the temporary file's,
// which means nothing to the user), keeping the cause.
func plain(err error) error {
	var pe *fs.PathError
	if errors.As(err, &pe) {
		return pe.Err
	}
	var le *os.LinkError
	if errors.As(err, &le) {
		return le.Err
	}
	return err
}

// Write calls fill with a buffered writer on a temporary file next to
// path and, if fill and the flush, sync and close all succeed, renames
// the temporary file to path. On any error the temporary file is removed,
// path is left as it was, and the error names path (never the temporary
// file). Stale temporary files of killed writers in the directory are
// removed first (CleanStale).
func Write(path string, perm os.FileMode, fill func(w io.Writer) error) (err error) {
	dir, base := filepath.Split(path)
	if dir == "" {
		dir = "."
	}
	if st, serr := os.Stat(path); serr == nil && st.IsDir() {
		return fmt.Errorf("%s is a directory: give a file name to write", path)
	}
	CleanStale(dir)
	tmp, err := os.CreateTemp(dir, TempPattern(base))
	if err != nil {
		if errors.Is(err, fs.ErrNotExist) {
			return fmt.Errorf("%s: the directory %s does not exist", path, filepath.Clean(dir))
		}
		return fmt.Errorf("%s: cannot create a file in %s: %w", path, filepath.Clean(dir), plain(err))
	}
	defer func() {
		if err != nil {
			tmp.Close()
			os.Remove(tmp.Name())
		}
	}()
	bw := bufio.NewWriterSize(tmp, 1<<16)
	if err = fill(bw); err != nil {
		return fmt.Errorf("%s: %w", path, plainWrite(err))
	}
	if err = bw.Flush(); err != nil {
		return fmt.Errorf("%s: writing: %w", path, plain(err))
	}
	if err = tmp.Chmod(perm); err != nil {
		return fmt.Errorf("%s: %w", path, plain(err))
	}
	if err = tmp.Sync(); err != nil {
		return fmt.Errorf("%s: writing: %w", path, plain(err))
	}
	if err = tmp.Close(); err != nil {
		return fmt.Errorf("%s: writing: %w", path, plain(err))
	}
	if err = os.Rename(tmp.Name(), path); err != nil {
		return fmt.Errorf("%s: %w", path, plain(err))
	}
	return nil
}

// plainWrite keeps fill's own errors as they are, and drops the
// temporary file's name from an error of writing to it.
func plainWrite(err error) error {
	var pe *fs.PathError
	if errors.As(err, &pe) && IsTemp(filepath.Base(pe.Path)) {
		return fmt.Errorf("writing: %w", pe.Err)
	}
	return err
}

// WriteBytes writes data to path atomically (see Write).
func WriteBytes(path string, data []byte, perm os.FileMode) error {
	return Write(path, perm, func(w io.Writer) error {
		_, err := w.Write(data)
		return err
	})
}
