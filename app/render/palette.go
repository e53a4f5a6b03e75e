package render

import (
	"fmt"
	"image/color"
	"slices"
	"strconv"
)

// The colours of the lattice view. The canvas is dark so that
// depassivated sites, the bright thing a user paints, stand out; every
// colour that carries meaning appears in the legend.
var (
	ColOutside   = RGB(0x14, 0x16, 0x1b) // beyond the scan field
	ColNoTerrace = RGB(0x1c, 0x1f, 0x26) // inside the field, on no terrace
	// ColTerrace tints alternate terraces so a step edge shows even
	// without its outline.
	ColTerrace   = []color.NRGBA{RGB(0x27, 0x2e, 0x3b), RGB(0x2c, 0x35, 0x33), RGB(0x33, 0x2c, 0x3b), RGB(0x2f, 0x33, 0x2a)}
	ColCleanH    = RGB(0x55, 0x63, 0x7a) // an H site still passivated
	ColBond      = RGB(0x3e, 0x49, 0x5c) // the Si–Si dimer bond under clean H
	ColStep      = RGB(0xe8, 0xe8, 0xe8) // step edges (terrace outlines)
	ColHatch     = RGB(0x3a, 0x44, 0x55) // row-direction hatching when zoomed out
	ColFieldEdge = RGB(0x70, 0x78, 0x88)

	ColError    = RGB(0xff, 0x3b, 0x30) // design-rule error
	ColWarning  = RGB(0xff, 0xb0, 0x20) // design-rule warning
	ColFiducial = RGB(0xff, 0xe0, 0x4a)
	ColMove     = RGB(0xf0, 0xf0, 0xf0)
	ColPreview  = RGB(0xff, 0xff, 0xff)
	ColSelect   = RGB(0xff, 0xff, 0xff)
	// ColReference outlines reference overlays (imported layouts).
	ColReference = RGB(0x7c, 0xf0, 0xd8)
)

// regionPalette colours regions by their index in the variant; the
// legend and the regions panel show the same swatches.
var regionPalette = []color.NRGBA{
	RGB(0xff, 0x9f, 0x1c), // orange
	RGB(0x2e, 0xc4, 0xf0), // cyan
	RGB(0xe8, 0x43, 0x93), // magenta
	RGB(0xa3, 0xe0, 0x48), // lime
	RGB(0xff, 0xd2, 0x3f), // yellow
	RGB(0x9b, 0x6c, 0xff), // violet
	RGB(0xff, 0x6b, 0x6b), // coral
	RGB(0x1d, 0xd3, 0xb0), // teal
	RGB(0x74, 0xb9, 0xff), // sky
	RGB(0xfa, 0xb1, 0xa0), // salmon
	RGB(0xc9, 0x8b, 0x3c), // ochre
	RGB(0x6f, 0x9a, 0x4a), // moss
	RGB(0xd0, 0x8c, 0xe8), // lilac
	RGB(0x4e, 0x7f, 0xc2), // steel blue
	RGB(0xe0, 0xc8, 0x9a), // sand
	RGB(0xb3, 0x4a, 0x6b), // wine
}

// segmentPalette colours write segments of a plan, cycling.
var segmentPalette = []color.NRGBA{
	RGB(0xff, 0x4d, 0x6d),
	RGB(0x4d, 0xab, 0xf7),
	RGB(0x51, 0xcf, 0x66),
	RGB(0xfc, 0xc4, 0x19),
	RGB(0xcc, 0x5d, 0xe8),
	RGB(0xff, 0x92, 0x2b),
	RGB(0x22, 0xb8, 0xcf),
	RGB(0xf0, 0x65, 0x95),
}

// RegionColor returns the colour of the region at index i of a variant.
func RegionColor(i int) color.NRGBA {
	if i < 0 {
		return ColCleanH
	}
	return regionPalette[i%len(regionPalette)]
}

// RegionPalette returns the colours offered to new regions, in order.
func RegionPalette() []color.NRGBA { return slices.Clone(regionPalette) }

// ParseColour reads a colour written "#rrggbb" (as design files hold a
// region's colour); ok is false for anything else.
func ParseColour(s string) (c color.NRGBA, ok bool) {
	if len(s) != 7 || s[0] != '#' {
		return c, false
	}
	v, err := strconv.ParseUint(s[1:], 16, 32)
	if err != nil {
		return c, false
	}
	return RGB(uint8(v>>16), uint8(v>>8), uint8(v)), true
}

// ColourHex writes c as "#rrggbb", ignoring its alpha.
func ColourHex(c color.NRGBA) string { return fmt.Sprintf("#%02x%02x%02x", c.R, c.G, c.B) }

// SegmentColor returns the colour of write segment i of a plan.
func SegmentColor(i int) color.NRGBA {
	if i < 0 {
		i = -i
	}
	return segmentPalette[i%len(segmentPalette)]
}

func RGB(r, g, b uint8) color.NRGBA { return color.NRGBA{R: r, G: g, B: b, A: 0xff} }

// Mix returns a + (b-a)·f for 0 <= f <= 1, opaque.
func Mix(a, b color.NRGBA, f float64) color.NRGBA {
	l := func(x, y uint8) uint8 { return uint8(float64(x) + (float64(y)-float64(x))*f + 0.5) }
	return color.NRGBA{R: l(a.R, b.R), G: l(a.G, b.G), B: l(a.B, b.B), A: 0xff}
}

// desaturate moves c halfway to its grey and darkens it, for region
// fills drawn under a route overlay.
func desaturate(c color.NRGBA) color.NRGBA {
	g := uint8((int(c.R)*30 + int(c.G)*59 + int(c.B)*11) / 100)
	return Mix(Mix(c, RGB(g, g, g), 0.6), RGB(0, 0, 0), 0.35)
}

// packRGBA returns c as the little-endian uint32 of an image.RGBA pixel.
func packRGBA(c color.NRGBA) uint32 {
	// Opaque colours only: NRGBA and RGBA agree when A = 0xff.
	return uint32(c.R) | uint32(c.G)<<8 | uint32(c.B)<<16 | uint32(c.A)<<24
}
