package route_test

import (
	"errors"
	"strings"
	"testing"

	"dimerpath/planner/route"
)

func TestReadCSV(t *testing.T) {
	for _, c := range []struct {
		name    string
		text    string
		strokes bool
		want    []route.Item
	}{
		{"points with header and comments", "# our test pattern\nx,y\n1,2\n\n 3.5 , -4e1 \n# end\n", false,
			[]route.Item{{A: route.Point{X: 1, Y: 2}, B: route.Point{X: 1, Y: 2}}, {A: route.Point{X: 3.5, Y: -40}, B: route.Point{X: 3.5, Y: -40}}}},
		{"strokes", "x1,y1,x2,y2\r\n0,0,1,1\r\n", true,
			[]route.Item{{A: route.Point{X: 0, Y: 0}, B: route.Point{X: 1, Y: 1}}}},
		{"no header", "5,6\n", false, []route.Item{{A: route.Point{X: 5, Y: 6}, B: route.Point{X: 5, Y: 6}}}},
		{"quoted", "\"x\",\"y\"\n\"5\", \"6.5\"\n", false, []route.Item{{A: route.Point{X: 5, Y: 6.5}, B: route.Point{X: 5, Y: 6.5}}}},
		{"empty", "# nothing\n", false, nil},
	} {
		t.Run(c.name, func(t *testing.T) {
			got, err := route.ReadCSV(strings.NewReader(c.text), "in.csv", c.strokes)
			if err != nil {
				t.Fatal(err)
			}
			if len(got) != len(c.want) {
				t.Fatalf("ReadCSV = %v, want %v", got, c.want)
			}
			for i := range got {
				if got[i] != c.want[i] {
					t.Errorf("ReadCSV item %d = %v, want %v", i, got[i], c.want[i])
				}
			}
		})
	}
}

func TestReadCSVErrors(t *testing.T) {
	for _, c := range []struct {
		name    string
		text    string
		strokes bool
		line    int
		field   string
		msg     string
	}{
		{"bad number", "x,y\n1,2\n3,abc\n", false, 3, "y", "not a finite number"},
		{"nan", "1,2\nNaN,2\n", false, 2, "x", "not a finite number"},
		{"inf", "# c\n1,2,3,+Inf\n", true, 2, "y2", "not a finite number"},
		{"too few fields", "1,2\n3\n", false, 2, "", "1 fields, want 2"},
		{"strokes without flag", "1,2,3,4\n", false, 1, "", "--strokes"},
		{"points with flag", "1,2\n", true, 1, "", "leave out --strokes"},
		{"header late", "1,2\nx,y\n", false, 2, "x", "not a finite number"},
		{"empty field", "1,\n", false, 1, "y", "not a finite number"},
		{"huge", "1,2\n3,-4e300\n", false, 2, "y", "magnitude above 1e+15"},
		{"bad header width", "x,y,z\n1,2\n", false, 1, "", "header has 3 fields"},
	} {
		t.Run(c.name, func(t *testing.T) {
			_, err := route.ReadCSV(strings.NewReader(c.text), "in.csv", c.strokes)
			var ce *route.CSVError
			if !errors.As(err, &ce) || ce.Line != c.line || ce.Field != c.field || !strings.Contains(err.Error(), c.msg) || !errors.Is(err, route.ErrCSV) {
				t.Errorf("ReadCSV error %v, want line %d field %q containing %q", err, c.line, c.field, c.msg)
			}
			if ce != nil && !strings.HasPrefix(err.Error(), "in.csv:") {
				t.Errorf("error %q does not name the file", err)
			}
		})
	}
}

func FuzzReadCSV(f *testing.F) {
	f.Add("x,y\n1,2\n3,4\n", false)
	f.Add("# strokes\nx1,y1,x2,y2\n0,0,1,1\n2,2,3,1e3\n", true)
	f.Add("1,2\n\n,\n", false)
	f.Add("1e16,2\n", false)
	f.Fuzz(func(t *testing.T, s string, strokes bool) {
		items, err := route.ReadCSV(strings.NewReader(s), "fuzz.csv", strokes)
		if err != nil {
			var ce *route.CSVError
			if !errors.As(err, &ce) || items != nil {
				t.Fatalf("error %v is not a *CSVError, or items came with it", err)
			}
			return
		}
		p := route.Problem{Items: items}
		if err := p.Validate(); err != nil {
			t.Fatalf("items read are not a valid problem: %v", err)
		}
		for _, it := range items {
			if !strokes && !it.IsPoint() {
				t.Fatal("a point file gave a stroke")
			}
		}
	})
}
