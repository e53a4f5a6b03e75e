package atomicfile

import (
	"errors"
	"io"
	"os"
	"path/filepath"
	"testing"
)

func TestWriteReplacesOnlyOnSuccess(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "plan.json")
	if err := WriteBytes(path, []byte("old"), 0o644); err != nil {
		t.Fatal(err)
	}
	boom := errors.New("disk on fire")
	err := Write(path, 0o644, func(w io.Writer) error {
		w.Write([]byte("half of the new conte"))
		return boom
	})
	if !errors.Is(err, boom) {
		t.Fatalf("Write error = %v, want it to wrap %v", err, boom)
	}
	got, _ := os.ReadFile(path)
	if string(got) != "old" {
		t.Errorf("after a failed write the file holds %q, want the old %q", got, "old")
	}
	entries, _ := os.ReadDir(dir)
	if len(entries) != 1 {
		t.Errorf("a failed write left %d files in the directory, want 1", len(entries))
	}
	if err := WriteBytes(path, []byte("new"), 0o644); err != nil {
		t.Fatal(err)
	}
	if got, _ := os.ReadFile(path); string(got) != "new" {
		t.Errorf("file holds %q, want %q", got, "new")
	}
}

func TestWriteMissingDirectory(t *testing.T) {
	path := filepath.Join(t.TempDir(), "no", "such", "dir", "x.json")
	if err := WriteBytes(path, []byte("x"), 0o644); err == nil {
		t.Fatal("WriteBytes into a missing directory succeeded, want an error")
	}
}
