// Package export writes plans for people and machines: the operator's
// printed plan (WritePDF), an SVG of the pattern and route (WriteSVG),
// the full plan as JSON (WritePlanJSON, read back by ReadPlanJSON), one
// CSV row per tip action (WriteActionsCSV), and the variant comparison
// report (WriteComparisonPDF, WriteComparisonSVG). WriteFile picks the
// format from the file name and writes through a temporary file renamed
// into place, so a failed export never leaves a half-written file.
//
// Every writer takes an io.Writer and a read-only *planner.Plan, checks
// the plan first (a NaN or a dangling reference is refused with a
// *jsonfile.Error naming the field, never written), and is deterministic: the
// same plan and Options give the same bytes. An optional Pattern (the
// lattice and each region's sites, see PatternOf) lets the figures draw
// the regions and, in the zoomed atomic-precision figures, the dimer rows.
//
// Coordinates are field nm with the origin at the lower-left corner of
// the scan field and y up; times are seconds on the plan clock; currents
// are A in files and nA on paper; line doses C/cm in files and mC/cm on
// paper. On paper segments and strokes are numbered from 1, in the files
// from 0.
//
// The figures are drawn once on a small internal canvas with two vector
// backends, fpdf for the PDF and a hand-written SVG writer, and tell
// things apart by grey level, hatching and line style only, so every
// page prints in black and white. Text is set in Liberation Sans,
// embedded (subset) in the PDF.
package export
