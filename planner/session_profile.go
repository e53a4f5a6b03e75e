package planner

import (
	"fmt"
	"math"
	"slices"

	"dimerpath/internal/jsonfile"
	"dimerpath/lattice"
)

// The parts of the instrument profile that describe the session around
// the writing: the process steps per dopant (dose, incorporation anneal,
// finding the area again), the imaging and tip care of a session
// (survey, conditioning, tip changes, verification, repair,
// documentation), the two kinds of registration with piezo creep, and
// the drift's compensation and excess. Each default names its source or
// says "from memory" (a recalled value to calibrate, never a check
// value).

// ProcessProfile describes the process steps of a multi-dopant write:
// each species is written in its own lithography step, followed by its
// dose and an incorporation anneal.
type ProcessProfile struct {
	// SpeciesOrder is the order of the lithography steps by dopant
	// species; species of the design not listed follow in name order
	// (with a warning).
	SpeciesOrder []string `json:"species_order"`
	// Dose is the precursor exposure after each lithography step.
	Dose DoseProfile `json:"dose"`
	// Anneal is the incorporation anneal after each dose.
	Anneal AnnealProfile `json:"anneal"`
	// RefindS is the time to find the write area again after an anneal
	// (approach, coarse positioning, a look at the field), before the
	// next step's first registration.
	RefindS float64 `json:"refind_s"`
	// WindowOpenLimitS is the longest a dopant window should stay open,
	// from the end of its write to the start of its dose; the plan warns
	// above it.
	WindowOpenLimitS float64 `json:"window_open_limit_s"`
}

// DoseProfile is one precursor exposure.
type DoseProfile struct {
	// ExposureL is the exposure in langmuir (1 L = 10⁻⁶ Torr·s).
	ExposureL float64 `json:"exposure_l"`
	// PressureTorr is the precursor pressure during the dose.
	PressureTorr float64 `json:"pressure_torr"`
	// PumpdownS is the wait for the chamber to recover its base pressure
	// after the dose.
	PumpdownS float64 `json:"pumpdown_s"`
}

// TimeS returns the dose's duration: exposure / pressure plus the
// pump-down.
func (d DoseProfile) TimeS() float64 { return d.ExposureL*1e-6/d.PressureTorr + d.PumpdownS }

// AnnealProfile is one incorporation anneal.
type AnnealProfile struct {
	TemperatureC float64 `json:"temperature_c"`
	TimeS        float64 `json:"time_s"`
	// CooldownS is the time for the sample and the microscope to come
	// back to a stable writing temperature.
	CooldownS float64 `json:"cooldown_s"`
}

// SessionProfile describes the parts of a session around the writing.
// Each part can be switched off.
type SessionProfile struct {
	// Survey is the image of the write area before the first
	// lithography step.
	Survey ImageProfile `json:"survey"`
	// Conditioning prepares the tip at the start, after field-emission
	// work and after each tip change.
	Conditioning ConditioningProfile `json:"conditioning"`
	// TipChanges are tip failures, random events during writing.
	TipChanges TipChangeProfile `json:"tip_changes"`
	// Verification images every atomic-precision feature after it is
	// written.
	Verification ImageProfile `json:"verification"`
	// Repair fixes what the verification finds: each missed site a dwell
	// and a small re-image.
	Repair RepairProfile `json:"repair"`
	// Documentation is the image of the written field at the end.
	Documentation ImageProfile `json:"documentation"`
	// PInToleranceMin is the probability of staying within tolerance
	// below which the plan warns (for the whole write and per segment).
	PInToleranceMin float64 `json:"p_in_tolerance_min"`
}

// ImageProfile is an STM image: its lines are PixelNM apart across the
// shorter side of the area (with MarginNM around it), each taking LineS.
type ImageProfile struct {
	Enabled  bool    `json:"enabled"`
	PixelNM  float64 `json:"pixel_nm"`
	LineS    float64 `json:"line_s"`
	MarginNM float64 `json:"margin_nm"`
}

// TimeS returns the time of an image of a w x h nm area (the margin
// added on every side): ceil(min side / pixel) lines of LineS.
func (im ImageProfile) TimeS(w, h float64) float64 {
	side := math.Min(w, h) + 2*im.MarginNM
	if side <= 0 || im.PixelNM <= 0 {
		return 0
	}
	return math.Ceil(side/im.PixelNM-1e-9) * im.LineS
}

// ConditioningProfile is tip conditioning (voltage pulses or gentle
// field emission on a clean area, then checking the imaging resolution).
type ConditioningProfile struct {
	Enabled bool    `json:"enabled"`
	TimeS   float64 `json:"time_s"`
}

// TipChangeProfile describes tip failures: they come at random during
// writing, on average one per MeanWriteS seconds of writing, and each
// costs a conditioning and a coarse registration.
type TipChangeProfile struct {
	Enabled    bool    `json:"enabled"`
	MeanWriteS float64 `json:"mean_write_s"`
}

// RepairProfile describes the repair of missed sites found by the
// verification image: each a dwell (the profile's dwell conditions) and
// a re-image of ReimageNM square at the verification's pixel and line
// time.
type RepairProfile struct {
	Enabled   bool    `json:"enabled"`
	ReimageNM float64 `json:"reimage_nm"`
}

// RegistrationProfile describes the two kinds of registration and the
// piezo creep that follows a long move.
type RegistrationProfile struct {
	// CoarseErrorNM is the error (one standard deviation, nm) of a
	// registration on a fiducial mark; its time is drift.registration_s.
	CoarseErrorNM float64 `json:"coarse_error_nm"`
	// Local is the registration on the lattice or on features already
	// written right beside the atomic-precision work.
	Local LocalRegistration `json:"local"`
	// Creep is the piezo creep after a long move.
	Creep CreepProfile `json:"creep"`
}

// LocalRegistration is a small atomic-resolution image beside the work.
type LocalRegistration struct {
	// ErrorNM is its error, one standard deviation (nm).
	ErrorNM float64 `json:"error_nm"`
	// SizeNM, PixelNM and LineS give its time: SizeNM/PixelNM lines of
	// LineS.
	SizeNM  float64 `json:"size_nm"`
	PixelNM float64 `json:"pixel_nm"`
	LineS   float64 `json:"line_s"`
}

// TimeS returns the time of one local registration image.
func (l LocalRegistration) TimeS() float64 {
	return ImageProfile{PixelNM: l.PixelNM, LineS: l.LineS}.TimeS(l.SizeNM, l.SizeNM)
}

// CreepProfile describes piezo creep: after a move, the tip keeps going
// by Fraction of the part of the move beyond FrameNM (moves within one
// frame are made by the scan voltages), decaying exponentially with time
// constant TauS. The wait after a long move lasts until the creep still
// to come is SettleShare of the next stroke's tolerance (at most
// MaxSettleS), so it grows with the move's length.
type CreepProfile struct {
	Fraction    float64 `json:"fraction"`
	FractionSD  float64 `json:"fraction_sd"`
	TauS        float64 `json:"tau_s"`
	FrameNM     float64 `json:"frame_nm"`
	SettleShare float64 `json:"settle_share"`
	MaxSettleS  float64 `json:"max_settle_s"`
}

// DriftCompensation is feed-forward drift compensation: the rate
// measured between two registrations is subtracted from then on, and
// what is left is ResidualShare of the raw rate.
type DriftCompensation struct {
	Enabled       bool    `json:"enabled"`
	ResidualShare float64 `json:"residual_share"`
}

// DriftExcess is drift beyond the settled rate after a disturbance,
// decaying exponentially: after a long move ExcessPerUMNMPerMin per µm
// of the move beyond the creep frame, after an anneal AnnealNMPerMin.
type DriftExcess struct {
	AfterMovePerUMNMPerMin float64 `json:"after_move_nm_per_min_per_um"`
	AfterMoveTauS          float64 `json:"after_move_tau_s"`
	AfterAnnealNMPerMin    float64 `json:"after_anneal_nm_per_min"`
	AfterAnnealTauS        float64 `json:"after_anneal_tau_s"`
}

// Role tolerance defaults (see DefaultProfile).
const (
	defaultLeadToleranceNM = 1.0
	defaultGateToleranceNM = 1.0
	defaultPadToleranceNM  = 10.0
)

// sessionDefaults fills the session, process and registration parts of
// the room-temperature default profile.
func sessionDefaults(p *Profile) {
	p.Process = ProcessProfile{
		// Arsenic first: the species written first goes through every
		// later anneal, and arsenic moves less than phosphorus in silicon
		// at the same temperature (slower diffusion, common practice of
		// silicon processing; from memory for these low temperatures), so
		// the second anneal disturbs the first step's donors least. It
		// also leaves the δ-layer leads, islands, gates and pads (the
		// default dopant P) for the last step, directly before their own
		// dose. A lab may prefer the other order: the plan follows the
		// profile.
		SpeciesOrder: []string{"As", "P"},
		// A few langmuir saturate the open dangling bonds at room
		// temperature for phosphine and arsine (from memory): 2 L at
		// 1e-8 Torr is 200 s, then 10 min to recover the base pressure
		// (from memory).
		Dose: DoseProfile{ExposureL: 2, PressureTorr: 1e-8, PumpdownS: 600},
		// Incorporation at 350 °C for about a minute (phosphine, from
		// memory; physics notes: arXiv 2510.20420), then about 30 min
		// until the microscope is stable again (from memory).
		Anneal: AnnealProfile{TemperatureC: 350, TimeS: 60, CooldownS: 1800},
		// Approaching again and finding the field after the anneal,
		// from memory.
		RefindS: 900,
		// An open dangling-bond window in 1e-10 mbar sees about 1 L of
		// residual gas in 3.7 h (derived); an hour keeps its exposure to
		// a quarter of that (common practice).
		WindowOpenLimitS: 3600,
	}
	image := func(pixel, line, margin float64) ImageProfile {
		return ImageProfile{Enabled: true, PixelNM: pixel, LineS: line, MarginNM: margin}
	}
	p.Session = SessionProfile{
		// A survey of the write area at 2 nm a pixel and 2 s a line, 50
		// nm beyond it on every side (from memory): it shows the
		// terraces, steps and defects the design must fit.
		Survey: image(2, 2, 50),
		// Tip conditioning (pulses or gentle field emission on a clean
		// area, then a check of the resolution) about 10 min, from memory.
		Conditioning: ConditioningProfile{Enabled: true, TimeS: 600},
		// A tip lasts about half an hour of writing before it changes or
		// must be re-formed (field emission and pulses change it), from
		// memory.
		TipChanges: TipChangeProfile{Enabled: true, MeanWriteS: 1800},
		// Atomic-resolution verification images at 0.1 nm a pixel and
		// 0.5 s a line, 2 nm beyond each feature (from memory).
		Verification: image(0.1, 0.5, 2),
		// A 5 nm re-image of each repaired site (from memory).
		Repair: RepairProfile{Enabled: true, ReimageNM: 5},
		// The documentation image: the survey's settings.
		Documentation: image(2, 2, 50),
		// A plan should hold every tolerance with at least 90 %
		// probability (common practice).
		PInToleranceMin: 0.9,
	}
	p.Registration = RegistrationProfile{
		// A fiducial imaged at 0.2 nm a pixel (50 nm, 256 lines) is found
		// to two or three pixels: ±0.5 nm, from memory.
		CoarseErrorNM: 0.5,
		// An atomic-resolution image of the lattice (10 nm at 0.1 nm a
		// pixel, 0.25 s a line: 25 s) locates the dimer rows to about an
		// eighth of a dimer pitch, from memory.
		Local: LocalRegistration{ErrorNM: lattice.DimerPitch / 8, SizeNM: 10, PixelNM: 0.1, LineS: 0.25},
		// Creep is 1–10 % of a large offset and decays over minutes (from
		// memory; Libioulle et al., JVST B 9, 655 (1991) show it distorts
		// images): 2 ± 1 %, 30 s. Moves within a 100 nm frame are made by
		// the scan voltages (from memory). Wait until a quarter of the
		// next stroke's tolerance is left, at most 10 min.
		Creep: CreepProfile{Fraction: 0.02, FractionSD: 0.01, TauS: 30, FrameNM: 100, SettleShare: 0.25, MaxSettleS: 600},
	}
	// Feed-forward compensation is optional (off by default); where a
	// lab uses it, a fifth of the raw rate is left, from memory.
	p.Drift.Compensation = DriftCompensation{Enabled: false, ResidualShare: 0.2}
	// Drift is faster soon after a large move (up to 5 nm/min at room
	// temperature, from memory; partly the creep above): 0.5 nm/min per
	// µm of move, decaying in a minute; and after an anneal: 1 nm/min
	// decaying in 20 min (from memory; a thermally compensated
	// instrument drifts < 10 Å/K, Lyding et al., RSI 59, 1897 (1988)).
	p.Drift.Excess = DriftExcess{AfterMovePerUMNMPerMin: 0.5, AfterMoveTauS: 60, AfterAnnealNMPerMin: 1, AfterAnnealTauS: 1200}
	// Leads and gates matter by their ends, not to a fraction of a
	// dimer: ±1 nm (common practice); pads are contacted ex situ, where
	// registration is ~300 nm (Bussmann et al., arXiv 1410.4793), and
	// overlap their fan-outs by tens of nm: ±10 nm (common practice).
	p.ToleranceLeadNM = defaultLeadToleranceNM
	p.ToleranceGateNM = defaultGateToleranceNM
	p.TolerancePadNM = defaultPadToleranceNM
}

// Plausible ranges of the session's fields (as for the rest of the
// profile: several orders of magnitude around the defaults; common
// practice).
const (
	maxExposureL      = 1e4   // langmuir
	minPressureTorr   = 1e-14 // below any UHV gauge
	maxPressureTorr   = 1e-2
	maxTemperatureC   = 1400 // below silicon's melting point (1414 °C)
	maxPixelNM        = 1000
	minPixelNM        = 1e-3
	maxLineS          = 3600
	maxImageMarginNM  = 1e5
	minMeanWriteS     = 1 // a tip that lasts less than a second of writing is a typo (common practice: tips last minutes to hours)
	maxMeanWriteS     = 1e7
	maxOpenLimitS     = 1e6
	maxLocalImageNM   = 1e4
	minSpeciesOrderID = 1
)

// lowTemperatureSession sets the session parts of the 4 K preset: piezo
// creep and the drift after moves are several times smaller at 4 K (the
// piezo coefficients drop about fivefold, from memory), and after an
// anneal the sample goes back into the cryostat and takes hours to cool
// (3 h, from memory), after which its drift excess is small (0.1
// nm/min decaying in an hour, from memory).
func lowTemperatureSession(p *Profile) {
	p.Registration.Creep.Fraction, p.Registration.Creep.FractionSD = 0.004, 0.002
	p.Drift.Excess.AfterMovePerUMNMPerMin = 0.1
	p.Drift.Excess.AfterAnnealNMPerMin, p.Drift.Excess.AfterAnnealTauS = 0.1, 3600
	p.Process.Anneal.CooldownS = 3 * 3600
}

// validateSession adds the problems of the session, process and
// registration parts, each against its plausible range.
func (v *validator) validateSession(p Profile) {
	pr := p.Process
	for i, s := range pr.SpeciesOrder {
		path := fmt.Sprintf("process.species_order[%d]", i)
		if len(s) < minSpeciesOrderID {
			v.add(path, s, "must name a species")
		}
		if slices.Index(pr.SpeciesOrder, s) < i {
			v.add(path, s, "is listed twice")
		}
	}
	v.positiveUpTo("process.dose.exposure_l", pr.Dose.ExposureL, maxExposureL, "L")
	v.within("process.dose.pressure_torr", pr.Dose.PressureTorr, minPressureTorr, maxPressureTorr, "Torr")
	v.within("process.dose.pumpdown_s", pr.Dose.PumpdownS, 0, MaxStepS, "s")
	if pr.Dose.ExposureL > 0 && pr.Dose.PressureTorr >= minPressureTorr && !(pr.Dose.TimeS() <= 10*MaxStepS) {
		v.add("process.dose.exposure_l", pr.Dose.ExposureL, fmt.Sprintf("at %s Torr the dose takes %s s, more than %d s",
			jsonfile.Number(pr.Dose.PressureTorr), jsonfile.Approx(pr.Dose.TimeS()), 10*MaxStepS))
	}
	v.positiveUpTo("process.anneal.temperature_c", pr.Anneal.TemperatureC, maxTemperatureC, "°C")
	v.within("process.anneal.time_s", pr.Anneal.TimeS, 0, MaxStepS, "s")
	v.within("process.anneal.cooldown_s", pr.Anneal.CooldownS, 0, MaxStepS, "s")
	v.within("process.refind_s", pr.RefindS, 0, MaxStepS, "s")
	v.positiveUpTo("process.window_open_limit_s", pr.WindowOpenLimitS, maxOpenLimitS, "s")

	s := p.Session
	for _, im := range []struct {
		name string
		im   ImageProfile
	}{{"survey", s.Survey}, {"verification", s.Verification}, {"documentation", s.Documentation}} {
		v.within("session."+im.name+".pixel_nm", im.im.PixelNM, minPixelNM, maxPixelNM, "nm")
		v.within("session."+im.name+".line_s", im.im.LineS, 0, maxLineS, "s")
		v.within("session."+im.name+".margin_nm", im.im.MarginNM, 0, maxImageMarginNM, "nm")
	}
	v.within("session.conditioning.time_s", s.Conditioning.TimeS, 0, MaxStepS, "s")
	v.within("session.tip_changes.mean_write_s", s.TipChanges.MeanWriteS, minMeanWriteS, maxMeanWriteS, "s")
	v.positiveUpTo("session.repair.reimage_nm", s.Repair.ReimageNM, maxLocalImageNM, "nm")
	if m := s.PInToleranceMin; !(m > 0 && m < 1) {
		v.add("session.p_in_tolerance_min", m, "must lie strictly between 0 and 1")
	}

	r := p.Registration
	v.within("registration.coarse_error_nm", r.CoarseErrorNM, 0, MaxToleranceNM, "nm")
	v.within("registration.local.error_nm", r.Local.ErrorNM, 0, MaxToleranceNM, "nm")
	v.positiveUpTo("registration.local.size_nm", r.Local.SizeNM, maxLocalImageNM, "nm")
	v.within("registration.local.pixel_nm", r.Local.PixelNM, minPixelNM, maxPixelNM, "nm")
	v.within("registration.local.line_s", r.Local.LineS, 0, maxLineS, "s")
	c := r.Creep
	v.within("registration.creep.fraction", c.Fraction, 0, 1, "(a share of the move)")
	v.within("registration.creep.fraction_sd", c.FractionSD, 0, 1, "")
	v.positiveUpTo("registration.creep.tau_s", c.TauS, MaxStepS, "s")
	v.within("registration.creep.frame_nm", c.FrameNM, 0, MaxScanFieldNM, "nm")
	if sh := c.SettleShare; !(sh > 0 && sh <= 1) {
		v.add("registration.creep.settle_share", sh, "must lie in (0, 1]")
	}
	v.within("registration.creep.max_settle_s", c.MaxSettleS, 0, MaxSettleS, "s")

	d := p.Drift
	v.within("drift.compensation.residual_share", d.Compensation.ResidualShare, 0, 1, "(a share of the raw rate)")
	v.within("drift.excess.after_move_nm_per_min_per_um", d.Excess.AfterMovePerUMNMPerMin, 0, MaxDriftNMPerMin, "nm/min per µm")
	v.positiveUpTo("drift.excess.after_move_tau_s", d.Excess.AfterMoveTauS, MaxStepS, "s")
	v.within("drift.excess.after_anneal_nm_per_min", d.Excess.AfterAnnealNMPerMin, 0, MaxDriftNMPerMin, "nm/min")
	v.positiveUpTo("drift.excess.after_anneal_tau_s", d.Excess.AfterAnnealTauS, MaxStepS, "s")

	v.within("tolerance_lead_nm", p.ToleranceLeadNM, MinToleranceNM, MaxToleranceNM, "nm")
	v.within("tolerance_gate_nm", p.ToleranceGateNM, MinToleranceNM, MaxToleranceNM, "nm")
	v.within("tolerance_pad_nm", p.TolerancePadNM, MinToleranceNM, MaxToleranceNM, "nm")
}
