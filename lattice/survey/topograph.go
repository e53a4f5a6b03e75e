package survey

import (
	"errors"
	"fmt"
)

// MaxSide is the largest width or height, in pixels, that the readers
// accept: 8192 x 8192 float32 heights take 256 MiB.
const MaxSide = 8192

// Topograph is a height map on a regular pixel grid, as read from a file.
//
// Pixel (i, j) is column i from the left and line j from the bottom, so
// that x points right and y points up as in the design's field; Z holds
// line 0 (the bottom line) first.
type Topograph struct {
	// Name is the file name, used in messages.
	Name string
	// Width and Height are the numbers of pixels along x and y.
	Width, Height int
	// Z holds the heights, Z[j*Width+i], in units of ZUnitNM.
	Z []float32
	// SizeNM is the nominal scan size (x, y) in nm as the file gives it;
	// zero when it gives none.
	SizeNM [2]float64
	// ZUnitNM is the height in nm of one unit of Z: 1 for a matrix in nm,
	// the file's scale for an image that carries one, 0 when the file
	// gives none (grey levels of an image).
	ZUnitNM float64
}

// At returns the height of pixel (i, j).
func (t *Topograph) At(i, j int) float32 { return t.Z[j*t.Width+i] }

// Errors the readers wrap, for errors.Is.
var (
	// ErrTruncated: the file ends before its image data does.
	ErrTruncated = errors.New("file is truncated")
	// ErrEmpty: the image has no pixels.
	ErrEmpty = errors.New("image is 0 x 0 pixels")
	// ErrTooLarge: the image is larger than MaxSide pixels on a side.
	ErrTooLarge = fmt.Errorf("image is larger than %d x %d pixels", MaxSide, MaxSide)
	// ErrTooManyBytes: an image file, or the pixels it declares, would
	// take more than MaxImageBytes.
	ErrTooManyBytes = errors.New("image is too large to read")
	// ErrNotFinite: a height is NaN or infinite.
	ErrNotFinite = errors.New("height is not a finite number")
	// ErrRagged: the lines of a height matrix differ in length.
	ErrRagged = errors.New("lines of the matrix differ in length")
	// ErrFormat: the file is not an image or matrix dimerpath reads.
	ErrFormat = errors.New("not a topograph dimerpath can read")
)

// ReadError reports what is wrong with a topograph file: the file, the
// line of a matrix (0 for images or the whole file) and the problem,
// written FILE:LINE: like every other reader's errors.
type ReadError struct {
	File string
	Line int
	Err  error
}

func (e *ReadError) Error() string {
	if e.Line > 0 {
		return fmt.Sprintf("%s:%d: %v", e.File, e.Line, e.Err)
	}
	return fmt.Sprintf("%s: %v", e.File, e.Err)
}

func (e *ReadError) Unwrap() error { return e.Err }
