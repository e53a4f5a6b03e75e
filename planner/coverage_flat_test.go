package planner

import (
	"reflect"
	"testing"
)

// withPaintedLines runs f with paintedLine on or off.
func withPaintedLines(on bool, f func()) {
	old := paintedLines
	paintedLines = on
	defer func() { paintedLines = old }()
	f()
}

// TestPaintedLinesMatchDecide: the demo's coverage (every region's and
// stroke's figures, the stray sites) with the pads' painted interior
// lines taken by paintedLine is bit for bit the one decide gives line by
// line (paintedLine repeats decide's bounds and tests; the reference is
// decide itself, with the shortcut off).
func TestPaintedLinesMatchDecide(t *testing.T) {
	demoWithAndWithout(t, withPaintedLines, func(v string, got, want Coverage, gs, ws []Stroke) {
		if !reflect.DeepEqual(got, want) {
			t.Errorf("%s: coverage with paintedLine %+v, without %+v", v, got, want)
		}
		for i := range gs {
			if gs[i].ExpectedMissed != ws[i].ExpectedMissed || gs[i].ExpectedStray != ws[i].ExpectedStray {
				t.Errorf("%s: stroke %d missed/stray %g/%g with paintedLine, %g/%g without", v, i,
					gs[i].ExpectedMissed, gs[i].ExpectedStray, ws[i].ExpectedMissed, ws[i].ExpectedStray)
			}
		}
	})
}
