// Package planner turns a design variant into a write plan: it chooses
// each region's write mode (atomic-precision, field-emission or hybrid),
// generates strokes, orders them with package route, splits the write
// into drift-safe segments with re-registration, and estimates the write
// time with its spread and the dopant yield. The result, a Plan, is plain
// data for the exporters and the GUI.
//
// Units: lengths in nm, times in s, currents in A, bias in V, line dose in
// C/cm.
package planner
