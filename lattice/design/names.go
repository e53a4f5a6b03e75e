package design

// Each role and write mode has one spelling in design and plan files
// (the constant's value, which String returns) and the display names
// users read in the GUI, on the command line and on the printed plan,
// all in the tables below: change a name here and every view follows.

// Roles lists the region roles in the order they are offered to users.
var Roles = []Role{RoleDevice, RoleGate, RoleLead, RolePad, RoleDonor, RoleOther}

// Modes lists the write modes a region may ask for, in the order they
// are offered to users. Strokes are written in ModeAP or ModeFE; a
// region is planned in ModeAP, ModeFE or ModeHybrid.
var Modes = []Mode{ModeAuto, ModeAP, ModeFE, ModeHybrid}

var roleNames = map[Role]string{
	RoleDevice: "device",
	RoleGate:   "gate",
	RoleLead:   "lead",
	RolePad:    "contact pad",
	RoleDonor:  "donor windows",
	RoleOther:  "other",
}

// String returns the role's spelling in design and plan files ("pad").
func (r Role) String() string { return string(r) }

// Name returns the role's display name ("contact pad" for RolePad),
// "no role" for the empty role and the file spelling of a role not in
// Roles.
func (r Role) Name() string {
	if n, ok := roleNames[r]; ok {
		return n
	}
	if r == "" {
		return "no role"
	}
	return string(r)
}

// Label returns the role's display name with its file spelling where
// the two differ, for where a user meets both (the window's role choice,
// dimerpath info beside a design file): "contact pad (pad)", "gate".
func (r Role) Label() string {
	if n := r.Name(); n != string(r) && r != "" {
		return n + " (" + string(r) + ")"
	}
	return r.Name()
}

// modeName holds a write mode's display names.
type modeName struct {
	abbrev    string // in tables and short labels: "AP"
	noun      string // "atomic precision"
	adjective string // before a noun: "atomic-precision mode"
	hint      string // what the mode does, where its name does not say
}

var modeNames = map[Mode]modeName{
	ModeAuto:   {abbrev: "auto", noun: "auto", adjective: "auto", hint: "the planner chooses"},
	ModeAP:     {abbrev: "AP", noun: "atomic precision", adjective: "atomic-precision"},
	ModeFE:     {abbrev: "FE", noun: "field emission", adjective: "field-emission"},
	ModeHybrid: {abbrev: "hybrid", noun: "hybrid", adjective: "hybrid", hint: "AP outline, FE fill"},
}

// name returns m's names; a mode not in Modes is named by its spelling.
func (m Mode) name() modeName {
	if n, ok := modeNames[m]; ok {
		return n
	}
	s := string(m)
	return modeName{abbrev: s, noun: s, adjective: s}
}

// String returns the mode's spelling in design and plan files ("ap").
func (m Mode) String() string { return string(m) }

// Abbrev returns the mode's short display name: "AP", "FE", "hybrid",
// "auto".
func (m Mode) Abbrev() string { return m.name().abbrev }

// Name returns the mode's display name: "atomic precision", "field
// emission", "hybrid", "auto".
func (m Mode) Name() string { return m.name().noun }

// Adjective returns the mode's name as it stands before a noun:
// "atomic-precision", "field-emission", "hybrid", "auto".
func (m Mode) Adjective() string { return m.name().adjective }

// Label returns the mode's name with what it means, for choice lists
// and table rows: "AP (atomic precision)", "FE (field emission)",
// "hybrid (AP outline, FE fill)", "auto (the planner chooses)".
func (m Mode) Label() string {
	n := m.name()
	switch {
	case n.hint != "":
		return n.noun + " (" + n.hint + ")"
	case n.abbrev != n.noun:
		return n.abbrev + " (" + n.noun + ")"
	}
	return n.noun
}

// precursors names the gas that delivers each donor species, and its
// formula: phosphine for P, arsine for As, diborane for B (Škereň et
// al., Nat. Electron. 2020), stibine for Sb.
var precursors = map[string][2]string{
	"P":  {"phosphine", "PH3"},
	"As": {"arsine", "AsH3"},
	"B":  {"diborane", "B2H6"},
	"Sb": {"stibine", "SbH3"},
}

// Precursor returns the gas that delivers species with its formula
// ("phosphine (PH3)" for "P"), or "<species> precursor" for a species
// not in the table.
func Precursor(species string) string {
	if p, ok := precursors[species]; ok {
		return p[0] + " (" + p[1] + ")"
	}
	return species + " precursor"
}

// DopantLabel returns the display name of what a region receives, for
// choice lists: "P (phosphine)", "none (no dopant)" for NoDopant, the
// species alone for a lab's own.
func DopantLabel(species string) string {
	switch p, ok := precursors[species]; {
	case species == NoDopant:
		return "none (no dopant)"
	case ok:
		return species + " (" + p[0] + ")"
	}
	return species
}
