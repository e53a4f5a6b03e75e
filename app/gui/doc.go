// Package gui is dimerpath's desktop window (Fyne): the user paints a
// device on the Si(100)-2x1:H lattice, sees the design rules checked,
// plans the write, compares variants and exports the operator's plan.
//
// It holds no science. Surfaces, rasterised regions, design-rule
// findings, plans, instrument profiles and exports are calls into
// lattice/design, planner and export, all made from science.go.
//
// # Structure
//
// Session is the editor's whole state (design, current variant, tool,
// selection, undo history, last plan and findings) and imports no Fyne:
// every edit is a Session method, tested without a window. Renderer
// fills a frame buffer from a Scene (what to draw) and a View (where to
// look); it imports no Fyne either and is benchmarked alone. The widgets
// are views: LatticeView shows a Renderer's frames in a canvas.Raster
// and turns pointer events into pan, zoom and Session calls; UI builds
// the main window around one Session and reacts to its Change
// notifications. Run starts the application (dimerpath gui, open and
// --screenshot).
//
// # Frame and units
//
// Field coordinates are nm with the origin at the lower-left corner of
// the scan field and y up, as in package lattice; a View maps them to
// device pixels with y down. Scales are nm per device pixel. Times shown
// are seconds (formatted), currents nA, line doses mC/cm, as the planner
// stores them in A and C/cm.
//
// Long work (planning, comparisons, checks, exports) runs in goroutines
// on a copy of the design and reports back through fyne.Do.
package gui
