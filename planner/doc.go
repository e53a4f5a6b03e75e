// Package planner turns a design variant into a write plan: it chooses
// each region's write mode (atomic-precision, field-emission or hybrid,
// with the reason), generates strokes, proves with an independent
// coverage check that they clear what is painted and nothing beyond the
// edge allowance, orders them with package route, splits the write into
// drift-safe segments with re-registration, lays out the timeline and
// estimates the write time with its spread and the dopant yield. The
// result, a Plan, is plain data for the exporters and the GUI.
//
// The entry points are Build (one variant) and Compare (every variant);
// Profile holds the instrument's conditions, dose model and limits
// (DefaultProfile and LowTemperatureProfile are the presets, Calibrate
// fits the width model to a lab's own lines); CheckCoverage, YieldOf and
// PoissonBinomial are usable alone.
//
// Units: lengths in nm, times in s, currents in A, bias in V, line dose in
// C/cm. Positions are in the field frame of package lattice.
//
// Sources: every default in DefaultProfile names its source (Schmucker et
// al., Nat. Commun. 3 (2012); Rudolph et al., APL (2014); Shen et al.,
// Science 268, 1590 (1995); Ballard et al., JVST B 32, 041804 (2014) and
// others) or says "from memory"; see DEVELOPERS.md for the model.
package planner
