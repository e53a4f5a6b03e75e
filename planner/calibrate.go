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

	"gonum.org/v1/gonum/stat/distuv"

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
	// Direction is the line's direction relative to the dimer rows,
	// DirectionAlong or DirectionAcross, or "" when the file does not say.
	Direction string
}

// Line directions relative to the dimer rows, as a measurement file gives
// them.
const (
	DirectionAlong  = "along"
	DirectionAcross = "across"
)

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
	colDirection = "direction"
)

// maxMeasurements bounds a measurement file: a calibration pattern has
// tens of lines, not millions.
const maxMeasurements = 100000

// maxMeasuredWidthNM bounds a test line's width: 10 µm, far wider than
// the widest line the exposure model gives (σ ≤ MaxSigmaNM).
const maxMeasuredWidthNM = 1e4

// MaxMeasurementBytes bounds a measurement file (16 MiB); a larger file
// is refused before it is read.
const MaxMeasurementBytes = 16 << 20

// ReadMeasurements reads a calibration CSV: a header line naming the
// columns bias_v, current_a or current_na, speed_nm_per_s and width_nm
// (and optionally mode, "ap" or "fe", and direction, "along" or "across"
// the dimer rows), in any order, then one test line
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
		case colBias, colCurrentA, colCurrentNA, colSpeed, colWidth, colMode, colDirection:
		default:
			return nil, fail(line, "", h, fmt.Errorf("unknown column %q in the header (want bias_v, current_a or current_na, speed_nm_per_s, width_nm, optional mode and direction)", jsonfile.Prefix(h, jsonfile.MaxQuote)))
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
		if math.Abs(m.BiasV) > MaxBiasV {
			return nil, fail(line, colBias, rec[index[colBias]], fmt.Errorf("bias beyond ±%d V, more than any tip is biased", MaxBiasV))
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
		if m.CurrentA < MinCurrentA || m.CurrentA > MaxCurrentA {
			return nil, fail(line, curCol, rec[index[curCol]], errors.New("current outside 1 fA to 1 µA, the range a profile takes"))
		}
		if m.SpeedNMPerS, err = num(colSpeed); err != nil {
			return nil, err
		}
		if !(m.SpeedNMPerS > 0) {
			return nil, fail(line, colSpeed, rec[index[colSpeed]], errors.New("speed must be positive"))
		}
		if m.SpeedNMPerS < MinSpeedNMPerS || m.SpeedNMPerS > MaxSpeedNMPerS {
			return nil, fail(line, colSpeed, rec[index[colSpeed]], fmt.Errorf("speed outside %s to %s nm/s, the range a profile takes", jsonfile.Number(MinSpeedNMPerS), jsonfile.Number(MaxSpeedNMPerS)))
		}
		if m.WidthNM, err = num(colWidth); err != nil {
			return nil, err
		}
		if m.WidthNM < 0 {
			return nil, fail(line, colWidth, rec[index[colWidth]], errors.New("width must not be negative (write 0 for no line)"))
		}
		if m.WidthNM > maxMeasuredWidthNM {
			return nil, fail(line, colWidth, rec[index[colWidth]], fmt.Errorf("width above %s nm: no written test line is that wide", jsonfile.Number(maxMeasuredWidthNM)))
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
		if i, ok := index[colDirection]; ok {
			switch d := strings.ToLower(strings.TrimSpace(rec[i])); d {
			case DirectionAlong, DirectionAcross:
				m.Direction = d
			default:
				return nil, fail(line, colDirection, rec[i], errors.New(`direction must be "along" or "across" (the dimer rows)`))
			}
		}
		out = append(out, m)
	}
	if len(out) == 0 {
		return nil, fail(line, "", "", errors.New("no measurements after the header"))
	}
	return out, nil
}

// Estimate is a fitted value with its standard error and 95 % interval.
type Estimate struct {
	Value float64 `json:"value"`
	SE    float64 `json:"se"`
	Lo95  float64 `json:"lo95"`
	Hi95  float64 `json:"hi95"`
}

// Residual is one test line's fit result. A censored line (no line
// written) has no residual: FitNM says what the model predicts there.
type Residual struct {
	Line       int     `json:"line"`
	DoseCPerCm float64 `json:"dose_c_per_cm"`
	CurrentA   float64 `json:"current_a"`
	BiasV      float64 `json:"bias_v"`
	WidthNM    float64 `json:"width_nm"`
	FitNM      float64 `json:"fit_nm"`
	ResidualNM float64 `json:"residual_nm"` // measured − fitted; 0 when censored
	Censored   bool    `json:"censored,omitempty"`
}

// LineFit is the fit of the exposure model to one group of test lines
// (one write mode, one direction relative to the dimer rows).
//
// The model: a line of dose λ written at bias V and current I clears its
// sites with probability at least ½ across the width w with
//
//	w² = 8σ²·ln(X/ln 2),  X = Y(V, I)·(λ/e)·(1/n_H)/(√(2π)·σ),
//	Y(V, I) = Y_ref·(I/I_ref)^(n−1)·10^((V−V_ref)/D)
//
// (see ExposureModel and LineModel.Width), which is linear in its
// coefficients: w² = m + b·ln(λ/λ_ref) + c·ln(I/I_ref) + d·(V−V_ref),
// with b = 8σ², c = b·(n−1), d = b·ln 10/D. The current term is fitted
// when the lines span more than one current, the bias term when they
// span more than one bias; λ_ref, I_ref and V_ref are the lines' means
// (geometric for dose and current), so the reference point lies among
// the data. Lines that wrote nothing are censored observations, w² ≤ 0
// (X ≤ ln 2), not dropped: the fit is by maximum likelihood (Tobit), and
// by least squares when no line is censored. The noise is taken as
// Gaussian with one standard deviation on w².
type LineFit struct {
	Mode      design.Mode `json:"mode"`
	Direction string      `json:"direction,omitempty"`
	Lines     int         `json:"lines"`
	Censored  int         `json:"censored"`
	// Terms names the fitted coefficients: "intercept", "dose", and
	// "current" and "bias" when fitted.
	Terms []string  `json:"terms"`
	Coef  []float64 `json:"coef_nm2"`
	// Cov is the covariance of Coef.
	Cov [][]float64 `json:"cov_nm4"`
	// ResidualSDNM2 is the residual standard deviation of w² (nm²) with
	// DOF = lines − coefficients degrees of freedom.
	ResidualSDNM2 float64 `json:"residual_sd_nm2"`
	DOF           int     `json:"dof"`

	RefDoseCPerCm float64 `json:"ref_dose_c_per_cm"`
	RefCurrentA   float64 `json:"ref_current_a"`
	RefBiasV      float64 `json:"ref_bias_v"`
	// Regime is the yield regime of RefBiasV.
	Regime string `json:"regime"`

	Sigma Estimate `json:"sigma_nm"`
	// Yield is Y at the reference bias and current (H per electron).
	Yield Estimate `json:"yield_per_electron"`
	// ThresholdDose is the dose at which a line first appears (X = ln 2)
	// at the reference bias and current.
	ThresholdDose Estimate `json:"threshold_dose_c_per_cm"`
	// Order (n) and DecadeV (D) are set when the current and bias terms
	// are fitted.
	Order   *Estimate `json:"order,omitempty"`
	DecadeV *Estimate `json:"decade_v,omitempty"`
	// CorrSigmaYield is the correlation of the fitted σ and ln Y.
	CorrSigmaYield float64 `json:"corr_sigma_yield"`

	Residuals []Residual `json:"residuals"`
	Warnings  []string   `json:"warnings,omitempty"`
}

// Calibration errors.
var (
	ErrTooFewPoints = errors.New("too few usable lines to fit")
	ErrNonPhysical  = errors.New("fit is not physical")
)

// lnYieldOffset is ln((1e−7 C/cm per C/nm)·(1/n_H)/(e·√(2π))): with it,
// ln X = ln Y + ln λ[C/cm] + lnYieldOffset − ln σ.
var lnYieldOffset = math.Log(1 / nmPerCm * SiteAreaNM2 / (ElementaryCharge * math.Sqrt(2*math.Pi)))

// FitLines fits the exposure model (see LineFit) to the test lines ms,
// all of one mode and direction. It returns ErrTooFewPoints when fewer
// lines than coefficients plus one are usable or every line is censored,
// and ErrNonPhysical when the width does not grow with dose or the model
// cannot be fitted (the dose and current vary together, the likelihood
// does not converge). file names the measurement file in messages.
func FitLines(ms []Measurement, file string) (LineFit, error) {
	var fit LineFit
	if len(ms) == 0 {
		return fit, fmt.Errorf("%s: %w: no lines", file, ErrTooFewPoints)
	}
	fit.Mode, fit.Direction, fit.Lines = ms[0].Mode, ms[0].Direction, len(ms)
	lnDose, lnCur, bias := 0.0, 0.0, 0.0
	distinctCur, distinctBias := false, false
	for _, m := range ms {
		lnDose += math.Log(m.DoseCPerCm())
		lnCur += math.Log(m.CurrentA)
		bias += m.BiasV
		distinctCur = distinctCur || math.Abs(math.Log(m.CurrentA/ms[0].CurrentA)) > math.Log(1.05)
		distinctBias = distinctBias || math.Abs(m.BiasV-ms[0].BiasV) > 0.05
	}
	n := float64(len(ms))
	fit.RefDoseCPerCm, fit.RefCurrentA, fit.RefBiasV = math.Exp(lnDose/n), math.Exp(lnCur/n), bias/n
	fit.Terms = []string{"intercept", "dose"}
	if distinctCur {
		fit.Terms = append(fit.Terms, "current")
	}
	if distinctBias {
		fit.Terms = append(fit.Terms, "bias")
	}
	p := len(fit.Terms)
	row := func(m Measurement) []float64 {
		r := []float64{1, math.Log(m.DoseCPerCm() / fit.RefDoseCPerCm)}
		if distinctCur {
			r = append(r, math.Log(m.CurrentA/fit.RefCurrentA))
		}
		if distinctBias {
			r = append(r, m.BiasV-fit.RefBiasV)
		}
		return r
	}
	x := make([][]float64, len(ms))
	y := make([]float64, len(ms))
	cens := make([]bool, len(ms))
	for i, m := range ms {
		x[i], y[i], cens[i] = row(m), m.WidthNM*m.WidthNM, m.WidthNM == 0
		if cens[i] {
			fit.Censored++
		}
	}
	written := len(ms) - fit.Censored
	switch {
	case written == 0:
		return fit, fmt.Errorf("%s: %w: all %d lines wrote nothing (censored): write some above the threshold", file, ErrTooFewPoints, len(ms))
	case len(ms) < p+1:
		return fit, fmt.Errorf("%s: %w: %d line(s) for %d coefficients (%s) and the noise: need at least %d", file, ErrTooFewPoints, len(ms), p, strings.Join(fit.Terms, ", "), p+1)
	}
	doses := map[float64]bool{}
	for i, m := range ms {
		if !cens[i] {
			doses[math.Round(math.Log(m.DoseCPerCm())*1e6)] = true
		}
	}
	if len(doses) < 2 {
		return fit, fmt.Errorf("%s: %w: the written lines are all at one dose (%.4g mC/cm); vary the speed", file, ErrTooFewPoints, ms[firstWritten(cens)].DoseCPerCm()*1e3)
	}
	cf, err := fitCensored(x, y, cens)
	if err != nil {
		what := err.Error()
		if distinctCur {
			what += " (do the dose and the current vary together? vary the speed at each current)"
		}
		return fit, fmt.Errorf("%s: %w: %s", file, ErrNonPhysical, what)
	}
	fit.Coef, fit.DOF, fit.ResidualSDNM2 = cf.Beta, cf.DOF, cf.S
	fit.Cov = make([][]float64, p)
	for i := range p {
		fit.Cov[i] = make([]float64, p)
		for j := range p {
			fit.Cov[i][j] = cf.Cov.At(i, j)
		}
	}
	mc, b := cf.Beta[0], cf.Beta[1]
	if !(b > 0) {
		return fit, fmt.Errorf("%s: %w: the width does not grow with dose (slope of w² on ln dose = %.4g nm²); check the measurements", file, ErrNonPhysical, b)
	}
	tq := studentT975(fit.DOF)
	se := func(i int) float64 { return math.Sqrt(math.Max(cf.Cov.At(i, i), 0)) }
	// var of a·β for a gradient a.
	varOf := func(g []float64) float64 {
		v := 0.0
		for i := range g {
			for j := range g {
				v += g[i] * g[j] * cf.Cov.At(i, j)
			}
		}
		return math.Max(v, 0)
	}
	covOf := func(g, h []float64) float64 {
		v := 0.0
		for i := range g {
			for j := range h {
				v += g[i] * h[j] * cf.Cov.At(i, j)
			}
		}
		return v
	}
	grad := func(entries map[int]float64) []float64 {
		g := make([]float64, p)
		for i, v := range entries {
			g[i] = v
		}
		return g
	}
	// σ = √(b/8): its interval from b's, which is exact for least squares.
	sigma := math.Sqrt(b / 8)
	bLo, bHi := b-tq*se(1), b+tq*se(1)
	gSigma := grad(map[int]float64{1: 1 / (16 * sigma)})
	fit.Sigma = Estimate{Value: sigma, SE: math.Sqrt(varOf(gSigma)), Lo95: math.Sqrt(math.Max(bLo, 0) / 8), Hi95: math.Sqrt(bHi / 8)}
	// ln Y_ref = m/b − ln λ_ref − offset + ln σ + ln ln 2.
	lnY := mc/b - math.Log(fit.RefDoseCPerCm) - lnYieldOffset + math.Log(sigma) + math.Log(math.Ln2)
	gLnY := grad(map[int]float64{0: 1 / b, 1: -mc/(b*b) + 1/(2*b)})
	seLnY := math.Sqrt(varOf(gLnY))
	fit.Yield = Estimate{Value: math.Exp(lnY), SE: math.Exp(lnY) * seLnY, Lo95: math.Exp(lnY - tq*seLnY), Hi95: math.Exp(lnY + tq*seLnY)}
	// ln λ_thr = ln λ_ref − m/b.
	lnThr := math.Log(fit.RefDoseCPerCm) - mc/b
	seThr := math.Sqrt(varOf(grad(map[int]float64{0: -1 / b, 1: mc / (b * b)})))
	fit.ThresholdDose = Estimate{Value: math.Exp(lnThr), SE: math.Exp(lnThr) * seThr, Lo95: math.Exp(lnThr - tq*seThr), Hi95: math.Exp(lnThr + tq*seThr)}
	if fit.Sigma.SE > 0 && seLnY > 0 {
		fit.CorrSigmaYield = covOf(gSigma, gLnY) / (fit.Sigma.SE * seLnY)
	}
	k := 2
	if distinctCur {
		c := cf.Beta[k]
		g := grad(map[int]float64{k: 1 / b, 1: -c / (b * b)})
		v, s := 1+c/b, math.Sqrt(varOf(g))
		fit.Order = &Estimate{Value: v, SE: s, Lo95: v - tq*s, Hi95: v + tq*s}
		k++
	}
	if distinctBias {
		d := cf.Beta[k]
		g := grad(map[int]float64{1: math.Ln10 / d, k: -b * math.Ln10 / (d * d)})
		v, s := b*math.Ln10/d, math.Sqrt(varOf(g))
		fit.DecadeV = &Estimate{Value: v, SE: s, Lo95: v - tq*s, Hi95: v + tq*s}
	}
	for i, m := range ms {
		w2 := 0.0
		for j, xv := range x[i] {
			w2 += xv * cf.Beta[j]
		}
		w := math.Sqrt(math.Max(w2, 0))
		r := Residual{Line: m.Line, DoseCPerCm: m.DoseCPerCm(), CurrentA: m.CurrentA, BiasV: m.BiasV, WidthNM: m.WidthNM, FitNM: w, Censored: cens[i]}
		if !cens[i] {
			r.ResidualNM = m.WidthNM - w
		} else if w2 > 2*cf.S {
			fit.Warnings = append(fit.Warnings, fmt.Sprintf("line %d wrote nothing at %.4g mC/cm, where the fit expects a %.2f nm line (w² %.2g nm², noise %.2g nm²): check it",
				m.Line, m.DoseCPerCm()*1e3, w, w2, cf.S))
		}
		fit.Residuals = append(fit.Residuals, r)
	}
	fit.warnCurrent(ms, tq)
	return fit, nil
}

func firstWritten(cens []bool) int {
	for i, c := range cens {
		if !c {
			return i
		}
	}
	return 0
}

// warnCurrent warns when lines at one dose but different currents
// disagree: the current coefficient differs from 0 by more than its 95 %
// interval allows. The yield then depends on the current, as in the
// multi-electron (vibrational) regime.
func (fit *LineFit) warnCurrent(ms []Measurement, tq float64) {
	if fit.Order == nil {
		return
	}
	// Find a dose at which lines of different currents were written.
	byDose := map[float64][]Measurement{}
	for _, m := range ms {
		k := math.Round(math.Log(m.DoseCPerCm()) * 50) // within 2 %
		byDose[k] = append(byDose[k], m)
	}
	var at []Measurement
	for _, g := range byDose {
		lo, hi := math.Inf(1), math.Inf(-1)
		for _, m := range g {
			lo, hi = math.Min(lo, m.CurrentA), math.Max(hi, m.CurrentA)
		}
		if hi > 1.05*lo && (at == nil || len(g) > len(at)) {
			at = g
		}
	}
	c, sc := fit.Coef[2], math.Sqrt(fit.Cov[2][2])
	if math.Abs(c) <= tq*sc {
		return
	}
	where := "lines of one dose"
	if at != nil {
		lo, hi := math.Inf(1), math.Inf(-1)
		for _, m := range at {
			lo, hi = math.Min(lo, m.CurrentA), math.Max(hi, m.CurrentA)
		}
		where = fmt.Sprintf("lines at %.4g mC/cm", at[0].DoseCPerCm()*1e3)
		where += fmt.Sprintf(" written at %.3g–%.3g nA", lo*1e9, hi*1e9)
	}
	msg := fmt.Sprintf("%s disagree in width beyond the noise: the yield per electron depends on the current (fitted n = %.2f ± %.2f, rate ∝ I^n)", where, fit.Order.Value, fit.Order.SE)
	if fit.Regime == RegimeElectronic {
		msg += "; in the electronic regime it should not (Shen et al. 1995): check the tip and the bias"
	} else {
		msg += ": the multi-electron (vibrational) regime of Shen et al. 1995"
	}
	fit.Warnings = append(fit.Warnings, msg)
}

// studentT975 returns the 97.5 % quantile of Student's t with dof degrees
// of freedom (gonum distuv).
func studentT975(dof int) float64 {
	return distuv.StudentsT{Mu: 0, Sigma: 1, Nu: float64(max(dof, 1))}.Quantile(0.975)
}

// Calibrate fits the exposure model to the test lines of each mode in ms
// and returns base with the fitted values in place: the mode's footprint
// σ, and the yield of the regime its lines were written in (the
// vibrational reference yield, bias and current, and n and D where the
// lines determine them; or the electronic yield). mode selects the mode
// when the file has no mode column (AP when empty) and restricts the fit
// to that mode when it has one. Lines along and across the dimer rows
// are fitted apart when both are present; the profile takes the fit
// along the rows (the direction dimerpath writes). The result is
// validated. Every error names source, the measurement file.
func Calibrate(base Profile, ms []Measurement, mode design.Mode, source string) (Profile, []LineFit, error) {
	type key struct {
		mode design.Mode
		dir  string
	}
	groups := map[key][]Measurement{}
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
		groups[key{md, m.Direction}] = append(groups[key{md, m.Direction}], m)
	}
	if len(groups) == 0 {
		return base, nil, fmt.Errorf("%s: %w: no lines of mode %q", source, ErrTooFewPoints, mode)
	}
	p := base
	var fits []LineFit
	for _, md := range []design.Mode{design.ModeAP, design.ModeFE} {
		var used *LineFit
		dirs := []string{DirectionAlong, "", DirectionAcross}
		_, hasAlong := groups[key{md, DirectionAlong}]
		_, hasAcross := groups[key{md, DirectionAcross}]
		for _, dir := range dirs {
			group, ok := groups[key{md, dir}]
			if !ok {
				continue
			}
			fit, err := FitLines(group, source)
			fit.Mode, fit.Direction = md, dir
			fit.Regime = p.Exposure.Regime(fit.RefBiasV)
			if err != nil {
				what := string(md)
				if dir != "" {
					what += " lines " + dir + " the rows"
				} else {
					what += " lines"
				}
				return base, append(fits, fit), fmt.Errorf("%s: %w", what, err)
			}
			fits = append(fits, fit)
			if used == nil {
				used = &fits[len(fits)-1]
			}
		}
		if used == nil {
			continue
		}
		if hasAcross && !hasAlong && len(groups[key{md, ""}]) == 0 {
			used.Warnings = append(used.Warnings, "only lines across the dimer rows were measured: the profile takes their fit, but dimerpath writes along the rows")
		}
		if err := p.apply(used, source); err != nil {
			return base, fits, err
		}
	}
	p.Name = fmt.Sprintf("%s, calibrated from %s", base.Name, filepath.Base(source))
	p.Notes = strings.TrimSpace(p.Notes + "\nexposure model calibrated from " + source)
	if err := p.Validate(); err != nil {
		return base, fits, fmt.Errorf("calibrated profile: %w", err)
	}
	return p, fits, nil
}

// apply puts a fit into the profile: σ into the mode, the yield into the
// regime its lines were written in.
func (p *Profile) apply(fit *LineFit, source string) error {
	mp := &p.AP
	if fit.Mode == design.ModeFE {
		mp = &p.FE
	}
	mp.SigmaNM = fit.Sigma.Value
	switch fit.Regime {
	case RegimeVibrational:
		v := &p.Exposure.Vibrational
		v.YieldPerElectron, v.BiasV, v.CurrentA = fit.Yield.Value, fit.RefBiasV, fit.RefCurrentA
		if fit.Order != nil {
			if fit.Order.Value >= 1 {
				v.Order = fit.Order.Value
			} else {
				fit.Warnings = append(fit.Warnings, fmt.Sprintf("fitted n = %.2f is below 1 (the yield falls with current): the profile keeps n = %g", fit.Order.Value, v.Order))
			}
		}
		if fit.DecadeV != nil {
			if fit.DecadeV.Value > 0 {
				v.DecadeV = fit.DecadeV.Value
			} else {
				fit.Warnings = append(fit.Warnings, fmt.Sprintf("the fitted yield falls with bias (D = %.3g V): the profile keeps D = %g V", fit.DecadeV.Value, v.DecadeV))
			}
		}
	case RegimeElectronic:
		p.Exposure.Electronic.YieldPerElectron = fit.Yield.Value
		if fit.DecadeV != nil {
			fit.Warnings = append(fit.Warnings, "the lines span more than one bias; the electronic-regime yield is taken as one value (at their mean bias)")
		}
	default:
		return fmt.Errorf("%s: %s lines written at %.2f V lie between the vibrational (≤ %g V) and electronic (≥ %g V) regimes, where the model only interpolates: calibrate at a bias in one regime",
			source, fit.Mode, fit.RefBiasV, p.Exposure.Vibrational.MaxBiasV, p.Exposure.Electronic.ThresholdV)
	}
	if math.Abs(fit.RefBiasV-mp.BiasV) > 0.25 {
		fit.Warnings = append(fit.Warnings, fmt.Sprintf("lines were written at %.2f V on average but the profile's %s bias is %.2f V: the model carries the yield over, but calibrate at the bias you write with", fit.RefBiasV, fit.Mode, mp.BiasV))
	}
	return nil
}
