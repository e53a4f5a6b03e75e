package planner

import (
	"errors"
	"math"
	"os"
	"path/filepath"
	"reflect"
	"strings"
	"testing"

	"dimerpath/internal/jsonfile"
	"dimerpath/lattice/design"
)

func TestDefaultProfileIsValid(t *testing.T) {
	for _, name := range Presets() {
		p, err := Preset(name)
		if err != nil {
			t.Fatalf("Preset(%q): %v", name, err)
		}
		if err := p.Validate(); err != nil {
			t.Errorf("Preset(%q).Validate() = %v, want nil", name, err)
		}
		if err := p.CheckLimits(nil); err != nil {
			t.Errorf("Preset(%q).CheckLimits(nil) = %v, want nil", name, err)
		}
	}
	if _, err := Preset("mars"); err == nil {
		t.Error(`Preset("mars") = nil error, want unknown preset`)
	}
}

func TestDefaultProfileValues(t *testing.T) {
	p := DefaultProfile()
	// Schmucker et al., Nat. Commun. 3 (2012): 2 nA at 2 mC/cm is 10 nm/s.
	if got := p.AP.Speed(); math.Abs(got-10) > 1e-9 {
		t.Errorf("AP speed = %v nm/s, want 10 (Schmucker 2012)", got)
	}
	// Default FE line width ~10 nm (Rudolph et al. 2014): 3–15 nm.
	if got := p.Line(design.ModeFE).Width(); got < 3 || got > 15 {
		t.Errorf("FE line width = %v nm, want about 10", got)
	}
	// The default dwell reaches 99 % within the 10 ms–1 s of a
	// feedback-controlled dwell (from memory; the technique: Walsh &
	// Hersam, Annu. Rev. Phys. Chem. 60, 193 (2009)).
	if c := p.DwellCapS(); c < 0.01 || c > 1 {
		t.Errorf("dwell 99%% time = %v s, want within 0.01..1 s", c)
	}
	// 4 K drift ≤ 0.1 nm/h (from memory): the LT preset must not exceed it.
	lt := LowTemperatureProfile()
	if r := lt.Drift.RateNMPerMin * 60; r > 0.1+1e-12 {
		t.Errorf("LT drift = %v nm/h, want ≤ 0.1", r)
	}
}

func TestValidateReportsEveryBadField(t *testing.T) {
	p := DefaultProfile()
	p.AP.CurrentA = 0
	p.FE.BiasV = math.NaN()
	p.MoveSpeedNMPerS = -3
	p.Dwell.Completion = 1
	p.FE.FillCompletion = 1.2
	p.Order = "sideways"
	p.Limits.MaxBiasV = math.Inf(1)
	err := p.Validate()
	var pe *jsonfile.Error
	if !errors.As(err, &pe) || !errors.Is(err, ErrInvalidProfile) {
		t.Fatalf("Validate() = %v, want *jsonfile.Error wrapping ErrInvalidProfile", err)
	}
	want := []string{"ap.current_a", "fe.bias_v", "move_speed_nm_per_s", "dwell.completion", "fe.fill_completion", "order", "limits.max_bias_v"}
	if len(pe.Problems) != len(want) {
		t.Errorf("Validate() found %d problems, want %d:\n%v", len(pe.Problems), len(want), err)
	}
	msg := err.Error()
	for _, w := range want {
		if !strings.Contains(msg, w+" = ") {
			t.Errorf("Validate() message lacks %q:\n%s", w, msg)
		}
	}
	if !strings.Contains(msg, "NaN") || !strings.Contains(msg, "-3") {
		t.Errorf("Validate() message should show the bad values NaN and -3:\n%s", msg)
	}
}

func TestValidateLinesThatClearNothing(t *testing.T) {
	p := DefaultProfile()
	p.AP.LineDoseCPerCm = 1e-6 // 2000 times below Schmucker's 2 mC/cm
	err := p.Validate()
	if err == nil || !strings.Contains(err.Error(), "ap.line_dose_c_per_cm") || !strings.Contains(err.Error(), "clear less than half") {
		t.Errorf("Validate() = %v, want a lines-clear-nothing problem", err)
	}
	p = DefaultProfile()
	p.Exposure.Electronic.ThresholdV = 4
	if err := p.Validate(); err == nil || !strings.Contains(err.Error(), "exposure.electronic.threshold_v = 4") {
		t.Errorf("Validate() = %v, want the electronic threshold below the vibrational regime refused", err)
	}
}

func TestReadVersion1Profile(t *testing.T) {
	// A version 1 file with the old threshold width model: the width it
	// described is the model's P = ½ band, so the converted profile gives
	// the same line width at the same dose.
	const v1 = `{"format":"dimerpath-profile","version":1,"name":"old",
		"ap":{"width":{"sigma_nm":0.3,"threshold_dose_c_per_cm":0.0005}},
		"fe":{"overlap":0.2},"dwell":{"yield_per_electron":1e-9}}`
	p, err := ParseProfile([]byte(v1), "old.json")
	if err != nil {
		t.Fatal(err)
	}
	// By hand: w = 2σ·√(2 ln(λ/λ_thr)) = 0.6·√(2 ln 4) at 2 mC/cm.
	want := 0.6 * math.Sqrt(2*math.Log(4))
	if got := p.Line(design.ModeAP).Width(); math.Abs(got-want) > 1e-9 {
		t.Errorf("converted AP width %v nm, want %v (the version 1 model)", got, want)
	}
	if p.AP.SigmaNM != 0.3 || !strings.Contains(p.Notes, "fe.overlap") || !strings.Contains(p.Notes, "dwell.yield_per_electron") {
		t.Errorf("converted σ %v, notes %q", p.AP.SigmaNM, p.Notes)
	}
}

func TestProfileSaveLoadRoundTrip(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "lab.json")
	p := LowTemperatureProfile()
	p.Name = "lab STM 2"
	p.AP.Passes = 3
	p.FE.Outline = true
	if err := SaveProfile(path, p); err != nil {
		t.Fatal(err)
	}
	got, err := LoadProfile(path)
	if err != nil {
		t.Fatal(err)
	}
	if !reflect.DeepEqual(got, p) {
		t.Errorf("LoadProfile(SaveProfile(p)) = %+v\nwant %+v", got, p)
	}
	// No temporary file is left behind.
	entries, _ := os.ReadDir(dir)
	if len(entries) != 1 {
		t.Errorf("directory holds %d entries after save, want 1", len(entries))
	}
}

func TestSaveProfileRefusesInvalid(t *testing.T) {
	path := filepath.Join(t.TempDir(), "bad.json")
	p := DefaultProfile()
	p.SettleS = -1
	if err := SaveProfile(path, p); err == nil || !strings.Contains(err.Error(), path) {
		t.Errorf("SaveProfile(invalid) = %v, want an error naming %s", err, path)
	}
	if _, err := os.Stat(path); !os.IsNotExist(err) {
		t.Errorf("SaveProfile(invalid) wrote %s", path)
	}
}

func TestParseProfile(t *testing.T) {
	cases := []struct {
		name, json string
		wantErr    string // substring; "" for success
		check      func(Profile) bool
	}{
		{"partial file keeps preset values", `{"format":"dimerpath-profile","version":1,"name":"x","ap":{"passes":2}}`, "",
			func(p Profile) bool { return p.AP.Passes == 2 && p.AP.CurrentA == 2e-9 && p.Drift.RateNMPerMin == 0.1 }},
		{"low-temperature base", `{"format":"dimerpath-profile","version":1,"base":"lt"}`, "",
			func(p Profile) bool { return p.Drift.RateNMPerMin < 0.01 && p.Name == "cal" }},
		{"wrong format", `{"format":"other","version":1}`, `cal.json:1:11: format = "other": not a dimerpath instrument profile`, nil},
		{"missing format", `{"version":1}`, "format: missing: not a dimerpath instrument profile", nil},
		{"future version", `{"format":"dimerpath-profile","version":7}`, "version = 7: this dimerpath reads profile versions 1 to 2", nil},
		{"unknown field", `{"format":"dimerpath-profile","version":1,"ap":{"bias":4}}`, "ap.bias: unknown field", nil},
		{"wrong type", `{"format":"dimerpath-profile","version":1,"ap":{"current_a":"2 nA"}}`, "ap.current_a", nil},
		{"truncated", `{"format":"dimerpath-profile","version":1,"ap":{`, "", nil},
		{"negative speed", `{"format":"dimerpath-profile","version":1,"move_speed_nm_per_s":-5}`, "move_speed_nm_per_s = -5", nil},
		{"zero current", `{"format":"dimerpath-profile","version":1,"fe":{"current_a":0}}`, "fe.current_a = 0", nil},
		{"huge number", `{"format":"dimerpath-profile","version":1,"settle_s":1e400}`, "settle_s", nil},
		{"unknown base", `{"format":"dimerpath-profile","version":1,"base":"moon"}`, `base = "moon": unknown profile preset (known: lt, rt)`, nil},
		{"trailing data", `{"format":"dimerpath-profile","version":1} {}`, "cal.json:1:44: not valid JSON: more data after the profile", nil},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			p, err := ParseProfile([]byte(c.json), "cal.json")
			if c.check == nil {
				if err == nil {
					t.Fatalf("ParseProfile(%s) = nil error, want one", c.json)
				}
				if !strings.HasPrefix(err.Error(), "cal.json") {
					t.Errorf("error %q does not name the file", err)
				}
				if !strings.Contains(err.Error(), c.wantErr) {
					t.Errorf("error %q lacks %q", err, c.wantErr)
				}
				return
			}
			if err != nil {
				t.Fatalf("ParseProfile(%s) = %v", c.json, err)
			}
			if !c.check(p) {
				t.Errorf("ParseProfile(%s) = %+v, fails its check", c.json, p)
			}
		})
	}
}

func FuzzParseProfile(f *testing.F) {
	f.Add([]byte(`{"format":"dimerpath-profile","version":1}`))
	f.Add([]byte(`{"format":"dimerpath-profile","version":1,"ap":{"passes":2,"width":{"sigma_nm":0.4}}}`))
	f.Add([]byte(`{"format":"dimerpath-profile","version":2,"exposure":{"vibrational":{"order":2}},"ap":{"sigma_nm":0.2}}`))
	f.Add([]byte(`{"format":"dimerpath-profile","version":1,"base":"lt","drift":{"rate_nm_per_min":-1}}`))
	f.Add([]byte(`[]`))
	f.Fuzz(func(t *testing.T, data []byte) {
		p, err := ParseProfile(data, "fuzz.json")
		if err == nil {
			if verr := p.Validate(); verr != nil {
				t.Fatalf("ParseProfile accepted a profile Validate refuses: %v", verr)
			}
		}
	})
}

func TestCheckLimits(t *testing.T) {
	cases := []struct {
		name     string
		edit     func(*Profile)
		uses     *ModeUse
		quantity string
		limit    string
	}{
		{"FE bias", func(p *Profile) { p.FE.BiasV = 12 }, nil, "fe.bias_v", "limits.max_bias_v"},
		{"negative AP bias counts by magnitude", func(p *Profile) { p.AP.BiasV = -11 }, nil, "ap.bias_v", "limits.max_bias_v"},
		{"AP current", func(p *Profile) { p.AP.CurrentA = 20e-9 }, nil, "ap.current_a", "limits.max_current_a"},
		{"FE speed", func(p *Profile) { p.FE.LineDoseCPerCm = 5e-6; p.Exposure.Electronic.YieldPerElectron = 1e-3 }, nil, "fe writing speed", "limits.max_speed_nm_per_s"},
		{"move speed", func(p *Profile) { p.MoveSpeedNMPerS = 9000 }, nil, "move_speed_nm_per_s", "limits.max_speed_nm_per_s"},
		{"dwell current", func(p *Profile) { p.Dwell.CurrentA = 11e-9 }, nil, "dwell.current_a", "limits.max_current_a"},
		{"unused FE is not checked", func(p *Profile) { p.FE.BiasV = 12 }, &ModeUse{AP: true}, "", ""},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			p := DefaultProfile()
			c.edit(&p)
			err := p.CheckLimits(c.uses)
			if c.quantity == "" {
				if err != nil {
					t.Fatalf("CheckLimits = %v, want nil", err)
				}
				return
			}
			var le *LimitError
			if !errors.As(err, &le) || !errors.Is(err, ErrBeyondLimits) {
				t.Fatalf("CheckLimits = %v, want *LimitError", err)
			}
			if !strings.HasPrefix(le.Quantity, c.quantity) || le.Limit != c.limit {
				t.Errorf("LimitError names %q / %q, want %q / %q", le.Quantity, le.Limit, c.quantity, c.limit)
			}
			if !(le.Value > le.Max) {
				t.Errorf("LimitError value %v not above max %v", le.Value, le.Max)
			}
		})
	}
	p := DefaultProfile()
	if err := p.checkField(2500, 1000); err == nil || !strings.Contains(err.Error(), "limits.scan_field_nm") || !strings.Contains(err.Error(), "2500 nm") {
		t.Errorf("checkField(2500, 1000) = %v, want a scan-field limit error", err)
	}
}

// Issue 16: validation accepted values no instrument has, and the planner
// then overflowed or allocated without bound. Each is refused with the
// field, the value and the range.
func TestValidatePlausibleRanges(t *testing.T) {
	cases := []struct {
		name string
		edit func(*Profile)
		want string
	}{
		{"settle of 1e306 s", func(p *Profile) { p.SettleS = 1e306 }, "settle_s = 1e+306: must be from 0 to 3600 s"},
		{"move at 5e-324 nm/s", func(p *Profile) { p.MoveSpeedNMPerS = 5e-324 }, "move_speed_nm_per_s = 5e-324: must be from 0.001 to 1e+07 nm/s"},
		{"registration of 1e308 s", func(p *Profile) { p.Drift.RegistrationS = 1e308 }, "drift.registration_s = 1e+308: must be from 0 to 86400 s"},
		{"yield of 5e-324", func(p *Profile) { p.Exposure.Vibrational.YieldPerElectron = 5e-324 }, "exposure.vibrational.yield_per_electron = 5e-324: must be from 1e-15 to 1 H atoms per electron"},
		{"bias of 1e307 V", func(p *Profile) { p.AP.BiasV = 1e307; p.Limits.MaxBiasV = 1e308 }, "ap.bias_v = 1e+307: must be non-zero and within ±100 V"},
		{"bias limit of 1e308 V", func(p *Profile) { p.Limits.MaxBiasV = 1e308 }, "limits.max_bias_v = 1e+308: must be more than 0 and at most 100 V"},
		{"current of 1 mA", func(p *Profile) { p.FE.CurrentA = 1e-3 }, "fe.current_a = 0.001: must be from 1 fA to 1 µA (1e-15 to 1e-06 A)"},
		{"current of 1e-300 A", func(p *Profile) { p.AP.CurrentA = 1e-300; p.AP.LineDoseCPerCm = 1e300 }, "ap.current_a = 1e-300: must be from 1 fA to 1 µA"},
		{"dose of 1e300 C/cm", func(p *Profile) { p.AP.LineDoseCPerCm = 1e300 }, "ap.line_dose_c_per_cm = 1e+300: must be from 1e-09 to 0.1 C/cm"},
		{"writing slower than 1 pm/s", func(p *Profile) {
			p.AP.CurrentA = 1e-15
			p.AP.LineDoseCPerCm = 0.1
		},
			"ap.line_dose_c_per_cm = 0.1: with ap.current_a = 1e-15 A the tip would write at 1e-07 nm/s; a writing speed must be from 0.001"},
		{"FE fill completion 1", func(p *Profile) { p.FE.FillCompletion = 1 }, "fe.fill_completion = 1: must be from 0.5 to 0.99999999"},
		{"dwell of years", func(p *Profile) { p.Dwell.CurrentA = 1e-12 }, "dwell.current_a = 1e-12: a dwell at 3.5 V and this current reaches its completion after"},
		{"drift of 1e6 nm/min", func(p *Profile) { p.Drift.RateNMPerMin = 1e6 }, "drift.rate_nm_per_min = 1e+06: must be from 0 to 100 nm/min"},
		{"tolerance of 1e-300 nm", func(p *Profile) { p.ToleranceAPNM = 1e-300 }, "tolerance_ap_nm = 1e-300: must be from 0.001 to 1000 nm"},
		{"sigma of 1e9 nm", func(p *Profile) { p.FE.SigmaNM = 1e9 }, "fe.sigma_nm = 1e+09: must be from 0.01 to 100 nm"},
		{"scan field of 1 m", func(p *Profile) { p.Limits.ScanFieldNM = 1e9 }, "limits.scan_field_nm = 1e+09: must be more than 0 and at most 100000 nm"},
		{"a tip change every 5e-324 s", func(p *Profile) { p.Session.TipChanges.MeanWriteS = 5e-324 }, "session.tip_changes.mean_write_s = 5e-324: must be from 1 to 1e+07 s"},
	}
	for _, c := range cases {
		t.Run(c.name, func(t *testing.T) {
			p := DefaultProfile()
			c.edit(&p)
			err := p.Validate()
			if err == nil || !strings.Contains(err.Error(), c.want) {
				t.Errorf("Validate() = %v\nwant a problem containing %q", err, c.want)
			}
		})
	}
	// Both presets sit well inside every range.
	for _, name := range Presets() {
		p, _ := Preset(name)
		if err := p.Validate(); err != nil {
			t.Errorf("preset %s: %v", name, err)
		}
	}
}

// Issue 16: --profile read a 1 GiB file whole before refusing it.
func TestLoadProfileRefusesAGigabyte(t *testing.T) {
	path := filepath.Join(t.TempDir(), "big.json")
	f, _ := os.Create(path)
	f.WriteString(`{"format": "dimerpath-profile", "version": 1, "notes": "`)
	if err := f.Truncate(1 << 30); err != nil {
		t.Skip("no sparse files here:", err)
	}
	f.Close()
	_, err := LoadProfile(path)
	if !errors.Is(err, ErrInvalidProfile) || !strings.Contains(err.Error(), "big.json: the file holds 1 GiB, more than the 1 MiB limit") {
		t.Errorf("LoadProfile(1 GiB) = %v", err)
	}
}
