package planner

import (
	"math"
	"reflect"
	"testing"

	"dimerpath/lattice"
	"dimerpath/lattice/design"
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

// TestKneeCut: split's cut along the dimers falls on the dimer edge
// nearest to kneeSigmas σ inside or outside a piece's along end (the one
// nearest the middle that leaves both parts over half a strip), and at
// the middle where no such edge lies inside the range or an AP stroke is
// active (the rule of kneeCut's comment; the positions from the lattice's
// dimer pitch).
func TestKneeCut(t *testing.T) {
	fe, ap := int32(0), int32(1)
	ck := &coverageCheck{strokes: []Stroke{{Mode: design.ModeFE}, {Mode: design.ModeAP}}}
	const sigma = 2.5
	line := func(stroke int32, a0, a1 float64) *piece {
		return &piece{kind: pieceParallel, stroke: stroke, a0: a0, a1: a1, sigma: sigma}
	}
	turn := func(stroke int32, c float64) *piece {
		return &piece{kind: pieceSquare, stroke: stroke, c: c, sigma: sigma}
	}
	k := kneeSigmas * sigma
	for _, tc := range []struct {
		name   string
		d0, d1 int
		ps     []*piece
		want   float64 // the along position the cut's edge is nearest to; < 0: the middle
	}{
		{"line end inside", 0, 1024, []*piece{line(fe, 10, 190)}, 190 + k},
		{"the edge nearest the middle", 0, 1024, []*piece{line(fe, 10, 190), line(fe, 10, 205)}, 205 - k},
		{"turn", 0, 1024, []*piece{turn(fe, 150)}, 150 + k},
		{"no end inside", 0, 1024, []*piece{line(fe, -100, 900)}, -1},
		{"edge too near the range's end", 0, 1024, []*piece{line(fe, -100, lattice.DimerEdge(stripDimers/4)-k)}, -1},
		{"AP stroke active", 0, 1024, []*piece{line(fe, 10, 190), line(ap, 10, 190)}, -1},
	} {
		r := siteRect{l0: 0, l1: 2, d0: tc.d0, d1: tc.d1}
		mid := (tc.d0 + tc.d1) / 2
		got := ck.kneeCut(r, tc.ps, mid)
		if tc.want < 0 {
			if got != mid {
				t.Errorf("%s: cut at %d, want the middle %d", tc.name, got, mid)
			}
			continue
		}
		if e := lattice.DimerEdge(got); math.Abs(e-tc.want) > lattice.DimerPitch/2+1e-9 {
			t.Errorf("%s: cut at dimer %d (edge %.3f nm), want the edge nearest %.3f nm", tc.name, got, e, tc.want)
		}
	}
}
