package planner

import (
	"math"

	"github.com/golang/geo/r2"

	"dimerpath/lattice"
	"dimerpath/lattice/design"
)

// strokeGen turns region sites into strokes. Stroke IDs are assigned by
// the caller.
type strokeGen struct {
	surf *lattice.Surface
	prof *Profile
	// apExt[n] is how far an AP line over n whole dimers is extended
	// beyond its end dimers' centres (nm); n >= len(apExt) uses the last.
	apExt []float64
	// feEnd and feSide are how far the FE fill keeps its line ends and
	// its outermost lines inside the region's outermost sites (nm).
	feEnd, feSide float64
	segs          map[*lattice.SiteSet][]runSeg
}

// segsOf returns the run segments of set, computed once per set (sets
// are not changed once strokes are made from them).
func (g *strokeGen) segsOf(set *lattice.SiteSet) []runSeg {
	if s, ok := g.segs[set]; ok {
		return s
	}
	s := runSegments(g.surf, set)
	g.segs[set] = s
	return s
}

func newStrokeGen(surf *lattice.Surface, prof *Profile) *strokeGen {
	g := &strokeGen{surf: surf, prof: prof, segs: map[*lattice.SiteSet][]runSeg{}}
	for n := 1; n <= 4; n++ {
		g.apExt = append(g.apExt, apExtension(prof.AP, n))
	}
	g.feEnd, g.feSide = feInset(prof.FE)
	return g
}

// modeRatio returns the delivered dose over the clearing threshold of a
// mode's strokes: passes·λ/λ_thr.
func modeRatio(m ModeProfile) float64 {
	return float64(max(m.Passes, 1)) * m.LineDoseCPerCm / m.Width.ThresholdDoseCPerCm
}

// apExtension chooses how far an AP line over n dimers runs beyond the
// centres of its end dimers: the least extension (in steps of 0.005 nm,
// up to half a dimer pitch) at which the end sites get at least 1.25 times
// the clearing dose, so that they clear with margin; at most half a pitch,
// so that the next dimer along stays short of it. From the width model's
// Gaussian footprint (see exposure).
func apExtension(m ModeProfile, n int) float64 {
	ratio, sigma := modeRatio(m), m.Width.SigmaNM
	centres := lattice.DimerAlong(n - 1) // from the first dimer's centre to the last's
	for ext := 0.0; ext <= lattice.DimerPitch/2; ext += 0.005 {
		L := centres + 2*ext
		if exposure(ratio, sigma, L, ext, lattice.HOffset) >= 1.25 {
			return ext
		}
	}
	return lattice.DimerPitch / 2
}

// feInset returns how far the FE fill keeps its paths inside the
// region's outermost sites: enough that a line's half width (where it
// stops clearing) reaches no farther than the edge allowance beyond them,
// plus a margin for the dose the neighbouring lines add. The margin is a
// quarter σ at line ends, where the sites between two line ends need
// both lines' dose, and half a σ along the outermost lines.
func feInset(m ModeProfile) (end, side float64) {
	base := math.Max(0, m.LineWidth()/2-m.EdgeAllowanceNM)
	return base + m.Width.SigmaNM/4, base + m.Width.SigmaNM/2
}

func pathLength(p []r2.Point) float64 {
	l := 0.0
	for i := 1; i < len(p); i++ {
		l += p[i].Sub(p[i-1]).Norm()
	}
	return l
}

// lineStroke returns an AP line along the row centre over dimers
// d0..d1 (inclusive) of one row, extended at both ends.
func (g *strokeGen) lineStroke(region string, t, row, d0, d1 int) Stroke {
	n := d1 - d0 + 1
	ext := g.apExt[min(n, len(g.apExt))-1]
	a := g.surf.DimerCentre(t, row, d0)
	b := g.surf.DimerCentre(t, row, d1)
	dir := g.surf.Terraces[t].Rows.Join(1, 0)
	path := []r2.Point{a.Sub(dir.Mul(ext)), b.Add(dir.Mul(ext))}
	l := pathLength(path)
	m := g.prof.AP
	return Stroke{Region: region, Mode: design.ModeAP, Kind: StrokeLine, Path: path, Passes: max(m.Passes, 1),
		LengthNM: l, DurationS: float64(max(m.Passes, 1)) * l / m.Speed(), Sites: 2 * n, Window: -1}
}

// dwellStroke parks the tip over one H site.
func (g *strokeGen) dwellStroke(region string, site lattice.Site) Stroke {
	return Stroke{Region: region, Mode: design.ModeAP, Kind: StrokeDwell, Path: []r2.Point{g.surf.Position(site)}, Passes: 1,
		DurationS: g.prof.Dwell.ExpectedS(), Sites: 1, Window: -1}
}

// apStrokes writes set atom by atom: a line along the row centre over
// every run of whole dimers, and a dwell on each half dimer at a run's
// ends (a line would clear its partner too).
func (g *strokeGen) apStrokes(region string, set *lattice.SiteSet) []Stroke {
	var out []Stroke
	for run := range set.Runs() {
		start, end := run.Start, run.End()
		if start%2 == 1 {
			out = append(out, g.dwellStroke(region, lattice.SiteAt(run.Terrace, run.Row, start)))
			start++
		}
		tail := end > start && end%2 == 1
		if tail {
			end--
		}
		if end > start {
			out = append(out, g.lineStroke(region, run.Terrace, run.Row, start/2, end/2-1))
		}
		if tail {
			out = append(out, g.dwellStroke(region, lattice.SiteAt(run.Terrace, run.Row, end)))
		}
	}
	return out
}

// windowStrokes opens one dopant window: a short AP line over its
// existing dimers, or a dwell on each of its sites (WindowStyleDwell).
func (g *strokeGen) windowStrokes(region string, w lattice.Window, index int) []Stroke {
	var dimers []int
	for d := w.FirstDimer; d <= w.LastDimer(); d++ {
		if d >= 0 && g.surf.Valid(lattice.Site{Terrace: w.Terrace, Row: w.Row, Dimer: d}) {
			dimers = append(dimers, d)
		}
	}
	if len(dimers) == 0 {
		return nil
	}
	var out []Stroke
	if g.prof.WindowStyle == WindowStyleDwell {
		for _, d := range dimers {
			for side := 0; side < 2; side++ {
				s := g.dwellStroke(region, lattice.Site{Terrace: w.Terrace, Row: w.Row, Dimer: d, Side: side})
				s.Window = index
				out = append(out, s)
			}
		}
		return out
	}
	// Consecutive existing dimers form one line (a window cut by a
	// terrace edge may leave two pieces).
	for i := 0; i < len(dimers); {
		j := i
		for j+1 < len(dimers) && dimers[j+1] == dimers[j]+1 {
			j++
		}
		s := g.lineStroke(region, w.Terrace, w.Row, dimers[i], dimers[j])
		s.Window = index
		out = append(out, s)
		i = j + 1
	}
	return out
}

// feLine is one FE raster line interval at across-coordinate c.
type feLine struct {
	c      float64
	lo, hi float64
}

// feStrokes fills set with FE serpentines, terrace by terrace, with
// raster lines along each terrace's dimer rows at a pitch of at most
// width·(1-overlap), spread evenly between the outermost sites less the
// inset. A line runs over the sites nearest its centre, less the inset at
// both ends; consecutive lines that each meet only the other are joined
// at their ends into one serpentine, so the tip turns at the edge without
// leaving FE conditions. With FE.Outline, each serpentine is followed by
// a pass around its ends.
func (g *strokeGen) feStrokes(region string, set *lattice.SiteSet) []Stroke {
	m := g.prof.FE
	pitch := m.Pitch()
	end, side := g.feEnd, g.feSide
	var out []Stroke
	all := g.segsOf(set) // in terrace order
	for len(all) > 0 {
		t := all[0].run.Terrace
		n := 1
		for n < len(all) && all[n].run.Terrace == t {
			n++
		}
		segs := all[:n]
		all = all[n:]
		rows := g.surf.Terraces[t].Rows
		cmin, cmax := math.Inf(1), math.Inf(-1)
		for _, s := range segs {
			_, c := rows.Split(s.a)
			cmin, cmax = math.Min(cmin, c-lattice.HOffset), math.Max(cmax, c+lattice.HOffset)
		}
		var cs []float64
		if cmax-cmin <= 2*side {
			cs = []float64{(cmin + cmax) / 2}
		} else {
			n := int(math.Ceil((cmax-cmin-2*side)/pitch-1e-9)) + 1
			step := (cmax - cmin - 2*side) / float64(max(n-1, 1))
			for k := 0; k < n; k++ {
				cs = append(cs, cmin+side+float64(k)*step)
			}
		}
		ix := newChordIndex(segs, rows)
		lineAt := func(c float64) []feLine {
			var ls []feLine
			for _, iv := range ix.chords(c, lattice.RowSpacing/2, 2*lattice.RowSpacing, false) {
				lo, hi := iv.Lo+end, iv.Hi-end
				if hi-lo < m.Width.SigmaNM {
					mid := iv.Center()
					lo, hi = mid-m.Width.SigmaNM/2, mid+m.Width.SigmaNM/2
				}
				ls = append(ls, feLine{c: c, lo: lo, hi: hi})
			}
			return ls
		}
		var lines [][]feLine
		var prev []feLine
		for k, c := range cs {
			cur := lineAt(c)
			// Where an edge slants across the raster, the shorter of two
			// neighbouring lines leaves a notch at its end that the
			// longer one, a pitch away, cannot reach: a line between them
			// fills it.
			if k > 0 && endsDiffer(prev, cur, end+2*lattice.DimerPitch) {
				if mid := lineAt((cs[k-1] + c) / 2); len(mid) > 0 {
					lines = append(lines, mid)
				}
			}
			if len(cur) > 0 {
				lines = append(lines, cur)
			}
			prev = cur
		}
		slantInset(lines, end)
		for _, chain := range serpentines(lines) {
			path := make([]r2.Point, 0, 2*len(chain))
			for i, ln := range chain {
				a, b := ln.lo, ln.hi
				if i%2 == 1 {
					a, b = b, a
				}
				path = append(path, rows.Join(a, ln.c), rows.Join(b, ln.c))
			}
			out = append(out, g.feStroke(region, StrokeRaster, path))
			if m.Outline {
				var ol []r2.Point
				for _, ln := range chain {
					ol = append(ol, rows.Join(ln.hi, ln.c))
				}
				for i := len(chain) - 1; i >= 0; i-- {
					ol = append(ol, rows.Join(chain[i].lo, chain[i].c))
				}
				ol = append(ol, ol[0])
				out = append(out, g.feStroke(region, StrokeOutline, ol))
			}
		}
	}
	return out
}

func (g *strokeGen) feStroke(region string, kind StrokeKind, path []r2.Point) Stroke {
	m := g.prof.FE
	l := pathLength(path)
	sites := 0 // filled in by the caller from the region
	return Stroke{Region: region, Mode: design.ModeFE, Kind: kind, Path: path, Passes: max(m.Passes, 1),
		LengthNM: l, DurationS: float64(max(m.Passes, 1)) * l / m.Speed(), Sites: sites, Window: -1}
}

// slantInset moves line ends in where the region's edge slants across
// the raster: the inset is meant perpendicular to the edge, so along the
// line it grows by sqrt(1+slope²), with the slope taken from the
// neighbouring lines' ends (capped at 4).
func slantInset(lines [][]feLine, inset float64) {
	orig := make([][]feLine, len(lines))
	for k := range lines {
		orig[k] = append([]feLine(nil), lines[k]...)
	}
	for k := range lines {
		for i := range lines[k] {
			ln := &lines[k][i]
			x := orig[k][i]
			sLo, sHi := 0.0, 0.0
			for _, nk := range []int{k - 1, k + 1} {
				if nk < 0 || nk >= len(orig) {
					continue
				}
				for _, y := range orig[nk] {
					if x.lo <= y.hi && y.lo <= x.hi {
						dc := math.Abs(y.c - x.c)
						sLo = math.Max(sLo, math.Abs(y.lo-x.lo)/dc)
						sHi = math.Max(sHi, math.Abs(y.hi-x.hi)/dc)
					}
				}
			}
			lo := x.lo + inset*(math.Sqrt(1+math.Min(sLo, 4)*math.Min(sLo, 4))-1)
			hi := x.hi - inset*(math.Sqrt(1+math.Min(sHi, 4)*math.Min(sHi, 4))-1)
			if hi > lo {
				ln.lo, ln.hi = lo, hi
			}
		}
	}
}

// endsDiffer reports whether an interval of a overlaps one of b whose
// ends lie more than tol from its own.
func endsDiffer(a, b []feLine, tol float64) bool {
	for _, x := range a {
		for _, y := range b {
			if x.lo <= y.hi && y.lo <= x.hi && (math.Abs(x.lo-y.lo) > tol || math.Abs(x.hi-y.hi) > tol) {
				return true
			}
		}
	}
	return false
}

// serpentines chains raster line intervals: the interval of line k joins
// the chain ending on line k-1 when each is the other's only overlap.
func serpentines(lines [][]feLine) [][]feLine {
	var done, open [][]feLine
	overlaps := func(a, b feLine) bool { return a.lo <= b.hi && b.lo <= a.hi }
	for k := range lines {
		var next [][]feLine
		used := make([]bool, len(open))
		for _, iv := range lines[k] {
			match := -1
			count := 0
			for ci, ch := range open {
				if overlaps(ch[len(ch)-1], iv) {
					count++
					match = ci
				}
			}
			if count == 1 && !used[match] {
				prev := open[match][len(open[match])-1]
				n := 0
				for _, o := range lines[k] {
					if overlaps(prev, o) {
						n++
					}
				}
				if n == 1 {
					used[match] = true
					next = append(next, append(open[match], iv))
					continue
				}
			}
			next = append(next, []feLine{iv})
		}
		for ci, ch := range open {
			if !used[ci] {
				done = append(done, ch)
			}
		}
		open = next
	}
	return append(done, open...)
}
