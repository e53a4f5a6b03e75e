package export

import (
	"bytes"
	"context"
	"encoding/csv"
	"encoding/json"
	"errors"
	"math"
	"reflect"
	"slices"
	"strconv"
	"strings"
	"testing"

	"dimerpath/export/internal/planfixture"
	"dimerpath/internal/jsonfile"
	"dimerpath/planner"
)

// testPlans are the fixture plans every format is tested on.
func testPlans(t testing.TB) map[string]*planner.Plan {
	t.Helper()
	return map[string]*planner.Plan{
		"set":   planfixture.SET().Plan,
		"large": planfixture.Large(3000, 7),
		"empty": emptyPlan(),
	}
}

// emptyPlan is a plan with nothing to write (a variant with no regions).
func emptyPlan() *planner.Plan {
	return &planner.Plan{Design: "empty", Variant: "none", FieldWidthNM: 10, FieldHeightNM: 10,
		Yield: planner.Yield{All: 1, DevicesPerPerfect: 1, Distribution: []float64{1}}}
}

// normalised returns a deep copy of p with empty slices made nil, the
// one difference a JSON round trip may make (the file always holds [],
// the reader leaves nil for absent fields). It copies by reflection, not
// through JSON, so it works on any plan, one with an infinite log10 of
// the yield too (issue 16: the JSON copy failed on those, silently).
func normalised(p *planner.Plan) *planner.Plan {
	q := reflect.New(reflect.TypeFor[planner.Plan]())
	copyNormalised(q.Elem(), reflect.ValueOf(p).Elem())
	return q.Interface().(*planner.Plan)
}

func copyNormalised(dst, src reflect.Value) {
	switch src.Kind() {
	case reflect.Slice:
		if src.Len() == 0 {
			return // dst stays nil
		}
		dst.Set(reflect.MakeSlice(src.Type(), src.Len(), src.Len()))
		for i := range src.Len() {
			copyNormalised(dst.Index(i), src.Index(i))
		}
	case reflect.Struct:
		for i := range src.NumField() {
			if src.Type().Field(i).IsExported() {
				copyNormalised(dst.Field(i), src.Field(i))
			}
		}
	default:
		dst.Set(src)
	}
}

func TestPlanJSONRoundTrip(t *testing.T) {
	for name, p := range testPlans(t) {
		t.Run(name, func(t *testing.T) {
			var buf bytes.Buffer
			if err := WritePlanJSON(&buf, p, "dimerpath test"); err != nil {
				t.Fatal(err)
			}
			got, err := ReadPlanJSON(&buf)
			if err != nil {
				t.Fatal(err)
			}
			// encoding/json writes the shortest decimal that reads back
			// to the same float64, so equality is exact.
			if want := normalised(p); !reflect.DeepEqual(normalised(got), want) {
				t.Errorf("ReadPlanJSON(WritePlanJSON(p)) differs from p")
				diffPlans(t, normalised(got), want)
			}
		})
	}
}

// diffPlans reports the first differing top-level fields.
func diffPlans(t *testing.T, got, want *planner.Plan) {
	g, w := reflect.ValueOf(got).Elem(), reflect.ValueOf(want).Elem()
	for i := range g.NumField() {
		if !reflect.DeepEqual(g.Field(i).Interface(), w.Field(i).Interface()) {
			t.Errorf("field %s differs", g.Type().Field(i).Name)
		}
	}
}

// TestPlanFileCoversPlan fails when the planner's contract types gain a
// field the plan file does not carry: add it to planFile, the reader,
// the writer and the README schema, then here.
func TestPlanFileCoversPlan(t *testing.T) {
	known := map[reflect.Type][]string{
		reflect.TypeFor[planner.Plan](): {"Design", "Variant", "Profile", "Seed", "FieldWidthNM", "FieldHeightNM", "Conditions",
			"Modes", "Fiducials", "Strokes", "Segments", "Actions", "Steps", "Breakdown", "TotalS", "P10S", "P50S", "P90S", "ScheduleS",
			"PInTolerance", "Couplings", "Drift", "FloorS", "ByHandS", "Windows", "Yield", "Coverage", "Warnings"},
		reflect.TypeFor[planner.Conditions](): {"Mode", "Kind", "BiasV", "CurrentA", "LineDoseCPerCm", "SpeedNMPerS", "LineWidthNM", "Passes", "PitchNM",
			"DwellS", "DwellCapS", "YieldPerElectron", "SigmaNM", "ElectronsPerSite"},
		reflect.TypeFor[planner.RegionMode](): {"Region", "Role", "Requested", "Mode", "Reason", "Sites"},
		reflect.TypeFor[planner.Fiducial]():   {"Name", "At"},
		reflect.TypeFor[planner.Stroke](): {"ID", "Region", "Mode", "Kind", "Path", "Passes", "LengthNM", "DurationS", "Sites",
			"ToleranceNM", "Segment", "Window", "ExpectedMissed", "ExpectedStray"},
		reflect.TypeFor[planner.Segment](): {"Index", "Step", "Registration", "Reason", "Fiducial", "FiducialAt", "StartS", "EndS", "BudgetS",
			"Strokes", "Tightest", "PInTolerance"},
		reflect.TypeFor[planner.Step]():      {"Kind", "Species", "StartS", "DurationS", "Segments", "Precursor", "ExposureL", "TemperatureC", "Note"},
		reflect.TypeFor[planner.Coupling]():  {"Kind", "A", "B", "ToleranceNM", "Strokes", "SameStep", "PInTolerance"},
		reflect.TypeFor[planner.DriftPlan](): {"RateNMPerMin", "CreepFraction", "ErrorZ", "Margin", "Compensated"},
		reflect.TypeFor[planner.Action](): {"Index", "Kind", "Segment", "Stroke", "From", "To", "StartS", "DurationS", "Mode",
			"BiasV", "CurrentA", "SpeedNMPS", "Note"},
		reflect.TypeFor[planner.Breakdown](): {"APWriteS", "FEWriteS", "DwellS", "TravelS", "ModeSwitchS", "RegistrationS", "VerificationS",
			"SurveyS", "ConditioningS", "TipChangeS", "RepairS", "DocumentationS", "DoseS", "AnnealS"},
		reflect.TypeFor[planner.Window](): {"Region", "Species", "Template", "At", "Sites", "OpenProbability", "P0", "P1", "P2Plus", "P1SD", "Probability", "OpenS"},
		reflect.TypeFor[planner.Yield](): {"Windows", "All", "All68", "All95", "Log10All68", "Log10All95", "ExpectedEmpty", "ExpectedMultiple", "ExpectedMisopened",
			"MeanGood", "Distribution", "DistributionFrom", "Log10All", "SDGood", "DevicesPerPerfect"},
		reflect.TypeFor[planner.Coverage]():       {"OK", "Sites", "StrayLimit", "ExpectedMissed", "ExpectedStray", "Regions", "OverLimit", "StraySites", "Issues"},
		reflect.TypeFor[planner.RegionCoverage](): {"Region", "Sites", "ExpectedMissed", "ExpectedStray", "ExpectedSpurious", "Probability", "Log10Probability"},
		reflect.TypeFor[planner.StraySite]():      {"Site", "At", "Probability", "Region", "Stroke"},
	}
	for typ, names := range known {
		var got []string
		for i := range typ.NumField() {
			if typ.Field(i).IsExported() {
				got = append(got, typ.Field(i).Name)
			}
		}
		if !slices.Equal(got, names) {
			t.Errorf("%v has fields %v; the plan file carries %v", typ, got, names)
		}
	}
}

// TestBreakdownKeys checks that the breakdown's keys in messages are the
// plan file's own: one per kind of time, in TimeKinds' order.
func TestBreakdownKeys(t *testing.T) {
	typ := reflect.TypeFor[breakdownJSON]()
	if typ.NumField() != len(planner.TimeKinds) {
		t.Fatalf("breakdownJSON has %d fields, planner.TimeKinds %d", typ.NumField(), len(planner.TimeKinds))
	}
	for i, k := range planner.TimeKinds {
		if tag := strings.Split(typ.Field(i).Tag.Get("json"), ",")[0]; breakdownKey(k) != tag {
			t.Errorf("breakdownKey(%v) = %q, the file's field is %q", k, breakdownKey(k), tag)
		}
	}
	b := planner.Breakdown{}
	for i, k := range planner.TimeKinds {
		*fieldOf(&b, k) = float64(i + 1)
	}
	bj := breakdownOf(b)
	if got := bj.breakdown(); got != b {
		t.Errorf("breakdown round trip %+v, want %+v", got, b)
	}
}

// fieldOf returns the field of kind k of b (test helper over Seconds).
func fieldOf(b *planner.Breakdown, k planner.TimeKind) *float64 {
	v := reflect.ValueOf(b).Elem()
	for i, kk := range planner.TimeKinds {
		if kk == k {
			return v.Field(i).Addr().Interface().(*float64)
		}
	}
	return nil
}

func TestPlanJSONDerivedFields(t *testing.T) {
	p := planfixture.SET().Plan
	var buf bytes.Buffer
	if err := WritePlanJSON(&buf, p, ""); err != nil {
		t.Fatal(err)
	}
	var f planFile
	if err := json.Unmarshal(buf.Bytes(), &f); err != nil {
		t.Fatal(err)
	}
	if f.Format != PlanFormat || f.Version != PlanVersion || f.Caution != planner.Caution {
		t.Errorf("header = %q v%d caution %q", f.Format, f.Version, f.Caution)
	}
	writer := strokeActions(p)
	for i, s := range f.Strokes {
		ps := p.Strokes[i]
		if s.StartNM != xyOf(ps.Path[0]) || s.EndNM != xyOf(ps.Path[len(ps.Path)-1]) {
			t.Errorf("strokes[%d]: start %v end %v, path %v", i, s.StartNM, s.EndNM, ps.Path)
		}
		a := p.Actions[writer[i]]
		if s.BiasV != a.BiasV || s.CurrentA != a.CurrentA || s.SpeedNMPS != a.SpeedNMPS {
			t.Errorf("strokes[%d] conditions %g V %g A %g nm/s, its action has %g V %g A %g nm/s", i,
				s.BiasV, s.CurrentA, s.SpeedNMPS, a.BiasV, a.CurrentA, a.SpeedNMPS)
		}
	}
	registrations := 0
	for i, a := range f.Actions {
		if a.Kind == "register" {
			registrations++
			if a.Fiducial != p.Segments[a.Segment].Fiducial {
				t.Errorf("actions[%d].fiducial = %q, segment %d registers on %q", i, a.Fiducial, a.Segment, p.Segments[a.Segment].Fiducial)
			}
		}
	}
	if registrations != len(p.Segments) {
		t.Errorf("%d registrations for %d segments", registrations, len(p.Segments))
	}
}

// mutate writes p as JSON, applies edit to the decoded object, and
// returns the re-encoded file.
func mutate(t *testing.T, p *planner.Plan, edit func(m map[string]any)) []byte {
	t.Helper()
	var buf bytes.Buffer
	if err := WritePlanJSON(&buf, p, ""); err != nil {
		t.Fatal(err)
	}
	var m map[string]any
	if err := json.Unmarshal(buf.Bytes(), &m); err != nil {
		t.Fatal(err)
	}
	edit(m)
	out, err := json.Marshal(m)
	if err != nil {
		t.Fatal(err)
	}
	return out
}

func at(m map[string]any, key string, i int) map[string]any {
	return m[key].([]any)[i].(map[string]any)
}

// A version 1 file (written before strokes carried their number on
// paper) reads as the same plan.
func TestReadPlanJSONVersion1(t *testing.T) {
	p := planfixture.SET().Plan
	data := mutate(t, p, func(m map[string]any) {
		m["version"] = 1
		for _, s := range m["strokes"].([]any) {
			delete(s.(map[string]any), "number")
		}
	})
	got, err := ReadPlanJSON(bytes.NewReader(data))
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(StrokeNumbers(got), StrokeNumbers(p)) || len(got.Strokes) != len(p.Strokes) {
		t.Errorf("version 1 file read as another plan")
	}
}

func TestReadPlanJSONRejects(t *testing.T) {
	p := planfixture.SET().Plan
	cases := []struct {
		name  string
		data  []byte
		is    error
		field string // must appear in the message
	}{
		{"not json", []byte("PK\x03\x04 zip"), ErrSyntax, "line 1"},
		{"empty", []byte(""), ErrSyntax, ""},
		{"design file", []byte(`{"format":"dimerpath-design","version":1}`), ErrNotPlan, "format"},
		{"no format", []byte(`{"version":1}`), ErrNotPlan, "format"},
		{"future version", mutate(t, p, func(m map[string]any) { m["version"] = PlanVersion + 1 }), ErrVersion, "version"},
		{"wrong paper number", mutate(t, p, func(m map[string]any) { at(m, "strokes", 2)["number"] = 9.0 }), ErrInvalid, "strokes[2].number = 9: stroke 2 is number 3 in writing order"},
		{"version string", mutate(t, p, func(m map[string]any) { m["version"] = "1" }), ErrVersion, "version"},
		{"unknown field", mutate(t, p, func(m map[string]any) { m["colour"] = "red" }), ErrInvalid, "colour"},
		{"syntax error line", []byte("{\n\"format\": \"dimerpath-plan\",\n\"version\": 2,\n\"design\": ]\n}"), ErrSyntax, "line 4"},
		{"trailing data", append(mutate(t, p, func(map[string]any) {}), []byte(" {}")...), ErrSyntax, ""},
		{"wrong type", mutate(t, p, func(m map[string]any) { m["total_s"] = "long" }), ErrInvalid, "total_s"},
		{"negative duration", mutate(t, p, func(m map[string]any) { at(m, "strokes", 2)["duration_s"] = -1.0 }), ErrInvalid, "strokes[2].duration_s"},
		{"unknown mode", mutate(t, p, func(m map[string]any) { at(m, "strokes", 1)["mode"] = "xx" }), ErrInvalid, "strokes[1].mode"},
		{"unknown kind", mutate(t, p, func(m map[string]any) { at(m, "actions", 3)["kind"] = "jump" }), ErrInvalid, "actions[3].kind"},
		{"bad stroke id", mutate(t, p, func(m map[string]any) { at(m, "strokes", 4)["id"] = 9.0 }), ErrInvalid, "strokes[4].id"},
		{"dangling stroke", mutate(t, p, func(m map[string]any) {
			at(m, "segments", 0)["strokes"] = []any{999.0}
		}), ErrInvalid, "segments[0].strokes[0]"},
		{"dangling window", mutate(t, p, func(m map[string]any) { at(m, "strokes", 0)["window"] = 77.0 }), ErrInvalid, "strokes[0].window"},
		{"empty path", mutate(t, p, func(m map[string]any) {
			s := at(m, "strokes", 7)
			s["path_nm"] = []any{}
		}), ErrInvalid, "strokes[7].path_nm"},
		{"start not path", mutate(t, p, func(m map[string]any) { at(m, "strokes", 8)["start_nm"] = []any{1.0, 2.0} }), ErrInvalid, "strokes[8].start_nm"},
		{"gap in timeline", mutate(t, p, func(m map[string]any) {
			a := at(m, "actions", 5)
			a["start_s"] = a["start_s"].(float64) + 10
		}), ErrInvalid, "actions[5].start_s"},
		{"breakdown sum", mutate(t, p, func(m map[string]any) { m["total_s"] = m["total_s"].(float64) * 2 }), ErrInvalid, "total_s"},
		{"probability above one", mutate(t, p, func(m map[string]any) { at(m, "windows", 0)["probability"] = 1.5 }), ErrInvalid, "windows[0].probability"},
		{"wrong fiducial", mutate(t, p, func(m map[string]any) { at(m, "actions", 1)["fiducial"] = "F-XX" }), ErrInvalid, "actions[1].fiducial"},
		{"zero field", mutate(t, p, func(m map[string]any) { m["field_nm"] = []any{0.0, 80.0} }), ErrInvalid, "field_nm[0]"},
		{"point far outside", mutate(t, p, func(m map[string]any) {
			at(m, "strokes", 3)["path_nm"] = []any{[]any{1e9, 5.0}}
			at(m, "strokes", 3)["start_nm"] = []any{1e9, 5.0}
			at(m, "strokes", 3)["end_nm"] = []any{1e9, 5.0}
		}), ErrInvalid, "strokes[3].path_nm[0]"},
		{"field too large", mutate(t, p, func(m map[string]any) { m["field_nm"] = []any{1e12, 80.0} }), ErrInvalid, "field_nm[0]"},
		// Issue 16: a plan without yield read as log10_all = -Inf, and
		// encoding/json matched keys in any case.
		{"no yield", mutate(t, p, func(m map[string]any) { delete(m, "yield") }), ErrInvalid, "yield: missing"},
		{"key in another case", mutate(t, p, func(m map[string]any) { m["vAriAnt"] = m["variant"]; delete(m, "variant") }), ErrInvalid,
			`vAriAnt: unknown field: names are case-sensitive, did you mean "variant"?`},
		{"NaN total is still a plan", bytes.Replace(mutate(t, p, func(m map[string]any) { m["total_s"] = "NAN" }), []byte(`"NAN"`), []byte("NaN"), 1),
			ErrInvalid, "total_s: NaN is not a finite number"},
		{"quantiles reversed", mutate(t, p, func(m map[string]any) { m["p10_s"] = m["p90_s"].(float64) + 1 }), ErrInvalid, "p50_s"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			_, err := ReadPlanJSON(bytes.NewReader(tc.data))
			if !errors.Is(err, tc.is) {
				t.Fatalf("ReadPlanJSON = %v, want an error wrapping %v", err, tc.is)
			}
			if _, ok := errors.AsType[*jsonfile.Error](err); !ok {
				t.Errorf("error %v is not a *jsonfile.Error", err)
			}
			if !strings.Contains(err.Error(), tc.field) {
				t.Errorf("error %q does not name %q", err, tc.field)
			}
		})
	}
}

func TestWriteRefusesUnwritablePlans(t *testing.T) {
	cases := []struct {
		name  string
		edit  func(p *planner.Plan)
		field string
	}{
		{"NaN point", func(p *planner.Plan) { p.Strokes[3].Path[0].X = math.NaN() }, "strokes[3].path_nm[0][0]"},
		{"infinite budget", func(p *planner.Plan) { p.Segments[1].BudgetS = math.Inf(1) }, "segments[1].budget_s"},
		{"negative speed", func(p *planner.Plan) { p.Conditions[0].SpeedNMPerS = -10 }, "conditions[0].speed_nm_per_s"},
		{"stroke in wrong segment", func(p *planner.Plan) { p.Strokes[0].Segment = 2 }, "segments[0].strokes[0]"},
		{"write without stroke", func(p *planner.Plan) {
			for i := range p.Actions {
				if p.Actions[i].Kind == planner.ActWrite {
					p.Actions[i].Stroke = -1
					return
				}
			}
		}, ".stroke"},
	}
	for _, tc := range cases {
		t.Run(tc.name, func(t *testing.T) {
			p := planfixture.SET().Plan
			tc.edit(p)
			for _, w := range []struct {
				name string
				fn   func() error
			}{
				{"json", func() error { return WritePlanJSON(&bytes.Buffer{}, p, "") }},
				{"csv", func() error { return WriteActionsCSV(&bytes.Buffer{}, p) }},
				{"svg", func() error { return WriteSVG(&bytes.Buffer{}, p, Options{}) }},
			} {
				err := w.fn()
				if !errors.Is(err, ErrInvalid) || !strings.Contains(err.Error(), tc.field) {
					t.Errorf("%s: error %v, want ErrInvalid naming %s", w.name, err, tc.field)
				}
			}
		})
	}
}

func TestActionsCSVMatchesJSON(t *testing.T) {
	for name, p := range testPlans(t) {
		t.Run(name, func(t *testing.T) {
			var js, cs bytes.Buffer
			if err := WritePlanJSON(&js, p, ""); err != nil {
				t.Fatal(err)
			}
			if err := WriteActionsCSV(&cs, p); err != nil {
				t.Fatal(err)
			}
			var f planFile
			if err := json.Unmarshal(js.Bytes(), &f); err != nil {
				t.Fatal(err)
			}
			rows, err := csv.NewReader(&cs).ReadAll()
			if err != nil {
				t.Fatal(err)
			}
			if !slices.Equal(rows[0], ActionColumns) {
				t.Fatalf("header %v, want %v", rows[0], ActionColumns)
			}
			rows = rows[1:]
			if len(rows) != len(f.Actions) {
				t.Fatalf("%d CSV rows, %d JSON actions", len(rows), len(f.Actions))
			}
			col := map[string]int{}
			for i, c := range ActionColumns {
				col[c] = i
			}
			for i, a := range f.Actions {
				r := rows[i]
				get := func(c string) string { return r[col[c]] }
				num := func(c string) float64 {
					if get(c) == "" {
						return 0
					}
					v, err := strconv.ParseFloat(get(c), 64)
					if err != nil {
						t.Fatalf("row %d %s: %v", i, c, err)
					}
					return v
				}
				checks := []struct {
					c        string
					got, was any
				}{
					{"index", get("index"), strconv.Itoa(a.Index)},
					{"kind", get("kind"), a.Kind},
					{"segment", get("segment"), strconv.Itoa(a.Segment)},
					{"stroke", get("stroke"), strconv.Itoa(a.Stroke)},
					{"mode", get("mode"), a.Mode},
					{"fiducial", get("fiducial"), a.Fiducial},
					{"note", get("note"), a.Note},
					{"from", [2]float64{num("from_x_nm"), num("from_y_nm")}, [2]float64(a.FromNM)},
					{"to", [2]float64{num("to_x_nm"), num("to_y_nm")}, [2]float64(a.ToNM)},
					{"start_s", num("start_s"), a.StartS},
					{"duration_s", num("duration_s"), a.DurationS},
					{"bias_v", num("bias_v"), a.BiasV},
					{"current_a", num("current_a"), a.CurrentA},
					{"speed", num("speed_nm_per_s"), a.SpeedNMPS},
				}
				if a.Stroke >= 0 {
					s := f.Strokes[a.Stroke]
					checks = append(checks, struct {
						c        string
						got, was any
					}{"region", get("region"), s.Region})
					if a.Kind == "write" || a.Kind == "dwell" {
						var path []xy
						for _, pair := range strings.Split(get("path_nm"), ";") {
							x, y, _ := strings.Cut(pair, " ")
							fx, _ := strconv.ParseFloat(x, 64)
							fy, _ := strconv.ParseFloat(y, 64)
							path = append(path, xy{fx, fy})
						}
						checks = append(checks, struct {
							c        string
							got, was any
						}{"path_nm", path, s.PathNM}, struct {
							c        string
							got, was any
						}{"passes", get("passes"), strconv.Itoa(s.Passes)})
					}
				}
				for _, ck := range checks {
					if !reflect.DeepEqual(ck.got, ck.was) {
						t.Errorf("row %d %s = %v, JSON action has %v", i, ck.c, ck.got, ck.was)
					}
				}
			}
		})
	}
}

func FuzzReadPlanJSON(f *testing.F) {
	// Small seeds: the fuzzer minimises every new input, which takes long
	// for a large file.
	for _, p := range []*planner.Plan{emptyPlan(), planfixture.Large(3, 3)} {
		var buf bytes.Buffer
		if err := WritePlanJSON(&buf, p, "fuzz"); err != nil {
			f.Fatal(err)
		}
		f.Add(buf.Bytes())
	}
	f.Add([]byte(`{"format":"dimerpath-plan","version":1}`))
	f.Add([]byte(`{"format":"dimerpath-plan","version":1,"strokes":[{"id":0,"path_nm":[]}]}`))
	f.Fuzz(func(t *testing.T, data []byte) {
		p, err := ReadPlanJSON(bytes.NewReader(data))
		if err != nil {
			if _, ok := errors.AsType[*jsonfile.Error](err); !ok {
				t.Fatalf("error %v is not a *jsonfile.Error", err)
			}
			return
		}
		// Whatever the reader accepts, the writers write and the reader
		// reads back the same.
		var buf bytes.Buffer
		if err := WritePlanJSON(&buf, p, ""); err != nil {
			t.Fatalf("accepted plan does not write: %v", err)
		}
		q, err := ReadPlanJSON(&buf)
		if err != nil {
			t.Fatalf("written plan does not read back: %v", err)
		}
		if !reflect.DeepEqual(normalised(p), normalised(q)) {
			t.Fatal("round trip changed the plan")
		}
		for _, w := range []func() error{
			func() error { return WriteActionsCSV(&bytes.Buffer{}, p) },
			func() error { return WriteSVG(&bytes.Buffer{}, p, Options{}) },
			func() error { return WritePDF(context.Background(), &bytes.Buffer{}, p, Options{}) },
		} {
			if err := w(); err != nil {
				t.Fatalf("accepted plan does not export: %v", err)
			}
		}
	})
}
