// Package rendertest keeps the frames tests draw, for a look by eye.
package rendertest

import (
	"image"
	"image/png"
	"os"
	"path/filepath"
	"testing"
)

// SaveImage writes img as a PNG file called name into
// $DIMERPATH_FRAME_DIR when that is set, and does nothing otherwise.
func SaveImage(t testing.TB, name string, img image.Image) {
	t.Helper()
	dir := os.Getenv("DIMERPATH_FRAME_DIR")
	if dir == "" {
		return
	}
	f, err := os.Create(filepath.Join(dir, name))
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	if err := png.Encode(f, img); err != nil {
		t.Fatal(err)
	}
}
