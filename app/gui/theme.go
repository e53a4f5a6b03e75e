package gui

import (
	"image/color"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/theme"
)

// labTheme is Fyne's default theme in its dark variant whatever the
// desktop asks for: the lattice view is dark so painted sites stand out,
// and panels around it in light colours would glare next to it. Its
// padding is trimmed so the side panels fit a 1280 x 800 laptop screen.
type labTheme struct {
	fyne.Theme
	padding, innerPadding float32
}

func newLabTheme() fyne.Theme { return labTheme{theme.DefaultTheme(), 3, 6} }

// compactTheme packs the tool palette tighter, so the tools and the
// options of the array tool fit a 1280 x 800 screen without scrolling.
func compactTheme() fyne.Theme { return labTheme{theme.DefaultTheme(), 2, 4} }

// Color returns the dark variant's colour of every name.
func (t labTheme) Color(n fyne.ThemeColorName, _ fyne.ThemeVariant) color.Color {
	return t.Theme.Color(n, theme.VariantDark)
}

// Size keeps the default sizes but for the padding.
func (t labTheme) Size(n fyne.ThemeSizeName) float32 {
	switch n {
	case theme.SizeNamePadding:
		return t.padding
	case theme.SizeNameInnerPadding:
		return t.innerPadding
	}
	return t.Theme.Size(n)
}
