package render

import (
	"image/color"
	"math"
	"testing"
)

// greyLevels returns the distinct red values of a pixbuf drawn in white on
// black, and the sum of red over all pixels / 255 (the drawn area).
func greyLevels(b *pixbuf) (map[uint32]bool, float64) {
	seen := map[uint32]bool{}
	area := 0.0
	for _, p := range b.pix {
		seen[p&0xff] = true
		area += float64(p&0xff) / 255
	}
	return seen, area
}

func newBuf(w, h int, aa bool) *pixbuf {
	b := &pixbuf{pix: make([]uint32, w*h), w: w, h: h, aa: aa}
	black := packRGBA(color.NRGBA{A: 0xff})
	for i := range b.pix {
		b.pix[i] = black
	}
	return b
}

func TestAntialiasedStrokeCoversItsArea(t *testing.T) {
	white := color.NRGBA{0xff, 0xff, 0xff, 0xff}
	// A 6 px wide stroke from (10, 10) to (70, 40): its area is the
	// rectangle l x w plus the two half-disks, π r² (geometry).
	l, w := math.Hypot(60, 30), 6.0
	want := l*w + math.Pi*9
	for _, aa := range []bool{false, true} {
		b := newBuf(80, 60, aa)
		b.thickLine(10, 10, 70, 40, w, white, 256)
		seen, area := greyLevels(b)
		if math.Abs(area-want) > 0.05*want {
			t.Errorf("aa %v: stroke covers %.1f px², want %.1f within 5 %%", aa, area, want)
		}
		if partial := len(seen) > 2; partial != aa {
			t.Errorf("aa %v: %d grey levels, want intermediate ones only when antialiased", aa, len(seen))
		}
		// The middle of the stroke is fully covered either way.
		if p := b.pix[25*80+40] & 0xff; p != 0xff {
			t.Errorf("aa %v: the stroke's centre is %d, want 255", aa, p)
		}
	}
}

func TestAntialiasedLineSplitsEachStep(t *testing.T) {
	white := color.NRGBA{0xff, 0xff, 0xff, 0xff}
	b := newBuf(60, 20, true)
	b.line(5, 5.5, 55, 15.5, white, 256)
	// Wu's method puts one pixel's worth of colour in every column the
	// line crosses, shared between the two rows it passes between.
	for x := 6; x < 54; x++ {
		sum := 0.0
		for y := 0; y < 20; y++ {
			sum += float64(b.pix[y*60+x]&0xff) / 255
		}
		if math.Abs(sum-1) > 0.02 {
			t.Fatalf("column %d holds %.3f of a pixel, want 1", x, sum)
		}
	}
}
