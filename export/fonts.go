package export

import (
	"sync"

	"codeberg.org/go-fonts/liberation/liberationsansbold"
	"codeberg.org/go-fonts/liberation/liberationsansregular"
	sfntfont "golang.org/x/image/font"
	"golang.org/x/image/font/sfnt"
	"golang.org/x/image/math/fixed"
)

// The PDF embeds Liberation Sans (SIL Open Font License), a subset of
// the glyphs used, so µ, ±, ², Å and names in any Latin, Greek or
// Cyrillic script print as typed. The SVG names it first in its font
// list, and measures its text with the same metrics; Liberation Sans is
// metric-compatible with Arial, the usual fallback.

// fontMetrics holds the advance widths of one regular and one bold face,
// in em.
type fontMetrics struct {
	mu    sync.Mutex
	faces [2]*sfnt.Font
	cache [2]map[rune]float64
	buf   sfnt.Buffer
}

var (
	metricsOnce sync.Once
	metrics     *fontMetrics
)

// sansMetrics returns the shared Liberation Sans metrics.
func sansMetrics() *fontMetrics {
	metricsOnce.Do(func() {
		m := &fontMetrics{cache: [2]map[rune]float64{{}, {}}}
		for i, ttf := range [][]byte{liberationsansregular.TTF, liberationsansbold.TTF} {
			f, err := sfnt.Parse(ttf)
			if err != nil {
				panic("export: embedded Liberation Sans does not parse: " + err.Error())
			}
			m.faces[i] = f
		}
		metrics = m
	})
	return metrics
}

// width returns the advance width of s in em.
func (m *fontMetrics) width(s string, bold bool) float64 {
	i := 0
	if bold {
		i = 1
	}
	m.mu.Lock()
	defer m.mu.Unlock()
	total := 0.0
	for _, r := range s {
		w, ok := m.cache[i][r]
		if !ok {
			f := m.faces[i]
			g, err := f.GlyphIndex(&m.buf, r)
			if err == nil && g == 0 {
				g, err = f.GlyphIndex(&m.buf, '?')
			}
			// At ppem = units per em the advance comes out in font units.
			upem := int(f.UnitsPerEm())
			var adv fixed.Int26_6
			if err == nil {
				adv, err = f.GlyphAdvance(&m.buf, g, fixed.I(upem), sfntfont.HintingNone)
			}
			if err != nil {
				adv = fixed.I(upem / 2)
			}
			w = float64(adv) / 64 / float64(upem)
			m.cache[i][r] = w
		}
		total += w
	}
	return total
}
