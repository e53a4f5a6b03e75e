package jsonfile

import (
	"bytes"
	"fmt"
	"io"
	"os"
	"strconv"
)

// ReadFile reads the file at path whole. A regular file larger than
// limit bytes is refused by its size before anything is read; any other
// input (a pipe, a device) is read, in chunks, up to limit+1 bytes and
// refused there, so memory holds at most about the limit whatever the
// input (and an accepted input twice, while its chunks are joined). The error of a
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

// Chunk sizes of readLimited: the first chunk of an input of unknown size,
// and the largest.
const (
	firstChunk = 64 << 10
	maxChunk   = 8 << 20
)

func readLimited(r io.Reader, file string, limit int64, kind error) ([]byte, error) {
	next := int64(firstChunk)
	if f, ok := r.(*os.File); ok {
		st, err := f.Stat()
		if err != nil {
			return nil, fmt.Errorf("%s: %w", orInput(file), err)
		}
		if st.IsDir() {
			return nil, fmt.Errorf("%s: is a directory, not a file", orInput(file))
		}
		if st.Mode().IsRegular() {
			if st.Size() > limit {
				return nil, tooLarge(file, st.Size(), limit, kind)
			}
			// One chunk of the size and a byte, to see the end: a regular
			// file is read into one buffer, returned as it is.
			next = st.Size() + 1
		}
	}
	// Read in chunks rather than into one growing buffer: growing by
	// append keeps the old arrays until the collector runs, so a pipe
	// refused at a 512 MiB limit held 2 GB; chunks hold the input once,
	// and a file that changes while it is read is still read to its end
	// (or to the limit).
	lr := io.LimitReader(r, limit+1)
	var chunks [][]byte
	var total int64
	for {
		chunk := make([]byte, min(next, limit+1-total))
		n, err := io.ReadFull(lr, chunk)
		chunks = append(chunks, chunk[:n])
		total += int64(n)
		if err == io.EOF || err == io.ErrUnexpectedEOF || total > limit {
			break
		}
		if err != nil {
			return nil, fmt.Errorf("%s: %w", orInput(file), err)
		}
		next = min(2*next, maxChunk)
	}
	if total > limit {
		return nil, tooLarge(file, -1, limit, kind)
	}
	if len(chunks) == 1 {
		return chunks[0], nil
	}
	return bytes.Join(chunks, nil), nil
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
