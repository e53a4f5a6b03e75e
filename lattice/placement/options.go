package placement

import (
	"fmt"
	"math"
	"strconv"
	"strings"

	"github.com/golang/geo/r2"

	"dimerpath/lattice/design"
)

// ParseBox reads a search box written "X0,Y0,X1,Y1" (two opposite
// corners in field nm), as the place command's --box and the window's
// Survey tab take it. An empty text is the zero box: the survey's area.
func ParseBox(s string) (r2.Rect, error) {
	if strings.TrimSpace(s) == "" {
		return r2.Rect{}, nil
	}
	parts := strings.Split(s, ",")
	if len(parts) != 4 {
		return r2.Rect{}, fmt.Errorf("%q: want X0,Y0,X1,Y1 in nm", s)
	}
	var v [4]float64
	for i, p := range parts {
		x, err := strconv.ParseFloat(strings.TrimSpace(p), 64)
		if err != nil || math.IsNaN(x) || math.IsInf(x, 0) || math.Abs(x) > design.MaxFieldNM {
			return r2.Rect{}, fmt.Errorf("%q: want X0,Y0,X1,Y1, four positions within ±%g nm", s, design.MaxFieldNM)
		}
		v[i] = x
	}
	r := r2.RectFromPoints(r2.Point{X: v[0], Y: v[1]}, r2.Point{X: v[2], Y: v[3]})
	if r.X.Length() <= 0 || r.Y.Length() <= 0 {
		return r2.Rect{}, fmt.Errorf("%q: the box is empty", s)
	}
	return r, nil
}

// ParseRegions reads the core's region names written "A,B"; an empty
// text means every atomic-precision region (nil).
func ParseRegions(s string) []string {
	var names []string
	for _, r := range strings.Split(s, ",") {
		if r = strings.TrimSpace(r); r != "" {
			names = append(names, r)
		}
	}
	return names
}
