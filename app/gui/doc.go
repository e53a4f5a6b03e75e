// Package gui is dimerpath's desktop window (Fyne): the user paints a
// device on the Si(100)-2x1:H lattice, sees the design rules checked,
// plans the write, compares variants and exports the operator's plan.
//
// It is the only package that imports Fyne, and it holds neither state
// nor science of its own: the design, its edits and undo history are an
// editor.Session, and the lattice view's frames are drawn by a
// render.Renderer; both packages are free of Fyne and tested without a
// window.
//
// # Structure
//
// The widgets are views: LatticeView shows a Renderer's frames in a
// canvas.Raster and turns pointer events into pan, zoom and Session
// calls; UI builds the main window around one Session and reacts to its
// Change notifications. Run starts the application (dimerpath gui, open
// and --screenshot).
//
// # Frame and units
//
// Field coordinates are nm with the origin at the lower-left corner of
// the scan field and y up, as in package lattice; a render.View maps
// them to device pixels with y down. Times shown are seconds
// (formatted), currents nA, line doses mC/cm, as the planner stores
// them in A and C/cm.
//
// Long work (planning, comparisons, checks, exports) runs in goroutines
// on a copy of the design and reports back through fyne.Do.
package gui
