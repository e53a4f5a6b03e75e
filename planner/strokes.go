package planner

import (
	"math"
	"slices"

	"github.com/golang/geo/r1"
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
	// pts is the unused rest of the block the short strokes' paths are
	// cut from (one allocation per pathBlock points instead of one per
	// stroke: a 10^6-window array has 10^6 such paths).
	pts []r2.Point
}

// pathBlock is the number of points allocated at once for paths.
const pathBlock = 4096

// newPath returns a path of n points (n ≤ pathBlock) cut from the
// current block, its capacity n so that an append never reaches into
// the next path.
func (g *strokeGen) newPath(n int) []r2.Point {
	if len(g.pts) < n {
		g.pts = make([]r2.Point, pathBlock)
	}
	p := g.pts[:n:n]
	g.pts = g.pts[n:]
	return p
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
		g.apExt = append(g.apExt, apExtension(prof, n))
	}
	g.feEnd, g.feSide = feInset(prof)
	return g
}

// apExtension chooses how far an AP line over n dimers runs beyond the
// centres of its end dimers (negative: it stops short of them): the
// extension, in steps of 0.0025 nm within half a dimer pitch either way,
// that makes the fewest expected wrong sites at each end — the end site
// left plus the next site along the row cleared, from the exposure model
// (lineExposure) — among those that clear the next site with less than
// half the stray limit (the margin feInset keeps too), unless the edge
// allowance reaches that site. A longer line leaves the end site less
// likely and clears the next site more likely. When no extension keeps
// the next site under the limit, the one that clears it least.
func apExtension(prof *Profile, n int) float64 {
	l := prof.Line(design.ModeAP)
	span := lattice.DimerAlong(n - 1) // from the first dimer's centre to the last's
	limit := prof.StrayLimit / 2
	if prof.AP.EdgeAllowanceNM >= lattice.DimerPitch {
		limit = 1
	}
	best, bestExt := math.Inf(1), 0.0
	least, leastExt := math.Inf(1), 0.0
	for i := -200; i <= 200; i++ {
		ext := float64(i) * 0.0025
		if math.Abs(ext) > lattice.DimerPitch/2+1e-12 {
			continue
		}
		L := span + 2*ext
		if L <= 0 {
			continue
		}
		end := lineExposure(l.Peak, l.SigmaNM, L, ext, lattice.HOffset)
		next := ClearProbability(lineExposure(l.Peak, l.SigmaNM, L, ext-lattice.DimerPitch, lattice.HOffset))
		if next < least {
			least, leastExt = next, ext
		}
		if next > limit {
			continue
		}
		if wrong := math.Exp(-end) + next; wrong < best-1e-15 {
			best, bestExt = wrong, ext
		}
	}
	if math.IsInf(best, 1) {
		return leastExt
	}
	return bestExt
}

// feInset returns how far the FE fill keeps its paths inside the region's
// outermost sites: far enough that every site beyond the edge allowance
// clears with less than half the stray limit, counting the neighbouring
// raster lines (the half is a margin for corners and round ends, where
// lines and turns come together in ways this one-dimensional sum does
// not follow). Along the outermost line (side) the lines further in add
// their tails; beyond the line ends (end) the serpentine's turn runs
// along the ends like a line, and every raster line ending there adds
// its tail. feStrokes keeps a disk of the larger radius around every
// point of its lines inside the region.
func feInset(prof *Profile) (end, side float64) {
	l := prof.Line(design.ModeFE)
	pitch := prof.FEPitch()
	limit := exposureFor(prof.StrayLimit / 2)
	if !(l.Peak > 0) || !(pitch > 0) {
		return 0, 0
	}
	// Σ_k over the lines at d + k·pitch, k ≥ 0, and over all lines.
	sideAt := func(d float64) float64 {
		sum := 0.0
		for k := 0; k < 1000; k++ {
			x := l.At(d + float64(k)*pitch)
			sum += x
			if x < 1e-300 {
				break
			}
		}
		return sum
	}
	across := l.At(0)
	for k := 1; k < 1000; k++ {
		x := 2 * l.At(float64(k)*pitch)
		across += x
		if x < 1e-300 {
			break
		}
	}
	reach := func(f func(float64) float64) float64 {
		lo, hi := 0.0, 100*l.SigmaNM
		if f(lo) <= limit {
			return 0
		}
		for range 100 {
			mid := (lo + hi) / 2
			if f(mid) > limit {
				lo = mid
			} else {
				hi = mid
			}
		}
		return hi
	}
	dSide := reach(sideAt)
	dEnd := reach(func(s float64) float64 { return l.At(s) + across*normalCDF(-s/l.SigmaNM) })
	allow := prof.FE.EdgeAllowanceNM
	return math.Max(0, dEnd-allow), math.Max(0, dSide-allow)
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
	path := g.newPath(2)
	path[0], path[1] = a.Sub(dir.Mul(ext)), b.Add(dir.Mul(ext))
	l := pathLength(path)
	m := g.prof.AP
	return Stroke{Region: region, Mode: design.ModeAP, Kind: StrokeLine, Path: path, Passes: max(m.Passes, 1),
		LengthNM: l, DurationS: float64(max(m.Passes, 1)) * l / m.Speed(), Sites: 2 * n, Window: -1}
}

// dwellStroke parks the tip over one H site.
func (g *strokeGen) dwellStroke(region string, site lattice.Site) Stroke {
	path := g.newPath(1)
	path[0] = g.surf.Position(site)
	return Stroke{Region: region, Mode: design.ModeAP, Kind: StrokeDwell, Path: path, Passes: 1,
		DurationS: g.prof.DwellExpectedS(), Sites: 1, Window: -1}
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
	return g.appendWindowStrokes(nil, region, w, index)
}

// appendWindowStrokes appends the strokes of window w to out.
func (g *strokeGen) appendWindowStrokes(out []Stroke, region string, w lattice.Window, index int) []Stroke {
	var buf [8]int
	dimers := buf[:0]
	for d := w.FirstDimer; d <= w.LastDimer(); d++ {
		if d >= 0 && g.surf.Valid(lattice.Site{Terrace: w.Terrace, Row: w.Row, Dimer: d}) {
			dimers = append(dimers, d)
		}
	}
	if len(dimers) == 0 {
		return out
	}
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
	pitch := g.prof.FEPitch()
	end, side := g.feEnd, g.feSide
	var out []Stroke
	whole := g.segsOf(set) // in terrace order
	all := whole
	radius := math.Max(end, side)
	for len(all) > 0 {
		t := all[0].run.Terrace
		n := 1
		for n < len(all) && all[n].run.Terrace == t {
			n++
		}
		segs := all[:n]
		all = all[n:]
		rows := g.surf.Terraces[t].Rows
		// This terrace's part of the region, and the whole region, in
		// the terrace's frame (across coordinates of both).
		cmin, cmax := math.Inf(1), math.Inf(-1)
		for _, s := range segs {
			_, c := rows.Split(s.a)
			cmin, cmax = math.Min(cmin, c-lattice.HOffset), math.Max(cmax, c+lattice.HOffset)
		}
		ix := newChordIndex(segs, rows)
		wix := ix
		if len(segs) < len(whole) {
			wix = newChordIndex(whole, rows)
		}
		// chordsAt's result is ix's buffer, valid until ix's next query
		// (wix may be ix); chords keeps a copy.
		chordsAt := func(ix *chordIndex, c float64) []r1.Interval {
			return ix.chords(c, lattice.RowSpacing/2, 2*lattice.RowSpacing, false)
		}
		chords := func(ix *chordIndex, c float64) []r1.Interval { return slices.Clone(chordsAt(ix, c)) }
		// The outermost lines keep the side inset from the region's edge;
		// where this terrace's part ends at a step inside the region (the
		// region goes on just beyond its outermost row) they need not.
		goesOn := func(c, beyond float64) bool {
			return len(lattice.IntersectIntervals(nil, chords(ix, c), chords(wix, beyond))) > 0
		}
		insetLo, insetHi := side, side
		if goesOn(cmin+lattice.HOffset, cmin-radius/2) {
			insetLo = 0
		}
		if goesOn(cmax-lattice.HOffset, cmax+radius/2) {
			insetHi = 0
		}
		var cs []float64
		if span := cmax - cmin - insetLo - insetHi; span <= 0 {
			cs = []float64{(cmin + insetLo + cmax - insetHi) / 2}
		} else {
			n := int(math.Ceil(span/pitch-1e-9)) + 1
			step := span / float64(max(n-1, 1))
			for k := 0; k < n; k++ {
				cs = append(cs, cmin+insetLo+float64(k)*step)
			}
		}
		// A line runs where a disk of the inset's radius around it lies
		// within the region (all terraces): the region's chords on the
		// rows within the radius, each shortened by what the disk
		// reaches along it, intersected, and then within this terrace's
		// chord. So a line stops the inset short of the region's edge
		// whether the edge is square to it, slanted or curved, and runs up
		// to a step inside the region, where the other terrace's lines
		// take over.
		// Scratch for lineAt, reused line after line: the eroded chords
		// and the next ones (two arrays, swapped), the shrunk chords.
		var erodedBuf, nextBuf, shrunkBuf []r1.Interval
		lineAt := func(c float64) []feLine {
			eroded := append(erodedBuf[:0], chordsAt(ix, c)...)
			next := nextBuf
			for k := 0; float64(k)*lattice.RowSpacing/2 <= radius+1e-9 && len(eroded) > 0; k++ {
				dc := float64(k) * lattice.RowSpacing / 2
				h := math.Sqrt(math.Max(0, radius*radius-dc*dc))
				for _, sgn := range [2]float64{-1, 1} {
					if k == 0 && sgn > 0 {
						continue
					}
					// wix's chords are read before its next query
					// overwrites them.
					shrunk := shrunkBuf[:0]
					for _, iv := range chordsAt(wix, c+sgn*dc) {
						if iv.Hi-h > iv.Lo+h {
							shrunk = append(shrunk, r1.Interval{Lo: iv.Lo + h, Hi: iv.Hi - h})
						}
					}
					shrunkBuf = shrunk
					next = lattice.IntersectIntervals(next[:0], eroded, shrunk)
					eroded, next = next, eroded
				}
			}
			erodedBuf, nextBuf = eroded, next
			var ls []feLine
			for _, iv := range eroded {
				lo, hi := iv.Lo, iv.Hi
				if hi-lo < m.SigmaNM {
					mid := iv.Center()
					lo, hi = mid-m.SigmaNM/2, mid+m.SigmaNM/2
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
// neighbouring lines' ends (capped at 4); a line the inset would turn
// inside out shrinks to its middle.
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
			if hi <= lo {
				// The edge is nearly parallel to the line: what the inset
				// leaves of it is its middle.
				lo = (x.lo + x.hi) / 2
				hi = lo
			}
			ln.lo, ln.hi = lo, hi
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
