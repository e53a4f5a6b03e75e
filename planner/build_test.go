package planner

import (
	"context"
	"errors"
	"fmt"
	"math"
	"reflect"
	"strings"
	"testing"

	"dimerpath/internal/jsonfile"
	"dimerpath/lattice/design"
)

func buildTest(t testing.TB, d *design.Design, variant string) (*Plan, error) {
	t.Helper()
	return buildVariant(context.Background(), d, variant, DefaultProfile(), Options{Seed: 7, MonteCarloRuns: 200})
}

func TestBuildDemoInvariants(t *testing.T) {
	d := demo(t)
	p, err := buildTest(t, d, "")
	if err != nil {
		t.Fatal(err)
	}
	// The breakdown sums exactly to the total.
	if p.Breakdown.Total() != p.TotalS {
		t.Errorf("breakdown sums to %v, total %v", p.Breakdown.Total(), p.TotalS)
	}
	// Actions cover the plan without gaps and end at the schedule's end;
	// the total is the Monte Carlo mean, which adds the expected tip
	// changes to it and the samples' mean departures of the repairs (the
	// missed sites, Poisson with the exposure model's expectation) and the
	// dwells from their scheduled times.
	clock, scheduledRepair, scheduledDwell := 0.0, 0.0, 0.0
	seen := map[int]int{}
	for i, a := range p.Actions {
		if a.Index != i || math.Abs(a.StartS-clock) > 1e-9*math.Max(clock, 1) || a.DurationS < 0 {
			t.Fatalf("action %d starts at %v, want %v", i, a.StartS, clock)
		}
		clock += a.DurationS
		switch a.Kind {
		case ActRepair:
			scheduledRepair += a.DurationS
		case ActDwell:
			scheduledDwell += a.DurationS
		}
		if a.Kind == ActWrite || a.Kind == ActDwell {
			seen[a.Stroke]++
			if p.Strokes[a.Stroke].Segment != a.Segment {
				t.Errorf("stroke %d written in segment %d, stroke says %d", a.Stroke, a.Segment, p.Strokes[a.Stroke].Segment)
			}
		}
	}
	sampled := p.Breakdown.TipChangeS + (p.Breakdown.RepairS - scheduledRepair) + (p.Breakdown.DwellS - scheduledDwell)
	if math.Abs(clock-p.ScheduleS) > 1e-6*p.ScheduleS || math.Abs(p.TotalS-p.ScheduleS-sampled) > 1e-6*p.TotalS {
		t.Errorf("actions end at %v, schedule %v, total %v with %v s of tip changes, repairs and dwells beyond the schedule", clock, p.ScheduleS, p.TotalS, sampled)
	}
	// Every stroke is written exactly once.
	for _, s := range p.Strokes {
		if seen[s.ID] != 1 {
			t.Errorf("stroke %d written %d times", s.ID, seen[s.ID])
		}
	}
	// Within a lithography step the segments tile its time; each starts
	// with its registration: coarse at its fiducial, or local beside its
	// first stroke.
	for _, st := range p.Steps {
		for k, i := range st.Segments {
			g := p.Segments[i]
			if k > 0 && g.StartS != p.Segments[i-1].EndS {
				t.Errorf("segment %d starts at %v, previous ends at %v", i, g.StartS, p.Segments[i-1].EndS)
			}
			if g.Registration == RegCoarse && g.Fiducial == "" || len(g.Strokes) == 0 || g.Reason == "" {
				t.Errorf("segment %d: %+v", i, g)
			}
			if g.Registration == RegLocal && g.FiducialAt != p.Strokes[g.Strokes[0]].Path[0] {
				t.Errorf("segment %d registers locally at %v, its first stroke starts at %v", i, g.FiducialAt, p.Strokes[g.Strokes[0]].Path[0])
			}
		}
	}
	// The plan holds its tolerances with the profile's probability, or
	// says it does not.
	if level := DefaultProfile().Session.PInToleranceMin; p.PInTolerance < level && !strings.Contains(strings.Join(p.Warnings, " "), "for the whole write") {
		t.Errorf("P(within tolerance) %v below %v without a warning", p.PInTolerance, level)
	}
	if !(p.P10S <= p.P50S && p.P50S <= p.P90S) {
		t.Errorf("P10 %v P50 %v P90 %v", p.P10S, p.P50S, p.P90S)
	}
	if !(p.FloorS > 0 && p.FloorS < p.TotalS) || !(p.ByHandS >= p.TotalS*0.99) {
		t.Errorf("floor %v, total %v, by hand %v", p.FloorS, p.TotalS, p.ByHandS)
	}
	// The demo's two windows: P 0.63 (Ivie 2021) and As 0.97 (Stock 2024),
	// each times the probability that its window opens as drawn, which the
	// AP line gives a few per cent short of 1.
	all := 1.0
	for _, w := range p.Windows {
		if want := map[string]float64{"P": 0.63, "As": 0.97}[w.Species]; w.P1 != want || w.OpenProbability < 0.85 || w.OpenProbability >= 1 ||
			math.Abs(w.Probability-w.OpenProbability*w.P1) > 1e-15 {
			t.Errorf("window %+v: want p1 %v, opened as drawn with 0.85–1", w, want)
		}
		all *= w.Probability
	}
	if len(p.Windows) != 2 || math.Abs(p.Yield.All-all) > 1e-15 {
		t.Errorf("windows %+v, P(all) %v, want %v", p.Windows, p.Yield.All, all)
	}
	// The demo's AP regions hold whole dimers and its windows are written
	// as lines (window_style line), so no stroke is a single-site dwell.
	for _, s := range p.Strokes {
		if s.Kind == StrokeDwell {
			t.Errorf("stroke %d of region %q is a dwell at %v", s.ID, s.Region, s.Path[0])
			break
		}
	}
	if len(p.Modes) != len(d.Variants[0].Regions) {
		t.Errorf("%d modes for %d regions", len(p.Modes), len(d.Variants[0].Regions))
	}
}

func TestBuildDeterministic(t *testing.T) {
	d := demo(t)
	a, err := buildTest(t, d, "")
	if err != nil {
		t.Fatal(err)
	}
	b, _ := buildTest(t, d, "")
	if a.TotalS != b.TotalS || a.P50S != b.P50S || !reflect.DeepEqual(a.Segments, b.Segments) {
		t.Errorf("same seed, different plans: %v vs %v", a.TotalS, b.TotalS)
	}
}

func TestBuildRefusesBeyondLimits(t *testing.T) {
	d := demo(t)
	prof := DefaultProfile()
	prof.FE.BiasV = 11
	_, err := buildVariant(context.Background(), d, "", prof, Options{})
	var le *LimitError
	if !errors.As(err, &le) || le.Quantity != "fe.bias_v" || le.Max != 10 {
		t.Errorf("Build with FE at 11 V = %v, want a LimitError naming fe.bias_v and 10 V", err)
	}
	// A variant without FE work does not need the FE limits.
	ap := testDesign(200, 200, design.Region{Name: "wire", Role: design.RoleDevice, Mode: design.ModeAP, Shapes: []design.Shape{rect(50, 50, 80, 52)}})
	if _, err := buildVariant(context.Background(), ap, "", prof, Options{}); err != nil {
		t.Errorf("AP-only plan refused for an FE limit: %v", err)
	}
	prof = DefaultProfile()
	prof.Limits.ScanFieldNM = 1000
	if _, err := buildVariant(context.Background(), d, "", prof, Options{}); !errors.As(err, &le) || le.Limit != "limits.scan_field_nm" {
		t.Errorf("2 µm field with a 1 µm scan limit: %v", err)
	}
	prof = DefaultProfile()
	prof.MoveSpeedNMPerS = math.NaN()
	var pe *jsonfile.Error
	if _, err := buildVariant(context.Background(), d, "", prof, Options{}); !errors.As(err, &pe) {
		t.Errorf("NaN move speed: %v, want a *jsonfile.Error", err)
	}
}

func TestBuildCancelled(t *testing.T) {
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if _, err := buildVariant(ctx, demo(t), "", DefaultProfile(), Options{}); !errors.Is(err, context.Canceled) {
		t.Errorf("Build on a cancelled context = %v", err)
	}
}

func TestModeChoice(t *testing.T) {
	cases := []struct {
		name   string
		region design.Region
		want   design.Mode
	}{
		{"narrow lead", design.Region{Name: "x", Role: design.RoleLead, Shapes: []design.Shape{rect(100, 100, 300, 106)}}, design.ModeAP},
		{"wide pad", design.Region{Name: "x", Role: design.RolePad, Shapes: []design.Shape{rect(100, 100, 400, 400)}}, design.ModeFE},
		{"wide pad, tight tolerance", design.Region{Name: "x", Role: design.RolePad, ToleranceNM: 0.5, Shapes: []design.Shape{rect(100, 100, 400, 400)}}, design.ModeHybrid},
		{"device", design.Region{Name: "x", Role: design.RoleDevice, Shapes: []design.Shape{rect(100, 100, 400, 400)}}, design.ModeAP},
		{"windows", design.Region{Name: "x", Role: design.RoleOther, Shapes: []design.Shape{{Kind: design.ShapeWindow, Template: "P", Points: [][2]float64{{200, 200}}}}}, design.ModeAP},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			// A drawn-FE neighbour far away, so the mode switch is paid
			// anyway.
			d := testDesign(600, 600, c.region, design.Region{Name: "far-pad", Role: design.RolePad, Mode: design.ModeFE, Shapes: []design.Shape{rect(500, 500, 560, 560)}})
			p, err := buildTest(t, d, "")
			if err != nil {
				t.Fatal(err)
			}
			if m := p.Modes[0]; m.Mode != c.want || m.Reason == "" {
				t.Errorf("mode %q (%s), want %q", m.Mode, m.Reason, c.want)
			}
			if !p.Coverage.OK {
				t.Errorf("coverage %+v", p.Coverage)
			}
		})
	}
}

func TestModeKeepOut(t *testing.T) {
	// A wide pad 3 nm from an AP wire: inside the 5 nm keep-out (design
	// rules default), so auto gives the pad an AP edge band (hybrid).
	wire := design.Region{Name: "wire", Role: design.RoleDevice, Mode: design.ModeAP, Shapes: []design.Shape{rect(100, 80, 300, 84)}}
	pad := design.Region{Name: "pad", Role: design.RolePad, Shapes: []design.Shape{rect(100, 87, 300, 300)}}
	p, err := buildTest(t, testDesign(400, 400, wire, pad), "")
	if err != nil {
		t.Fatal(err)
	}
	if m := p.Modes[1]; m.Mode != design.ModeHybrid {
		t.Errorf("pad near an AP wire: %q (%s), want hybrid", m.Mode, m.Reason)
	}
	// Drawn FE there is honoured, with a warning.
	pad.Mode = design.ModeFE
	p, err = buildTest(t, testDesign(400, 400, wire, pad), "")
	if err != nil {
		t.Fatal(err)
	}
	if p.Modes[1].Mode != design.ModeFE || len(p.Warnings) == 0 {
		t.Errorf("drawn FE: mode %q, warnings %v", p.Modes[1].Mode, p.Warnings)
	}
}

func TestFEFillTimeByHand(t *testing.T) {
	// Rudolph et al. 2014: ≳10^4 nm²/s in FE; by hand, 1 µm² at 10^4 nm²/s
	// takes 100 s. At the default pitch (9 nm) and 1000 nm/s the fill of a
	// 1 µm square runs 1000 nm lines 9 nm apart: 1 µm² / (speed × pitch),
	// within 3 % (the fence post, the insets and the turns).
	prof := DefaultProfile()
	d := testDesign(1200, 1200, design.Region{Name: "pad", Role: design.RolePad, Mode: design.ModeFE, Shapes: []design.Shape{rect(100, 100, 1100, 1100)}})
	lay, _ := layRegions(t, d)
	g := newStrokeGen(lay.Surface, &prof)
	fill := strokesTime(g.feStrokes("pad", lay.Regions[0].Sites))
	byHand := 1e6 / (prof.FE.Speed() * prof.FEPitch())
	if byHand < 90 || byHand > 125 || math.Abs(fill-byHand) > 0.03*byHand {
		t.Errorf("FE fill of 1 µm² takes %.1f s, by hand %.1f s", fill, byHand)
	}
}

func TestLongStrokeSplitAtRegistration(t *testing.T) {
	// A 1500 nm AP line (one row: its two H sites lie at 99.67 and
	// 100.03 nm) takes 150 s at 10 nm/s, beyond its drift budget after a
	// local registration at the planned values ((±0.2 nm − z·σ) / the
	// planned rate: DriftBudget by hand): split into as many pieces as
	// that budget needs, with a warning.
	d := testDesign(1800, 200, design.Region{Name: "wire", Role: design.RoleDevice, Mode: design.ModeAP, Shapes: []design.Shape{rect(100, 99.5, 1600, 100.2)}})
	p, err := buildTest(t, d, "")
	if err != nil {
		t.Fatal(err)
	}
	m, _ := planModel(&[]Profile{DefaultProfile()}[0])
	budget := DriftBudget(0.2, m.errLocal, 0, m.r0*m.rateMul)
	want := int(math.Ceil(150 / budget))
	if budget <= 0 || budget >= 150 || len(p.Strokes) != want || len(p.Segments) < want || !strings.Contains(strings.Join(p.Warnings, " "), fmt.Sprintf("split into %d pieces", want)) {
		t.Errorf("%d strokes in %d segments, warnings %v; want the line in %d pieces (budget %.1f s), each in a segment", len(p.Strokes), len(p.Segments), p.Warnings, want, budget)
	}
	for _, s := range p.Strokes {
		if s.DurationS > budget+1e-9 {
			t.Errorf("a piece takes %.1f s, beyond the %.1f s budget", s.DurationS, budget)
		}
	}
	if !p.Coverage.OK {
		t.Errorf("split line: coverage %+v", p.Coverage)
	}
}

// A tolerance the registration error nearly uses up makes every stroke
// of the island fail alike; the plan says so once per region, naming
// the strokes, not once per stroke (the demo printed 60 such lines).
func TestStrokeWarningsOncePerRegion(t *testing.T) {
	prof := DefaultProfile()
	prof.Registration.Local.ErrorNM = 0.12
	p, err := buildVariant(context.Background(), demo(t), "", prof, Options{Seed: 7, MonteCarloRuns: 200})
	if err != nil {
		t.Fatal(err)
	}
	seen := map[string]string{}
	held := 0
	for _, w := range p.Warnings {
		var kind string
		switch {
		case strings.Contains(w, "cannot be held within"):
			kind = "held"
			held++
		case strings.Contains(w, "at registrations"):
			kind = "split"
		default:
			continue
		}
		region := w[strings.Index(w, "region \"")+8:]
		region = region[:strings.Index(region, "\"")]
		if prev, ok := seen[kind+region]; ok {
			t.Errorf("region %s warned twice:\n%s\n%s", region, prev, w)
		}
		seen[kind+region] = w
	}
	if held == 0 || !strings.Contains(seen["heldsensor-island"], "strokes of region \"sensor-island\" (ids ") {
		t.Errorf("no grouped warning for the island's strokes: %q", p.Warnings)
	}
}
