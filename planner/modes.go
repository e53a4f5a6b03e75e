package planner

import (
	"fmt"
	"math"

	"github.com/golang/geo/r2"

	"dimerpath/lattice"
	"dimerpath/lattice/design"
)

// ballard is the source of the hybrid practice.
const ballard = "Ballard et al., JVST B 32, 041804 (2014)"

// regionWork is one region of the variant as the planner works on it.
type regionWork struct {
	index      int
	name       string
	role       design.Role
	requested  design.Mode
	sites      *lattice.SiteSet // every site, windows included
	windows    []lattice.Window
	plain      *lattice.SiteSet // sites outside the windows
	tolGiven   float64          // the region's own tolerance, 0 for none
	count      int              // sites
	plainCount int              // sites outside the windows
	segs       []runSeg
	width      float64 // narrowest chord, nm (see minWidth)
	widthAt    r2.Point

	mode           design.Mode
	reason         string
	apPart, fePart *lattice.SiteSet // plain sites written in each mode
	tolAP, tolFE   float64
	srcAP, srcFE   string // where each tolerance comes from (a JSON path)
	dopant         string // the species it receives, design.NoDopant for none
	stepNamed      string // the step a region without dopant names
	warnings       []string
}

// minWidth returns the length of the shortest chord of the region across
// raster lines along x and along y at a step of lineWidth/2, leaving out
// lines within lineWidth/2 of the region's extreme sites (where every
// shape tapers): a region whose narrowest chord is shorter than the FE
// line width cannot be written in FE without clearing beyond it. Cells
// count whole (see chords).
func minWidth(segs []runSeg, lineWidth float64) (float64, r2.Point) {
	best, at := math.Inf(1), r2.Point{}
	if len(segs) == 0 {
		return 0, at
	}
	step := math.Max(lineWidth/2, lattice.RowSpacing)
	for _, dir := range []lattice.RowDirection{lattice.RowsAlongX, lattice.RowsAlongY} {
		ix := newChordIndex(segs, dir)
		lo, hi := math.Inf(1), math.Inf(-1)
		alo, ahi := math.Inf(1), math.Inf(-1)
		for _, s := range segs {
			for _, p := range []r2.Point{s.a, s.b} {
				a, c := dir.Split(p)
				lo, hi = math.Min(lo, c), math.Max(hi, c)
				alo, ahi = math.Min(alo, a), math.Max(ahi, a)
			}
		}
		lo -= lattice.RowSpacing / 2
		hi += lattice.RowSpacing / 2
		if hi-lo < best {
			// The whole region is narrower than a raster line: its middle.
			best, at = hi-lo, dir.Join((alo+ahi)/2, (lo+hi)/2)
		}
		for c := lo + lineWidth/2; c <= hi-lineWidth/2; c += step {
			for _, ch := range ix.chords(c, lattice.RowSpacing/2, lattice.RowSpacing, true) {
				if ch.Length() < best {
					best, at = ch.Length(), dir.Join(ch.Center(), c)
				}
			}
		}
	}
	return best, at
}

// apTime estimates the AP writing time of a site set: its runs as lines.
func (g *strokeGen) apTime(set *lattice.SiteSet) float64 {
	t := 0.0
	for _, s := range g.apStrokes("", set) {
		t += s.DurationS
	}
	return t
}

func strokesTime(ss []Stroke) float64 {
	t := 0.0
	for _, s := range ss {
		t += s.DurationS
	}
	return t
}

// modeChooser decides each region's mode.
type modeChooser struct {
	g        *strokeGen
	prof     *Profile
	keepOut  float64
	regions  []*regionWork
	feCache  map[*lattice.SiteSet][]Stroke
	forcedFE bool
}

func (mc *modeChooser) fe(set *lattice.SiteSet) []Stroke {
	if s, ok := mc.feCache[set]; ok {
		return s
	}
	s := mc.g.feStrokes("", set)
	mc.feCache[set] = s
	return s
}

// choose sets mode, reason and the AP and FE parts of every region:
//
//   - a region drawn ap, fe or hybrid keeps its mode (with a warning
//     where the planner would not choose it);
//   - auto: AP for dopant windows, donor and device regions; AP where the
//     narrowest chord is below the FE line width; hybrid (AP edge band
//     plus FE fill, Ballard 2014) where the region is wide but its own
//     tolerance is tighter than FE holds (profile tolerance_fe_nm), or it
//     comes within the FE keep-out of AP features while its core does
//     not; AP where FE would not be faster; else FE.
//
// FE regions that only touch an AP feature (connections) are not held
// to the keep-out.
func (mc *modeChooser) choose() {
	band := mc.prof.HybridBandNM
	for _, r := range mc.regions {
		switch r.requested {
		case design.ModeAP:
			mc.set(r, design.ModeAP, design.ModeAP.Adjective()+" as drawn")
		case design.ModeFE:
			mc.set(r, design.ModeFE, design.ModeFE.Adjective()+" as drawn")
			mc.forcedFE = true
			if len(r.windows) > 0 {
				r.warnings = append(r.warnings, fmt.Sprintf("region %q is drawn FE but holds %d dopant window(s): the windows are written in AP, the rest in FE", r.name, len(r.windows)))
			}
			if r.tolGiven > 0 && r.tolGiven < mc.prof.ToleranceFENM {
				r.warnings = append(r.warnings, fmt.Sprintf("region %q is drawn FE with tolerance ±%g nm, tighter than FE holds (±%g nm)", r.name, r.tolGiven, mc.prof.ToleranceFENM))
			}
		case design.ModeHybrid:
			mc.set(r, design.ModeHybrid, fmt.Sprintf("hybrid as drawn: AP edge band %.1f nm + FE fill (%s)", band, ballard))
			mc.forcedFE = true
		default:
			mc.auto1(r)
		}
	}
	// Keep-out, against every AP feature decided so far.
	ap := mc.apFeatures()
	for _, r := range mc.regions {
		if r.mode == design.ModeAP || (r.requested != design.ModeAuto && r.requested != "" && r.requested != design.ModeFE) {
			continue
		}
		if mc.keepOut <= 0 || len(ap) == 0 {
			continue
		}
		d, at, near := mc.gap(ap, r, r.fePart)
		if !near {
			continue
		}
		if r.requested == design.ModeFE {
			r.warnings = append(r.warnings, fmt.Sprintf("field-emission region %q comes %.1f nm from an AP feature at %s, inside the %g nm FE keep-out", r.name, d, fmtPoint(at), mc.keepOut))
			continue
		}
		// An FE region too near: its core may still be FE behind an AP
		// band; a hybrid whose core is too near is written in AP.
		what := fmt.Sprintf("%.1f nm from an AP feature at %s, inside the %g nm FE keep-out", d, fmtPoint(at), mc.keepOut)
		if r.mode == design.ModeFE {
			core := erode(r.plain, band)
			if _, _, coreNear := mc.gap(ap, r, core); !coreNear && !core.IsEmpty() && mc.hybridPays(r, core) {
				mc.setHybrid(r, core, what+fmt.Sprintf(": AP edge band %.1f nm + FE fill (%s)", band, ballard))
				continue
			}
		}
		mc.set(r, design.ModeAP, what)
	}
	// The mode switch is paid once for all FE work: without any region
	// drawn FE, auto FE must save more than it.
	if !mc.forcedFE {
		saved := 0.0
		var auto []*regionWork
		for _, r := range mc.regions {
			if r.mode != design.ModeAP {
				saved += mc.g.apTime(r.plain) - mc.partsTime(r)
				auto = append(auto, r)
			}
		}
		if len(auto) > 0 && saved < mc.prof.ModeSwitchS {
			for _, r := range auto {
				mc.set(r, design.ModeAP, fmt.Sprintf("FE would save only %.0f s in all, less than the %.0f s mode switch", saved, mc.prof.ModeSwitchS))
			}
		}
	}
}

// auto1 is the first, keep-out-free pass of the auto choice.
func (mc *modeChooser) auto1(r *regionWork) {
	w := mc.prof.Line(design.ModeFE).Width()
	band := mc.prof.HybridBandNM
	switch {
	case r.plain.IsEmpty() && len(r.windows) > 0:
		mc.set(r, design.ModeAP, fmt.Sprintf("holds %d dopant window(s): windows need atomic precision", len(r.windows)))
		return
	case len(r.windows) > 0:
		mc.set(r, design.ModeAP, fmt.Sprintf("holds %d dopant window(s) among its sites: written atom by atom", len(r.windows)))
		return
	case r.role == design.RoleDonor || r.role == design.RoleDevice:
		mc.set(r, design.ModeAP, fmt.Sprintf("%s region: written atom by atom", r.role))
		return
	case r.plain.IsEmpty():
		mc.set(r, design.ModeAP, "no sites to write")
		return
	}
	r.width, r.widthAt = minWidth(r.segs, w)
	switch {
	case r.width < w:
		mc.set(r, design.ModeAP, fmt.Sprintf("narrowest part %.1f nm (at %s) is below the %.1f nm FE line width", r.width, fmtPoint(r.widthAt), w))
		return
	}
	apT := mc.g.apTime(r.plain)
	if r.tolGiven > 0 && r.tolGiven < mc.prof.ToleranceFENM {
		core := erode(r.plain, band)
		why := fmt.Sprintf("tolerance ±%g nm is tighter than FE holds (±%g nm)", r.tolGiven, mc.prof.ToleranceFENM)
		if !core.IsEmpty() && mc.hybridPays(r, core) {
			mc.setHybrid(r, core, fmt.Sprintf("wide (narrowest %.0f nm) but %s: AP edge band %.1f nm + FE fill (%s)", r.width, why, band, ballard))
			return
		}
		mc.set(r, design.ModeAP, why)
		return
	}
	feT := strokesTime(mc.fe(r.plain))
	if apT <= feT {
		mc.set(r, design.ModeAP, fmt.Sprintf("AP is as fast here (%.0f s vs %.0f s in FE)", apT, feT))
		return
	}
	mc.set(r, design.ModeFE, fmt.Sprintf("wide (narrowest %.0f nm, FE line %.1f nm) and tolerance allows FE: %.0f s in FE instead of %.0f s in AP", r.width, w, feT, apT))
}

// hybridPays reports whether an AP band plus FE core beats AP alone.
func (mc *modeChooser) hybridPays(r *regionWork, core *lattice.SiteSet) bool {
	bandSet := r.plain.Clone().Difference(core)
	return mc.g.apTime(bandSet)+strokesTime(mc.fe(core)) < mc.g.apTime(r.plain)
}

func (mc *modeChooser) partsTime(r *regionWork) float64 {
	t := 0.0
	if r.apPart != nil {
		t += mc.g.apTime(r.apPart)
	}
	if r.fePart != nil && !r.fePart.IsEmpty() {
		t += strokesTime(mc.fe(r.fePart))
	}
	return t
}

func (mc *modeChooser) set(r *regionWork, mode design.Mode, reason string) {
	r.mode, r.reason = mode, reason
	switch mode {
	case design.ModeAP:
		r.apPart, r.fePart = r.plain, nil
	case design.ModeFE:
		r.apPart, r.fePart = nil, r.plain
	case design.ModeHybrid:
		core := erode(r.plain, mc.prof.HybridBandNM)
		r.apPart, r.fePart = r.plain.Clone().Difference(core), core
		if core.IsEmpty() {
			r.warnings = append(r.warnings, fmt.Sprintf("region %q is too narrow for a %.1f nm AP band and an FE fill: written in AP alone", r.name, mc.prof.HybridBandNM))
		}
	}
}

func (mc *modeChooser) setHybrid(r *regionWork, core *lattice.SiteSet, reason string) {
	r.mode, r.reason = design.ModeHybrid, reason
	r.apPart, r.fePart = r.plain.Clone().Difference(core), core
}

// apFeature is one region's AP sites, indexed for keep-out distances.
type apFeature struct {
	region int
	ix     *lattice.CellIndex
}

// apFeatures indexes the sites of every region planned AP (windows
// included) and the AP bands of hybrid regions.
func (mc *modeChooser) apFeatures() []apFeature {
	var out []apFeature
	for _, r := range mc.regions {
		if r.mode != design.ModeAP && r.mode != design.ModeHybrid && len(r.windows) == 0 {
			continue
		}
		owned := r.sites
		if r.mode == design.ModeHybrid && r.fePart != nil {
			owned = r.sites.Clone().Difference(r.fePart)
		}
		if ix := lattice.NewCellIndex(mc.g.surf, owned); !ix.IsEmpty() {
			out = append(out, apFeature{region: r.index, ix: ix})
		}
	}
	return out
}

// segBounds returns the box of run segments' dimer centres.
func segBounds(segs []runSeg) r2.Rect {
	b := r2.EmptyRect()
	for _, s := range segs {
		b = b.AddPoint(s.a).AddPoint(s.b)
	}
	return b
}

// gap returns the least distance from part (of region r) to an AP
// feature of another region that it does not touch, and reports whether
// it lies inside the keep-out. Distances are between site cells, as the
// FE keep-out design rule measures them (lattice.CellIndex); a feature
// within design.TouchNM touches (a connection, as the floating rule
// sees it), which is no keep-out breach.
func (mc *modeChooser) gap(feats []apFeature, r *regionWork, part *lattice.SiteSet) (float64, r2.Point, bool) {
	if part == nil || part.IsEmpty() {
		return 0, r2.Point{}, false
	}
	// The part's run segments are made anyway (its strokes need them):
	// their box, widened by a cell, rules out far features before the
	// part's cells are indexed.
	bounds := segBounds(mc.g.segsOf(part)).ExpandedByMargin(mc.keepOut + lattice.RowSpacing)
	var mine *lattice.CellIndex
	best, at := math.Inf(1), r2.Point{}
	for _, f := range feats {
		if f.region == r.index || !bounds.Intersects(f.ix.Bounds()) {
			continue
		}
		if mine == nil {
			mine = lattice.NewCellIndex(mc.g.surf, part)
		}
		d, p, ok := f.ix.GapWithin(mine, mc.keepOut)
		if ok && d > design.TouchNM && d < best {
			best, at = d, p
		}
	}
	return best, at, best < mc.keepOut
}
