package planner

import (
	"context"
	"errors"
	"math"
	"strings"
	"testing"

	"dimerpath/internal/jsonfile"
	"dimerpath/lattice"
	"dimerpath/lattice/design"
)

// TestStepsFollowTheChemistry checks the demo's process against the
// chemistry of hydrogen-resist lithography: an open dangling-bond window
// takes whichever precursor reaches it (Schofield et al., PRL 91, 136104
// (2003): the precursor adsorbs on the depassivated sites; one species per
// lithography step is common practice), so each species is written in its
// own lithography step, dosed and annealed before the next is written; no
// other species' dose falls between a window's write and its own dose;
// windows come last in their step; the tip is conditioned after
// field-emission work.
func TestStepsFollowTheChemistry(t *testing.T) {
	p, err := buildTest(t, demo(t), "")
	if err != nil {
		t.Fatal(err)
	}
	var kinds []string
	for _, st := range p.Steps {
		kinds = append(kinds, string(st.Kind)+":"+st.Species)
	}
	want := "survey: lithography:As dose:As anneal:As reregister:P lithography:P dose:P anneal:P documentation:"
	if got := strings.Join(kinds, " "); got != want {
		t.Fatalf("steps %s\nwant  %s", got, want)
	}
	stepAt := func(tm float64) int {
		for i, st := range p.Steps {
			if tm >= st.StartS && tm < st.StartS+st.DurationS {
				return i
			}
		}
		return -1
	}
	for _, a := range p.Actions {
		if a.Kind != ActWrite && a.Kind != ActDwell {
			continue
		}
		s := p.Strokes[a.Stroke]
		st := p.Steps[stepAt(a.StartS)]
		if st.Kind != StepLithography {
			t.Fatalf("stroke %d written in a %s step", s.ID, st.Kind)
		}
		if s.Window >= 0 {
			w := p.Windows[s.Window]
			if st.Species != w.Species {
				t.Errorf("a %s window written in the %s step", w.Species, st.Species)
			}
			// Every dose between its write and its own is its own.
			end := a.StartS + a.DurationS
			for _, d := range p.Steps {
				if d.Kind == StepDose && d.StartS >= end {
					if d.Species != w.Species {
						t.Errorf("a %s window is open during the %s dose", w.Species, d.Species)
					}
					if math.Abs(end+w.OpenS-d.StartS) > 1e-6 {
						t.Errorf("window open %v s, its dose starts %v s after its write", w.OpenS, d.StartS-end)
					}
					break
				}
			}
		}
	}
	// Windows last in their step (a stroke coupled to a window is
	// written with it).
	for _, st := range p.Steps {
		if st.Kind != StepLithography {
			continue
		}
		windowSeen := false
		for _, a := range p.Actions {
			if (a.Kind != ActWrite && a.Kind != ActDwell) || stepAt(a.StartS) < 0 || p.Steps[stepAt(a.StartS)].StartS != st.StartS {
				continue
			}
			s := p.Strokes[a.Stroke]
			if s.Window >= 0 {
				windowSeen = true
			} else if windowSeen && !isCoupledToWindow(p, s.ID) {
				t.Errorf("step %s: stroke %d of %s written after a window", st.Species, s.ID, s.Region)
			}
		}
	}
	// The tip is conditioned after field-emission work.
	conditioned := 0
	for i, a := range p.Actions {
		if a.Kind == ActSwitch && a.Mode == design.ModeAP && i+1 < len(p.Actions) && p.Actions[i+1].Kind == ActCondition {
			conditioned++
		}
	}
	if conditioned == 0 {
		t.Error("the tip is never conditioned after field-emission work")
	}
	// Anneals follow doses, a reregister precedes every later lithography.
	for i, st := range p.Steps {
		if st.Kind == StepDose && (i+1 >= len(p.Steps) || p.Steps[i+1].Kind != StepAnneal || p.Steps[i+1].Species != st.Species) {
			t.Errorf("dose %s is not followed by its anneal", st.Species)
		}
	}
}

// isCoupledToWindow reports whether stroke id is one of a coupling that
// also holds a window stroke (written with the window, after it).
func isCoupledToWindow(p *Plan, id int) bool {
	for _, c := range p.Couplings {
		has, win := false, false
		for _, s := range c.Strokes {
			has = has || s == id
			win = win || p.Strokes[s].Window >= 0
		}
		if has && win {
			return true
		}
	}
	return false
}

// TestSessionTimeAgainstPublishedRates checks the writing parts of the
// session time against the published working points: AP lines at +4 V,
// 2 nA and 2 mC/cm go 10 nm/s (Schmucker et al., Nat. Commun. 3 (2012)),
// and field emission fills about 10^4 nm²/s (Rudolph et al., APL 2014;
// the default's 9·10^3 nm²/s, its lines overlapping by 10 %, within a
// factor 1.5).
func TestSessionTimeAgainstPublishedRates(t *testing.T) {
	p, err := buildTest(t, demo(t), "")
	if err != nil {
		t.Fatal(err)
	}
	apLength, feSites := 0.0, 0
	for _, s := range p.Strokes {
		if s.Mode == design.ModeAP && s.Kind != StrokeDwell {
			apLength += s.LengthNM * float64(max(s.Passes, 1))
		}
		if s.Mode == design.ModeFE && s.Kind == StrokeRaster {
			feSites += s.Sites
		}
	}
	if got := apLength / p.Breakdown.APWriteS; math.Abs(got-10) > 1e-9 {
		t.Errorf("AP lines written at %v nm/s, Schmucker 2012: 10 nm/s", got)
	}
	area := float64(feSites) / lattice.HDensity
	if rate := area / p.Breakdown.FEWriteS; rate < 1e4/1.5 || rate > 1e4*1.5 {
		t.Errorf("FE fills %.0f nm²/s, Rudolph 2014: ~10^4 nm²/s", rate)
	}
	// The session is hours: the parts around the writing dominate.
	if p.TotalS < 2*3600 || p.FloorS > 0.1*p.TotalS {
		t.Errorf("session %v s, writing alone %v s", p.TotalS, p.FloorS)
	}
}

// TestCoupledPairsShareADriftWindow checks §4 on the demo: each tunnel
// gap's facing strokes are written one after the other in one segment;
// a coupling across steps makes the later side's segment register
// locally on the earlier side.
func TestCoupledPairsShareADriftWindow(t *testing.T) {
	d := demo(t)
	d.Variants[0].Couplings = []design.Coupling{{A: "donor-P", B: "donor-As", ToleranceNM: 0.3}}
	p, err := buildTest(t, d, "")
	if err != nil {
		t.Fatal(err)
	}
	if len(p.Couplings) != 3 {
		t.Fatalf("couplings %+v, want the two tunnel gaps and the declared pair", p.Couplings)
	}
	order := map[int]int{}
	k := 0
	for _, a := range p.Actions {
		if a.Kind == ActWrite || a.Kind == ActDwell {
			order[a.Stroke] = k
			k++
		}
	}
	for _, c := range p.Couplings {
		if len(c.Strokes) != 2 || c.PInTolerance < 0 || c.PInTolerance > 1 {
			t.Errorf("coupling %+v", c)
			continue
		}
		a, b := p.Strokes[c.Strokes[0]], p.Strokes[c.Strokes[1]]
		if c.Kind == CoupledGap {
			if !c.SameStep || a.Segment != b.Segment || math.Abs(float64(order[a.ID]-order[b.ID])) != 1 {
				t.Errorf("tunnel gap %s/%s: strokes %d and %d at %d and %d in segments %d and %d", c.A, c.B, a.ID, b.ID, order[a.ID], order[b.ID], a.Segment, b.Segment)
			}
			if c.ToleranceNM != lattice.RowSpacing/2 {
				t.Errorf("tunnel gap tolerance %v, want half a row spacing", c.ToleranceNM)
			}
			continue
		}
		later := a
		if b.Segment > a.Segment {
			later = b
		}
		if c.SameStep || p.Segments[later.Segment].Registration != RegLocal || !strings.Contains(p.Segments[later.Segment].Reason, "registers on") {
			t.Errorf("cross-step coupling: later segment %+v", p.Segments[later.Segment])
		}
		if later.ToleranceNM > 0.3 {
			t.Errorf("the later window holds ±%v nm, not the coupling's ±0.3 nm", later.ToleranceNM)
		}
	}
}

// TestSessionBadInput checks the refusals and warnings of issue 11.
func TestSessionBadInput(t *testing.T) {
	// A region without dopant naming a step no species of the variant
	// takes: an error naming the field and value.
	d := testDesign(600, 600,
		design.Region{Name: "wire", Role: design.RoleDevice, Mode: design.ModeAP, Shapes: []design.Shape{rect(100, 99.5, 200, 100.2)}},
		design.Region{Name: "mark", Role: design.RoleOther, Mode: design.ModeAP, Species: design.NoDopant, LithographyStep: "As",
			Shapes: []design.Shape{rect(300, 99.5, 320, 100.2)}})
	_, err := buildTest(t, d, "")
	if err == nil || !strings.Contains(err.Error(), `variants[0].regions[1].lithography_step = "As"`) || !strings.Contains(err.Error(), "steps: P") {
		t.Errorf("a step no species takes: %v", err)
	}
	// Named none: the first step, with a warning when there are several.
	d.Variants[0].Regions[1].LithographyStep = ""
	d.Variants[0].Regions = append(d.Variants[0].Regions, design.Region{Name: "as", Role: design.RoleDonor, Mode: design.ModeAP, Species: "As",
		Shapes: []design.Shape{{Kind: design.ShapeWindow, Template: "As", Points: [][2]float64{{400, 300}}}}})
	p, err := buildTest(t, d, "")
	if err != nil {
		t.Fatal(err)
	}
	if w := strings.Join(p.Warnings, "\n"); !strings.Contains(w, `region "mark" receives no dopant and names no lithography_step: written in the first step (As)`) {
		t.Errorf("warnings %s", w)
	}
	// A species order naming a species no template has: a warning.
	prof := DefaultProfile()
	prof.Process.SpeciesOrder = []string{"Sb", "P"}
	p, err = buildVariant(context.Background(), d, "", prof, Options{Seed: 1, MonteCarloRuns: 50})
	if err != nil {
		t.Fatal(err)
	}
	w := strings.Join(p.Warnings, "\n")
	if !strings.Contains(w, `process.species_order[0] = "Sb": no window template of the design has this species; ignored`) ||
		!strings.Contains(w, "species As not in the profile's process.species_order: assumed written after P") {
		t.Errorf("warnings %s", w)
	}
	// An anneal or dose with a negative or non-finite time: the profile
	// names the field.
	for _, c := range []struct {
		edit func(*Profile)
		path string
	}{
		{func(p *Profile) { p.Process.Anneal.TimeS = -1 }, "process.anneal.time_s"},
		{func(p *Profile) { p.Process.Anneal.CooldownS = math.Inf(1) }, "process.anneal.cooldown_s"},
		{func(p *Profile) { p.Process.Dose.PumpdownS = math.NaN() }, "process.dose.pumpdown_s"},
		{func(p *Profile) { p.Process.Dose.ExposureL = -2 }, "process.dose.exposure_l"},
		{func(p *Profile) { p.Session.PInToleranceMin = 1 }, "session.p_in_tolerance_min"},
	} {
		prof := DefaultProfile()
		c.edit(&prof)
		var je *jsonfile.Error
		if err := prof.Validate(); !errors.As(err, &je) || !strings.Contains(err.Error(), c.path) {
			t.Errorf("%s: Validate = %v", c.path, err)
		}
	}
	// A tolerance smaller than the registration error can ever hold.
	d = testDesign(600, 600, design.Region{Name: "wire", Role: design.RoleDevice, Mode: design.ModeAP, ToleranceNM: 0.03,
		Shapes: []design.Shape{rect(100, 99.5, 200, 100.2)}})
	if _, err := buildTest(t, d, ""); err == nil || !strings.Contains(err.Error(), "variants[0].regions[0].tolerance_nm = 0.03 nm") ||
		!strings.Contains(err.Error(), "registration.local.error_nm") {
		t.Errorf("a tolerance below the registration error: %v", err)
	}
}

// TestPlanHoldsTheLevel checks that the demo's plan stays within
// tolerance with at least the profile's probability, and that a profile
// that cannot gets a warning naming the segment and what would help.
func TestPlanHoldsTheLevel(t *testing.T) {
	p, err := buildTest(t, demo(t), "")
	if err != nil {
		t.Fatal(err)
	}
	if level := DefaultProfile().Session.PInToleranceMin; p.PInTolerance < level {
		t.Errorf("P(within tolerance) = %v, below %v", p.PInTolerance, level)
	}
	for _, g := range p.Segments {
		if g.PInTolerance < p.PInTolerance-1e-9 || g.Tightest < 0 {
			t.Errorf("segment %d: P %v below the whole write's %v, tightest %d", g.Index, g.PInTolerance, p.PInTolerance, g.Tightest)
		}
	}
	// A coarse error that eats the FE tolerance: warnings name segments.
	// FE work alone, so that every FE stroke needs a fiducial (in the
	// demo, an FE stroke written after the atomic-precision features
	// beside it registers on an image of them, so whether a segment
	// falls short there depends on the route's order).
	prof := DefaultProfile()
	prof.Registration.CoarseErrorNM = 1.2
	prof.ToleranceFENM = 2
	fe := testDesign(600, 600, design.Region{Name: "pads", Role: design.RoleLead, Mode: design.ModeFE, ToleranceNM: 2,
		Shapes: []design.Shape{rect(200, 200, 260, 230), rect(300, 300, 330, 360)}})
	p, err = buildVariant(context.Background(), fe, "", prof, Options{Seed: 1, MonteCarloRuns: 300})
	if err != nil {
		t.Fatal(err)
	}
	w := strings.Join(p.Warnings, "\n")
	if !strings.Contains(w, "P(every stroke within tolerance) =") || !strings.Contains(w, "what would help:") {
		t.Errorf("no segment warning: %s", w)
	}
}

// Every action of the demo's session lies inside one process step, so
// the action list and the CSV's step column leave none outside (the
// move to the first fiducial fell between the survey and the first
// lithography step).
func TestEveryActionInAStep(t *testing.T) {
	p, err := buildTest(t, demo(t), "")
	if err != nil {
		t.Fatal(err)
	}
	const eps = 1e-9
	k := 0
	for _, a := range p.Actions {
		for k < len(p.Steps) && a.StartS >= p.Steps[k].StartS+p.Steps[k].DurationS-eps && a.DurationS > 0 {
			k++
		}
		if k == len(p.Steps) || a.StartS < p.Steps[k].StartS-eps || a.StartS+a.DurationS > p.Steps[k].StartS+p.Steps[k].DurationS+eps {
			t.Fatalf("action %d (%s at %.3f s for %.3f s: %s) lies in no step", a.Index, a.Kind, a.StartS, a.DurationS, a.Note)
		}
	}
}

// RegistrationReasons covers every segment once, under its own kind and
// reason, in the order of each group's first segment.
func TestRegistrationReasonsCoverEverySegment(t *testing.T) {
	p, err := buildTest(t, demo(t), "")
	if err != nil {
		t.Fatal(err)
	}
	rs := p.RegistrationReasons()
	seen := make([]int, len(p.Segments))
	first := -1
	for _, r := range rs {
		if r.Segments[0] <= first {
			t.Errorf("group %q starts at segment %d, after a group starting at %d", r.Reason, r.Segments[0], first)
		}
		first = r.Segments[0]
		for _, g := range r.Segments {
			seen[g]++
			if s := p.Segments[g]; s.Registration != r.Kind || s.Reason != r.Reason || r.Reason == "" {
				t.Errorf("segment %d (%s: %q) grouped under %s: %q", g, s.Registration, s.Reason, r.Kind, r.Reason)
			}
		}
	}
	for g, n := range seen {
		if n != 1 {
			t.Errorf("segment %d in %d groups", g, n)
		}
	}
	if len(rs) < 2 || len(rs) >= len(p.Segments) {
		t.Errorf("%d reasons for %d segments: want the demo's few kinds of reason grouped", len(rs), len(p.Segments))
	}
}
