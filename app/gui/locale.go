package gui

// Rewrites a "C.UTF-8" locale before Fyne reads it; see the package doc.
import _ "dimerpath/internal/posixlocale"
