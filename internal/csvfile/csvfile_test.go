package csvfile

import (
	"errors"
	"io"
	"os"
	"path/filepath"
	"strings"
	"testing"
)

var errKind = errors.New("bad sample")

func readAll(t *testing.T, r io.Reader, limit int64) ([][]string, error) {
	t.Helper()
	cr, err := NewReader(r, "in.csv", limit, errKind)
	if err != nil {
		return nil, err
	}
	var out [][]string
	for {
		rec, _, err := cr.Read()
		if err == io.EOF {
			return out, nil
		}
		if err != nil {
			return out, err
		}
		out = append(out, append([]string(nil), rec...))
	}
}

func TestReader(t *testing.T) {
	recs, err := readAll(t, strings.NewReader("\ufeffa, b\n# comment\n\n1,2\n\"3\",4\n"), 1000)
	if err != nil || len(recs) != 3 || recs[0][0] != "a" || recs[0][1] != "b" || recs[2][0] != "3" {
		t.Errorf("records %q, %v", recs, err)
	}
}

// Issue 16: calibrate held a 64 MiB file without line breaks whole (25
// times its size in memory) and quoted all of it in its error.
func TestReaderLimits(t *testing.T) {
	cases := []struct {
		name  string
		in    io.Reader
		limit int64
		want  string
	}{
		{"a line longer than 64 KiB", io.MultiReader(strings.NewReader("bias_v"), strings.NewReader(strings.Repeat("x", 1<<20))), 1 << 30,
			"in.csv:1: line longer than 64 KiB, the limit (is this a CSV file?)"},
		{"more than the limit", strings.NewReader(strings.Repeat("1,2\n", 1000)), 100, "in.csv:26: more bytes than the limit for this kind of file"},
		{"a bad quote", strings.NewReader("1,2\n3,\"4\n"), 100, `in.csv:2: extraneous or missing " in quoted-field`},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			_, err := readAll(t, c.in, c.limit)
			if err == nil || err.Error() != c.want || !errors.Is(err, errKind) {
				t.Errorf("%v, want %q", err, c.want)
			}
		})
	}
	t.Run("a regular file beyond the limit is refused by its size, unread", func(t *testing.T) {
		path := filepath.Join(t.TempDir(), "big.csv")
		f, _ := os.Create(path)
		f.Truncate(1 << 30)
		f.Seek(0, io.SeekStart)
		defer f.Close()
		if _, err := NewReader(f, "big.csv", 16<<20, errKind); err == nil || !errors.Is(err, ErrTooLarge) ||
			err.Error() != "big.csv: the file holds 1 GiB, more than the 16 MiB limit for this kind of file" {
			t.Errorf("1 GiB file: %v", err)
		}
	})
}

func TestErrorQuotesAShortPrefix(t *testing.T) {
	e := &Error{File: "m.csv", Line: 3, Column: "width_nm", Value: strings.Repeat("9", 1000), Err: errors.New("not a finite number")}
	if got := e.Error(); len(got) > 100 || !strings.HasPrefix(got, `m.csv:3: width_nm = "9999`) {
		t.Errorf("Error() = %q", got)
	}
}

func FuzzReader(f *testing.F) {
	for _, s := range []string{"a,b\n1,2\n", "\"x\n", "# c\n\n,,,\n", "\ufeff1"} {
		f.Add([]byte(s))
	}
	f.Fuzz(func(t *testing.T, data []byte) {
		cr, err := NewReader(strings.NewReader(string(data)), "f.csv", 4096, nil)
		if err != nil {
			t.Fatal(err)
		}
		for i := 0; ; i++ {
			_, line, err := cr.Read()
			if err == io.EOF {
				return
			}
			if err != nil {
				if len(err.Error()) > 300 {
					t.Fatalf("message of %d bytes", len(err.Error()))
				}
				return
			}
			if line < 1 || i > len(data) {
				t.Fatalf("record %d on line %d", i, line)
			}
		}
	})
}
