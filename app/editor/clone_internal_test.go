package editor

import (
	"reflect"
	"testing"

	"dimerpath/lattice/design"
)

// TestCloneRulesSharesNothing fills every pointer field of design.Rules
// (found by reflection, so a field added later is covered without a
// change here) and checks the clone points at its own copies: an undo
// snapshot must not change when the live design's rules are edited.
func TestCloneRulesSharesNothing(t *testing.T) {
	var orig design.Rules
	rv := reflect.ValueOf(&orig).Elem()
	for i := 0; i < rv.NumField(); i++ {
		f := rv.Field(i)
		if f.Kind() != reflect.Pointer {
			t.Fatalf("Rules.%s is a %s: teach cloneRules and this test about it", rv.Type().Field(i).Name, f.Kind())
		}
		f.Set(reflect.New(f.Type().Elem()))
	}
	clone := cloneRules(orig)
	cv := reflect.ValueOf(clone)
	for i := 0; i < rv.NumField(); i++ {
		name := rv.Type().Field(i).Name
		if cv.Field(i).IsNil() {
			t.Errorf("Rules.%s: the clone lost the value", name)
			continue
		}
		if cv.Field(i).Pointer() == rv.Field(i).Pointer() {
			t.Errorf("Rules.%s: the clone shares the original's value", name)
		}
		if !reflect.DeepEqual(cv.Field(i).Elem().Interface(), rv.Field(i).Elem().Interface()) {
			t.Errorf("Rules.%s: the clone's value differs", name)
		}
	}
}
