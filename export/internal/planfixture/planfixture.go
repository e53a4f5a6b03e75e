// Package planfixture builds synthetic write plans for the export tests,
// examples and benchmarks. They are test fixtures: the geometry sits on
// the real lattice and the timelines are self-consistent (every action
// starts when the previous one ends, the breakdown sums to the total),
// but the numbers are not the planner's physics. The device is invented
// for these tests (the fictional "Kestrel Lab" SET-K1).
package planfixture

import (
	"cmp"
	"fmt"
	"math"
	"math/rand/v2"
	"slices"

	"github.com/golang/geo/r2"

	"dimerpath/lattice"
	"dimerpath/lattice/design"
	"dimerpath/planner"
)

// Region is one region of a fixture device with its lattice sites.
type Region struct {
	Name  string
	Role  design.Role
	Mode  design.Mode // ap, fe or hybrid
	Sites *lattice.SiteSet
}

// Device is a fixture design with its plan.
type Device struct {
	Surface *lattice.Surface
	Regions []Region
	Plan    *planner.Plan
}

// Tip conditions of the fixtures (AP: the +4 V, 2 nA, 2 mC/cm of
// Schmucker et al., Nat. Commun. 3 (2012), hence 10 nm/s; FE: inside the
// usual +7–10 V, 1–10 nA, from memory).
var (
	apConditions = planner.Conditions{Mode: design.ModeAP, Kind: planner.StrokeLine, BiasV: 4, CurrentA: 2e-9, LineDoseCPerCm: 2e-3,
		SpeedNMPerS: 10, LineWidthNM: 0.8, Passes: 2}
	feConditions = planner.Conditions{Mode: design.ModeFE, Kind: planner.StrokeRaster, BiasV: 8, CurrentA: 5e-9, LineDoseCPerCm: 5e-5,
		SpeedNMPerS: 1000, LineWidthNM: 4, Passes: 1, PitchNM: 3}
)

// dwellConditions are the AP conditions for parking on single sites.
var dwellConditions = planner.Conditions{Mode: design.ModeAP, Kind: planner.StrokeDwell, BiasV: dwellBiasV, CurrentA: dwellCurrentA,
	Passes: 1, DwellS: dwellS, DwellCapS: 3 * dwellS}

const (
	dwellBiasV     = 3.0 // the dwell conditions: see dwellConditions
	dwellCurrentA  = 1e-9
	dwellS         = 0.5
	moveSpeedNMPS  = 200
	settleS        = 2
	switchS        = 5
	registrationS  = 240
	verificationS  = 60
	conditionS     = 600
	surveyS        = 1200
	refindS        = 900
	doseS          = 800
	annealS        = 1860
	windowP        = 0.63 // Ivie et al. 2021, single-P 3-dimer window
	windowAs       = 0.97 // Stock et al. 2024, single As
	apBudgetS      = 120  // 0.2 nm / 0.1 nm/min
	feBudgetS      = 1200 // 2 nm / 0.1 nm/min
	fixtureDesign  = "Kestrel Lab SET-K1"
	fixtureProfile = "Kestrel RT-STM (fixture)"
)

// SET returns a small single-electron-transistor device on two terraces
// (the row direction turns at the step at x = 70 nm): an AP island with
// source, drain and gate leads, six donor windows, and three FE contact
// pads, written as a two-step session: a survey; the two arsenic windows
// (one segment), their dose and anneal; the rest with the four
// phosphorus windows last (four segments), their dose and anneal; a
// documentation image.
func SET() *Device {
	surf, err := lattice.NewSurface(120, 80,
		lattice.Terrace{Name: "T0", Rows: lattice.RowsAlongX,
			Boundary: []r2.Point{{X: 0, Y: 0}, {X: 70, Y: 0}, {X: 70, Y: 80}, {X: 0, Y: 80}}},
		lattice.Terrace{Name: "T1", Rows: lattice.RowsAlongY, Offset: r2.Point{X: 0.1, Y: 0.2}},
	)
	if err != nil {
		panic(err)
	}
	d := &Device{Surface: surf}
	b := newBuilder(fixtureDesign, "baseline", 120, 80)
	b.p.Fiducials = []planner.Fiducial{
		{Name: "F-SW", At: r2.Point{X: 4, Y: 4}}, {Name: "F-NW", At: r2.Point{X: 4, Y: 76}},
		{Name: "F-NE", At: r2.Point{X: 116, Y: 76}}, {Name: "F-SE", At: r2.Point{X: 116, Y: 4}},
	}

	addRegion := func(name string, role design.Role, mode design.Mode, reason string) *lattice.SiteSet {
		s := lattice.NewSiteSet()
		d.Regions = append(d.Regions, Region{Name: name, Role: role, Mode: mode, Sites: s})
		b.p.Modes = append(b.p.Modes, planner.RegionMode{Region: name, Role: role, Requested: "auto", Mode: mode, Reason: reason})
		return s
	}
	// AP lines: one stroke per row over dimers d0..d1, serpentine.
	apBlock := func(name string, set *lattice.SiteSet, rows [2]int, dimers [2]int) []int {
		var ids []int
		for i, r := 0, rows[0]; r <= rows[1]; i, r = i+1, r+1 {
			set.AddRun(0, r, 2*dimers[0], 2*(dimers[1]+1))
			a, z := surf.DimerCentre(0, r, dimers[0]), surf.DimerCentre(0, r, dimers[1])
			if i%2 == 1 {
				a, z = z, a
			}
			ids = append(ids, b.line(name, []r2.Point{a, z}, 2*(dimers[1]-dimers[0]+1)))
		}
		return ids
	}

	island := addRegion("island", "device", "ap", "tolerance ±0.2 nm needs atomic precision")
	source := addRegion("source", "lead", "ap", "within the FE keep-out of the island")
	drain := addRegion("drain", "lead", "ap", "within the FE keep-out of the island")
	gate := addRegion("gate", "gate", "ap", "narrower than the FE line width (4 nm)")
	donors := addRegion("donors", "donor", "ap", "dopant windows are written atom by atom")
	padS := addRegion("pad-S", "pad", "fe", "wide and ±2 nm tolerance: FE is 100x faster")
	padD := addRegion("pad-D", "pad", "fe", "wide and ±2 nm tolerance: FE is 100x faster")
	padG := addRegion("pad-G", "pad", "fe", "wide and ±2 nm tolerance: FE is 100x faster")

	// Step As: the two arsenic windows.
	var segAs []int
	for _, dm := range []int{86, 93} {
		w := lattice.Window{Template: &lattice.ArsineWindow, Terrace: 0, Row: 26, FirstDimer: dm}
		w.AddTo(donors)
		at := surf.DimerCentre(0, 26, dm).Add(surf.DimerCentre(0, 26, dm+1)).Mul(0.5)
		segAs = append(segAs, b.dwell("donors", at, "As", "As", windowAs, 4))
	}
	// Step P, segment 0: the island, then the phosphorus windows last.
	seg0 := apBlock("island", island, [2]int{48, 53}, [2]int{80, 95})
	var winsP []int
	for _, dm := range []int{84, 88, 92, 96} {
		w := lattice.Window{Template: &lattice.PhosphineWindow, Terrace: 0, Row: 30, FirstDimer: dm}
		w.AddTo(donors)
		at := surf.DimerCentre(0, 30, dm+1)
		winsP = append(winsP, b.dwell("donors", at, "P", "P", windowP, 6))
	}
	seg1 := apBlock("source", source, [2]int{50, 51}, [2]int{20, 68})
	seg1 = append(seg1, apBlock("drain", drain, [2]int{50, 51}, [2]int{108, 180})...)
	seg2 := apBlock("gate", gate, [2]int{70, 72}, [2]int{70, 105})

	// FE pads: serpentine raster plus an outline pass.
	var seg3, seg4 []int
	seg3 = append(seg3, b.pad("pad-S", padS, surf, r2.RectFromPoints(r2.Point{X: 1, Y: 30}, r2.Point{X: 14, Y: 47}))...)
	seg3 = append(seg3, b.pad("pad-G", padG, surf, r2.RectFromPoints(r2.Point{X: 20, Y: 55.5}, r2.Point{X: 36, Y: 72}))...)
	seg4 = append(seg4, b.pad("pad-D", padD, surf, r2.RectFromPoints(r2.Point{X: 66, Y: 28}, r2.Point{X: 100, Y: 50}))...)

	b.survey()
	b.lithography("As", [][]int{segAs})
	b.process("As")
	b.lithography("P", [][]int{seg0, seg1, seg2, seg3, append(seg4, winsP...)})
	b.process("P")
	b.document()
	b.p.Couplings = []planner.Coupling{{Kind: planner.CoupledGap, A: "island", B: "source", ToleranceNM: 0.384,
		Strokes: []int{seg0[0], seg1[0]}, SameStep: true, PInTolerance: 0.99}}
	b.p.Warnings = []string{"stroke 21 (drain) was split at a registration to keep within its drift budget"}
	for i := range d.Regions {
		b.p.Modes[i].Sites = d.Regions[i].Sites.Count()
	}
	d.Plan = b.finish()
	return d
}

// Large returns a plan with n strokes spread over a 1 µm x 1 µm field
// (70 % AP lines, 25 % dwells, 5 % small FE rasters) in segments of 200
// strokes, for benchmarks. The same n and seed give the same plan.
func Large(n int, seed int64) *planner.Plan {
	rng := rand.New(rand.NewPCG(uint64(seed), 0x5eed))
	b := newBuilder("Kestrel Lab array (fixture)", "dense", 1000, 1000)
	for i := range 9 {
		b.p.Fiducials = append(b.p.Fiducials, planner.Fiducial{Name: fmt.Sprintf("F%d", i),
			At: r2.Point{X: 50 + 450*float64(i%3), Y: 50 + 450*float64(i/3)}})
	}
	b.p.Modes = []planner.RegionMode{
		{Region: "lines", Role: "device", Requested: "ap", Mode: "ap", Reason: "as drawn"},
		{Region: "windows", Role: "donor", Requested: "ap", Mode: "ap", Reason: "as drawn"},
		{Region: "pads", Role: "pad", Requested: "fe", Mode: "fe", Reason: "as drawn"},
	}
	// Strokes in a boustrophedon over 20 nm bands, so moves stay short.
	type item struct {
		at   r2.Point
		kind int
	}
	items := make([]item, n)
	for i := range items {
		k := 0
		switch u := rng.Float64(); {
		case u < 0.05:
			k = 2
		case u < 0.30:
			k = 1
		}
		items[i] = item{r2.Point{X: 10 + 960*rng.Float64(), Y: 10 + 960*rng.Float64()}, k}
	}
	band := func(p r2.Point) int { return int(p.Y / 20) }
	slices.SortFunc(items, func(a, c item) int {
		ba, bc := band(a.at), band(c.at)
		if ba != bc {
			return cmp.Compare(ba, bc)
		}
		if ba%2 == 0 {
			return cmp.Compare(a.at.X, c.at.X)
		}
		return cmp.Compare(c.at.X, a.at.X)
	})
	b.p.Steps = []planner.Step{{Kind: planner.StepLithography, Species: "P", Note: "write everything"}}
	var seg []int
	for _, it := range items {
		var id int
		switch it.kind {
		case 0:
			l := 2 + 18*rng.Float64()
			id = b.line("lines", []r2.Point{it.at, it.at.Add(r2.Point{X: l})}, int(l/lattice.DimerPitch)*2)
		case 1:
			id = b.dwell("windows", it.at, "P", "P", windowP, 6)
		case 2:
			id = b.raster("pads", r2.RectFromPoints(it.at, it.at.Add(r2.Point{X: 20, Y: 20})))
		}
		seg = append(seg, id)
		if len(seg) == 200 {
			b.segment(seg)
			seg = nil
		}
	}
	if len(seg) > 0 {
		b.segment(seg)
	}
	b.p.Steps[0].DurationS = b.t
	b.process("P")
	return b.finish()
}

// builder assembles a self-consistent plan: strokes first, then the
// timeline segment by segment.
type builder struct {
	p    *planner.Plan
	t    float64
	at   r2.Point
	mode design.Mode
}

func newBuilder(design, variant string, w, h float64) *builder {
	return &builder{p: &planner.Plan{
		Design: design, Variant: variant, Profile: fixtureProfile, Seed: 1,
		FieldWidthNM: w, FieldHeightNM: h,
		Conditions: []planner.Conditions{apConditions, dwellConditions, feConditions},
	}}
}

func pathLength(path []r2.Point) float64 {
	l := 0.0
	for i := 1; i < len(path); i++ {
		l += path[i].Sub(path[i-1]).Norm()
	}
	return l
}

func (b *builder) add(s planner.Stroke) int {
	s.ID = len(b.p.Strokes)
	s.Segment = -1
	b.p.Strokes = append(b.p.Strokes, s)
	return s.ID
}

func (b *builder) line(region string, path []r2.Point, sites int) int {
	l := pathLength(path)
	return b.add(planner.Stroke{Region: region, Mode: design.ModeAP, Kind: planner.StrokeLine, Path: path,
		Passes: apConditions.Passes, LengthNM: l, DurationS: float64(apConditions.Passes) * l / apConditions.SpeedNMPerS,
		Sites: sites, ToleranceNM: 0.2, Window: -1})
}

func (b *builder) dwell(region string, at r2.Point, species, template string, prob float64, sites int) int {
	// Every site must clear: 0.99 per site (the planner's default dwell
	// completion), a fixture value.
	open := math.Pow(0.99, float64(sites))
	b.p.Windows = append(b.p.Windows, planner.Window{Region: region, Species: species, Template: template,
		At: at, Sites: sites, OpenProbability: open, P0: 1 - prob, P1: prob, P1SD: 0.05, Probability: prob * open})
	return b.add(planner.Stroke{Region: region, Mode: design.ModeAP, Kind: planner.StrokeDwell, Path: []r2.Point{at},
		Passes: 1, DurationS: dwellS, Sites: sites, ToleranceNM: 0.2, Window: len(b.p.Windows) - 1})
}

// raster adds a serpentine FE fill of r (lines along x, FE pitch apart).
func (b *builder) raster(region string, r r2.Rect) int {
	in := r.ExpandedByMargin(-feConditions.LineWidthNM / 2)
	var path []r2.Point
	k := 0
	for y := in.Y.Lo; y <= in.Y.Hi+1e-9; y += feConditions.PitchNM {
		a, z := r2.Point{X: in.X.Lo, Y: y}, r2.Point{X: in.X.Hi, Y: y}
		if k%2 == 1 {
			a, z = z, a
		}
		path = append(path, a, z)
		k++
	}
	l := pathLength(path)
	return b.add(planner.Stroke{Region: region, Mode: design.ModeFE, Kind: planner.StrokeRaster, Path: path,
		Passes: 1, LengthNM: l, DurationS: l / feConditions.SpeedNMPerS, Sites: int(r.Size().X * r.Size().Y * lattice.HDensity),
		ToleranceNM: 2, Window: -1})
}

// pad adds an FE raster and an outline pass over r, and its sites.
func (b *builder) pad(region string, set *lattice.SiteSet, surf *lattice.Surface, r r2.Rect) []int {
	for t := range surf.Terraces {
		for row := range surf.RowCount(t) {
			for dm := range surf.DimerCount(t) {
				for side := range 2 {
					s := lattice.Site{Terrace: t, Row: row, Dimer: dm, Side: side}
					if r.ContainsPoint(surf.Position(s)) && surf.Valid(s) {
						set.Add(s)
					}
				}
			}
		}
	}
	id := b.raster(region, r)
	b.p.Strokes[id].Sites = set.Count()
	in := r.ExpandedByMargin(-feConditions.LineWidthNM / 2)
	ring := []r2.Point{in.Lo(), {X: in.X.Hi, Y: in.Y.Lo}, in.Hi(), {X: in.X.Lo, Y: in.Y.Hi}, in.Lo()}
	l := pathLength(ring)
	o := b.add(planner.Stroke{Region: region, Mode: design.ModeFE, Kind: planner.StrokeOutline, Path: ring,
		Passes: 1, LengthNM: l, DurationS: l / feConditions.SpeedNMPerS, ToleranceNM: 2, Window: -1})
	return []int{id, o}
}

func (b *builder) act(a planner.Action) {
	a.Index = len(b.p.Actions)
	a.StartS = b.t
	b.p.Actions = append(b.p.Actions, a)
	b.t += a.DurationS
	b.at = a.To
	switch a.Kind {
	case planner.ActMove:
		b.p.Breakdown.TravelS += a.DurationS
	case planner.ActRegister, planner.ActRefind:
		b.p.Breakdown.RegistrationS += a.DurationS
	case planner.ActSurvey:
		b.p.Breakdown.SurveyS += a.DurationS
	case planner.ActCondition:
		b.p.Breakdown.ConditioningS += a.DurationS
	case planner.ActDose:
		b.p.Breakdown.DoseS += a.DurationS
	case planner.ActAnneal:
		b.p.Breakdown.AnnealS += a.DurationS
	case planner.ActDocument:
		b.p.Breakdown.DocumentationS += a.DurationS
	case planner.ActSwitch:
		b.p.Breakdown.ModeSwitchS += a.DurationS
	case planner.ActVerify:
		b.p.Breakdown.VerificationS += a.DurationS
	case planner.ActDwell:
		b.p.Breakdown.DwellS += a.DurationS
	case planner.ActWrite:
		if a.Mode == design.ModeFE {
			b.p.Breakdown.FEWriteS += a.DurationS
		} else {
			b.p.Breakdown.APWriteS += a.DurationS
		}
	}
}

func (b *builder) move(to r2.Point, seg int, note string) {
	d := to.Sub(b.at).Norm()
	if d < 1e-9 {
		return
	}
	b.act(planner.Action{Kind: planner.ActMove, Segment: seg, Stroke: -1, From: b.at, To: to,
		DurationS: d/moveSpeedNMPS + settleS, SpeedNMPS: moveSpeedNMPS, Note: note})
}

// segment registers on the fiducial nearest the first stroke, writes the
// strokes in order, and ends with a verification image.
func (b *builder) segment(ids []int) {
	seg := len(b.p.Segments)
	first := b.p.Strokes[ids[0]].Path[0]
	fid := b.p.Fiducials[0]
	for _, f := range b.p.Fiducials {
		if f.At.Sub(first).Norm() < fid.At.Sub(first).Norm() {
			fid = f
		}
	}
	b.move(fid.At, seg, "to fiducial "+fid.Name)
	s := planner.Segment{Index: seg, Step: len(b.p.Steps) - 1, Registration: planner.RegCoarse, Reason: "fixture: fiducial " + fid.Name,
		Fiducial: fid.Name, FiducialAt: fid.At, StartS: b.t, Strokes: ids, BudgetS: math.Inf(1), Tightest: ids[0], PInTolerance: 0.99}
	b.p.Steps[len(b.p.Steps)-1].Segments = append(b.p.Steps[len(b.p.Steps)-1].Segments, seg)
	b.act(planner.Action{Kind: planner.ActRegister, Segment: seg, Stroke: -1, From: fid.At, To: fid.At,
		DurationS: registrationS, Note: "register on " + fid.Name})
	for _, id := range ids {
		st := &b.p.Strokes[id]
		st.Segment = seg
		if st.Mode == design.ModeAP {
			s.BudgetS = min(s.BudgetS, apBudgetS)
		} else {
			s.BudgetS = min(s.BudgetS, feBudgetS)
		}
		cond := apConditions
		if st.Mode == design.ModeFE {
			cond = feConditions
		}
		if st.Mode != b.mode {
			b.act(planner.Action{Kind: planner.ActSwitch, Segment: seg, Stroke: -1, From: b.at, To: b.at,
				DurationS: switchS, Mode: st.Mode, BiasV: cond.BiasV, CurrentA: cond.CurrentA,
				Note: fmt.Sprintf("switch to %s", st.Mode)})
			b.mode = st.Mode
		}
		b.move(st.Path[0], seg, "")
		end := st.Path[len(st.Path)-1]
		if st.Kind == planner.StrokeDwell {
			b.act(planner.Action{Kind: planner.ActDwell, Segment: seg, Stroke: id, From: st.Path[0], To: end,
				DurationS: st.DurationS, Mode: st.Mode, BiasV: dwellBiasV, CurrentA: dwellCurrentA})
			continue
		}
		b.act(planner.Action{Kind: planner.ActWrite, Segment: seg, Stroke: id, From: st.Path[0], To: end,
			DurationS: st.DurationS, Mode: st.Mode, BiasV: cond.BiasV, CurrentA: cond.CurrentA, SpeedNMPS: cond.SpeedNMPerS})
	}
	b.act(planner.Action{Kind: planner.ActVerify, Segment: seg, Stroke: -1, From: b.at, To: b.at,
		DurationS: verificationS, Note: "verification image"})
	s.EndS = b.t
	b.p.Segments = append(b.p.Segments, s)
}

// survey adds the survey step: a conditioning and a survey image.
func (b *builder) survey() {
	b.p.Steps = append(b.p.Steps, planner.Step{Kind: planner.StepSurvey, StartS: b.t, Note: "condition the tip, then survey"})
	b.act(planner.Action{Kind: planner.ActCondition, Segment: -1, Stroke: -1, From: b.at, To: b.at, DurationS: conditionS, Note: "condition the tip"})
	b.act(planner.Action{Kind: planner.ActSurvey, Segment: -1, Stroke: -1, From: b.at, To: b.at, DurationS: surveyS, Note: "survey image"})
	b.endStep()
}

// lithography adds a lithography step of species with the given
// segments (stroke IDs each), after finding the area again when it is
// not the first.
func (b *builder) lithography(species string, segs [][]int) {
	for _, st := range b.p.Steps {
		if st.Kind == planner.StepLithography {
			b.p.Steps = append(b.p.Steps, planner.Step{Kind: planner.StepReregister, Species: species, StartS: b.t, Note: "find the area again"})
			b.act(planner.Action{Kind: planner.ActRefind, Segment: -1, Stroke: -1, From: b.at, To: b.at, DurationS: refindS, Note: "find the area again"})
			b.endStep()
			break
		}
	}
	b.p.Steps = append(b.p.Steps, planner.Step{Kind: planner.StepLithography, Species: species, StartS: b.t, Note: "write the " + species + " regions, windows last"})
	for _, ids := range segs {
		b.segment(ids)
	}
	b.endStep()
}

// process adds the dose and the anneal of species; the windows of the
// species stay open until the dose.
func (b *builder) process(species string) {
	b.p.Steps = append(b.p.Steps, planner.Step{Kind: planner.StepDose, Species: species, StartS: b.t,
		Precursor: design.Precursor(species), ExposureL: 2, Note: "dose"})
	// Each window has been open since the end of its last stroke's
	// action: one pass over the actions (a pass per window was
	// quadratic, minutes for the large fixtures).
	for _, a := range b.p.Actions {
		if a.Stroke < 0 {
			continue
		}
		if i := b.p.Strokes[a.Stroke].Window; i >= 0 && b.p.Windows[i].Species == species {
			b.p.Windows[i].OpenS = b.t - (a.StartS + a.DurationS)
		}
	}
	b.act(planner.Action{Kind: planner.ActDose, Segment: -1, Stroke: -1, From: b.at, To: b.at, DurationS: doseS, Note: "dose " + species})
	b.endStep()
	b.p.Steps = append(b.p.Steps, planner.Step{Kind: planner.StepAnneal, Species: species, StartS: b.t, TemperatureC: 350, Note: "anneal"})
	b.act(planner.Action{Kind: planner.ActAnneal, Segment: -1, Stroke: -1, From: b.at, To: b.at, DurationS: annealS, Note: "anneal 350 °C"})
	b.endStep()
}

// document adds the documentation step.
func (b *builder) document() {
	b.p.Steps = append(b.p.Steps, planner.Step{Kind: planner.StepDocumentation, StartS: b.t, Note: "documentation image"})
	b.act(planner.Action{Kind: planner.ActRefind, Segment: -1, Stroke: -1, From: b.at, To: b.at, DurationS: refindS, Note: "find the area again"})
	b.act(planner.Action{Kind: planner.ActDocument, Segment: -1, Stroke: -1, From: b.at, To: b.at, DurationS: surveyS, Note: "documentation image"})
	b.endStep()
}

func (b *builder) endStep() {
	st := &b.p.Steps[len(b.p.Steps)-1]
	st.DurationS = b.t - st.StartS
}

// finish fills the totals, the spread and the yield.
func (b *builder) finish() *planner.Plan {
	p := b.p
	p.ScheduleS = b.t
	// A fixture tip change: 5 % of the schedule on average.
	p.Breakdown.TipChangeS = 0.05 * b.t
	p.TotalS = p.Breakdown.Total()
	p.PInTolerance = 0.95
	p.Drift = planner.DriftPlan{RateNMPerMin: 0.16, CreepFraction: 0.03, ErrorZ: 1.64, Margin: 1.25}
	p.FloorS = p.Breakdown.APWriteS + p.Breakdown.FEWriteS + p.Breakdown.DwellS
	p.ByHandS = 1.8 * p.TotalS // a fixture ratio, not a by-hand plan
	// A fixture spread, not a Monte Carlo.
	p.P10S, p.P50S, p.P90S = 0.97*p.TotalS, 0.995*p.TotalS, 1.06*p.TotalS
	for i := range p.Segments {
		p.Segments[i].BudgetS = min(p.Segments[i].BudgetS, feBudgetS)
	}
	probs := make([]float64, len(p.Windows))
	for i, w := range p.Windows {
		probs[i] = w.Probability
	}
	p.Yield = yieldOf(probs)
	// Fixture intervals (a tenth either side in log10), not a sampling.
	l := p.Yield.Log10All
	p.Yield.Log10All68 = [2]float64{1.1 * l, 0.9 * l}
	p.Yield.Log10All95 = [2]float64{1.2 * l, 0.8 * l}
	for k := range 2 {
		p.Yield.All68[k], p.Yield.All95[k] = math.Pow(10, p.Yield.Log10All68[k]), math.Pow(10, p.Yield.Log10All95[k])
	}
	for _, w := range p.Windows {
		p.Yield.ExpectedEmpty += w.OpenProbability * w.P0
		p.Yield.ExpectedMisopened += 1 - w.OpenProbability
	}
	sites := 0
	for _, m := range p.Modes {
		sites += m.Sites
	}
	// A fixture expectation: a thousandth of the sites missed, none stray.
	p.Coverage = planner.Coverage{OK: true, Sites: sites, StrayLimit: 0.01, ExpectedMissed: 1e-3 * float64(sites)}
	for _, m := range p.Modes {
		p.Coverage.Regions = append(p.Coverage.Regions, planner.RegionCoverage{Region: m.Region, Sites: m.Sites,
			ExpectedMissed: 1e-3 * float64(m.Sites), Probability: math.Exp(-1e-3 * float64(m.Sites)), Log10Probability: -1e-3 * float64(m.Sites) / math.Ln10})
	}
	return p
}

// yieldOf returns the Poisson-binomial yield of independent windows. For
// more than 2000 windows with one probability it uses the binomial pmf
// in logs, O(n); otherwise the O(n²) recurrence.
func yieldOf(probs []float64) planner.Yield {
	n := len(probs)
	y := planner.Yield{Windows: n}
	if n == 0 {
		y.All, y.DevicesPerPerfect = 1, 1
		y.Distribution = []float64{1}
		return y
	}
	dist := make([]float64, n+1)
	if n > 2000 {
		q := probs[0]
		for k := 0; k <= n; k++ {
			lg := func(x float64) float64 { v, _ := math.Lgamma(x); return v }
			dist[k] = math.Exp(lg(float64(n+1)) - lg(float64(k+1)) - lg(float64(n-k+1)) +
				float64(k)*math.Log(q) + float64(n-k)*math.Log1p(-q))
		}
	} else {
		dist[0] = 1
		for i, q := range probs {
			for k := i + 1; k >= 1; k-- {
				dist[k] = dist[k]*(1-q) + dist[k-1]*q
			}
			dist[0] *= 1 - q
		}
	}
	lsum, varSum := 0.0, 0.0
	for _, q := range probs {
		y.MeanGood += q
		lsum += math.Log10(q)
		varSum += q * (1 - q)
	}
	y.All = dist[n]
	y.Log10All = lsum
	y.SDGood = math.Sqrt(varSum)
	for y.DistributionFrom < n && dist[y.DistributionFrom] == 0 {
		y.DistributionFrom++
	}
	y.Distribution = dist
	if y.All > 0 {
		y.DevicesPerPerfect = 1 / y.All
	}
	return y
}
