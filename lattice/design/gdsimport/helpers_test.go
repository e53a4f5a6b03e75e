package gdsimport

import (
	"fmt"
	"testing"

	"github.com/golang/geo/r2"

	"dimerpath/lattice/design"
)

func designWithFiducials(t testing.TB, a, b r2.Point) *design.Design {
	t.Helper()
	src := fmt.Sprintf(`{"format": "dimerpath-design", "version": 1, "name": "marks", "field": {"width_nm": 5000, "height_nm": 5000},
	  "fiducials": [{"name": "F1", "at_nm": [%g, %g]}, {"name": "F2", "at_nm": [%g, %g]}],
	  "variants": [{"name": "v", "regions": []}]}`, a.X, a.Y, b.X, b.Y)
	d, err := design.Parse("marks.json", []byte(src))
	if err != nil {
		t.Fatal(err)
	}
	return d
}
