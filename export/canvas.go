package export

import "math"

// The figures (overview, zoomed areas, charts) are drawn once, on the
// small canvas interface below, and rendered by two backends: the PDF
// canvas (fpdf, page millimetres) and the SVG canvas (its own user units,
// nm for the pattern file). Device coordinates have y growing downwards
// on both.

// vec is a point in device units.
type vec struct{ x, y float64 }

func (a vec) add(b vec) vec       { return vec{a.x + b.x, a.y + b.y} }
func (a vec) sub(b vec) vec       { return vec{a.x - b.x, a.y - b.y} }
func (a vec) scale(s float64) vec { return vec{a.x * s, a.y * s} }
func (a vec) norm() float64       { return math.Hypot(a.x, a.y) }

// box is an axis-aligned rectangle in device units: top-left corner,
// width and height.
type box struct{ x, y, w, h float64 }

func (b box) right() float64      { return b.x + b.w }
func (b box) bottom() float64     { return b.y + b.h }
func (b box) centre() vec         { return vec{b.x + b.w/2, b.y + b.h/2} }
func (b box) inset(d float64) box { return box{b.x + d, b.y + d, b.w - 2*d, b.h - 2*d} }
func (b box) overlaps(o box) bool {
	return b.x < o.right() && o.x < b.right() && b.y < o.bottom() && o.y < b.bottom()
}
func (b box) contains(o box) bool {
	return o.x >= b.x && o.y >= b.y && o.right() <= b.right() && o.bottom() <= b.bottom()
}
func (b box) containsPt(p vec) bool {
	return p.x >= b.x && p.x <= b.right() && p.y >= b.y && p.y <= b.bottom()
}
func (b box) shift(d vec) box { return box{b.x + d.x, b.y + d.y, b.w, b.h} }

// grey is a grey level from 0 (black) to 1 (white). The figures use grey
// levels, line styles and hatching only, so they print in black and white.
type grey float64

// byte255 returns the grey level as an 8-bit channel value.
func (g grey) byte255() int {
	v := int(math.Round(float64(g) * 255))
	return max(0, min(255, v))
}

// hatch is a fill pattern of thin lines.
type hatch uint8

const (
	hatchNone       hatch = iota
	hatchDiag             // lines rising to the right, /
	hatchBackDiag         // lines falling to the right, \
	hatchCross            // both diagonals
	hatchHorizontal       // horizontal lines
	hatchVertical         // vertical lines
)

// pen is an outline style. Widths, dashes are in millimetres on paper;
// the backend converts them to device units.
type pen struct {
	width float64   // mm; 0 draws no outline
	grey  grey      // line grey level
	dash  []float64 // mm, alternating dash and gap; nil is solid
	round bool      // round caps and joins
}

// paint is a fill style.
type paint struct {
	fill      bool    // fill with grey
	grey      grey    // fill grey level
	hatch     hatch   // hatching on top of the fill
	hatchGrey grey    // hatch line grey level
	hatchStep float64 // mm between hatch lines (0 takes 1.2 mm)
}

// noPaint leaves shapes unfilled; noPen draws no outline.
var (
	noPaint = paint{}
	noPen   = pen{}
)

func solid(g grey) paint { return paint{fill: true, grey: g} }

// font is a text style: size in points.
type font struct {
	size float64
	bold bool
	grey grey
}

// anchor says which point of the text the position gives.
type anchor uint8

const (
	anchorStart  anchor = iota // left end of the baseline
	anchorMiddle               // middle of the baseline
	anchorEnd                  // right end of the baseline
)

// tag identifies an element in the SVG output (id and class
// attributes); the PDF ignores it.
type tag struct{ id, class string }

// ptMM is one typographic point in millimetres.
const ptMM = 25.4 / 72

// canvas is what the figure drawers need from a backend. Lengths are in
// device units except pen widths, dashes and hatch steps (mm) and font
// sizes (pt); mm converts.
type canvas interface {
	// mm returns the device units per millimetre of paper.
	mm() float64
	// group opens a group (an SVG <g> with tg's id and class; nothing
	// in PDF). Shapes drawn with the group's pen and paint may omit them
	// in the output. Groups nest; endGroup closes the innermost.
	group(tg tag, p pen, f paint)
	endGroup()
	polyline(pts []vec, closed bool, p pen, f paint, tg tag)
	rect(b box, p pen, f paint, tg tag)
	circle(c vec, r float64, p pen, f paint, tg tag)
	text(at vec, s string, f font, a anchor, tg tag)
	// segments draws disjoint line segments pairs[0]–pairs[1],
	// pairs[2]–pairs[3], … in one path.
	segments(pairs []vec, p pen, tg tag)
	// dots draws a round dot of radius r at each point, in one path.
	dots(pts []vec, r float64, g grey, tg tag)
	// clip confines drawing to b until the matching endClip.
	clip(b box)
	endClip()
	// textWidth returns the advance width of s in device units.
	textWidth(s string, f font) float64
}

// textHeight returns the cap height of f in device units, used to centre
// text vertically (about 0.72 em for Liberation Sans).
func textHeight(c canvas, f font) float64 { return 0.72 * f.size * ptMM * c.mm() }

// maxHatchLines bounds the hatch lines of one box. A zoomed figure may
// hatch a region far larger than the page (clipped to it), so the bound
// is generous; it is there so that a box of absurd or infinite size ends.
const maxHatchLines = 200_000

// hatchLines returns the hatch line segments of kind h covering b, step
// apart (device units), for backends that clip them to the shape.
//
// A box that would need more than maxHatchLines lines (an absurd plan's
// bar, or a non-finite one) gets none: the loop must end and stay small.
func hatchLines(b box, h hatch, step float64) [][2]vec {
	if !(step > 0) || h == hatchNone || !((b.w+b.h)/step <= maxHatchLines) {
		return nil
	}
	var out [][2]vec
	switch h {
	case hatchHorizontal:
		for y := b.y + step/2; y < b.bottom(); y += step {
			out = append(out, [2]vec{{b.x, y}, {b.right(), y}})
		}
	case hatchVertical:
		for x := b.x + step/2; x < b.right(); x += step {
			out = append(out, [2]vec{{x, b.y}, {x, b.bottom()}})
		}
	case hatchDiag, hatchBackDiag, hatchCross:
		// Lines at ±45°, spaced step apart perpendicular to them.
		d := step * math.Sqrt2
		span := b.w + b.h
		if h != hatchBackDiag {
			// x - (bottom - y) = c: rising to the right on paper.
			for c := -b.h; c < b.w; c += d {
				out = append(out, [2]vec{{b.x + c, b.bottom()}, {b.x + c + span, b.bottom() - span}})
			}
		}
		if h != hatchDiag {
			for c := -b.h; c < b.w; c += d {
				out = append(out, [2]vec{{b.x + c, b.y}, {b.x + c + span, b.y + span}})
			}
		}
	}
	return out
}
