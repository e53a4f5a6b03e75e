package gui

import (
	"image/color"

	"fyne.io/fyne/v2"
	"fyne.io/fyne/v2/theme"
)

// labTheme is Fyne's default theme in its dark variant whatever the
// desktop asks for: the lattice view is dark so painted sites stand out,
// and panels around it in light colours would glare next to it.
type labTheme struct{ fyne.Theme }

func newLabTheme() fyne.Theme { return labTheme{theme.DefaultTheme()} }

// Color returns the dark variant's colour of every name.
func (t labTheme) Color(n fyne.ThemeColorName, _ fyne.ThemeVariant) color.Color {
	return t.Theme.Color(n, theme.VariantDark)
}

// Size keeps the default sizes but trims the padding a little so the
// side panels fit a 1280 x 800 laptop screen.
func (t labTheme) Size(n fyne.ThemeSizeName) float32 {
	switch n {
	case theme.SizeNamePadding:
		return 3
	case theme.SizeNameInnerPadding:
		return 6
	}
	return t.Theme.Size(n)
}

// compactTheme packs the tool palette tighter, so the tools and the
// options of the array tool fit a 1280 x 800 screen without scrolling.
type compactTheme struct{ fyne.Theme }

func (t compactTheme) Size(n fyne.ThemeSizeName) float32 {
	switch n {
	case theme.SizeNamePadding:
		return 2
	case theme.SizeNameInnerPadding:
		return 4
	}
	return t.Theme.Size(n)
}
