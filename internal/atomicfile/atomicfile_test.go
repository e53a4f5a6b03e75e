package atomicfile

import (
	"errors"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"strconv"
	"strings"
	"syscall"
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

// Issue 16: a writer killed mid-write left hidden ".NAME.tmp-*" files for
// good. Temporary files now say what they are, and the next write into
// the directory removes those of writers that are gone.
func TestWriteCleansUpAfterAKilledWriter(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "plan.pdf")
	// A real writer, killed while its temporary file is open.
	if os.Getenv("ATOMICFILE_CHILD") == "" {
		exe, err := os.Executable()
		if err != nil {
			t.Skip(err)
		}
		cmd := exec.Command(exe, "-test.run", "^TestKilledChild$")
		cmd.Env = append(os.Environ(), "ATOMICFILE_CHILD="+path)
		out, _ := cmd.StdoutPipe()
		if err := cmd.Start(); err != nil {
			t.Fatal(err)
		}
		buf := make([]byte, 5)
		io.ReadFull(out, buf) // "ready": the child is inside Write
		cmd.Process.Kill()
		cmd.Wait()
	}
	left, _ := filepath.Glob(filepath.Join(dir, ".plan.pdf.dimerpath-unfinished-*"))
	if len(left) != 1 {
		t.Fatalf("the killed writer left %v, want one recognisable unfinished file", left)
	}
	// Another process's live file and somebody else's file stay.
	live := filepath.Join(dir, ".other.svg"+marker+strconv.Itoa(os.Getpid())+"-42")
	mine := filepath.Join(dir, ".notes.tmp-123")
	for _, f := range []string{live, mine} {
		os.WriteFile(f, []byte("x"), 0o644)
	}
	if err := WriteBytes(path, []byte("new"), 0o644); err != nil {
		t.Fatal(err)
	}
	entries, _ := os.ReadDir(dir)
	var names []string
	for _, e := range entries {
		names = append(names, e.Name())
	}
	want := []string{".notes.tmp-123", filepath.Base(live), "plan.pdf"}
	if strings.Join(names, " ") != strings.Join(want, " ") {
		t.Errorf("after the next write the directory holds %v, want %v", names, want)
	}
}

// TestKilledChild is the writer TestWriteCleansUpAfterAKilledWriter
// kills: it starts a write and waits inside it.
func TestKilledChild(t *testing.T) {
	path := os.Getenv("ATOMICFILE_CHILD")
	if path == "" {
		t.Skip("run by TestWriteCleansUpAfterAKilledWriter")
	}
	Write(path, 0o644, func(w io.Writer) error {
		w.Write(make([]byte, 100000))
		os.Stdout.WriteString("ready")
		select {} // until killed
	})
}

func TestCheck(t *testing.T) {
	dir := t.TempDir()
	cases := []struct {
		name, path, want string
	}{
		{"a directory", dir, dir + " is a directory: give a file name to write"},
		{"a missing directory", filepath.Join(dir, "no", "x.pdf"), "x.pdf: the directory " + filepath.Join(dir, "no") + " does not exist"},
		{"a file as directory", filepath.Join(dir, "f", "x.pdf"), "x.pdf: " + filepath.Join(dir, "f") + " is not a directory"},
	}
	os.WriteFile(filepath.Join(dir, "f"), nil, 0o644)
	for _, c := range cases {
		if err := Check(c.path); err == nil || !strings.Contains(err.Error(), c.want) {
			t.Errorf("%s: Check = %v, want %q", c.name, err, c.want)
		}
	}
	if err := Check(filepath.Join(dir, "ok.pdf")); err != nil {
		t.Errorf("Check(writable) = %v", err)
	}
	if entries, _ := os.ReadDir(dir); len(entries) != 1 {
		t.Errorf("Check left files behind: %v", entries)
	}
	// Write says the same about a directory instead of "rename: file exists".
	if err := WriteBytes(dir, []byte("x"), 0o644); err == nil || !strings.Contains(err.Error(), "is a directory") {
		t.Errorf("WriteBytes(dir) = %v", err)
	}
}

// Errors name the file asked for, never the temporary file.
func TestWriteErrorNamesTheTarget(t *testing.T) {
	path := filepath.Join(t.TempDir(), "plan.pdf")
	err := Write(path, 0o644, func(w io.Writer) error {
		// What a full disk makes the temporary file's writer return.
		return &os.PathError{Op: "write", Path: filepath.Join(filepath.Dir(path), ".plan.pdf"+marker+"1-2"), Err: syscall.ENOSPC}
	})
	if err == nil || err.Error() != path+": writing: no space left on device" {
		t.Errorf("Write = %v", err)
	}
}
