package gui

import (
	"math"
	"reflect"
	"strings"
	"testing"

	"dimerpath/planner"
)

func TestProfileEditorRefusesBadValues(t *testing.T) {
	u, _ := newTestUI(t, nil)
	before := u.Session.Profile
	e := u.openProfileEditor()
	cur := e.entry("ap.current_a")
	if cur == nil {
		t.Fatal("no AP current field")
	}
	// The default AP current, shown in nA.
	if got, want := cur.Text, formatField(e.fields[1], &before); got != want {
		t.Fatalf("AP current shows %q, want %q", got, want)
	}

	cases := []struct {
		name, text, msg string
	}{
		{"not a number", "two", "not a number"},
		{"negative", "-1", "must be from 1 fA to 1 µA"},
		{"no instrument has it", "1e6", "Setpoint current (nA) = 1e+06: must be from 1 fA to 1 µA"},
		{"beyond the limit", "50", "more than the instrument allows (Instrument limits / Largest current (nA) = "},
	}
	for _, c := range cases {
		cur.SetText(c.text)
		e.apply()
		if e.msg.Hidden || !strings.Contains(e.msg.Text, c.msg) {
			t.Errorf("%s (%q): message %q (hidden %v), want one containing %q", c.name, c.text, e.msg.Text, e.msg.Hidden, c.msg)
		}
		if !reflect.DeepEqual(u.Session.Profile, before) {
			t.Fatalf("%s: the profile changed although Apply was refused", c.name)
		}
	}
	// The refusal names the field as the editor labels it.
	cur.SetText("-1")
	e.apply()
	if !strings.Contains(e.msg.Text, "Atomic-precision mode / Setpoint current (nA) = -1") {
		t.Errorf("message %q does not name the field", e.msg.Text)
	}

	cur.SetText("1")
	e.apply()
	if got := u.Session.Profile.AP.CurrentA; math.Abs(got-1e-9) > 1e-21 {
		t.Errorf("after a valid Apply the AP current is %g A, want 1e-9 A", got)
	}
	if err := u.Session.Profile.Validate(); err != nil {
		t.Errorf("applied profile does not validate: %v", err)
	}
	if _, stale := u.Session.Plan(); stale {
		t.Error("no plan, so none can be stale")
	}
}

func TestProfilePresetFillsEditor(t *testing.T) {
	u, _ := newTestUI(t, nil)
	e := u.openProfileEditor()
	lt, err := planner.Preset(planner.PresetLowTemp)
	if err != nil {
		t.Fatal(err)
	}
	e.fill(lt)
	e.apply()
	if u.Session.Profile.Drift.RateNMPerMin != lt.Drift.RateNMPerMin || u.Session.Profile.Name != lt.Name {
		t.Errorf("applied %+v, want the low-temperature preset", u.Session.Profile.Drift)
	}
}

// Issue 13: the profile dialog showed a threshold as "0.00676676";
// values show four significant digits, and a field left alone keeps its
// exact value when applied.
func TestProfileShowsSignificantDigits(t *testing.T) {
	for _, c := range []struct {
		v    float64
		want string
	}{
		{0.05 / math.Exp(2), "0.006767"},
		{2, "2"},
		{0.999, "0.999"},
		{2000, "2000"},
		{1.5e-9, "1.5e-09"},
		{12345.6, "12346"}, // whole digits are never dropped
	} {
		if got := sigDigits(c.v, 4); got != c.want {
			t.Errorf("sigDigits(%g) = %q, want %q", c.v, got, c.want)
		}
	}
}
