package planner

import (
	"reflect"
	"testing"
)

// TimeKinds covers every field of Breakdown once: set each field to its
// own value and read it back through Seconds.
func TestTimeKindsCoverBreakdown(t *testing.T) {
	var b Breakdown
	v := reflect.ValueOf(&b).Elem()
	if v.NumField() != len(TimeKinds) {
		t.Fatalf("Breakdown has %d fields, TimeKinds %d kinds", v.NumField(), len(TimeKinds))
	}
	for i := range v.NumField() {
		v.Field(i).SetFloat(float64(int(1) << i))
	}
	sum := 0.0
	for i, k := range TimeKinds {
		s := b.Seconds(k)
		if f := v.Type().Field(i).Name; s != v.Field(i).Float() {
			t.Errorf("%v: Seconds = %g, want field %d (%s) = %g: kinds in Breakdown's order", k, s, i, f, v.Field(i).Float())
		}
		sum += s
	}
	if sum != b.Total() {
		t.Errorf("the kinds sum to %g, Total %g", sum, b.Total())
	}
}

func TestTimeKindNames(t *testing.T) {
	tests := []struct {
		k           TimeKind
		name, short string
	}{
		{TimeAPWrite, "AP writing", "AP"},
		{TimeFEWrite, "FE writing", "FE"},
		{TimeDwell, "dwells", "dwell"},
		{TimeTravel, "travel and settling", "travel"},
		{TimeModeSwitch, "mode switches", "switch"},
		{TimeRegistration, "registrations", "register"},
		{TimeVerification, "verification images", "verify"},
		{TimeKind(99), "TimeKind(99)", "TimeKind(99)"},
	}
	for _, tc := range tests {
		if tc.k.String() != tc.name || tc.k.Short() != tc.short {
			t.Errorf("TimeKind %d: String, Short = %q, %q, want %q, %q", int(tc.k), tc.k.String(), tc.k.Short(), tc.name, tc.short)
		}
	}
}
