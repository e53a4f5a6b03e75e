package planner

import (
	"errors"
	"fmt"
	"io"
	"math"
	"path/filepath"
	"slices"
	"strconv"
	"strings"

	"gonum.org/v1/gonum/stat"

	"dimerpath/internal/csvfile"
	"dimerpath/internal/jsonfile"
	"dimerpath/lattice/design"
)

// Measurement is one test line a lab wrote and measured: the tip
// conditions, the writing speed and the measured line width.
type Measurement struct {
	Line        int     // line in the CSV file, for messages
	BiasV       float64 // sample bias
	CurrentA    float64 // setpoint current
	SpeedNMPerS float64 // tip speed while writing
	WidthNM     float64 // measured line width; 0 when no line was written
	// Mode is the write mode the line was written in, or "" when the
	// file has no mode column.
	Mode design.Mode
}

// DoseCPerCm returns the line dose I/v in C/cm.
func (m Measurement) DoseCPerCm() float64 { return m.CurrentA / m.SpeedNMPerS * nmPerCm }

// ErrBadMeasurement is wrapped by the *csvfile.Error of every bad
// measurement file.
var ErrBadMeasurement = errors.New("bad measurement")

// Measurement file columns. The header names the current's unit:
// current_a in amperes or current_na in nanoamperes.
const (
	colBias      = "bias_v"
	colCurrentA  = "current_a"
	colCurrentNA = "current_na"
	colSpeed     = "speed_nm_per_s"
	colWidth     = "width_nm"
	colMode      = "mode"
)

// maxMeasurements bounds a measurement file: a calibration pattern has
// tens of lines, not millions.
const maxMeasurements = 100000

// MaxMeasurementBytes bounds a measurement file (16 MiB); a larger file
// is refused before it is read.
const MaxMeasurementBytes = 16 << 20

// ReadMeasurements reads a calibration CSV: a header line naming the
// columns bias_v, current_a or current_na, speed_nm_per_s and width_nm
// (and optionally mode, "ap" or "fe"), in any order, then one test line
// per record. Lines starting with '#' and blank lines are skipped. Every
// error is a *csvfile.Error wrapping ErrBadMeasurement that names the
// file (name), the line and the column. At most MaxMeasurementBytes and
// csvfile.MaxLine bytes a line are read.
func ReadMeasurements(r io.Reader, name string) ([]Measurement, error) {
	cr, err := csvfile.NewReader(r, name, MaxMeasurementBytes, ErrBadMeasurement)
	if err != nil {
		return nil, err
	}
	fail := func(line int, col, val string, err error) error {
		return cr.Errorf(line, col, val, "%w", err)
	}
	header, line, err := cr.Read()
	if err == io.EOF {
		return nil, fail(1, "", "", errors.New("empty file: want a header line with bias_v, current_a or current_na, speed_nm_per_s, width_nm"))
	}
	if err != nil {
		return nil, err
	}
	header = slices.Clone(header)
	index := map[string]int{}
	for i, h := range header {
		h = strings.ToLower(strings.TrimSpace(h))
		switch h {
		case colBias, colCurrentA, colCurrentNA, colSpeed, colWidth, colMode:
		default:
			return nil, fail(line, "", h, fmt.Errorf("unknown column %q in the header (want bias_v, current_a or current_na, speed_nm_per_s, width_nm, optional mode)", jsonfile.Prefix(h, jsonfile.MaxQuote)))
		}
		if _, dup := index[h]; dup {
			return nil, fail(line, "", h, fmt.Errorf("column %q appears twice in the header", jsonfile.Prefix(h, jsonfile.MaxQuote)))
		}
		index[h] = i
	}
	_, hasA := index[colCurrentA]
	_, hasNA := index[colCurrentNA]
	switch {
	case hasA && hasNA:
		return nil, fail(line, "", "", errors.New("header has both current_a and current_na: give the current once, in one unit"))
	case !hasA && !hasNA:
		return nil, fail(line, "", "", errors.New("header lacks the current: name it current_a (amperes) or current_na (nanoamperes)"))
	}
	for _, c := range []string{colBias, colSpeed, colWidth} {
		if _, ok := index[c]; !ok {
			return nil, fail(line, "", "", fmt.Errorf("header lacks the %s column", c))
		}
	}
	var out []Measurement
	for {
		rec, recLine, err := cr.Read()
		if err == io.EOF {
			break
		}
		if err != nil {
			return nil, err
		}
		line = recLine
		if len(rec) != len(header) {
			return nil, fail(line, "", "", fmt.Errorf("%d fields, want %d as in the header", len(rec), len(header)))
		}
		if len(out) == maxMeasurements {
			return nil, fail(line, "", "", fmt.Errorf("more than %d measurements: is this a calibration file?", maxMeasurements))
		}
		num := func(col string) (float64, error) {
			raw := strings.TrimSpace(rec[index[col]])
			v, err := strconv.ParseFloat(raw, 64)
			if err != nil || math.IsNaN(v) || math.IsInf(v, 0) {
				return 0, fail(line, col, raw, errors.New("not a finite number"))
			}
			return v, nil
		}
		m := Measurement{Line: line}
		if m.BiasV, err = num(colBias); err != nil {
			return nil, err
		}
		if m.BiasV == 0 {
			return nil, fail(line, colBias, rec[index[colBias]], errors.New("bias must not be zero"))
		}
		curCol, scale := colCurrentA, 1.0
		if hasNA {
			curCol, scale = colCurrentNA, 1e-9
		}
		if m.CurrentA, err = num(curCol); err != nil {
			return nil, err
		}
		m.CurrentA *= scale
		if !(m.CurrentA > 0) {
			return nil, fail(line, curCol, rec[index[curCol]], errors.New("current must be positive"))
		}
		if hasA && m.CurrentA > 1e-6 {
			return nil, fail(line, curCol, rec[index[curCol]], errors.New("current above 1 µA: is the column in nA? name it current_na"))
		}
		if m.SpeedNMPerS, err = num(colSpeed); err != nil {
			return nil, err
		}
		if !(m.SpeedNMPerS > 0) {
			return nil, fail(line, colSpeed, rec[index[colSpeed]], errors.New("speed must be positive"))
		}
		if m.WidthNM, err = num(colWidth); err != nil {
			return nil, err
		}
		if m.WidthNM < 0 {
			return nil, fail(line, colWidth, rec[index[colWidth]], errors.New("width must not be negative (write 0 for no line)"))
		}
		if i, ok := index[colMode]; ok {
			switch strings.ToLower(strings.TrimSpace(rec[i])) {
			case "ap":
				m.Mode = design.ModeAP
			case "fe":
				m.Mode = design.ModeFE
			default:
				return nil, fail(line, colMode, rec[i], errors.New(`mode must be "ap" or "fe"`))
			}
		}
		out = append(out, m)
	}
	if len(out) == 0 {
		return nil, fail(line, "", "", errors.New("no measurements after the header"))
	}
	return out, nil
}

// Residual is one measurement's fit result.
type Residual struct {
	Line       int     `json:"line"`
	DoseCPerCm float64 `json:"dose_c_per_cm"`
	WidthNM    float64 `json:"width_nm"`
	FitNM      float64 `json:"fit_nm"`
	ResidualNM float64 `json:"residual_nm"` // measured - fitted
}

// WidthFit is the least-squares fit of the width-vs-dose model to a
// lab's lines: w² = A + B·ln λ, so σ = sqrt(B/8) and λ_thr = exp(-A/B).
type WidthFit struct {
	Mode  design.Mode `json:"mode"`
	Model WidthModel  `json:"model"`
	A     float64     `json:"a_nm2"`
	B     float64     `json:"b_nm2"`
	// RSquared is the coefficient of determination of the linear fit of
	// w² on ln λ.
	RSquared  float64    `json:"r_squared"`
	RMSNM     float64    `json:"rms_nm"`
	Points    int        `json:"points"`
	Skipped   int        `json:"skipped"` // lines of width 0 (below threshold), not fitted
	Residuals []Residual `json:"residuals"`
	Warnings  []string   `json:"warnings,omitempty"`
}

// Calibration errors.
var (
	ErrTooFewPoints = errors.New("too few points to fit")
	ErrNonPhysical  = errors.New("fit is not physical")
)

// minFitPoints is the least number of written lines a fit needs: two
// parameters and at least one degree of freedom left to judge the fit.
const minFitPoints = 3

// FitWidth fits the width model to the measurements (all of one mode) by
// ordinary least squares on w² = A + B·ln λ (gonum stat.LinearRegression).
// Lines of width 0 are left out of the fit but must lie below the fitted
// threshold dose. It returns ErrTooFewPoints with fewer than 3 written
// lines or fewer than 2 distinct doses, and ErrNonPhysical when the width
// does not grow with dose or the threshold lies beyond every measured
// dose.
func FitWidth(ms []Measurement) (WidthFit, error) {
	var fit WidthFit
	if len(ms) > 0 {
		fit.Mode = ms[0].Mode
	}
	var x, y []float64
	var used []Measurement
	for _, m := range ms {
		if m.WidthNM == 0 {
			fit.Skipped++
			continue
		}
		x = append(x, math.Log(m.DoseCPerCm()))
		y = append(y, m.WidthNM*m.WidthNM)
		used = append(used, m)
	}
	fit.Points = len(x)
	if len(x) < minFitPoints {
		return fit, fmt.Errorf("%w: %d written line(s), need at least %d with a measured width", ErrTooFewPoints, len(x), minFitPoints)
	}
	distinct := slices.Clone(x)
	slices.Sort(distinct)
	distinct = slices.Compact(distinct)
	if len(distinct) < 2 {
		return fit, fmt.Errorf("%w: every line has the same dose (%.4g mC/cm); vary the speed or the current", ErrTooFewPoints, used[0].DoseCPerCm()*1e3)
	}
	fit.A, fit.B = stat.LinearRegression(x, y, nil, false)
	fit.RSquared = stat.RSquared(x, y, nil, fit.A, fit.B)
	if !(fit.B > 0) {
		return fit, fmt.Errorf("%w: the width does not grow with dose (slope of w² on ln λ = %.4g nm²); check the measurements", ErrNonPhysical, fit.B)
	}
	fit.Model = WidthModel{SigmaNM: math.Sqrt(fit.B / 8), ThresholdDoseCPerCm: math.Exp(-fit.A / fit.B)}
	maxDose := 0.0
	for _, m := range used {
		maxDose = math.Max(maxDose, m.DoseCPerCm())
	}
	if fit.Model.ThresholdDoseCPerCm >= maxDose {
		return fit, fmt.Errorf("%w: fitted threshold %.4g mC/cm lies above every measured dose", ErrNonPhysical, fit.Model.ThresholdDoseCPerCm*1e3)
	}
	ss := 0.0
	for _, m := range used {
		w := fit.Model.Width(m.DoseCPerCm())
		r := m.WidthNM - w
		ss += r * r
		fit.Residuals = append(fit.Residuals, Residual{Line: m.Line, DoseCPerCm: m.DoseCPerCm(), WidthNM: m.WidthNM, FitNM: w, ResidualNM: r})
	}
	fit.RMSNM = math.Sqrt(ss / float64(len(used)))
	for _, m := range ms {
		if m.WidthNM == 0 && m.DoseCPerCm() > 1.5*fit.Model.ThresholdDoseCPerCm {
			fit.Warnings = append(fit.Warnings, fmt.Sprintf("line %d wrote nothing at %.4g mC/cm, well above the fitted threshold %.4g mC/cm",
				m.Line, m.DoseCPerCm()*1e3, fit.Model.ThresholdDoseCPerCm*1e3))
		}
	}
	lo, hi := math.Inf(1), math.Inf(-1)
	for _, m := range ms {
		lo, hi = math.Min(lo, m.BiasV), math.Max(hi, m.BiasV)
	}
	if hi-lo > 0.25 {
		fit.Warnings = append(fit.Warnings, fmt.Sprintf("biases range over %.2f–%.2f V: line width also grows with bias (Schmucker et al. 2012), so fit one bias at a time", lo, hi))
	}
	if fit.RSquared < 0.8 {
		fit.Warnings = append(fit.Warnings, fmt.Sprintf("poor fit (R² = %.3f): the model may not describe these lines", fit.RSquared))
	}
	return fit, nil
}

// Calibrate fits the width model of each mode found in ms and returns
// base with the fitted models in place. mode selects the mode to fit
// when the file has no mode column (AP when empty) and restricts the fit
// to that mode when it has one; an empty mode with a mode column fits
// every mode present. The result is validated: a fitted threshold above
// the profile's line dose is refused with a message saying so.
func Calibrate(base Profile, ms []Measurement, mode design.Mode, source string) (Profile, []WidthFit, error) {
	byMode := map[design.Mode][]Measurement{}
	for _, m := range ms {
		md := m.Mode
		if md == "" {
			md = mode
			if md == "" {
				md = design.ModeAP
			}
		}
		if mode != "" && md != mode {
			continue
		}
		m.Mode = md
		byMode[md] = append(byMode[md], m)
	}
	if len(byMode) == 0 {
		return base, nil, fmt.Errorf("%w: no measurements of mode %q", ErrTooFewPoints, mode)
	}
	p := base
	var fits []WidthFit
	for _, md := range []design.Mode{design.ModeAP, design.ModeFE} {
		group, ok := byMode[md]
		if !ok {
			continue
		}
		fit, err := FitWidth(group)
		fit.Mode = md
		if err != nil {
			return base, append(fits, fit), fmt.Errorf("%s lines: %w", md, err)
		}
		mp := &p.AP
		if md == design.ModeFE {
			mp = &p.FE
		}
		mp.Width = fit.Model
		bias := 0.0
		for _, m := range group {
			bias += m.BiasV
		}
		bias /= float64(len(group))
		if math.Abs(bias-mp.BiasV) > 0.25 {
			fit.Warnings = append(fit.Warnings, fmt.Sprintf("lines were written at %.2f V on average but the profile's %s bias is %.2f V; set %s.bias_v to the calibrated bias", bias, md, mp.BiasV, md))
		}
		fits = append(fits, fit)
	}
	p.Name = fmt.Sprintf("%s, calibrated from %s", base.Name, filepath.Base(source))
	p.Notes = strings.TrimSpace(p.Notes + "\nwidth model calibrated from " + source)
	if err := p.Validate(); err != nil {
		return base, fits, fmt.Errorf("calibrated profile: %w", err)
	}
	return p, fits, nil
}
