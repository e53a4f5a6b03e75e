package design

import "testing"

func TestModeNames(t *testing.T) {
	tests := []struct {
		mode                         Mode
		abbrev, name, adjective, lbl string
	}{
		{ModeAuto, "auto", "auto", "auto", "auto (the planner chooses)"},
		{ModeAP, "AP", "atomic precision", "atomic-precision", "AP (atomic precision)"},
		{ModeFE, "FE", "field emission", "field-emission", "FE (field emission)"},
		{ModeHybrid, "hybrid", "hybrid", "hybrid", "hybrid (AP outline, FE fill)"},
		{Mode("laser"), "laser", "laser", "laser", "laser"},
	}
	for _, tc := range tests {
		t.Run(string(tc.mode), func(t *testing.T) {
			m := tc.mode
			if m.Abbrev() != tc.abbrev || m.Name() != tc.name || m.Adjective() != tc.adjective || m.Label() != tc.lbl {
				t.Errorf("%q: Abbrev, Name, Adjective, Label = %q, %q, %q, %q, want %q, %q, %q, %q",
					m, m.Abbrev(), m.Name(), m.Adjective(), m.Label(), tc.abbrev, tc.name, tc.adjective, tc.lbl)
			}
			if m.String() != string(m) {
				t.Errorf("%q.String() = %q, want the file spelling", m, m.String())
			}
		})
	}
}

func TestRoleNames(t *testing.T) {
	tests := []struct {
		role Role
		want string
	}{
		{RoleDevice, "device"}, {RoleGate, "gate"}, {RoleLead, "lead"},
		{RolePad, "contact pad"}, {RoleDonor, "donor windows"}, {RoleOther, "other"},
		{"", "no role"}, {"probe", "probe"},
	}
	for _, tc := range tests {
		if got := tc.role.Name(); got != tc.want {
			t.Errorf("Role(%q).Name() = %q, want %q", tc.role, got, tc.want)
		}
	}
}

// Issue 13: the window says "contact pad" where the file says "pad";
// where a user meets both, the label shows both.
func TestRoleLabels(t *testing.T) {
	for _, tc := range []struct {
		role Role
		want string
	}{
		{RolePad, "contact pad (pad)"}, {RoleDonor, "donor windows (donor)"}, {RoleGate, "gate"}, {RoleDevice, "device"}, {"", "no role"},
	} {
		if got := tc.role.Label(); got != tc.want {
			t.Errorf("Role(%q).Label() = %q, want %q", tc.role, got, tc.want)
		}
	}
}

// Every role and mode offered to users has a display name of its own,
// so two never read alike in a choice list.
func TestDisplayNamesAreComplete(t *testing.T) {
	seen := map[string]bool{}
	for _, r := range Roles {
		if _, ok := roleNames[r]; !ok || seen[r.Name()] {
			t.Errorf("role %q: display name %q missing or shared", r, r.Name())
		}
		seen[r.Name()] = true
	}
	seen = map[string]bool{}
	for _, m := range Modes {
		if _, ok := modeNames[m]; !ok || seen[m.Label()] {
			t.Errorf("mode %q: label %q missing or shared", m, m.Label())
		}
		seen[m.Label()] = true
	}
}

// The precursors are the hydrides named in the literature: phosphine
// and arsine (Schofield 2003; Stock 2024), diborane (Škereň 2020).
func TestDopantNames(t *testing.T) {
	tests := []struct {
		species, precursor, label string
	}{
		{"P", "phosphine (PH3)", "P (phosphine)"},
		{"As", "arsine (AsH3)", "As (arsine)"},
		{"B", "diborane (B2H6)", "B (diborane)"},
		{"Sb", "stibine (SbH3)", "Sb (stibine)"},
		{"Bi", "Bi precursor", "Bi"},
		{NoDopant, "none precursor", "none (no dopant)"},
	}
	for _, tc := range tests {
		t.Run(tc.species, func(t *testing.T) {
			if got := Precursor(tc.species); got != tc.precursor {
				t.Errorf("Precursor(%q) = %q, want %q", tc.species, got, tc.precursor)
			}
			if got := DopantLabel(tc.species); got != tc.label {
				t.Errorf("DopantLabel(%q) = %q, want %q", tc.species, got, tc.label)
			}
		})
	}
}
