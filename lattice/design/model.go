package design

import (
	"dimerpath/lattice"
)

// FormatName and FormatVersion identify dimerpath's design files. A file
// with a higher version than FormatVersion is refused, never half-read.
const (
	FormatName    = "dimerpath-design"
	FormatVersion = 1
)

// Design is one device layout: the scan field, its terraces, the
// fiducial marks used for re-registration, design-rule settings, the
// dopant-window templates and one or more layout variants.
type Design struct {
	Format      string     `json:"format"`
	Version     int        `json:"version"`
	Name        string     `json:"name"`
	Description string     `json:"description,omitempty"`
	Field       Field      `json:"field"`
	Terraces    []Terrace  `json:"terraces,omitempty"`
	Fiducials   []Fiducial `json:"fiducials,omitempty"`
	// Rules overrides the design-rule defaults; nil fields keep them.
	Rules *Rules `json:"rules,omitempty"`
	// WindowTemplates overrides or adds dopant-window templates; the
	// built-in P and As templates apply where none of the same name is
	// given. Use the Templates method for the merged set.
	WindowTemplates []lattice.WindowTemplate `json:"templates,omitempty"`
	Variants        []Variant                `json:"variants"`
	// Dopant is the species a region receives when it names none (its
	// Species is empty): the δ-layer of leads, islands, gates and pads.
	// Empty means DefaultDopant ("P").
	Dopant string `json:"dopant,omitempty"`
	// References are chip layouts kept beside the design as an overlay:
	// drawn on the lattice and printed on the plan's overview, never
	// written (dimerpath import-gds --as reference).
	References []Reference `json:"references,omitempty"`
	// Survey is a survey topograph of the surface under the design and
	// what its analysis found (dimerpath survey); nil without one.
	Survey *Survey `json:"survey,omitempty"`
}

// Reference is geometry imported from a mask layout (GDSII) and mapped
// into the field, kept for orientation: the contact layer, registration
// markers, another device. The polygons are stored, so the design does
// not depend on the layout file; File, Layers and the chip frame say
// where they came from.
type Reference struct {
	Name string `json:"name"`
	// File is the layout file as it was given to the import.
	File string `json:"file,omitempty"`
	// Layers are the layers read, "L/D" or "L" (every data type).
	Layers []string `json:"layers,omitempty"`
	// ChipOffsetNM and ChipRotationDeg are the chip frame the import used
	// (see lattice.ChipFrame): a field point p lies at offset + R·p on
	// the chip.
	ChipOffsetNM    [2]float64 `json:"chip_offset_nm"`
	ChipRotationDeg float64    `json:"chip_rotation_deg,omitempty"`
	// PolygonsNM are the layout's polygons in field nm.
	PolygonsNM [][][2]float64 `json:"polygons_nm"`
}

// Field is the scan field, with its lower-left corner at the origin.
type Field struct {
	WidthNM  float64 `json:"width_nm"`
	HeightNM float64 `json:"height_nm"`
}

// Terrace is a terrace as written in the file.
type Terrace struct {
	Name string `json:"name"`
	// Boundary is the outline polygon in nm; empty means the rest of the
	// field.
	Boundary [][2]float64 `json:"boundary_nm,omitempty"`
	// Rows is "x" or "y": the direction the dimer rows run. With
	// StepFrom it may be omitted; given, it must agree.
	Rows string `json:"rows,omitempty"`
	// OffsetNM places row 0, dimer 0 (see lattice.Terrace.Offset). With
	// StepFrom it is an extra shift on top of the step's (normally
	// omitted; RowSpacing/2 across the rows picks the other antiphase
	// registry).
	OffsetNM [2]float64 `json:"offset_nm"`
	// StepFrom names an earlier terrace one single-height step away:
	// this terrace's rows are then turned by 90° from that one's and its
	// lattice shifted by lattice.StepShift (see lattice.Terrace.AcrossStep).
	StepFrom string `json:"step_from,omitempty"`
	// Step says which way the step from StepFrom goes: "up" (this
	// terrace lies one atomic layer higher) or "down". The two give
	// lattices a/2 (0.27 nm) apart. Files that leave it out (version 1)
	// are read as "down", and the step-registry rule warns.
	Step string `json:"step,omitempty"`
}

// Fiducial is a mark the operator images to re-register the tip's
// position between write segments.
type Fiducial struct {
	Name string     `json:"name"`
	AtNM [2]float64 `json:"at_nm"`
}

// Variant is one named layout alternative of the design.
type Variant struct {
	Name        string   `json:"name"`
	Description string   `json:"description,omitempty"`
	Regions     []Region `json:"regions"`
	// TunnelGaps names the pairs of regions meant to be tunnel-coupled
	// across a gap (for example an SET island and its source lead); the
	// gap width is checked and the pair counts as connected for the
	// floating-region rule.
	TunnelGaps []TunnelGap `json:"tunnel_gaps,omitempty"`
	// Couplings name pairs of regions whose placement relative to each
	// other matters more than their absolute placement (a dopant window
	// and the island that senses it, two windows of a pair): the planner
	// writes the facing parts of the two inside one drift window, or, when
	// they are written in different process steps, registers the later on
	// the earlier.
	Couplings []Coupling `json:"couplings,omitempty"`
}

// Coupling is a relative placement tolerance between two regions.
type Coupling struct {
	A string `json:"a"`
	B string `json:"b"`
	// ToleranceNM is the tolerance (±nm) of the two regions' placement
	// relative to each other.
	ToleranceNM float64 `json:"tolerance_nm"`
}

// TunnelGap is a designed tunnel barrier between two regions.
type TunnelGap struct {
	A string `json:"a"`
	B string `json:"b"`
	// MinNM and MaxNM override the rule's range for this gap; 0 keeps it.
	MinNM float64 `json:"min_nm,omitempty"`
	MaxNM float64 `json:"max_nm,omitempty"`
	// ToleranceNM is the tolerance (±nm) of the gap's width: the two
	// edges' placement relative to each other; 0 keeps the rule's
	// (tunnel_gap_tolerance_nm).
	ToleranceNM float64 `json:"tolerance_nm,omitempty"`
}

// Role is what a region is for in the device. Its value is its spelling
// in design and plan files; Name gives its display name (names.go).
type Role string

const (
	RoleDevice Role = "device" // active structure: island, channel, donor cluster
	RoleGate   Role = "gate"   // in-plane gate
	RoleLead   Role = "lead"   // wire from a device or gate out to a pad
	RolePad    Role = "pad"    // contact pad, µm-size, usually field-emission mode
	RoleDonor  Role = "donor"  // single-donor windows: not wired to a pad
	RoleOther  Role = "other"  // marks, test lines
)

// Mode is a write mode: the mode asked for a region (ModeAuto lets the
// planner choose), the mode the planner gives a region, and the mode a
// stroke is written in (ModeAP or ModeFE). Its value is its spelling in
// design and plan files; Abbrev, Name, Adjective and Label give its
// display names (names.go).
type Mode string

const (
	ModeAuto   Mode = "auto"   // the planner chooses, and says why
	ModeAP     Mode = "ap"     // atomic-precision: low bias, slow, one row wide
	ModeFE     Mode = "fe"     // field-emission: high bias, fast, wide lines
	ModeHybrid Mode = "hybrid" // AP outline band plus FE fill
)

// Region is one named part of a variant. Its sites are the union of its
// shapes and painted sites, minus its erased sites.
type Region struct {
	Name string `json:"name"`
	Role Role   `json:"role"`
	// Mode is the write mode asked for; empty means ModeAuto.
	Mode Mode `json:"mode,omitempty"`
	// Species is the dopant the region receives ("P" from phosphine, "As"
	// from arsine): that of its windows, and of its δ-layer. Empty takes
	// the design's Dopant; NoDopant ("none") marks a region opened for
	// another reason, written in the lithography step LithographyStep
	// names.
	Species string `json:"species,omitempty"`
	// LithographyStep names, by its species, the process step in which a
	// region without dopant (Species "none") is written; empty means the
	// first step.
	LithographyStep string `json:"lithography_step,omitempty"`
	// ToleranceNM is the placement tolerance (±nm); 0 takes the mode's
	// default (AP ±0.2 nm, FE ±2 nm).
	ToleranceNM float64 `json:"tolerance_nm,omitempty"`
	// Colour is the colour the region is drawn in on screen, "#rrggbb";
	// empty lets the program choose. It stays with the region, so
	// deleting another region recolours none.
	Colour string  `json:"colour,omitempty"`
	Shapes []Shape `json:"shapes,omitempty"`
	// Painted and Erased hold sites set or cleared by hand, stored in the
	// file as runs per row.
	Painted *lattice.SiteSet `json:"painted,omitempty"`
	Erased  *lattice.SiteSet `json:"erased,omitempty"`
}

// ShapeKind names a shape in the file.
type ShapeKind string

const (
	ShapeSite     ShapeKind = "site"     // one H site nearest Points[0]
	ShapeDimer    ShapeKind = "dimer"    // both H sites of the dimer nearest Points[0]
	ShapeRect     ShapeKind = "rect"     // axis-aligned, corners Points[0] and Points[1]
	ShapePolygon  ShapeKind = "polygon"  // vertices Points (3 or more)
	ShapePolyline ShapeKind = "polyline" // vertices Points (2 or more), WidthNM wide
	ShapeWindow   ShapeKind = "window"   // dopant window of Template, centred on the dimer nearest Points[0]
	ShapeArray    ShapeKind = "array"    // Array.Cols x Array.Rows copies of Array.Of
)

// Shape is one geometric primitive, in field nm, rasterised onto the
// lattice by snapping (a site belongs to a shape when its position lies
// inside it).
type Shape struct {
	Kind    ShapeKind    `json:"kind"`
	Points  [][2]float64 `json:"points_nm,omitempty"`
	WidthNM float64      `json:"width_nm,omitempty"`
	// Template names the window template for ShapeWindow ("P", "As" or a
	// design's own).
	Template string `json:"template,omitempty"`
	Array    *Array `json:"array,omitempty"`
}

// Array repeats a site, dimer or window shape on a regular grid whose
// pitch is counted in dimers along the row and in rows across it, so
// every copy sits on the lattice exactly.
type Array struct {
	Of          *Shape `json:"of"`
	Cols        int    `json:"cols"`
	Rows        int    `json:"rows"`
	PitchDimers int    `json:"pitch_dimers"`
	PitchRows   int    `json:"pitch_rows"`
}

// Rules holds the design-rule settings; a nil field keeps the default.
type Rules struct {
	// ScanFieldNM is the largest field the instrument scans without a
	// coarse move (default 2000 x 2000 nm).
	ScanFieldNM *[2]float64 `json:"scan_field_nm,omitempty"`
	// WindowGapDimers is the least number of intact dimers between two
	// windows on one row (default 1).
	WindowGapDimers *int `json:"window_gap_dimers,omitempty"`
	// WindowFacingRows is how many neighbouring rows on each side must
	// hold no window in the facing segment (default 1).
	WindowFacingRows *int `json:"window_facing_rows,omitempty"`
	// FEKeepOutNM is the least gap between field-emission regions and
	// atomic-precision features (default 5 nm).
	FEKeepOutNM *float64 `json:"fe_keepout_nm,omitempty"`
	// TunnelGapMinNM and TunnelGapMaxNM bound designed tunnel gaps
	// (default 5.4–12.3 nm: 7–16 dimer rows, Wang et al., Commun. Phys.
	// 3, 82 (2020)).
	TunnelGapMinNM *float64 `json:"tunnel_gap_min_nm,omitempty"`
	TunnelGapMaxNM *float64 `json:"tunnel_gap_max_nm,omitempty"`
	// APToleranceNM and FEToleranceNM are the placement tolerances (±nm)
	// of regions that give none, by mode (defaults 0.2 and 2 nm).
	APToleranceNM *float64 `json:"ap_tolerance_nm,omitempty"`
	FEToleranceNM *float64 `json:"fe_tolerance_nm,omitempty"`
	// LeadToleranceNM, GateToleranceNM and PadToleranceNM are the
	// placement tolerances (±nm) of leads, gates and pads that give none;
	// nil takes the instrument profile's (tolerance_lead_nm, ...). A lead
	// matters by its ends, not to a fraction of a dimer.
	LeadToleranceNM *float64 `json:"lead_tolerance_nm,omitempty"`
	GateToleranceNM *float64 `json:"gate_tolerance_nm,omitempty"`
	PadToleranceNM  *float64 `json:"pad_tolerance_nm,omitempty"`
	// TunnelGapToleranceNM is the tolerance (±nm) of a tunnel gap's width
	// (default half a dimer-row spacing, 0.38 nm).
	TunnelGapToleranceNM *float64 `json:"tunnel_gap_tolerance_nm,omitempty"`
	// DefectWindowClearanceNM and DefectClearanceNM are the least
	// distances from the edge of a survey's defect to dopant windows
	// (default 3 nm) and to other atomic-precision features (default
	// 1.5 nm), both from memory.
	DefectWindowClearanceNM *float64 `json:"defect_window_clearance_nm,omitempty"`
	DefectClearanceNM       *float64 `json:"defect_clearance_nm,omitempty"`
}

// NoDopant is the Species of a region that receives no dopant.
const NoDopant = "none"

// DefaultDopant is the dopant of regions when the design names none:
// phosphorus δ-layers are the usual leads, islands, gates and pads of
// hydrogen-resist lithography (common practice).
const DefaultDopant = "P"

// DopantText describes what the region receives for a table: its
// dopant (DopantOf), and for a region without one the step it is
// written in: "P", "none (As step)", "none (first step)".
func (d *Design) DopantText(r *Region) string {
	if sp := d.DopantOf(r); sp != NoDopant {
		return sp
	}
	if r.LithographyStep != "" {
		return "none (" + r.LithographyStep + " step)"
	}
	return "none (first step)"
}

// DopantOf returns the dopant the region receives: its Species, else the
// design's Dopant, else DefaultDopant; NoDopant for a region without.
func (d *Design) DopantOf(r *Region) string {
	switch {
	case r.Species != "":
		return r.Species
	case d.Dopant != "":
		return d.Dopant
	}
	return DefaultDopant
}
