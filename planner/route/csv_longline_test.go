package route_test

import (
	"strings"
	"testing"

	"dimerpath/planner/route"
	"dimerpath/planner/route/tsplib"
)

// A file without line breaks is refused at the line limit with words a
// user reads, not bufio's "token too long".
func TestOverlongLineNamesTheLimit(t *testing.T) {
	long := strings.Repeat("1", route.MaxLineBytes+10)
	tests := []struct {
		name string
		read func() error
	}{
		{"points", func() error { _, err := route.ReadCSV(strings.NewReader("x,y\n"+long), "pts.csv", false); return err }},
		{"tsplib", func() error { _, err := tsplib.Read(strings.NewReader("NAME: a\n"+long), "a.tsp"); return err }},
		{"tour", func() error { _, err := tsplib.ReadTour(strings.NewReader(long), "a.tour", 3); return err }},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			err := tc.read()
			if err == nil {
				t.Fatal("an over-long line was accepted")
			}
			msg := err.Error()
			if !strings.Contains(msg, "line longer than 1024 KiB, the limit") || strings.Contains(msg, "token too long") {
				t.Errorf("message %q does not name the limit", msg)
			}
			if !strings.Contains(msg, ":2:") && tc.name != "tour" {
				t.Errorf("message %q does not name line 2", msg)
			}
		})
	}
}
