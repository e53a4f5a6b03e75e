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
)

// MaxFileBytes bounds the size of a topograph file: an 8192 x 8192 matrix
// written with 24 characters a number.
const MaxFileBytes = 2 << 30

// maxLineBytes bounds one line of a height matrix: MaxSide numbers of up
// to 64 characters each.
const maxLineBytes = MaxSide * 64

// Read reads a topograph from a file: a grey-scale PNG or TIFF (8 or 16
// bits a pixel) or a plain-text height matrix. Errors name the file and
// are *ReadError values wrapping one of the Err… sentinels where one fits.
func Read(path string) (*Topograph, error) {
	f, err := os.Open(path)
	if err != nil {
		return nil, err
	}
	defer f.Close()
	return Decode(f, filepath.Base(path))
}

// Decode reads a topograph from r, telling the format from its first
// bytes; name is used in messages.
func Decode(r io.Reader, name string) (*Topograph, error) {
	br := bufio.NewReaderSize(io.LimitReader(r, MaxFileBytes+1), 1<<16)
	head, _ := br.Peek(8)
	var t *Topograph
	var err error
	switch {
	case bytes.HasPrefix(head, []byte("\x89PNG\r\n\x1a\n")):
		t, err = decodePNG(br, name)
	case bytes.HasPrefix(head, []byte("II*\x00")), bytes.HasPrefix(head, []byte("MM\x00*")):
		t, err = decodeTIFF(br, name)
	case len(head) == 0:
		return nil, &ReadError{File: name, Err: fmt.Errorf("%w: the file is empty", ErrEmpty)}
	default:
		t, err = DecodeMatrix(br, name)
	}
	if err != nil {
		return nil, err
	}
	return t, nil
}

// decodePNG reads a grey-scale PNG. The heights are the grey levels; PNG
// text chunks may carry width_nm, height_nm (the nominal scan size) and
// z_nm_per_level (the height of one level), as WritePNG writes them.
func decodePNG(r io.Reader, name string) (*Topograph, error) {
	data, err := io.ReadAll(r)
	if err != nil {
		return nil, &ReadError{File: name, Err: err}
	}
	if len(data) > MaxFileBytes {
		return nil, &ReadError{File: name, Err: fmt.Errorf("file is larger than %d bytes", MaxFileBytes)}
	}
	// The size stands in the header: checked before the decoder, which
	// refuses a 0 x 0 image with a less helpful message.
	if len(data) >= 24 && string(data[12:16]) == "IHDR" {
		w, h := binary.BigEndian.Uint32(data[16:]), binary.BigEndian.Uint32(data[20:])
		if err := checkSize(int(min(w, 1<<20)), int(min(h, 1<<20))); err != nil {
			return nil, &ReadError{File: name, Err: err}
		}
	}
	cfg, err := png.DecodeConfig(bytes.NewReader(data))
	if err != nil {
		return nil, &ReadError{File: name, Err: imageError("PNG", err)}
	}
	if err := checkSize(cfg.Width, cfg.Height); err != nil {
		return nil, &ReadError{File: name, Err: err}
	}
	img, err := png.Decode(bytes.NewReader(data))
	if err != nil {
		return nil, &ReadError{File: name, Err: imageError("PNG", err)}
	}
	t, err := fromImage(img, name)
	if err != nil {
		return nil, err
	}
	text, err := pngText(data)
	if err != nil {
		return nil, &ReadError{File: name, Err: err}
	}
	for _, k := range []struct {
		key string
		dst *float64
	}{{"width_nm", &t.SizeNM[0]}, {"height_nm", &t.SizeNM[1]}, {"z_nm_per_level", &t.ZUnitNM}} {
		s, ok := text[k.key]
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

// decodeTIFF reads a grey-scale TIFF of 8 or 16 bits a pixel.
func decodeTIFF(r io.Reader, name string) (*Topograph, error) {
	data, err := io.ReadAll(r)
	if err != nil {
		return nil, &ReadError{File: name, Err: err}
	}
	if len(data) > MaxFileBytes {
		return nil, &ReadError{File: name, Err: fmt.Errorf("file is larger than %d bytes", MaxFileBytes)}
	}
	cfg, err := tiff.DecodeConfig(bytes.NewReader(data))
	if err != nil {
		return nil, &ReadError{File: name, Err: imageError("TIFF", err)}
	}
	if err := checkSize(cfg.Width, cfg.Height); err != nil {
		return nil, &ReadError{File: name, Err: err}
	}
	img, err := decodeTIFFImage(data)
	if err != nil {
		return nil, &ReadError{File: name, Err: imageError("TIFF", err)}
	}
	return fromImage(img, name)
}

// decodeTIFFImage decodes with a recover: the TIFF decoder has panicked on
// malformed files in the past, and a bad file must never crash the caller.
func decodeTIFFImage(data []byte) (img image.Image, err error) {
	defer func() {
		if p := recover(); p != nil {
			img, err = nil, fmt.Errorf("malformed image data (%v)", p)
		}
	}()
	return tiff.Decode(bytes.NewReader(data))
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

// pngText returns the tEXt chunks of a PNG stream as key -> text.
func pngText(data []byte) (map[string]string, error) {
	out := map[string]string{}
	p := 8
	for p+8 <= len(data) {
		n := int(binary.BigEndian.Uint32(data[p:]))
		typ := string(data[p+4 : p+8])
		if n < 0 || p+12+n > len(data) {
			return out, nil // the image decoded; a damaged tail carries no text we need
		}
		if typ == "tEXt" {
			body := data[p+8 : p+8+n]
			if k := bytes.IndexByte(body, 0); k > 0 {
				out[string(body[:k])] = string(body[k+1:])
			}
		}
		if typ == "IEND" {
			break
		}
		p += 12 + n
	}
	return out, nil
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
