package planner

import (
	"fmt"
	"math"
	"reflect"
	"strings"
)

// A profile parameter a sweep may vary is any number of the instrument
// profile, named by its JSON path ("drift.rate_nm_per_min",
// "ap.current_a"): the list follows the Profile type by reflection, so a
// field added to the profile can be swept without a change here. The
// limits are left out (they are what values are checked against), and so
// are the file's format, version and the text fields.

// profileField is one number of the profile: its JSON path and where it
// lies in the struct.
type profileField struct {
	path  string
	index []int
	kind  reflect.Kind
}

// profileFields lists the profile's numeric fields in declaration order.
func profileFields() []profileField {
	var out []profileField
	var walk func(t reflect.Type, prefix string, index []int)
	walk = func(t reflect.Type, prefix string, index []int) {
		for i := 0; i < t.NumField(); i++ {
			f := t.Field(i)
			if !f.IsExported() {
				continue
			}
			name, _, _ := strings.Cut(f.Tag.Get("json"), ",")
			if name == "" || name == "-" {
				continue
			}
			path := prefix + name
			idx := append(append([]int(nil), index...), i)
			switch f.Type.Kind() {
			case reflect.Struct:
				if path == "limits" {
					continue
				}
				walk(f.Type, path+".", idx)
			case reflect.Float64, reflect.Int:
				if path == "version" {
					continue
				}
				out = append(out, profileField{path: path, index: idx, kind: f.Type.Kind()})
			}
		}
	}
	walk(reflect.TypeFor[Profile](), "", nil)
	return out
}

// profileField returns the field with the JSON path, or false.
func findProfileField(path string) (profileField, bool) {
	for _, f := range profileFields() {
		if f.path == path {
			return f, true
		}
	}
	return profileField{}, false
}

// get returns the field's value in p.
func (f profileField) get(p *Profile) float64 {
	v := reflect.ValueOf(p).Elem().FieldByIndex(f.index)
	if f.kind == reflect.Int {
		return float64(v.Int())
	}
	return v.Float()
}

// set stores x in p's field; an integer field takes whole numbers only.
func (f profileField) set(p *Profile, x float64) error {
	v := reflect.ValueOf(p).Elem().FieldByIndex(f.index)
	if f.kind == reflect.Int {
		if x != math.Trunc(x) || math.Abs(x) > 1<<53 {
			return fmt.Errorf("%s = %s: must be a whole number", f.path, formatSweepNumber(x))
		}
		v.SetInt(int64(x))
		return nil
	}
	v.SetFloat(x)
	return nil
}

// unitOf returns the unit a profile field's JSON name ends with, as it
// is written on an axis ("nm/min", "s", "A"), or "".
func unitOf(path string) string {
	name := path[strings.LastIndexByte(path, '.')+1:]
	for _, u := range []struct{ suffix, unit string }{
		{"_nm_per_min", "nm/min"}, {"_nm_per_s", "nm/s"}, {"_c_per_cm", "C/cm"},
		{"_nm", "nm"}, {"_s", "s"}, {"_a", "A"}, {"_v", "V"},
	} {
		if strings.HasSuffix(name, u.suffix) {
			return u.unit
		}
	}
	return ""
}

// formatSweepNumber writes a parameter value in its shortest exact form.
func formatSweepNumber(x float64) string {
	return fmt.Sprint(x)
}
