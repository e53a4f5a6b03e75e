package placement_test

import (
	"fmt"
	"strings"
	"testing"

	"dimerpath/lattice/placement"
)

func TestParseBox(t *testing.T) {
	tests := []struct {
		text    string
		want    [4]float64 // x0, y0, x1, y1 after ordering
		wantErr string
	}{
		{"", [4]float64{}, ""},
		{"900, 950, 1100,1050", [4]float64{900, 950, 1100, 1050}, ""},
		{"1100,1050,900,950", [4]float64{900, 950, 1100, 1050}, ""}, // corners in either order
		{"1,2,3", [4]float64{}, "want X0,Y0,X1,Y1"},
		{"1,2,3,x", [4]float64{}, "four positions"},
		{"0,0,NaN,1", [4]float64{}, "four positions"},
		{"0,0,1e12,1", [4]float64{}, "four positions"},
		{"5,0,5,10", [4]float64{}, "the box is empty"},
	}
	for _, tc := range tests {
		t.Run(tc.text, func(t *testing.T) {
			r, err := placement.ParseBox(tc.text)
			if tc.wantErr != "" {
				if err == nil || !strings.Contains(err.Error(), tc.wantErr) {
					t.Fatalf("ParseBox(%q) error %v, want %q", tc.text, err, tc.wantErr)
				}
				return
			}
			if err != nil {
				t.Fatal(err)
			}
			if got := [4]float64{r.X.Lo, r.Y.Lo, r.X.Hi, r.Y.Hi}; got != tc.want {
				t.Errorf("ParseBox(%q) = %v, want %v", tc.text, got, tc.want)
			}
		})
	}
}

func ExampleParseRegions() {
	fmt.Printf("%q\n", placement.ParseRegions(" donor-P, sensor-island ,"))
	fmt.Println(placement.ParseRegions("") == nil)
	// Output:
	// ["donor-P" "sensor-island"]
	// true
}
