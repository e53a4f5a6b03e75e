package design

import (
	"math"
	"strings"
	"testing"

	"github.com/golang/geo/r2"

	"dimerpath/lattice"
)

// A survey loads, saves and loads back, and every bad field is reported
// at its JSON path.
func TestSurveyInDesignFile(t *testing.T) {
	sv := `"survey": {"image": "scan.png", "offset_nm": [900, 910], "rotation_deg": -3, "size_px": [900, 900],
	  "scale_nm_per_px": [0.152, 0.149], "skew_deg": 0.4,
	  "terraces": [{"rows_deg": 3, "polygon_nm": [[0, 0], [136, 0], [136, 134], [0, 134]], "dimer_nm": [0.2, 0.1]}],
	  "steps": [{"polyline_nm": [[10, 0], [12, 134]]}],
	  "defects": [{"at_nm": [40.6, 8.4], "kind": "bright", "height_nm": 0.15, "size_nm": 0.9, "class": "dangling bond"},
	              {"at_nm": [75.7, 29.3], "kind": "dark", "size_nm": 0.6, "by_hand": true}]},`
	src := strings.Replace(minimal, `"variants"`, sv+`"variants"`, 1)
	d, err := Parse("sv.json", []byte(src))
	if err != nil {
		t.Fatal(err)
	}
	if d.Survey == nil || len(d.Survey.Defects) != 2 || !d.Survey.Defects[1].ByHand || d.Survey.SkewDeg != 0.4 {
		t.Fatalf("survey %+v", d.Survey)
	}
	data, err := Marshal(d)
	if err != nil {
		t.Fatal(err)
	}
	again, err := Parse("sv.json", data)
	if err != nil || again.Survey == nil || again.Survey.Defects[0].Class != "dangling bond" || len(again.Survey.Steps[0].PolylineNM) != 2 {
		t.Fatalf("reloaded survey %+v, %v", again.Survey, err)
	}

	bad := strings.Replace(minimal, `"variants"`, `"survey": {"offset_nm": [0, 1e9], "size_px": [0, 9000], "scale_nm_per_px": [5e-324, -1],
	  "steps": [{"polyline_nm": [[1, 1]]}], "defects": [{"at_nm": [1, 2], "kind": "grey", "size_nm": -1}]},"variants"`, 1)
	_, err = Parse("sv.json", []byte(bad))
	if err == nil {
		t.Fatal("bad survey accepted")
	}
	for _, want := range []string{
		`survey.offset_nm: [0, 1e+09] lies beyond`,
		`survey.size_px[0]: 0 pixels`,
		`survey.size_px[1]: 9000 pixels`,
		`survey.scale_nm_per_px[0]: 5e-324 is not a scale in [0.001, 1000] nm per pixel`,
		`survey.scale_nm_per_px[1]: -1 is not a scale`,
		`survey.steps[0].polyline_nm: has 1 points`,
		`survey.defects[0].kind: "grey" is not "bright" or "dark"`,
		`survey.defects[0].size_nm: -1 is not a size`,
	} {
		if !strings.Contains(err.Error(), want) {
			t.Errorf("error %q\nlacks %q", err, want)
		}
	}
}

// TestSurveyFrames checks the survey's frames against hand arithmetic: a
// survey turned by 90° at (100, 200) puts its point (1, 0) at (100, 201),
// and pixel (10, 0) with skew 0 at 10 x its x scale.
func TestSurveyFrames(t *testing.T) {
	s := &Survey{OffsetNM: [2]float64{100, 200}, RotationDeg: 90, SizePx: [2]int{20, 10}, ScaleNMPerPx: [2]float64{0.5, 0.25}, SkewDeg: 30}
	if p := s.ToField(r2.Point{X: 1, Y: 0}); math.Abs(p.X-100) > 1e-12 || math.Abs(p.Y-201) > 1e-12 {
		t.Errorf("ToField(1, 0) = %v, want (100, 201)", p)
	}
	if q := s.FromField(s.ToField(r2.Point{X: 3, Y: -4})); math.Abs(q.X-3) > 1e-12 || math.Abs(q.Y+4) > 1e-12 {
		t.Errorf("FromField(ToField(3, -4)) = %v", q)
	}
	// y pixel steps lean by the skew: (0, 4) px is 1 nm long at 30° from the normal.
	if p := s.PixelToSurvey(0, 4); math.Abs(p.X-0.5) > 1e-12 || math.Abs(p.Y-math.Sqrt(3)/2) > 1e-12 {
		t.Errorf("PixelToSurvey(0, 4) = %v, want (0.5, 0.866)", p)
	}
	if o := s.Outline(); len(o) != 4 || o[0] != (r2.Point{X: 100, Y: 200}) {
		t.Errorf("outline %v", o)
	}
	if u, v := s.SurveyToPixel(s.PixelToSurvey(7, 3)); math.Abs(u-7) > 1e-12 || math.Abs(v-3) > 1e-12 {
		t.Errorf("SurveyToPixel(PixelToSurvey(7, 3)) = (%g, %g)", u, v)
	}
	// Covers: the image's pixel points inside it, and just outside each edge.
	for _, c := range []struct {
		u, v float64
		in   bool
	}{{10, 5, true}, {0.01, 0.01, true}, {19.99, 9.99, true}, {-0.1, 5, false}, {20.1, 5, false}, {10, -0.1, false}, {10, 10.1, false}} {
		if got := s.Covers(s.ToField(s.PixelToSurvey(c.u, c.v))); got != c.in {
			t.Errorf("Covers(pixel %g, %g) = %v, want %v", c.u, c.v, got, c.in)
		}
	}
}

// DesignTerraces lays the survey's terraces on the lattice the diamond
// structure gives (lattice.Terrace.AcrossStep, derived in
// lattice/step_test.go): a survey whose upper terrace's dimer sits where
// a step up (in the other antiphase registry) puts it must come back as
// step_from the base, step "up", and the half-row offset; a step down
// likewise; the base keeps the measured dimer as its offset.
func TestDesignTerracesFromSurvey(t *testing.T) {
	base := lattice.Terrace{Rows: lattice.RowsAlongX, Offset: r2.Point{X: 0.21, Y: 0.13}}
	for _, c := range []struct {
		name      string
		dir       lattice.StepDirection
		antiphase bool
	}{{"up", lattice.StepUp, false}, {"up, other registry", lattice.StepUp, true}, {"down", lattice.StepDown, false}} {
		t.Run(c.name, func(t *testing.T) {
			upper := base.AcrossStep(c.dir)
			want := upper.Offset
			if c.antiphase {
				want = want.Add(upper.Rows.Join(0, lattice.RowSpacing/2))
			}
			// A dimer of the upper lattice a few cells away, as the
			// analysis would report it, with 0.03 nm of error.
			dimer := want.Add(upper.Rows.Join(7*lattice.DimerPitch+0.03, 3*lattice.RowSpacing-0.02))
			s := &Survey{OffsetNM: [2]float64{100, 50}, SizePx: [2]int{100, 100}, ScaleNMPerPx: [2]float64{0.2, 0.2}}
			// Survey frame = field − offset (no rotation).
			local := func(p r2.Point) [2]float64 { return [2]float64{p.X - 100, p.Y - 50} }
			lower, higher := 0, 1
			if c.dir == lattice.StepDown {
				lower, higher = 1, 0 // terrace 0 (the larger) is the upper one: up_from says so
			}
			small := [][2]float64{{0, 0}, {5, 0}, {5, 20}, {0, 20}}
			large := [][2]float64{{5, 0}, {20, 0}, {20, 20}, {5, 20}}
			s.Terraces = []SurveyTerrace{
				{RowsDeg: 0, PolygonNM: large, DimerNM: local(base.Offset.Add(r2.Point{X: 3 * lattice.DimerPitch, Y: 2 * lattice.RowSpacing}))},
				{RowsDeg: 90, PolygonNM: small, DimerNM: local(dimer)},
			}
			// Which terrace is up: for a step down from the base, the
			// base (terrace 0) is up from terrace 1.
			up := lower
			s.Terraces[higher].UpFrom = &up
			if c.dir == lattice.StepDown {
				one := 1
				s.Terraces[0].UpFrom, s.Terraces[1].UpFrom = &one, nil
			}
			ts, err := s.DesignTerraces()
			if err != nil {
				t.Fatal(err)
			}
			if len(ts) != 2 || ts[0].Rows != "x" || len(ts[0].Boundary) != 0 || ts[1].StepFrom != ts[0].Name || ts[1].Step != c.dir.String() || len(ts[1].Boundary) != 4 {
				t.Fatalf("terraces %+v", ts)
			}
			if math.Abs(ts[0].OffsetNM[0]-(base.Offset.X+3*lattice.DimerPitch)) > 1e-9 {
				t.Errorf("base offset %v, want the measured dimer", ts[0].OffsetNM)
			}
			d := &Design{Field: Field{WidthNM: 200, HeightNM: 200}, Terraces: ts}
			surf, err := d.Surface()
			if err != nil {
				t.Fatal(err)
			}
			// The upper terrace's lattice must hold the wanted dimer: its
			// offset equals want modulo one lattice cell.
			got := surf.Terraces[1].Offset
			along, across := upper.Rows.Split(got.Sub(want))
			if r := math.Remainder(along, lattice.DimerPitch); math.Abs(r) > 1e-9 {
				t.Errorf("upper lattice off along its rows by %g nm", r)
			}
			if r := math.Remainder(across, lattice.RowSpacing); math.Abs(r) > 1e-9 {
				t.Errorf("upper lattice off across its rows by %g nm (registry)", r)
			}
		})
	}
	tilted := &Survey{RotationDeg: 4, Terraces: []SurveyTerrace{{PolygonNM: [][2]float64{{0, 0}, {1, 0}, {1, 1}}}}}
	if _, err := tilted.DesignTerraces(); err == nil || !strings.Contains(err.Error(), "rotation_deg") {
		t.Errorf("rows 4° off the axis: %v, want a refusal", err)
	}
}
