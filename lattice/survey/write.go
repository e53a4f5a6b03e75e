package survey

import (
	"bytes"
	"encoding/binary"
	"fmt"
	"hash/crc32"
	"image"
	"image/png"
	"io"
	"math"
	"strconv"
)

// WritePNG writes t as a grey-scale PNG of 8 or 16 bits a pixel, the top
// line first as PNG wants. The heights are spread over the grey levels;
// text chunks record the height of one level (z_nm_per_level, when t's
// heights are in nm) and the nominal scan size (width_nm, height_nm, when
// known), which Read takes back.
func WritePNG(w io.Writer, t *Topograph, bits int) error {
	if bits != 8 && bits != 16 {
		return fmt.Errorf("survey: WritePNG: %d bits a pixel; want 8 or 16", bits)
	}
	if err := checkSize(t.Width, t.Height); err != nil || len(t.Z) != t.Width*t.Height {
		return fmt.Errorf("survey: WritePNG: bad topograph %d x %d with %d heights", t.Width, t.Height, len(t.Z))
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, v := range t.Z {
		lo, hi = min(lo, float64(v)), max(hi, float64(v))
	}
	top := 255.0
	if bits == 16 {
		top = 65535
	}
	step := (hi - lo) / top
	if !(step > 0) {
		step = 1
	}
	var img image.Image
	if bits == 8 {
		g := image.NewGray(image.Rect(0, 0, t.Width, t.Height))
		for row := 0; row < t.Height; row++ {
			for i := 0; i < t.Width; i++ {
				g.Pix[row*g.Stride+i] = uint8(math.Round((float64(t.At(i, t.Height-1-row)) - lo) / step))
			}
		}
		img = g
	} else {
		g := image.NewGray16(image.Rect(0, 0, t.Width, t.Height))
		for row := 0; row < t.Height; row++ {
			for i := 0; i < t.Width; i++ {
				v := uint16(math.Round((float64(t.At(i, t.Height-1-row)) - lo) / step))
				binary.BigEndian.PutUint16(g.Pix[row*g.Stride+2*i:], v)
			}
		}
		img = g
	}
	var buf bytes.Buffer
	enc := png.Encoder{CompressionLevel: png.BestCompression}
	if err := enc.Encode(&buf, img); err != nil {
		return err
	}
	var text [][2]string
	if t.ZUnitNM > 0 {
		text = append(text, [2]string{"z_nm_per_level", strconv.FormatFloat(step*t.ZUnitNM, 'g', -1, 64)})
	}
	if t.SizeNM[0] > 0 && t.SizeNM[1] > 0 {
		text = append(text,
			[2]string{"width_nm", strconv.FormatFloat(t.SizeNM[0], 'g', -1, 64)},
			[2]string{"height_nm", strconv.FormatFloat(t.SizeNM[1], 'g', -1, 64)})
	}
	data := buf.Bytes()
	// The signature (8 bytes) and IHDR (25 bytes) come first; text
	// chunks go right after IHDR.
	const afterIHDR = 8 + 25
	if _, err := w.Write(data[:afterIHDR]); err != nil {
		return err
	}
	for _, kv := range text {
		if err := writeChunk(w, "tEXt", append(append([]byte(kv[0]), 0), kv[1]...)); err != nil {
			return err
		}
	}
	_, err := w.Write(data[afterIHDR:])
	return err
}

func writeChunk(w io.Writer, typ string, body []byte) error {
	var head [8]byte
	binary.BigEndian.PutUint32(head[:4], uint32(len(body)))
	copy(head[4:], typ)
	crc := crc32.NewIEEE()
	crc.Write(head[4:])
	crc.Write(body)
	var tail [4]byte
	binary.BigEndian.PutUint32(tail[:], crc.Sum32())
	for _, b := range [][]byte{head[:], body, tail[:]} {
		if _, err := w.Write(b); err != nil {
			return err
		}
	}
	return nil
}
