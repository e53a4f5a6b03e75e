package design

import (
	"math"
	"os"
	"slices"
	"strings"
	"testing"

	"dimerpath/lattice"
)

func loadDemo(t testing.TB) *Design {
	t.Helper()
	data, err := os.ReadFile("../../assets/demo.json")
	if err != nil {
		t.Fatal(err)
	}
	d, err := Parse("demo.json", data)
	if err != nil {
		t.Fatal(err)
	}
	return d
}

// donorRowY is the centre line of the demo's donor row, row 1302.
var donorRowY = 1302 * lattice.RowSpacing

// Each rule against the demo (which passes every rule) changed so that it
// breaks that rule exactly once.
func TestRulesBreakOnce(t *testing.T) {
	region := func(d *Design, name string) *Region { return d.Variants[0].Region(name) }
	tests := []struct {
		name    string
		rule    string
		regions []string
		msg     string
		change  func(d *Design)
	}{
		{"window across the step edge", RuleWindow, []string{"donor-P"}, "reaches off terrace",
			func(d *Design) {
				// The step edge crosses y = 1000 at x = 1480 + 80·1000/2000 = 1520.
				region(d, "donor-P").Shapes[0].Points[0] = [2]float64{1519.95, donorRowY}
			}},
		{"window partly erased", RuleWindow, []string{"donor-As"}, "1 of its 4 sites are erased",
			func(d *Design) {
				r := region(d, "donor-As")
				surf, _ := d.Surface()
				w, _ := surf.PlaceWindow(lattice.ArsineWindow, point(r.Shapes[0].Points[0]))
				r.Erased = lattice.NewSiteSet()
				r.Erased.Add(lattice.Site{Terrace: w.Terrace, Row: w.Row, Dimer: w.FirstDimer, Side: 1})
			}},
		{"donor region with half a dimer", RuleWindow, []string{"donor-P"}, "half a dimer",
			func(d *Design) {
				r := region(d, "donor-P")
				r.Painted = lattice.NewSiteSet()
				r.Painted.Add(lattice.Site{Terrace: 0, Row: 1330, Dimer: 2400, Side: 0})
			}},
		{"windows on one row without a gap", RuleWindowSpacing, []string{"donor-P", "donor-As"}, "0 intact dimers",
			func(d *Design) {
				// P at dimer 2487 opens 2486..2488; As starting at 2489 touches it.
				region(d, "donor-As").Shapes[0].Points[0] = [2]float64{2489.5 * lattice.DimerPitch, donorRowY}
			}},
		{"window facing a window", RuleWindowSpacing, []string{"donor-P", "donor-As"}, "faces window",
			func(d *Design) {
				region(d, "donor-As").Shapes[0].Points[0] = [2]float64{2487 * lattice.DimerPitch, donorRowY + lattice.RowSpacing}
			}},
		{"window beside a written dimer", RuleWindowSpacing, []string{"donor-P", "sensor-island"}, "is written by region",
			func(d *Design) {
				// Widen the island to reach the dimer just left of the P window.
				region(d, "sensor-island").Shapes = append(region(d, "sensor-island").Shapes,
					Shape{Kind: ShapeRect, Points: [][2]float64{{2485 * lattice.DimerPitch, donorRowY - 0.3}, {1000, donorRowY + 0.3}}})
				region(d, "donor-As").Shapes[0].Points[0] = [2]float64{2480 * lattice.DimerPitch, donorRowY + 20}
			}},
		{"window one row below the island", RuleWindowSpacing, []string{"donor-P", "sensor-island"}, "faces sites written by region \"sensor-island\" 1 row(s) away (row 1295",
			func(d *Design) {
				// The island's lowest row is 1295; a P window on row 1294
				// under its middle has only one intact trough (about 0.4
				// nm) between them.
				region(d, "donor-P").Shapes[0].Points[0] = [2]float64{2604 * lattice.DimerPitch, 1294 * lattice.RowSpacing}
			}},
		{"FE fan too close to the island", RuleFEKeepOut, []string{"sensor-island", "source-fan"}, "keep at least 5 nm",
			func(d *Design) {
				// The 40 nm fan's round end now reaches y = 1010, 4.2 nm above the island.
				region(d, "source-fan").Shapes[0].Points[0] = [2]float64{1000, 1030}
			}},
		{"pad beyond the field", RuleScanField, []string{"pad-source"}, "reaches outside the field",
			func(d *Design) { region(d, "pad-source").Shapes[0].Points[1] = [2]float64{2050, 1940} }},
		{"gate without its fan-out", RuleFloating, []string{"gate-island"}, "floating",
			func(d *Design) { removeRegion(d, "gate-island-fan") }},
		// A tunnel gap is no DC path: without its fan-out the drain lead
		// reaches a pad only through the island's two tunnel gaps and
		// the source lead, and is floating.
		{"drain lead behind tunnel gaps only", RuleFloating, []string{"drain-lead"}, "only a tunnel gap links it towards a pad",
			func(d *Design) { removeRegion(d, "drain-fan") }},
		{"island without its tunnel gaps", RuleFloating, []string{"sensor-island"}, "device region is floating",
			func(d *Design) { d.Variants[0].TunnelGaps = nil }},
		{"tunnel gap of 6 rows", RuleTunnelGap, []string{"sensor-island", "source-lead"}, "4.61 nm (6.0 dimer rows across the rows) is narrower",
			func(d *Design) { region(d, "source-lead").Shapes[0].Points[0][1] = 1315.5 * lattice.RowSpacing }},
		{"tunnel gap of 20 rows", RuleTunnelGap, []string{"sensor-island", "source-lead"}, "15.36 nm (20.0 dimer rows across the rows) is wider",
			func(d *Design) { region(d, "source-lead").Shapes[0].Points[0][1] = 1329.5 * lattice.RowSpacing }},
		{"tunnel gap closed", RuleTunnelGap, []string{"sensor-island", "drain-lead"}, "no tunnel gap",
			func(d *Design) { region(d, "drain-lead").Shapes[0].Points[1][1] = 1000 }},
		// The P window's cells reach y = donorRowY + 0.38 nm: a defect
		// 0.8 nm wide at 2.5 nm above the row leaves 1.7 nm of surface.
		{"defect beside the P window", RuleSurfaceClearance, []string{"donor-P"}, "a dopant window of \"donor-P\" lies 1.7",
			func(d *Design) {
				addSurvey(d, SurveyDefect{AtNM: [2]float64{955, donorRowY + 2.5}, Kind: DefectBright, SizeNM: 0.8, Class: "dangling bond"})
			}},
		// The island's top edge is at y = 1005.78 nm.
		{"defect beside the island", RuleSurfaceClearance, []string{"sensor-island"}, "comes 0.92 nm from the edge of a dark defect",
			func(d *Design) {
				addSurvey(d, SurveyDefect{AtNM: [2]float64{999.9, 1007.0}, Kind: DefectDark, SizeNM: 0.6, Class: "vacancy"})
			}},
		{"step edge through the island", RuleSurfaceClearance, []string{"sensor-island"}, "crosses a step edge",
			func(d *Design) {
				addSurvey(d)
				d.Survey.Steps = []SurveyStep{{PolylineNM: [][2]float64{surveyPoint(1000, 980), surveyPoint(1001, 1020)}}}
			}},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			d := loadDemo(t)
			tc.change(d)
			if err := d.Validate(); err != nil {
				t.Fatalf("changed design is invalid: %v", err)
			}
			fs, err := Check(d, "gap-9")
			if err != nil {
				t.Fatal(err)
			}
			if len(fs) != 1 {
				t.Fatalf("%d findings, want exactly one %s:\n%v", len(fs), tc.rule, fs)
			}
			f := fs[0]
			if f.Rule != tc.rule || f.Severity != SeverityError || strings.Join(f.Regions, ",") != strings.Join(tc.regions, ",") || !strings.Contains(f.Message, tc.msg) {
				t.Errorf("finding %v; want rule %s, regions %v, message with %q", f, tc.rule, tc.regions, tc.msg)
			}
			if !d.Field.contains(f.AtNM.X, f.AtNM.Y) && tc.rule != RuleScanField {
				t.Errorf("finding at %v, outside the field", f.AtNM)
			}
		})
	}
}

// surveyOffset is where addSurvey puts a survey's lower-left corner.
var surveyOffset = [2]float64{880, 880}

// surveyPoint returns the survey-frame point of field point (x, y) for a
// survey added by addSurvey (turned by 0°).
func surveyPoint(x, y float64) [2]float64 {
	return [2]float64{x - surveyOffset[0], y - surveyOffset[1]}
}

// addSurvey gives d a 240 x 240 nm survey over the device with the given
// defects, their positions given in field nm.
func addSurvey(d *Design, defects ...SurveyDefect) {
	for i := range defects {
		defects[i].AtNM = surveyPoint(defects[i].AtNM[0], defects[i].AtNM[1])
	}
	d.Survey = &Survey{Image: "survey.png", OffsetNM: surveyOffset, SizePx: [2]int{1600, 1600}, ScaleNMPerPx: [2]float64{0.15, 0.15}, Defects: defects}
}

// removeRegion drops the named region from the first variant.
func removeRegion(d *Design, name string) {
	v := &d.Variants[0]
	for i, r := range v.Regions {
		if r.Name == name {
			v.Regions = append(v.Regions[:i], v.Regions[i+1:]...)
			return
		}
	}
}

func TestStepRegistryRule(t *testing.T) {
	// The demo says its upper terrace is one step up; a file that does
	// not say (version 1) is laid out as a step down, with a warning that
	// names the terrace and the regions on it.
	d := loadDemo(t)
	d.Terraces[1].Step = ""
	fs, err := Check(d, "gap-9")
	if err != nil {
		t.Fatal(err)
	}
	if len(fs) != 1 || fs[0].Rule != RuleStepRegistry || fs[0].Severity != SeverityWarning ||
		!strings.Contains(fs[0].Message, `terrace "upper" steps from "lower" without saying up or down`) || !slices.Contains(fs[0].Regions, "pad-source") {
		t.Errorf("findings %v, want one step-registry warning about the upper terrace", fs)
	}
	// Up and down lay the terrace's sites out a/2 = 0.27 nm apart.
	up, _ := loadDemo(t).Surface()
	down, _ := d.Surface()
	site := lattice.Site{Terrace: 1, Row: 100, Dimer: 1000}
	if dist := up.Position(site).Sub(down.Position(site)).Norm(); math.Abs(dist-lattice.SiLatticeConstant/2) > 1e-9 {
		t.Errorf("up and down lattices %.4f nm apart, want a/2", dist)
	}
	d.Terraces[1].Step = "sideways"
	if err := d.Validate(); err == nil || !strings.Contains(err.Error(), `terraces[1].step: step "sideways" is not "up" or "down"`) {
		t.Errorf("Validate = %v, want the bad step named", err)
	}
	d.Terraces[1].Step = "up"
	d.Terraces[0].Step = "up"
	if err := d.Validate(); err == nil || !strings.Contains(err.Error(), "terraces[0].step") {
		t.Errorf("Validate = %v, want a step without step_from refused", err)
	}
}

func (f Field) contains(x, y float64) bool {
	return x >= 0 && y >= 0 && x <= f.WidthNM && y <= f.HeightNM
}

func TestDemoPassesEveryRule(t *testing.T) {
	d := loadDemo(t)
	for _, v := range d.Variants {
		fs, err := Check(d, v.Name)
		if err != nil {
			t.Fatal(err)
		}
		if len(fs) != 0 {
			t.Errorf("variant %s: %d findings: %v", v.Name, len(fs), fs)
		}
	}
	// The variants differ in one tunnel gap: 9 vs 12 dimer rows, i.e.
	// 9·0.76806 = 6.91 nm and 12·0.76806 = 9.22 nm (Wang et al. 2020
	// count gaps in dimer rows).
	for _, tc := range []struct {
		variant string
		rows    float64
	}{{"gap-9", 9}, {"gap-12-source", 12}} {
		l, err := d.Lay(tc.variant)
		if err != nil {
			t.Fatal(err)
		}
		got := l.GapNM(l.Region("sensor-island"), l.Region("source-lead"))
		if math.Abs(got-tc.rows*lattice.RowSpacing) > 1e-6 {
			t.Errorf("%s: source gap %g nm, want %g rows = %g nm", tc.variant, got, tc.rows, tc.rows*lattice.RowSpacing)
		}
	}
}

// Configured rules change the verdict: the demo fails a tunnel-gap range
// of 8–12 nm (its 9-row gaps are 6.9 nm) and a keep-out of 60 nm.
func TestRulesAreConfigurable(t *testing.T) {
	d := loadDemo(t)
	lo, hi, keep := 8.0, 12.0, 60.0
	d.Rules = &Rules{TunnelGapMinNM: &lo, TunnelGapMaxNM: &hi}
	fs, _ := Check(d, "gap-9")
	if n := countRule(fs, RuleTunnelGap); n != 2 {
		t.Errorf("tunnel gaps 8–12 nm: %d findings, want 2: %v", n, fs)
	}
	d.Rules = &Rules{FEKeepOutNM: &keep}
	fs, _ = Check(d, "gap-9")
	if n := countRule(fs, RuleFEKeepOut); n == 0 {
		t.Errorf("keep-out 60 nm: no findings")
	}
}

func countRule(fs []Finding, rule string) int {
	n := 0
	for _, f := range fs {
		if f.Rule == rule {
			n++
		}
	}
	return n
}
