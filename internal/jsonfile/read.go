package jsonfile

import (
	"fmt"
	"io"
	"os"
	"strconv"
)

// ReadFile reads the file at path whole. A regular file larger than
// limit bytes is refused by its size before anything is read; any other
// input (a pipe, a device) is read up to limit+1 bytes and refused there,
// so memory stays within the limit whatever the input. The error of a
// refusal is an *Error naming path and wrapping ErrTooLarge and kind.
func ReadFile(path string, limit int64, kind error) ([]byte, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	return readLimited(f, path, limit, kind)
}

// ReadAll reads r whole within limit bytes, as ReadFile does; file names
// the input in errors. When r is an *os.File of a regular file, its size
// is checked first.
func ReadAll(r io.Reader, file string, limit int64, kind error) ([]byte, error) {
	return readLimited(r, file, limit, kind)
}

func readLimited(r io.Reader, file string, limit int64, kind error) ([]byte, error) {
	size := int64(-1)
	if f, ok := r.(*os.File); ok {
		st, err := f.Stat()
		if err != nil {
			return nil, fmt.Errorf("%s: %w", orInput(file), err)
		}
		if st.IsDir() {
			return nil, fmt.Errorf("%s: is a directory, not a file", orInput(file))
		}
		if st.Mode().IsRegular() {
			size = st.Size()
			if size > limit {
				return nil, tooLarge(file, size, limit, kind)
			}
		}
	}
	// Grow the buffer as the data comes rather than trusting the size:
	// a file may change while it is read.
	buf := make([]byte, 0, min(max(size+1, 512), limit+1))
	lr := io.LimitReader(r, limit+1)
	for {
		if len(buf) == cap(buf) {
			buf = append(buf, 0)[:len(buf)]
		}
		n, err := lr.Read(buf[len(buf):cap(buf)])
		buf = buf[:len(buf)+n]
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, fmt.Errorf("%s: %w", orInput(file), err)
		}
	}
	if int64(len(buf)) > limit {
		return nil, tooLarge(file, -1, limit, kind)
	}
	return buf, nil
}

func orInput(file string) string {
	if file == "" {
		return "input"
	}
	return file
}

func tooLarge(file string, size, limit int64, kind error) error {
	msg := fmt.Sprintf("larger than %s, the limit for this kind of file", Bytes(limit))
	if size >= 0 {
		msg = fmt.Sprintf("the file holds %s, more than the %s limit for this kind of file", Bytes(size), Bytes(limit))
	}
	return &Error{File: file, Kind: kind, Problems: []Problem{{Message: msg, Err: ErrTooLarge}}}
}

// Bytes formats a size in bytes for a message: "64 MiB", "1.5 GiB",
// "812 bytes".
func Bytes(n int64) string {
	if n < 1024 {
		return fmt.Sprintf("%d bytes", n)
	}
	f := float64(n)
	units := []string{"KiB", "MiB", "GiB", "TiB", "PiB", "EiB"}
	for i, u := range units {
		f /= 1024
		if f < 999.5 || i == len(units)-1 {
			return strconv.FormatFloat(f, 'g', 3, 64) + " " + u
		}
	}
	return ""
}
