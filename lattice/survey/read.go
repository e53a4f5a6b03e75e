package survey

import (
	"bufio"
	"bytes"
	"encoding/binary"
	"errors"
	"fmt"
	"image"
	"image/color"
	"image/png"
	"io"
	"math"
	"os"
	"path/filepath"
	"strconv"
	"strings"

	"golang.org/x/image/tiff"

	"dimerpath/internal/jsonfile"
)

// MaxFileBytes bounds the size of a height-matrix file: an 8192 x 8192
// matrix written with 24 characters a number. The matrix is read line by
// line, so its memory stays with the numbers, never with the file.
const MaxFileBytes = 2 << 30

// MaxImageBytes bounds a PNG or TIFF topograph, both its file and the
// pixels it decodes to: an 8192 x 8192 image of 16-bit grey levels is
// 128 MiB; twice that leaves room for an uncompressed file with its
// metadata, or 8-bit colour (grey in an RGB model). A file beyond it is
// refused by its size or by the dimensions its header declares, before
// its pixels are read.
const MaxImageBytes = 256 << 20

// maxLineBytes bounds one line of a height matrix: MaxSide numbers of up
// to 64 characters each.
const maxLineBytes = MaxSide * 64

// Image formats, told by their signatures.
const (
	formatPNG  = "PNG"
	formatTIFF = "TIFF"
)

// imageFormat returns formatPNG or formatTIFF when head starts with that
// format's signature, else "".
func imageFormat(head []byte) string {
	switch {
	case bytes.HasPrefix(head, []byte("\x89PNG\r\n\x1a\n")):
		return formatPNG
	case bytes.HasPrefix(head, []byte("II*\x00")), bytes.HasPrefix(head, []byte("MM\x00*")):
		return formatTIFF
	}
	return ""
}

// Read reads a topograph from a file: a grey-scale PNG or TIFF (8 or 16
// bits a pixel) or a plain-text height matrix. Errors name the file and
// are *ReadError values wrapping one of the Err… sentinels where one fits.
// An image file larger than MaxImageBytes is refused before it is read.
func Read(path string) (*Topograph, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	name := filepath.Base(path)
	if st, err := f.Stat(); err == nil && st.Mode().IsRegular() {
		var head [8]byte
		n, _ := f.ReadAt(head[:], 0)
		switch imageFormat(head[:n]) {
		case formatPNG:
			if err := checkFileBytes(formatPNG, st.Size()); err != nil {
				return nil, &ReadError{File: name, Err: err}
			}
		case formatTIFF:
			if err := checkFileBytes(formatTIFF, st.Size()); err != nil {
				return nil, &ReadError{File: name, Err: err}
			}
			// The TIFF decoder reads where the file's offsets point:
			// straight from the file, never the whole file in memory.
			return decodeTIFF(io.NewSectionReader(f, 0, st.Size()), name)
		}
	}
	return Decode(f, name)
}

// checkFileBytes refuses an image file of more than MaxImageBytes.
func checkFileBytes(format string, size int64) error {
	if size > MaxImageBytes {
		return fmt.Errorf("%w: the %s file is %s, more than the %s a topograph image may take (an 8192 x 8192 image of 16-bit grey levels is 128 MiB)",
			ErrTooManyBytes, format, jsonfile.Bytes(size), jsonfile.Bytes(MaxImageBytes))
	}
	return nil
}

// Decode reads a topograph from r, telling the format from its first
// bytes; name is used in messages. A PNG is decoded as it streams; a TIFF
// is read into memory first, up to MaxImageBytes (Read decodes a TIFF file
// in place).
func Decode(r io.Reader, name string) (*Topograph, error) {
	br := bufio.NewReaderSize(io.LimitReader(r, MaxFileBytes+1), 1<<16)
	head, _ := br.Peek(8)
	switch imageFormat(head) {
	case formatPNG:
		return decodePNG(br, name)
	case formatTIFF:
		capped := &cappedReader{r: br, left: MaxImageBytes}
		data, err := io.ReadAll(capped)
		if capped.over {
			return nil, &ReadError{File: name, Err: fmt.Errorf("%w: the TIFF data is longer than the %s a topograph image may take", ErrTooManyBytes, jsonfile.Bytes(MaxImageBytes))}
		}
		if err != nil {
			return nil, &ReadError{File: name, Err: err}
		}
		return decodeTIFF(bytes.NewReader(data), name)
	}
	if len(head) == 0 {
		return nil, &ReadError{File: name, Err: fmt.Errorf("%w: the file is empty", ErrEmpty)}
	}
	return DecodeMatrix(br, name)
}

// cappedReader passes on at most left bytes and notes (over) when the
// stream has more.
type cappedReader struct {
	r    io.Reader
	left int64
	over bool
}

func (c *cappedReader) Read(p []byte) (int, error) {
	if c.left <= 0 {
		var one [1]byte
		if n, _ := c.r.Read(one[:]); n > 0 {
			c.over = true
			return 0, errTooManyBytes
		}
		return 0, io.EOF
	}
	if int64(len(p)) > c.left {
		p = p[:c.left]
	}
	n, err := c.r.Read(p)
	c.left -= int64(n)
	return n, err
}

// errTooManyBytes stops a decoder at the cap; the reader's over flag says
// what happened.
var errTooManyBytes = errors.New("image data beyond the cap")

// checkDecodedBytes refuses a w x h image whose decoded pixels,
// bytesPerPixel each, would take more than MaxImageBytes (its heights then
// take up to as much again, as float32).
func checkDecodedBytes(format string, w, h, bytesPerPixel int, model string) error {
	if n := int64(w) * int64(h) * int64(bytesPerPixel); n > MaxImageBytes {
		return fmt.Errorf("%w: a %d x %d %s %s takes %s decoded, more than %s: save the topograph as 8- or 16-bit grey scale",
			ErrTooManyBytes, w, h, model, format, jsonfile.Bytes(n), jsonfile.Bytes(MaxImageBytes))
	}
	return nil
}

// pngHeaderInfo reads the IHDR chunk at the start of a PNG stream: its
// size, and the bytes a pixel takes once decoded by image/png (grey 1 or 2,
// palette 1, the other models 4 or 8) with the model's name. ok is false
// when head does not hold an IHDR chunk.
func pngHeaderInfo(head []byte) (w, h, bytesPerPixel int, model string, ok bool) {
	if len(head) < 26 || string(head[12:16]) != "IHDR" {
		return 0, 0, 0, "", false
	}
	w = int(min(binary.BigEndian.Uint32(head[16:]), 1<<20))
	h = int(min(binary.BigEndian.Uint32(head[20:]), 1<<20))
	depth, colourType := head[24], head[25]
	wide := depth == 16
	switch colourType {
	case 0:
		model, bytesPerPixel = "grey", 1
		if wide {
			bytesPerPixel = 2
		}
	case 3:
		model, bytesPerPixel = "palette", 1
	default: // RGB, grey with alpha, RGBA
		model, bytesPerPixel = "colour", 4
		if wide {
			bytesPerPixel = 8
		}
	}
	if wide {
		model = "16-bit " + model
	} else {
		model = "8-bit " + model
	}
	return w, h, bytesPerPixel, model, true
}

// decodePNG reads a grey-scale PNG as it streams. The heights are the grey
// levels; PNG text chunks may carry width_nm, height_nm (the nominal scan
// size) and z_nm_per_level (the height of one level), as WritePNG writes
// them. The size declared in the header is checked before any pixel is
// read.
func decodePNG(br *bufio.Reader, name string) (*Topograph, error) {
	head, _ := br.Peek(26)
	// The size stands in the header: checked before the decoder, which
	// refuses a 0 x 0 image with a less helpful message and would
	// allocate whatever the header declares.
	if w, h, bpp, model, ok := pngHeaderInfo(head); ok {
		if err := checkSize(w, h); err != nil {
			return nil, &ReadError{File: name, Err: err}
		}
		if err := checkDecodedBytes(formatPNG, w, h, bpp, model); err != nil {
			return nil, &ReadError{File: name, Err: err}
		}
	}
	capped := &cappedReader{r: br, left: MaxImageBytes}
	text := &pngTextScanner{skip: 8}
	img, err := png.Decode(io.TeeReader(capped, text))
	if capped.over {
		return nil, &ReadError{File: name, Err: fmt.Errorf("%w: the PNG data is longer than the %s a topograph image may take", ErrTooManyBytes, jsonfile.Bytes(MaxImageBytes))}
	}
	if err != nil {
		return nil, &ReadError{File: name, Err: imageError(formatPNG, err)}
	}
	t, err := fromImage(img, name)
	if err != nil {
		return nil, err
	}
	for _, k := range []struct {
		key string
		dst *float64
	}{{"width_nm", &t.SizeNM[0]}, {"height_nm", &t.SizeNM[1]}, {"z_nm_per_level", &t.ZUnitNM}} {
		s, ok := text.text[k.key]
		if !ok {
			continue
		}
		v, err := strconv.ParseFloat(strings.TrimSpace(s), 64)
		if err != nil || !(v > 0) || math.IsInf(v, 0) {
			return nil, &ReadError{File: name, Err: fmt.Errorf("PNG text %s: %q is not a positive number", k.key, s)}
		}
		*k.dst = v
	}
	return t, nil
}

// tiffBytesPerPixel is what golang.org/x/image/tiff allocates a pixel of
// the model (its images are Gray, Gray16, Paletted, RGBA, NRGBA, RGBA64,
// NRGBA64 or CMYK), with the model's name.
func tiffBytesPerPixel(m color.Model) (int, string) {
	switch m {
	case color.GrayModel:
		return 1, "8-bit grey"
	case color.Gray16Model:
		return 2, "16-bit grey"
	case color.RGBA64Model, color.NRGBA64Model:
		return 8, "16-bit colour"
	}
	if _, ok := m.(color.Palette); ok {
		return 1, "palette"
	}
	return 4, "8-bit colour"
}

// decodeTIFF reads a grey-scale TIFF of 8 or 16 bits a pixel from r, which
// the decoder reads where the file's offsets point. The size and model
// are checked before the pixels are decoded.
func decodeTIFF(r io.ReaderAt, name string) (*Topograph, error) {
	cfg, err := decodeTIFFConfig(r)
	if err != nil {
		return nil, &ReadError{File: name, Err: imageError(formatTIFF, err)}
	}
	if err := checkSize(cfg.Width, cfg.Height); err != nil {
		return nil, &ReadError{File: name, Err: err}
	}
	bpp, model := tiffBytesPerPixel(cfg.ColorModel)
	if err := checkDecodedBytes(formatTIFF, cfg.Width, cfg.Height, bpp, model); err != nil {
		return nil, &ReadError{File: name, Err: err}
	}
	img, err := decodeTIFFImage(r)
	if err != nil {
		return nil, &ReadError{File: name, Err: imageError(formatTIFF, err)}
	}
	return fromImage(img, name)
}

// decodeTIFFConfig reads a TIFF's header with a recover, as
// decodeTIFFImage does.
func decodeTIFFConfig(r io.ReaderAt) (cfg image.Config, err error) {
	defer func() {
		if p := recover(); p != nil {
			cfg, err = image.Config{}, fmt.Errorf("malformed header (%v)", p)
		}
	}()
	return tiff.DecodeConfig(readerAtReader{r})
}

// readerAtReader hands an io.ReaderAt to the TIFF decoder, which uses the
// ReadAt method of what it is given (Read is never called).
type readerAtReader struct{ io.ReaderAt }

func (readerAtReader) Read([]byte) (int, error) { return 0, errors.New("read through ReadAt only") }

// decodeTIFFImage decodes with a recover: the TIFF decoder has panicked on
// malformed files in the past, and a bad file must never crash the caller.
func decodeTIFFImage(r io.ReaderAt) (img image.Image, err error) {
	defer func() {
		if p := recover(); p != nil {
			img, err = nil, fmt.Errorf("malformed image data (%v)", p)
		}
	}()
	return tiff.Decode(readerAtReader{r})
}

func imageError(format string, err error) error {
	msg := err.Error()
	if errors.Is(err, io.ErrUnexpectedEOF) || errors.Is(err, io.EOF) || strings.Contains(msg, "not enough pixel data") {
		return fmt.Errorf("%w: %s data ends early", ErrTruncated, format)
	}
	if strings.Contains(msg, "invalid image size: 0x") || strings.HasSuffix(msg, "x0") {
		return fmt.Errorf("%w: %s: %v", ErrEmpty, format, err)
	}
	return fmt.Errorf("%w: %s: %v", ErrFormat, format, err)
}

func checkSize(w, h int) error {
	if w <= 0 || h <= 0 {
		return fmt.Errorf("%w (%d x %d)", ErrEmpty, w, h)
	}
	if w > MaxSide || h > MaxSide {
		return fmt.Errorf("%w: it is %d x %d", ErrTooLarge, w, h)
	}
	return nil
}

// fromImage takes the grey levels of img, bottom line first. An image in
// a colour model is accepted when every pixel is grey (R = G = B).
func fromImage(img image.Image, name string) (*Topograph, error) {
	b := img.Bounds()
	w, h := b.Dx(), b.Dy()
	if err := checkSize(w, h); err != nil {
		return nil, &ReadError{File: name, Err: err}
	}
	t := &Topograph{Name: name, Width: w, Height: h, Z: make([]float32, w*h)}
	put := func(i, row int, v float32) { t.Z[(h-1-row)*w+i] = v }
	switch m := img.(type) {
	case *image.Gray:
		for row := 0; row < h; row++ {
			line := m.Pix[row*m.Stride : row*m.Stride+w]
			for i, v := range line {
				put(i, row, float32(v))
			}
		}
	case *image.Gray16:
		for row := 0; row < h; row++ {
			line := m.Pix[row*m.Stride : row*m.Stride+2*w]
			for i := 0; i < w; i++ {
				put(i, row, float32(binary.BigEndian.Uint16(line[2*i:])))
			}
		}
	default:
		// Colour models: grey only, at the model's own depth.
		eight := true
		switch img.ColorModel() {
		case color.RGBA64Model, color.NRGBA64Model, color.Gray16Model, color.Alpha16Model:
			eight = false
		}
		for row := 0; row < h; row++ {
			for i := 0; i < w; i++ {
				r, g, bl, _ := img.At(b.Min.X+i, b.Min.Y+row).RGBA()
				if r != g || g != bl {
					return nil, &ReadError{File: name, Err: fmt.Errorf("%w: pixel (%d, %d) from the top left is coloured; a topograph is grey-scale", ErrFormat, i, row)}
				}
				v := float32(r)
				if eight {
					v = float32(r >> 8)
				}
				put(i, row, v)
			}
		}
	}
	return t, nil
}

// pngTextScanner is written the bytes of a PNG stream as the decoder
// reads them and keeps its tEXt chunks (key -> text), up to maxPNGText
// bytes of them; everything else passes by.
type pngTextScanner struct {
	skip int64  // bytes left to pass by: the signature, a chunk's body, a CRC
	head []byte // the part of a chunk header seen so far
	body []byte // the tEXt body being collected
	want int    // bytes left of that body
	kept int    // text bytes kept so far
	text map[string]string
}

// maxPNGText bounds the text a PNG's tEXt chunks may leave in memory.
const maxPNGText = 1 << 20

func (s *pngTextScanner) Write(p []byte) (int, error) {
	n := len(p)
	for len(p) > 0 {
		switch {
		case s.skip > 0:
			k := int(min(s.skip, int64(len(p))))
			s.skip -= int64(k)
			p = p[k:]
		case s.want > 0:
			k := min(s.want, len(p))
			s.body = append(s.body, p[:k]...)
			s.want -= k
			p = p[k:]
			if s.want == 0 {
				if k := bytes.IndexByte(s.body, 0); k > 0 {
					if s.text == nil {
						s.text = map[string]string{}
					}
					s.text[string(s.body[:k])] = string(s.body[k+1:])
				}
				s.body = s.body[:0]
				s.skip = 4 // the CRC
			}
		default:
			k := min(8-len(s.head), len(p))
			s.head = append(s.head, p[:k]...)
			p = p[k:]
			if len(s.head) < 8 {
				continue
			}
			size := int64(binary.BigEndian.Uint32(s.head))
			if string(s.head[4:8]) == "tEXt" && size > 0 && s.kept+int(size) <= maxPNGText {
				s.want = int(size)
				s.kept += int(size)
			} else {
				s.skip = size + 4
			}
			s.head = s.head[:0]
		}
	}
	return n, nil
}

// DecodeMatrix reads a plain-text height matrix: numbers separated by
// spaces, tabs or commas, one scan line per text line. Lines starting with
// # are comments and may carry "key: value" headers: width_nm and
// height_nm (the nominal scan size), unit ("m" or "nm", the unit of the
// heights; default nm) and first_line ("top", the default, or "bottom":
// which edge of the image the first line of numbers is). Empty lines are
// skipped. name is used in messages.
func DecodeMatrix(r io.Reader, name string) (*Topograph, error) {
	br, ok := r.(*bufio.Reader)
	if !ok {
		br = bufio.NewReaderSize(r, 1<<16)
	}
	t := &Topograph{Name: name, ZUnitNM: 1}
	unit, firstLine := "", "top"
	var rows [][]float32
	width, lineNo := 0, 0
	fail := func(line int, err error) (*Topograph, error) {
		return nil, &ReadError{File: name, Line: line, Err: err}
	}
	for {
		raw, err := readLine(br)
		if err == io.EOF && raw == nil {
			break
		}
		lineNo++
		if err == errLongLine {
			return fail(lineNo, fmt.Errorf("line is longer than %d bytes", maxLineBytes))
		}
		if err != nil && err != io.EOF {
			return fail(lineNo, err)
		}
		line := strings.TrimSpace(string(raw))
		if line == "" {
			continue
		}
		if strings.HasPrefix(line, "#") {
			key, val, found := strings.Cut(strings.TrimSpace(line[1:]), ":")
			if !found {
				continue
			}
			key, val = strings.ToLower(strings.TrimSpace(key)), strings.TrimSpace(val)
			switch key {
			case "width_nm", "height_nm":
				v, perr := strconv.ParseFloat(val, 64)
				if perr != nil || !(v > 0) || math.IsInf(v, 0) {
					return fail(lineNo, fmt.Errorf("header %s: %q is not a positive number of nm", key, val))
				}
				if key == "width_nm" {
					t.SizeNM[0] = v
				} else {
					t.SizeNM[1] = v
				}
			case "unit":
				if val != "m" && val != "nm" {
					return fail(lineNo, fmt.Errorf("header unit: %q is not \"m\" or \"nm\"", val))
				}
				unit = val
			case "first_line":
				if val != "top" && val != "bottom" {
					return fail(lineNo, fmt.Errorf("header first_line: %q is not \"top\" or \"bottom\"", val))
				}
				firstLine = val
			}
			continue
		}
		fields := strings.FieldsFunc(line, func(c rune) bool { return c == ' ' || c == '\t' || c == ',' })
		if len(fields) > MaxSide {
			return fail(lineNo, fmt.Errorf("%w: %d numbers on the line", ErrTooLarge, len(fields)))
		}
		if len(rows) == 0 {
			width = len(fields)
		} else if len(fields) != width {
			return fail(lineNo, fmt.Errorf("%w: %d numbers, but the first line of numbers has %d", ErrRagged, len(fields), width))
		}
		if len(rows) == MaxSide {
			return fail(lineNo, fmt.Errorf("%w: more than %d lines of numbers", ErrTooLarge, MaxSide))
		}
		row := make([]float32, width)
		for k, f := range fields {
			v, perr := strconv.ParseFloat(f, 64)
			if perr != nil && !errors.Is(perr, strconv.ErrRange) {
				return fail(lineNo, fmt.Errorf("%w: number %d, %q, is not a number", ErrFormat, k+1, f))
			}
			if math.IsNaN(v) || math.IsInf(v, 0) || math.Abs(v) > math.MaxFloat32 {
				return fail(lineNo, fmt.Errorf("%w: number %d is %q", ErrNotFinite, k+1, f))
			}
			row[k] = float32(v)
		}
		rows = append(rows, row)
		if err == io.EOF {
			break
		}
	}
	if len(rows) == 0 || width == 0 {
		return nil, &ReadError{File: name, Err: fmt.Errorf("%w: no numbers in the file", ErrEmpty)}
	}
	t.Width, t.Height = width, len(rows)
	t.Z = make([]float32, width*len(rows))
	for k, row := range rows {
		j := len(rows) - 1 - k // first line at the top
		if firstLine == "bottom" {
			j = k
		}
		copy(t.Z[j*width:], row)
	}
	scale := float32(1)
	switch unit {
	case "m":
		scale = 1e9
	case "":
		// No unit: heights below 1e-4 in magnitude everywhere can only be
		// metres (a height map in nm would be flat to 1e-13 m).
		big := false
		for _, v := range t.Z {
			if v > 1e-4 || v < -1e-4 {
				big = true
				break
			}
		}
		if !big {
			scale = 1e9
		}
	}
	if scale != 1 {
		for i := range t.Z {
			t.Z[i] *= scale
		}
	}
	return t, nil
}

var errLongLine = errors.New("line too long")

// readLine returns the next line without its end, or errLongLine when it
// is longer than maxLineBytes.
func readLine(br *bufio.Reader) ([]byte, error) {
	var buf []byte
	for {
		part, isPrefix, err := br.ReadLine()
		if err != nil {
			if buf != nil && err == io.EOF {
				return buf, io.EOF
			}
			return nil, err
		}
		buf = append(buf, part...)
		if len(buf) > maxLineBytes {
			return nil, errLongLine
		}
		if !isPrefix {
			return buf, nil
		}
	}
}
