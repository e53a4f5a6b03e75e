// Package lattice models the hydrogen-terminated Si(100)-2x1 surface that
// an STM tip writes on: its published geometry, the integer address of
// every H site, terraces separated by single-height steps (across which
// the dimer-row direction turns by 90° and the lattice shifts), compact
// sets of sites that stay fast at 10^7 sites, and the shapes and
// dopant-window templates that are rasterised into such sets.
//
// # Frame and units
//
// Positions are in nanometres in the field frame: the origin is the
// lower-left corner of the scan field, x points right and y points up.
// A terrace's dimer rows run along x (RowsAlongX) or along y
// (RowsAlongY). On a RowsAlongX terrace, row r has its centre line at
// y = Offset.Y + r·RowSpacing, dimer d sits at x = Offset.X + d·DimerPitch,
// and the dimer's two H sites lie HOffset below (side 0) and above
// (side 1) the centre line; a RowsAlongY terrace is the same with x and y
// exchanged (side 0 is then the left atom).
//
// Within a row, sites are numbered by Index = 2·Dimer + Side, so the
// sites of consecutive dimers along a row form one run of consecutive
// indices. Rows, dimers and indices are never negative: a terrace's
// offset is reduced into one lattice cell, so index 0 lies at or just
// inside the field's lower-left corner.
//
// Every conversion between the field and a terrace's rows is here, so a
// change of lattice geometry is made in this package alone: a terrace's
// Frame converts field points to distances along and across its rows
// from its origin and back (ToLocal, ToField, LocalRect, FieldRect),
// DimerAlong, RowAcross, SiteAcross and DimerEdge place dimers, rows,
// sites and cell edges in it, RowDirection.Split and Join exchange the
// axes without moving the origin, Frame.NearestCellRect (the editor's
// rectangles: edges to the nearest cell edges), Frame.SnapRect (the
// whole cells under two corners) and LatticeVector snap rectangles and
// moves to whole dimers and rows, and DimersIn,
// Surface.RowDimers,
// Surface.TerraceSpans and Surface.Dimers answer which dimers lie in an
// interval, exist on a row or meet a window.
//
// # Terraces and steps
//
// A Surface holds one or more terraces. A terrace with a Boundary polygon
// holds the field points inside it (terraces with boundaries are tried in
// order); one terrace may have no boundary and hold the rest of the field.
// Terrace.AcrossStep gives the lattice one single-height step away: rows
// turned by 90° and shifted by StepShift. A site exists when its dimer's
// centre lies in the field and on the site's terrace, so both H of a
// dimer share a terrace; Surface.Valid tells.
//
// # Site sets and shapes
//
// A SiteSet is a bitset per dimer row, ordered terrace, row, index, each
// terrace storing its rows from its first and each row its words from
// its first (an offset beside them); a
// row (RowBits) answers range queries a word at a time: counts, whether
// any or all sites of a side are in a range, the sites or gaps of a
// range, its runs. Lines are cut into intervals (r1.Interval, closed,
// in nm) with linear-time list operations: NormalizeIntervals,
// MergeIntervals, IntersectIntervals, SubtractIntervals and
// SearchIntervals. Areas
// (Rect, Polygon, Polyline with a width) are rasterised by Surface.Paint
// one lattice line at a time: the area's spans on the line are clipped to
// the terrace and set a 64-bit word at a time, so painting a 1 µm² square
// (6.8·10^6 sites) takes about a millisecond. Dopant windows are placed
// from WindowTemplate data (PhosphineWindow, ArsineWindow or a lab's own)
// with Surface.PlaceWindow. A SiteSet encodes to JSON run-length per row
// (MarshalJSON), and decoding validates everything and refuses sets
// beyond MaxSiteSetSites. ReadPointsCSV with Surface.SnapSites or
// SnapWindows imports positions made by a script, reporting each point
// more than OffLatticeNM off the lattice.
//
// # Distances between sets
//
// A CellIndex holds a set's lattice cells (Surface.SiteCell) in a grid;
// CellIndex.GapWithin and CellIndex.Gap give the least distance between
// two sets, the width of the intact surface between them (n intact rows
// measure n·RowSpacing), at a cost that grows with the sets' outlines,
// not their site counts.
//
// # References
//
// CODATA 2018 for the Si lattice constant; see geometry.go for the
// source of every constant.
package lattice
