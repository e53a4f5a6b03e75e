package design

import (
	"reflect"
	"runtime"
	"strings"
	"testing"

	"dimerpath/lattice"
)

// TestLaySameOnAnyCores checks that Lay, which paints the regions on
// every core at once, gives the layout it gives on one core, for each of
// the demo's variants, and that with two failing regions the error names
// the first in region order, as painting one by one does.
func TestLaySameOnAnyCores(t *testing.T) {
	d := loadDemo(t)
	layOn := func(procs int, variant string) (*Layout, error) {
		defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(procs))
		return d.Lay(variant)
	}
	for _, v := range d.Variants {
		one, err := layOn(1, v.Name)
		if err != nil {
			t.Fatal(err)
		}
		for _, procs := range []int{2, 4} {
			many, err := layOn(procs, v.Name)
			if err != nil {
				t.Fatal(err)
			}
			if !reflect.DeepEqual(one, many) {
				t.Errorf("variant %q: the layout on %d cores differs from one core's", v.Name, procs)
			}
		}
	}
	v := &d.Variants[0]
	off := func(r *Region) {
		r.Painted = lattice.NewSiteSet()
		r.Painted.AddRun(0, 9999, 0, 2) // beyond the field
	}
	first, later := &v.Regions[len(v.Regions)-3], &v.Regions[len(v.Regions)-1]
	off(first)
	off(later)
	for _, procs := range []int{1, 2, 4} {
		if _, err := layOn(procs, v.Name); err == nil || !strings.Contains(err.Error(), `region "`+first.Name+`": painted`) {
			t.Errorf("%d cores: %v, want the error of region %q", procs, err, first.Name)
		}
	}
}
