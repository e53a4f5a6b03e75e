package lattice

import "math"

// Published geometry of the hydrogen-terminated Si(100)-2x1 surface. All
// lengths are in nanometres. Every other length in dimerpath that stands
// for the lattice is derived from these, so they are the one place to
// change if a better value is published.
const (
	// SiLatticeConstant is the cubic lattice parameter a of silicon.
	// Source: CODATA 2018 (unchanged in CODATA 2022), 5.431 020 511(89) Å,
	// ideal Si at 22.5 °C in vacuum.
	SiLatticeConstant = 0.5431020511

	// DimerPitch is the spacing of dimers along a dimer row, a/√2
	// (0.38403 nm). Derived from SiLatticeConstant; 3.84 Å is also the
	// measured along-row dangling-bond spacing (arXiv cond-mat/0611417).
	DimerPitch = SiLatticeConstant / math.Sqrt2

	// RowSpacing is the spacing of neighbouring dimer rows, 2a/√2 = √2·a
	// (0.76806 nm). Derived; 7.68 Å in arXiv cond-mat/0611417.
	RowSpacing = SiLatticeConstant * math.Sqrt2

	// DimerBond is the Si–Si dimer bond length on the H-terminated
	// surface: 2.47 ± 0.02 Å by surface X-ray diffraction (Surf. Sci. 453,
	// 18 (2000)). The bond lies across the row.
	DimerBond = 0.247

	// HOffset is the distance of each H site from its row's centre line,
	// across the row. Derived from the dimer bond, the H–Si–Si angle of
	// 108–111° (Shoji, Kusumura, Oura, Surf. Sci. 1993) and an Si–H
	// length of 1.50 Å that is from memory; the result, 1.77 Å, is used
	// only to draw and snap sites, never as a check value.
	HOffset = 0.177

	// StepHeight is the height of a single-layer step on Si(100), a/4
	// (0.13578 nm), derived from the diamond lattice.
	StepHeight = SiLatticeConstant / 4

	// StepShift is the in-plane shift of the surface lattice across one
	// single-layer step, a/(2√2) = 0.19201 nm along <110>, derived from
	// the diamond lattice.
	StepShift = SiLatticeConstant / (2 * math.Sqrt2)

	// SitesPerDimer is the number of H sites on one dimer: one on each Si
	// atom of the dimer.
	SitesPerDimer = 2
)

// DimerArea is the area of one 2x1 surface cell, holding one dimer and
// so two H sites: DimerPitch·RowSpacing = a² = 0.29496 nm².
const DimerArea = DimerPitch * RowSpacing

// HDensity is the areal density of H sites on the saturated surface,
// 2/a² = 6.7806 nm⁻² (6.78×10¹⁴ cm⁻²); derived from CODATA a.
const HDensity = SitesPerDimer / DimerArea
