package survey

import (
	"bytes"
	"context"
	"encoding/binary"
	"errors"
	"hash/crc32"
	"image"
	"image/color"
	"image/png"
	"math"
	"strings"
	"testing"

	"golang.org/x/image/tiff"
)

// ramp returns a w x h topograph whose heights rise along x and y.
func ramp(w, h int) *Topograph {
	t := &Topograph{Name: "ramp", Width: w, Height: h, Z: make([]float32, w*h), ZUnitNM: 1, SizeNM: [2]float64{12.5, 7.5}}
	for j := 0; j < h; j++ {
		for i := 0; i < w; i++ {
			t.Z[j*w+i] = float32(0.01*float64(i) + 0.1*float64(j))
		}
	}
	return t
}

func TestPNGRoundTrip(t *testing.T) {
	for _, bits := range []int{8, 16} {
		src := ramp(20, 9)
		var buf bytes.Buffer
		if err := WritePNG(&buf, src, bits); err != nil {
			t.Fatal(err)
		}
		got, err := Decode(&buf, "ramp.png")
		if err != nil {
			t.Fatal(err)
		}
		if got.Width != 20 || got.Height != 9 || got.SizeNM != src.SizeNM {
			t.Fatalf("%d bits: read %d x %d, size %v; want 20 x 9, %v", bits, got.Width, got.Height, got.SizeNM, src.SizeNM)
		}
		// Heights come back in nm through z_nm_per_level, to within one
		// grey level of the range (the lowest level is the minimum).
		step := (float64(src.Z[len(src.Z)-1]) - float64(src.Z[0])) / (math.Exp2(float64(bits)) - 1)
		for k := range src.Z {
			want := float64(src.Z[k] - src.Z[0])
			if d := float64(got.Z[k])*got.ZUnitNM - want; math.Abs(d) > step {
				t.Fatalf("%d bits: pixel %d height %g nm, want %g ± %g", bits, k, float64(got.Z[k])*got.ZUnitNM, want, step)
			}
		}
		// Line 0 is the bottom line: the ramp rises with j.
		if !(got.At(0, 8) > got.At(0, 0)) {
			t.Errorf("%d bits: the top line is not higher than the bottom one", bits)
		}
	}
}

func TestTIFFGreyLevels(t *testing.T) {
	for _, img := range []image.Image{gray8(5, 3), gray16(5, 3)} {
		var buf bytes.Buffer
		if err := tiff.Encode(&buf, img, nil); err != nil {
			t.Fatal(err)
		}
		got, err := Decode(&buf, "scan.tif")
		if err != nil {
			t.Fatal(err)
		}
		// The image's top row (y = 0) is the topograph's last line.
		r, _, _, _ := img.At(4, 0).RGBA()
		exp := float32(r)
		if _, ok := img.(*image.Gray); ok {
			exp = float32(r >> 8)
		}
		if got.At(4, 2) != exp || got.ZUnitNM != 0 {
			t.Errorf("%T: pixel (4, top) = %g (unit %g), want %g grey levels with no unit", img, got.At(4, 2), got.ZUnitNM, exp)
		}
	}
}

func gray8(w, h int) *image.Gray {
	g := image.NewGray(image.Rect(0, 0, w, h))
	for i := range g.Pix {
		g.Pix[i] = uint8(7 * i)
	}
	return g
}

func gray16(w, h int) *image.Gray16 {
	g := image.NewGray16(image.Rect(0, 0, w, h))
	for i := 0; i < w*h; i++ {
		binary.BigEndian.PutUint16(g.Pix[2*i:], uint16(1000*i+3))
	}
	return g
}

func TestMatrix(t *testing.T) {
	src := "# instrument: invented\n# width_nm: 3\n# height_nm: 2\n# unit: m\n# first_line: bottom\n" +
		"1e-10, 2e-10\t3e-10\n\n4e-10 5e-10 6e-10\r\n"
	got, err := Decode(strings.NewReader(src), "m.txt")
	if err != nil {
		t.Fatal(err)
	}
	if got.Width != 3 || got.Height != 2 || got.SizeNM != [2]float64{3, 2} || got.ZUnitNM != 1 {
		t.Fatalf("read %d x %d, size %v, unit %g", got.Width, got.Height, got.SizeNM, got.ZUnitNM)
	}
	// first_line bottom: the first line of numbers is line 0; metres to nm.
	if math.Abs(float64(got.At(0, 0))-0.1) > 1e-6 || math.Abs(float64(got.At(2, 1))-0.6) > 1e-6 {
		t.Errorf("heights %v, want 0.1 … 0.6 nm with the first line at the bottom", got.Z)
	}
	top, err := Decode(strings.NewReader("1 2\n3 4\n"), "top.txt")
	if err != nil {
		t.Fatal(err)
	}
	if top.At(0, 1) != 1 || top.At(0, 0) != 3 {
		t.Errorf("first_line defaults to top: got line 1 = %g, line 0 = %g", top.At(0, 1), top.At(0, 0))
	}
}

// pngHeader returns the signature and an IHDR chunk for a w x h grey PNG,
// with nothing after it.
func pngHeader(w, h uint32) []byte {
	var b bytes.Buffer
	b.WriteString("\x89PNG\r\n\x1a\n")
	body := make([]byte, 13)
	binary.BigEndian.PutUint32(body[0:], w)
	binary.BigEndian.PutUint32(body[4:], h)
	body[8], body[9] = 8, 0 // 8-bit grey
	var head [8]byte
	binary.BigEndian.PutUint32(head[:4], 13)
	copy(head[4:], "IHDR")
	b.Write(head[:])
	b.Write(body)
	crc := crc32.NewIEEE()
	crc.Write(head[4:])
	crc.Write(body)
	var tail [4]byte
	binary.BigEndian.PutUint32(tail[:], crc.Sum32())
	b.Write(tail[:])
	return b.Bytes()
}

func TestBadTopographs(t *testing.T) {
	var good bytes.Buffer
	if err := png.Encode(&good, gray8(40, 30)); err != nil {
		t.Fatal(err)
	}
	var goodTIFF bytes.Buffer
	if err := tiff.Encode(&goodTIFF, gray16(40, 30), nil); err != nil {
		t.Fatal(err)
	}
	colour := image.NewRGBA(image.Rect(0, 0, 4, 4))
	colour.Set(1, 2, color.RGBA{200, 10, 10, 255})
	var colourPNG bytes.Buffer
	png.Encode(&colourPNG, colour)
	for _, c := range []struct {
		name, data string
		is         error
		want       string // in the message
	}{
		{"truncated PNG", good.String()[:good.Len()/2], ErrTruncated, "truncated"},
		{"truncated TIFF", goodTIFF.String()[:goodTIFF.Len()/2], ErrTruncated, "truncated"},
		{"0 x 0 PNG", string(pngHeader(0, 0)), ErrEmpty, "0 x 0"},
		{"PNG wider than 8192", string(pngHeader(9000, 10)), ErrTooLarge, "8192"},
		{"empty file", "", ErrEmpty, "empty"},
		{"matrix of comments", "# width_nm: 4\n", ErrEmpty, "no numbers"},
		{"NaN height", "1 2\n3 NaN\n", ErrNotFinite, "scan.bin:2:"},
		{"infinite height", "1 2\n3 -Inf\n", ErrNotFinite, "scan.bin:2:"},
		{"ragged line", "1 2 3\n4 5 6\n7 8\n", ErrRagged, "scan.bin:3:"},
		{"word in the matrix", "1 2\nthree 4\n", ErrFormat, "scan.bin:2:"},
		{"bad unit", "# unit: pm\n1 2\n", nil, "scan.bin:1: header unit"},
		{"bad width", "# width_nm: -3\n1 2\n", nil, "scan.bin:1: header width_nm"},
		{"colour PNG", colourPNG.String(), ErrFormat, "coloured"},
	} {
		t.Run(c.name, func(t *testing.T) {
			_, err := Decode(strings.NewReader(c.data), "scan.bin")
			if err == nil {
				t.Fatal("accepted")
			}
			var re *ReadError
			if !errors.As(err, &re) || re.File != "scan.bin" {
				t.Errorf("error %v does not name the file (%T)", err, err)
			}
			if c.is != nil && !errors.Is(err, c.is) {
				t.Errorf("error %v is not %v", err, c.is)
			}
			if !strings.Contains(err.Error(), c.want) {
				t.Errorf("error %q does not say %q", err, c.want)
			}
		})
	}
}

func TestGreyRGBAccepted(t *testing.T) {
	img := image.NewRGBA(image.Rect(0, 0, 3, 2))
	for i := range img.Pix {
		img.Pix[i] = 90
	}
	var buf bytes.Buffer
	png.Encode(&buf, img)
	got, err := Decode(&buf, "grey.png")
	if err != nil {
		t.Fatal(err)
	}
	if got.At(1, 1) != 90 {
		t.Errorf("grey RGB pixel read as %g, want 90", got.At(1, 1))
	}
}

func TestAnalyseRefusesWhatItCannotUse(t *testing.T) {
	flat := &Topograph{Name: "flat.txt", Width: 64, Height: 64, Z: make([]float32, 64*64), ZUnitNM: 1}
	if _, err := Analyse(context.Background(), flat, Options{}); !errors.Is(err, ErrNoLattice) || !strings.Contains(err.Error(), "flat.txt") {
		t.Errorf("flat image: %v, want ErrNoLattice naming the file", err)
	}
	small := ramp(20, 20)
	if _, err := Analyse(context.Background(), small, Options{}); err == nil || !strings.Contains(err.Error(), "at least") {
		t.Errorf("20 x 20 image: %v, want a size error", err)
	}
}

// FuzzDecode feeds the readers anything: they must return a topograph or
// an error naming the file, never panic, and what they return must be
// analysable or refused with an error.
func FuzzDecode(f *testing.F) {
	var p8, p16, tf bytes.Buffer
	WritePNG(&p8, ramp(40, 33), 8)
	WritePNG(&p16, ramp(33, 40), 16)
	tiff.Encode(&tf, gray8(36, 36), nil)
	f.Add(p8.Bytes())
	f.Add(p16.Bytes())
	f.Add(tf.Bytes())
	f.Add(pngHeader(9000, 1))
	f.Add([]byte("# width_nm: 3\n# unit: m\n1 2 3\n4 5 6\n"))
	f.Add([]byte("1,2\n3\n"))
	f.Fuzz(func(t *testing.T, data []byte) {
		top, err := Decode(bytes.NewReader(data), "fuzz")
		if err != nil {
			if !strings.HasPrefix(err.Error(), "fuzz") {
				t.Fatalf("error %q does not name the file", err)
			}
			return
		}
		if top.Width*top.Height != len(top.Z) || top.Width < 1 || top.Height < 1 {
			t.Fatalf("read %d x %d with %d heights", top.Width, top.Height, len(top.Z))
		}
		if top.Width <= 96 && top.Height <= 96 {
			if an, err := Analyse(context.Background(), top, Options{}); err == nil && an.Width != top.Width {
				t.Fatalf("analysis of %d px wide image says %d", top.Width, an.Width)
			}
		}
	})
}
