package gui

import "image/color"

// The colours of the lattice view. The canvas is dark so that
// depassivated sites, the bright thing a user paints, stand out; every
// colour that carries meaning appears in the legend.
var (
	colOutside   = rgb(0x14, 0x16, 0x1b) // beyond the scan field
	colNoTerrace = rgb(0x1c, 0x1f, 0x26) // inside the field, on no terrace
	// colTerrace tints alternate terraces so a step edge shows even
	// without its outline.
	colTerrace   = []color.NRGBA{rgb(0x27, 0x2e, 0x3b), rgb(0x2c, 0x35, 0x33), rgb(0x33, 0x2c, 0x3b), rgb(0x2f, 0x33, 0x2a)}
	colCleanH    = rgb(0x55, 0x63, 0x7a) // an H site still passivated
	colBond      = rgb(0x3e, 0x49, 0x5c) // the Si–Si dimer bond under clean H
	colStep      = rgb(0xe8, 0xe8, 0xe8) // step edges (terrace outlines)
	colHatch     = rgb(0x3a, 0x44, 0x55) // row-direction hatching when zoomed out
	colFieldEdge = rgb(0x70, 0x78, 0x88)

	colError    = rgb(0xff, 0x3b, 0x30) // design-rule error
	colWarning  = rgb(0xff, 0xb0, 0x20) // design-rule warning
	colFiducial = rgb(0xff, 0xe0, 0x4a)
	colMove     = rgb(0xf0, 0xf0, 0xf0)
	colPreview  = rgb(0xff, 0xff, 0xff)
	colSelect   = rgb(0xff, 0xff, 0xff)
)

// regionPalette colours regions by their index in the variant; the
// legend and the regions panel show the same swatches.
var regionPalette = []color.NRGBA{
	rgb(0xff, 0x9f, 0x1c), // orange
	rgb(0x2e, 0xc4, 0xf0), // cyan
	rgb(0xe8, 0x43, 0x93), // magenta
	rgb(0xa3, 0xe0, 0x48), // lime
	rgb(0xff, 0xd2, 0x3f), // yellow
	rgb(0x9b, 0x6c, 0xff), // violet
	rgb(0xff, 0x6b, 0x6b), // coral
	rgb(0x1d, 0xd3, 0xb0), // teal
	rgb(0x74, 0xb9, 0xff), // sky
	rgb(0xfa, 0xb1, 0xa0), // salmon
	rgb(0xc9, 0x8b, 0x3c), // ochre
	rgb(0x6f, 0x9a, 0x4a), // moss
	rgb(0xd0, 0x8c, 0xe8), // lilac
	rgb(0x4e, 0x7f, 0xc2), // steel blue
	rgb(0xe0, 0xc8, 0x9a), // sand
	rgb(0xb3, 0x4a, 0x6b), // wine
}

// segmentPalette colours write segments of a plan, cycling.
var segmentPalette = []color.NRGBA{
	rgb(0xff, 0x4d, 0x6d),
	rgb(0x4d, 0xab, 0xf7),
	rgb(0x51, 0xcf, 0x66),
	rgb(0xfc, 0xc4, 0x19),
	rgb(0xcc, 0x5d, 0xe8),
	rgb(0xff, 0x92, 0x2b),
	rgb(0x22, 0xb8, 0xcf),
	rgb(0xf0, 0x65, 0x95),
}

// RegionColor returns the colour of the region at index i of a variant.
func RegionColor(i int) color.NRGBA {
	if i < 0 {
		return colCleanH
	}
	return regionPalette[i%len(regionPalette)]
}

// SegmentColor returns the colour of write segment i of a plan.
func SegmentColor(i int) color.NRGBA {
	if i < 0 {
		i = -i
	}
	return segmentPalette[i%len(segmentPalette)]
}

func rgb(r, g, b uint8) color.NRGBA { return color.NRGBA{R: r, G: g, B: b, A: 0xff} }

// mix returns a + (b-a)·f for 0 <= f <= 1, opaque.
func mix(a, b color.NRGBA, f float64) color.NRGBA {
	l := func(x, y uint8) uint8 { return uint8(float64(x) + (float64(y)-float64(x))*f + 0.5) }
	return color.NRGBA{R: l(a.R, b.R), G: l(a.G, b.G), B: l(a.B, b.B), A: 0xff}
}

// desaturate moves c halfway to its grey and darkens it, for region
// fills drawn under a route overlay.
func desaturate(c color.NRGBA) color.NRGBA {
	g := uint8((int(c.R)*30 + int(c.G)*59 + int(c.B)*11) / 100)
	return mix(mix(c, rgb(g, g, g), 0.6), rgb(0, 0, 0), 0.35)
}

// packRGBA returns c as the little-endian uint32 of an image.RGBA pixel.
func packRGBA(c color.NRGBA) uint32 {
	// Opaque colours only: NRGBA and RGBA agree when A = 0xff.
	return uint32(c.R) | uint32(c.G)<<8 | uint32(c.B)<<16 | uint32(c.A)<<24
}
