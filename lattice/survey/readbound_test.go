package survey

import (
	"bytes"
	"encoding/binary"
	"errors"
	"hash/crc32"
	"image"
	"image/color"
	"io"
	"os"
	"path/filepath"
	"runtime"
	"strings"
	"testing"

	"golang.org/x/image/tiff"
)

// allocated returns the bytes f allocates on the Go heap (TotalAlloc
// counts every allocation, freed or not, so a whole-file read shows even
// if the collector has run since).
func allocated(f func()) uint64 {
	var before, after runtime.MemStats
	runtime.ReadMemStats(&before)
	f()
	runtime.ReadMemStats(&after)
	return after.TotalAlloc - before.TotalAlloc
}

// zeros is an endless stream of zero bytes.
type zeros struct{}

func (zeros) Read(p []byte) (int, error) {
	clear(p)
	return len(p), nil
}

// pngChunk returns one PNG chunk with its length and CRC.
func pngChunk(typ string, size uint32, body []byte) []byte {
	var b bytes.Buffer
	var head [8]byte
	binary.BigEndian.PutUint32(head[:4], size)
	copy(head[4:], typ)
	b.Write(head[:])
	b.Write(body)
	crc := crc32.NewIEEE()
	crc.Write(head[4:])
	crc.Write(body)
	binary.Write(&b, binary.BigEndian, crc.Sum32())
	return b.Bytes()
}

// pngHeaderOf is pngHeader with a bit depth and PNG colour type.
func pngHeaderOf(w, h uint32, depth, colourType byte) []byte {
	body := make([]byte, 13)
	binary.BigEndian.PutUint32(body[0:], w)
	binary.BigEndian.PutUint32(body[4:], h)
	body[8], body[9] = depth, colourType
	return append([]byte("\x89PNG\r\n\x1a\n"), pngChunk("IHDR", 13, body)...)
}

// tiffWithSize encodes a 1 x 1 image and rewrites the width and length
// its first IFD declares (TIFF 6.0, section 2: tags 256 and 257, 12-byte
// entries after a 2-byte count).
func tiffWithSize(t *testing.T, img image.Image, w, h uint32) []byte {
	var buf bytes.Buffer
	if err := tiff.Encode(&buf, img, nil); err != nil {
		t.Fatal(err)
	}
	data := buf.Bytes()
	le := binary.LittleEndian
	if string(data[:2]) != "II" {
		t.Fatalf("encoder wrote byte order %q", data[:2])
	}
	ifd := int(le.Uint32(data[4:]))
	n := int(le.Uint16(data[ifd:]))
	for i := 0; i < n; i++ {
		e := data[ifd+2+12*i:]
		var v uint32
		switch le.Uint16(e) {
		case 256:
			v = w
		case 257:
			v = h
		default:
			continue
		}
		if le.Uint16(e[2:]) == 3 { // SHORT
			le.PutUint16(e[8:], uint16(v))
		} else {
			le.PutUint32(e[8:], v)
		}
	}
	return data
}

// The reader refuses what would take too much memory before reading it:
// a 1 GiB file with an image signature by its size, an image whose header
// declares more decoded bytes than MaxImageBytes by its header, a PNG
// stream longer than MaxImageBytes at the cap. Each refusal must allocate
// next to nothing (a whole-file read would show as hundreds of MiB).
func TestImagesRefusedBeforeReadWhole(t *testing.T) {
	dir := t.TempDir()
	sparse := func(name string, head []byte) string {
		path := filepath.Join(dir, name)
		f, err := os.Create(path)
		if err != nil {
			t.Fatal(err)
		}
		defer f.Close()
		if _, err := f.Write(head); err != nil {
			t.Fatal(err)
		}
		// A sparse file: 1 GiB long, no disk used.
		if err := f.Truncate(1 << 30); err != nil {
			t.Fatal(err)
		}
		return path
	}
	tiffHead := []byte("II*\x00\x08\x00\x00\x00")
	rgba64 := image.NewRGBA64(image.Rect(0, 0, 1, 1))
	grey16 := image.NewGray16(image.Rect(0, 0, 1, 1))
	grey16.Set(0, 0, color.Gray16{Y: 7})

	for _, c := range []struct {
		name string
		read func() (*Topograph, error)
		want string
	}{
		{"1 GiB PNG file", func() (*Topograph, error) { return Read(sparse("big.png", pngHeaderOf(100, 100, 8, 0))) }, "1 GiB"},
		{"1 GiB TIFF file", func() (*Topograph, error) { return Read(sparse("big.tif", tiffHead)) }, "1 GiB"},
		{"PNG declaring 8192 x 8192 16-bit colour", func() (*Topograph, error) {
			return Decode(io.MultiReader(bytes.NewReader(pngHeaderOf(8192, 8192, 16, 6)), io.LimitReader(zeros{}, 1<<30)), "big.png")
		}, "512 MiB decoded"},
		{"PNG stream longer than the cap", func() (*Topograph, error) {
			// A valid header, then an ancillary chunk of 300 MiB the
			// decoder would read through.
			head := append(pngHeaderOf(100, 100, 8, 0), pngChunk("zzZz", 300<<20, nil)[:8]...)
			return Decode(io.MultiReader(bytes.NewReader(head), zeros{}), "long.png")
		}, "longer than the 256 MiB"},
		{"TIFF declaring 8192 x 8192 16-bit colour", func() (*Topograph, error) {
			path := filepath.Join(dir, "colour.tif")
			if err := os.WriteFile(path, tiffWithSize(t, rgba64, 8192, 8192), 0o644); err != nil {
				t.Fatal(err)
			}
			return Read(path)
		}, "512 MiB decoded"},
	} {
		t.Run(c.name, func(t *testing.T) {
			var err error
			bytesUsed := allocated(func() { _, err = c.read() })
			if !errors.Is(err, ErrTooManyBytes) {
				t.Fatalf("error %v, want ErrTooManyBytes", err)
			}
			var re *ReadError
			if !errors.As(err, &re) || re.File == "" || !strings.Contains(err.Error(), c.want) {
				t.Errorf("error %q does not name the file or say %q", err, c.want)
			}
			if bytesUsed > 4<<20 {
				t.Errorf("refusing it allocated %d MiB, want under 4 MiB", bytesUsed>>20)
			}
		})
	}

	// The same checks let a small TIFF through, read from the file in place.
	path := filepath.Join(dir, "small.tif")
	if err := os.WriteFile(path, tiffWithSize(t, grey16, 1, 1), 0o644); err != nil {
		t.Fatal(err)
	}
	top, err := Read(path)
	if err != nil || top.Width != 1 || top.Height != 1 || top.At(0, 0) != 7 {
		t.Fatalf("1 x 1 grey TIFF: %+v, %v", top, err)
	}
}

// Text chunks anywhere in the stream, before or after the pixels, give
// the scan size (the PNG specification allows tEXt after IDAT).
func TestPNGTextAfterPixels(t *testing.T) {
	var buf bytes.Buffer
	if err := WritePNG(&buf, ramp(12, 10), 8); err != nil {
		t.Fatal(err)
	}
	data := buf.Bytes()
	// Move the IEND chunk's 12 bytes after a new text chunk.
	iend := data[len(data)-12:]
	text := []byte("height_nm\x0042.5")
	moved := append(append(append([]byte{}, data[:len(data)-12]...), pngChunk("tEXt", uint32(len(text)), text)...), iend...)
	top, err := Decode(bytes.NewReader(moved), "late.png")
	if err != nil {
		t.Fatal(err)
	}
	if top.SizeNM[1] != 42.5 {
		t.Errorf("height_nm after the pixels read as %g, want 42.5", top.SizeNM[1])
	}
}
