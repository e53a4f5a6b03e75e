// Package design holds dimerpath's design model (field, terraces,
// fiducials and layout variants made of named regions), its JSON file
// format, and the design-rule checks run before planning.
//
// Parse and Load read a design file and report every problem with its
// JSON path, line and column (a *jsonfile.Error wrapping ErrInvalid); Save
// writes one atomically. A Design
// answers the questions the planner and the GUI ask: Surface (its
// lattice), Variant (by name, "" for the first), Templates (built-in P
// and As windows merged with the file's), EffectiveRules (the design
// rules with defaults filled in) and Lay, which rasterises every region
// of a variant onto the lattice (Region.Sites, Region.Windows) as a
// Layout. Check and Layout.Check run the design rules (RuleNames) and
// return Findings.
//
// Lengths are in nm in the field frame of package lattice. The format is
// documented in the README ("Design files").
package design
