// Package editor is the state of dimerpath's design editor, without a
// window: the Session (the design, the variant shown, the tool and its
// options, the selection, the undo history, the last plan and
// design-rule findings), the tools' gestures and the shape edits.
//
// It holds no science. Surfaces, rasterised regions, design-rule
// findings, plans, instrument profiles and exports are calls into
// lattice/design, planner and export, made from sites.go, jobs.go and
// files.go. It imports no Fyne (make lint checks), so every edit is
// tested without a window or cgo; package gui shows a Session and calls
// its methods.
//
// # Frame and units
//
// Field coordinates are nm with the origin at the lower-left corner of
// the scan field and y up, as in package lattice. Every edit is a
// Session method that records an undo state and tells OnChange what
// changed (Change bits).
//
// A Session is used from one goroutine. Long work (planning,
// comparisons, checks, exports) runs on a copy of the design
// (DesignCopy) and its result is marked stale when the design changed
// meanwhile (PlanToken).
package editor
