package survey

import (
	"errors"
	"math"
	"slices"
)

// peak is a local maximum of a power spectrum.
type peak struct {
	f     [2]float64 // frequency in cycles per pixel, between bins
	power float64
	score float64 // power over the median power at the same radius
}

// hann returns the Hann window of length n, the weights of a windowed
// transform: it keeps a lattice peak's leakage to a few bins.
func hann(n int) []float64 {
	w := make([]float64, n)
	for i := range w {
		w[i] = 0.5 - 0.5*math.Cos(2*math.Pi*(float64(i)+0.5)/float64(n))
	}
	return w
}

// windowedData returns the w x h crop of g at (x0, y0) less sub (when not
// nil: a height to take off each pixel, by its index in g), its mean
// removed and Hann-windowed in x and y.
func windowedData(g *grid, sub func(q int) float64, x0, y0, w, h int) []float64 {
	f := make([]float64, w*h)
	var mean float64
	for j := 0; j < h; j++ {
		for i := 0; i < w; i++ {
			q := (y0+j)*g.w + x0 + i
			v := g.v[q]
			if sub != nil {
				v -= sub(q)
			}
			f[j*w+i] = v
			mean += v
		}
	}
	mean /= float64(w * h)
	wx, wy := hann(w), hann(h)
	for j := 0; j < h; j++ {
		for i := 0; i < w; i++ {
			f[j*w+i] = (f[j*w+i] - mean) * wx[i] * wy[j]
		}
	}
	return f
}

// findPeaks returns the local maxima of s's power (one of each ±f pair)
// between minF cycles per pixel and the Nyquist limit whose power is at
// least minScore times the median at their radius, strongest first, at
// most maxPeaks of them, each placed between bins by the Hann window's
// exact ratio rule.
func findPeaks(s *spectrum, minF, minScore float64, maxPeaks int) []peak {
	w, h := s.w, s.h
	radius := func(kx, ky int) float64 {
		return math.Hypot(float64(kx)/float64(w), float64(ky)/float64(h))
	}
	// Median power by radius, from a sample of the bins.
	const shells = 256
	shellOf := func(r float64) int { return min(shells-1, int(r/0.75*shells)) }
	samples := make([][]float64, shells)
	total := s.hw * h
	stride := max(1, total/400000)
	if stride%2 == 0 {
		stride++ // avoid sampling along a single column pattern
	}
	for k := 0; k < total; k += stride {
		kx, ky := k%s.hw, k/s.hw
		if ky > h/2 {
			ky -= h
		}
		r := radius(kx, ky)
		samples[shellOf(r)] = append(samples[shellOf(r)], s.power(kx, ky))
	}
	bg := make([]float64, shells)
	for i := range bg {
		if len(samples[i]) > 0 {
			bg[i] = median(samples[i])
		}
	}
	for i := 1; i < shells; i++ { // empty shells take the last known
		if bg[i] == 0 {
			bg[i] = bg[i-1]
		}
	}
	// Scan-line offsets put power all along the columns of zero x
	// frequency (and, through the window, the next ones), falling with
	// the y frequency where the offsets drift: a peak there is measured
	// against the median of its column within ±16 bins (its own ±2 left
	// out).
	colBG := make([][]float64, 3)
	for kx := 0; kx <= min(2, w/2); kx++ {
		col := make([]float64, h)
		for ky := 0; ky < h; ky++ {
			col[ky] = s.power(kx, ky)
		}
		colBG[kx] = make([]float64, h)
		win := make([]float64, 0, 32)
		for ky := 0; ky < h; ky++ {
			win = win[:0]
			for d := -16; d <= 16; d++ {
				if d >= -2 && d <= 2 {
					continue
				}
				win = append(win, col[((ky+d)%h+h)%h])
			}
			colBG[kx][ky] = median(win)
		}
	}
	var out []peak
	for ky := -(h - 1) / 2; ky <= h/2; ky++ {
		for kx := 0; kx <= w/2; kx++ {
			if kx == 0 && ky <= 0 {
				continue
			}
			r := radius(kx, ky)
			if r < minF || float64(kx) >= float64(w)/2 || math.Abs(float64(ky)) >= float64(h)/2 {
				continue
			}
			p := s.power(kx, ky)
			b := bg[shellOf(r)]
			if kx <= 2 {
				b = math.Max(b, colBG[kx][(ky+h)%h])
			}
			if !(p > minScore*b) {
				continue
			}
			local := true
			for dy := -1; dy <= 1 && local; dy++ {
				for dx := -1; dx <= 1; dx++ {
					if (dx != 0 || dy != 0) && s.power(kx+dx, ky+dy) > p {
						local = false
						break
					}
				}
			}
			if !local {
				continue
			}
			m0 := math.Sqrt(p)
			dx := hannOffset(math.Sqrt(s.power(kx-1, ky)), m0, math.Sqrt(s.power(kx+1, ky)))
			dy := hannOffset(math.Sqrt(s.power(kx, ky-1)), m0, math.Sqrt(s.power(kx, ky+1)))
			out = append(out, peak{
				f:     [2]float64{(float64(kx) + dx) / float64(w), (float64(ky) + dy) / float64(h)},
				power: p, score: p / math.Max(b, 1e-300),
			})
		}
	}
	slices.SortFunc(out, func(a, b peak) int { return cmpDesc(a.power, b.power) })
	if len(out) > maxPeaks {
		out = out[:maxPeaks]
	}
	return out
}

// hannOffset returns where between bins a Hann-windowed tone lies, from
// the magnitudes at the bin below, at the peak bin and above: for a tone
// δ bins above the peak bin the magnitude ratio of the larger neighbour is
// r = (1+δ)/(2−δ), so δ = (2r−1)/(r+1) (exact for a pure tone).
func hannOffset(below, at, above float64) float64 {
	if !(at > 0) {
		return 0
	}
	if above >= below {
		r := above / at
		return math.Max(0, math.Min(0.5, (2*r-1)/(r+1)))
	}
	r := below / at
	return -math.Max(0, math.Min(0.5, (2*r-1)/(r+1)))
}

func cmpDesc(a, b float64) int {
	switch {
	case a > b:
		return -1
	case a < b:
		return 1
	}
	return 0
}

// basis is the lattice's reciprocal basis in the image: every lattice
// peak of Si(100)-2x1 lies at m·b1 + n·b2 (cycles per pixel) for whole m
// and n, b1 and b2 being the two directions' row frequencies (1/row
// spacing, turned 90° from each other on the surface). A terrace whose
// rows run across b1 shows peaks (m, 2n): rows at b1, dimers at 2·b2; the
// other kind shows (2m, n). No peak has m and n both odd.
type basis struct {
	b1, b2 [2]float64
	// measured2 reports whether b2 was seen (a peak of the other terrace
	// or this terrace's dimers); otherwise it is b1 turned by 90°, and
	// the scale is taken as isotropic without skew.
	measured2 bool
	// dimers1, dimers2 report whether the dimer peaks 2·b2 (of terraces
	// with rows across b1) and 2·b1 were seen.
	dimers1, dimers2 bool
	// kind1 and kind2 report whether peaks of terraces with rows across b1
	// (one odd index m) and across b2 (odd n) were seen.
	kind1, kind2 bool
	// peaks are the lattice peaks the basis was fitted to, with their
	// indices.
	peaks []labelled
	// bin is the spacing of the transform's bins, cycles per pixel.
	bin float64
}

type labelled struct {
	peak
	m, n int
}

// errNoLattice is returned when the spectrum shows no dimer-row peak.
var errNoLattice = errors.New("no dimer-row period found in the image (is it an atomically resolved image of Si(100)-2x1?)")

// findBasis identifies the lattice among the peaks. nominal is the
// expected row frequency vector length in cycles per pixel along x and y
// (row spacing over the nominal pixel size), or zero when unknown. The
// strongest peaks are each tried as a row peak b1, with b2 the peak at
// b1 turned by ±90° (the other terrace's rows), or half the peak at twice
// that (this terrace's dimers); the hypothesis whose grid explains the
// most peak power wins, ties going to a measured b2, then to the longer
// b1. bin is the spacing of the transform's bins (cycles per pixel).
func findBasis(peaks []peak, nominal [2]float64, bin float64) (basis, error) {
	if len(peaks) == 0 {
		return basis{}, errNoLattice
	}
	plausible := func(f [2]float64) bool {
		if nominal[0] == 0 {
			return true
		}
		// The frequency in units of the expected row frequency, by the
		// nominal pixel size: scanners are rarely off by more than 25 %.
		r := math.Hypot(f[0]/nominal[0], f[1]/nominal[1])
		return r > 0.75 && r < 1.33
	}
	var best basis
	bestScore := -1.0
	tried := 0
	for _, c := range peaks {
		if tried == 8 {
			break
		}
		if !plausible(c.f) {
			continue
		}
		tried++
		for _, b2 := range partners(c, peaks) {
			b := basis{b1: c.f, b2: b2.f, measured2: b2.measured, bin: bin}
			score := b.explain(peaks)
			// Within 2 %, a measured b2 and then a longer b1 win.
			tie := score > bestScore*0.98 && score <= bestScore*1.02
			if score > bestScore*1.02 || (tie && b.measured2 && !best.measured2) ||
				(tie && b.measured2 == best.measured2 && norm(b.b1) > norm(best.b1)*1.01) {
				best, bestScore = b, score
			}
		}
	}
	if bestScore <= 0 {
		return basis{}, errNoLattice
	}
	best.refine(peaks)
	return best, nil
}

type partner struct {
	f        [2]float64
	measured bool
}

// partners returns the candidates for b2 given b1 = c.f: peaks near c
// turned by ±90° (within 25 % in length and 12° in angle: scanner
// distortion), or half of peaks near twice that; and c turned by 90°
// itself, unmeasured.
func partners(c peak, peaks []peak) []partner {
	var out []partner
	r90 := [2]float64{-c.f[1], c.f[0]}
	lc := norm(c.f)
	for _, mult := range []float64{1, 2} {
		// Dimers beyond the Nyquist limit show up aliased, anywhere: a
		// dimer peak is looked for only where it can be seen.
		if mult == 2 && (math.Abs(2*r90[0]) > 0.45 || math.Abs(2*r90[1]) > 0.45) {
			continue
		}
		for _, q := range peaks {
			for _, sgn := range []float64{1, -1} {
				f := [2]float64{sgn * q.f[0] / mult, sgn * q.f[1] / mult}
				lr := norm(f) / lc
				cos := (f[0]*r90[0] + f[1]*r90[1]) / (norm(f) * lc)
				if lr > 0.8 && lr < 1.25 && cos > math.Cos(12*math.Pi/180) {
					out = append(out, partner{f: f, measured: true})
				}
			}
		}
	}
	out = append(out, partner{f: r90})
	return out
}

// explain returns the power of the peaks that lie on b's grid at
// allowed indices (not both odd), within 6 % of |b1|.
func (b *basis) explain(peaks []peak) float64 {
	var sum float64
	for _, p := range peaks {
		if m, n, ok := b.index(p.f); ok {
			_, _ = m, n
			sum += p.power
		}
	}
	return sum
}

// index returns the grid indices of frequency f, and whether f lies on
// the grid at an index Si(100)-2x1 allows.
func (b *basis) index(f [2]float64) (m, n int, ok bool) {
	return b.indexWithin(f, 0.06*norm(b.b1))
}

// indexWithin is index with the tolerance tol (cycles per pixel).
func (b *basis) indexWithin(f [2]float64, tol float64) (m, n int, ok bool) {
	det := b.b1[0]*b.b2[1] - b.b1[1]*b.b2[0]
	if det == 0 {
		return 0, 0, false
	}
	mf := (f[0]*b.b2[1] - f[1]*b.b2[0]) / det
	nf := (b.b1[0]*f[1] - b.b1[1]*f[0]) / det
	m, n = int(math.Round(mf)), int(math.Round(nf))
	if (m == 0 && n == 0) || (m%2 != 0 && n%2 != 0) || abs(m) > 8 || abs(n) > 8 {
		return m, n, false
	}
	px := float64(m)*b.b1[0] + float64(n)*b.b2[0]
	py := float64(m)*b.b1[1] + float64(n)*b.b2[1]
	if math.Abs(px) >= 0.5 || math.Abs(py) >= 0.5 {
		return m, n, false // beyond the Nyquist limit: what is seen there is aliased
	}
	return m, n, math.Hypot(f[0]-px, f[1]-py) < tol
}

// refine fits b1 and b2 by weighted least squares to every peak on the
// grid (three times, labelling again with each fit), weighted by the
// peaks' power. Without a measured b2 only b1 is fitted, from the peaks along
// it.
func (b *basis) refine(peaks []peak) {
	for pass := 0; pass < 3; pass++ {
		// Once fitted, the lattice's peaks lie within a bin or so of the
		// grid; a looser tolerance would let stray peaks in.
		tol := 0.06 * norm(b.b1)
		if pass > 0 && b.bin > 0 {
			tol = math.Min(tol, math.Max(1.5*b.bin, 0.01*norm(b.b1)))
		}
		b.peaks = b.peaks[:0]
		for _, p := range peaks {
			if m, n, ok := b.indexWithin(p.f, tol); ok {
				if !b.measured2 && n != 0 {
					continue
				}
				b.peaks = append(b.peaks, labelled{peak: p, m: m, n: n})
			}
		}
		b.dimers1, b.dimers2, b.kind1, b.kind2 = false, false, false, false
		for _, p := range b.peaks {
			b.dimers1 = b.dimers1 || (p.m == 0 && abs(p.n) == 2)
			b.dimers2 = b.dimers2 || (p.n == 0 && abs(p.m) == 2)
			b.kind1 = b.kind1 || (p.m%2 != 0 && p.n%2 == 0)
			b.kind2 = b.kind2 || (p.m%2 == 0 && p.n%2 != 0)
		}
		b.peaks = singleSource(b.peaks)
		fitBasis(b, b.peaks)
	}
	if !b.measured2 {
		b.b2 = [2]float64{-b.b1[1], b.b1[0]}
	}
}

// alignTo orders b's vectors like ref's (b1 along ±ref.b1), so that the
// kinds of terrace keep their numbers, and reports whether they match
// within 10° and 10 % (a measurement of the same lattice).
func (b *basis) alignTo(ref basis) bool {
	near := func(u, v [2]float64) bool {
		d1 := math.Hypot(u[0]-v[0], u[1]-v[1])
		d2 := math.Hypot(u[0]+v[0], u[1]+v[1])
		return math.Min(d1, d2) < 0.15*norm(v)
	}
	if !near(b.b1, ref.b1) && near(b.b1, ref.b2) {
		b.b1, b.b2 = b.b2, b.b1
		b.dimers1, b.dimers2 = b.dimers2, b.dimers1
		b.kind1, b.kind2 = b.kind2, b.kind1
		for i := range b.peaks {
			b.peaks[i].m, b.peaks[i].n = b.peaks[i].n, b.peaks[i].m
		}
	}
	return near(b.b1, ref.b1) && near(b.b2, ref.b2)
}

// singleSource drops the peaks with both indices even when both kinds of
// terrace are in view in comparable measure: there the second row
// harmonic of one kind and the dimer peak of the other fall on the same
// frequency with different phases and masks, and their sum can peak off
// the lattice frequency. Peaks of one kind alone (one index odd) stay.
// When one kind's peaks are five times weaker than the other's (a small
// terrace), the shared peaks are the big terrace's and stay.
func singleSource(ps []labelled) []labelled {
	var p1, p2 float64
	for _, p := range ps {
		if p.m%2 != 0 && p.n%2 == 0 {
			p1 = math.Max(p1, p.power)
		}
		if p.m%2 == 0 && p.n%2 != 0 {
			p2 = math.Max(p2, p.power)
		}
	}
	if p1 == 0 || p2 == 0 || math.Min(p1, p2) < 0.2*math.Max(p1, p2) {
		return ps
	}
	out := ps[:0]
	for _, p := range ps {
		if p.m%2 != 0 || p.n%2 != 0 {
			out = append(out, p)
		}
	}
	return out
}

// fitBasis solves f_k ≈ m_k·b1 + n_k·b2 for b1 and b2 by weighted least
// squares (x and y apart: the same 2 x 2 normal equations).
func fitBasis(b *basis, ps []labelled) {
	var smm, smn, snn float64
	var rmx, rmy, rnx, rny float64
	// Weights: a peak's power grows with the area of its terraces, and
	// its width shrinks with it.
	var top float64
	for _, p := range ps {
		top = math.Max(top, p.power)
	}
	for _, p := range ps {
		w := p.power / top
		m, n := float64(p.m), float64(p.n)
		smm += w * m * m
		smn += w * m * n
		snn += w * n * n
		rmx += w * m * p.f[0]
		rmy += w * m * p.f[1]
		rnx += w * n * p.f[0]
		rny += w * n * p.f[1]
	}
	if !b.measured2 || snn == 0 {
		if smm > 0 {
			b.b1 = [2]float64{rmx / smm, rmy / smm}
		}
		return
	}
	det := smm*snn - smn*smn
	if math.Abs(det) < 1e-12*smm*snn {
		return
	}
	b.b1 = [2]float64{(rmx*snn - rnx*smn) / det, (rmy*snn - rny*smn) / det}
	b.b2 = [2]float64{(rnx*smm - rmx*smn) / det, (rny*smm - rmy*smn) / det}
}

func norm(v [2]float64) float64 { return math.Hypot(v[0], v[1]) }

func abs(i int) int {
	if i < 0 {
		return -i
	}
	return i
}

// maxRefinePixels bounds the images whose peaks refinePeaks places by the
// transform itself: beyond it a peak spans enough bins that the Hann rule
// alone is precise to a few 10⁻⁴ of its frequency.
const maxRefinePixels = 1100 * 1100

// refinePeaks moves each peak to the maximum of the magnitude of the
// windowed data's Fourier transform, evaluated directly between bins.
// Where a terrace covers only part of the image, the lattice's peak is the
// transform of (window x terrace mask) moved to the lattice frequency,
// lopsided but still largest exactly there (the transform of a
// non-negative function peaks at zero), while the Hann ratio rule assumes
// the window's own shape. Each peak is searched on a 5 x 5 grid of 0.3
// bin, then 0.075 bin, and placed by a quadratic through the best 3 x 3.
func refinePeaks(f []float64, w, h int, peaks []peak) {
	if w*h > maxRefinePixels {
		return
	}
	row := make([]complex128, h)
	exR, exI := make([]float64, w), make([]float64, w)
	for k := range peaks {
		p := &peaks[k]
		step := 0.3
		for level := 0; level < 2; level++ {
			var mag [5][5]float64
			for a := 0; a < 5; a++ {
				fx := p.f[0] + float64(a-2)*step/float64(w)
				for x := range exR {
					exI[x], exR[x] = math.Sincos(-2 * math.Pi * fx * float64(x))
				}
				for y := 0; y < h; y++ {
					var sr, si float64
					line := f[y*w : y*w+w]
					for x, v := range line {
						sr += v * exR[x]
						si += v * exI[x]
					}
					row[y] = complex(sr, si)
				}
				for b := 0; b < 5; b++ {
					fy := p.f[1] + float64(b-2)*step/float64(h)
					var sum complex128
					for y, r := range row {
						s, c := math.Sincos(-2 * math.Pi * fy * float64(y))
						sum += r * complex(c, s)
					}
					mag[a][b] = real(sum)*real(sum) + imag(sum)*imag(sum)
				}
			}
			ba, bb := 2, 2
			for a := 1; a < 4; a++ {
				for b := 1; b < 4; b++ {
					if mag[a][b] > mag[ba][bb] {
						ba, bb = a, b
					}
				}
			}
			da := parabola(mag[ba-1][bb], mag[ba][bb], mag[ba+1][bb])
			db := parabola(mag[ba][bb-1], mag[ba][bb], mag[ba][bb+1])
			p.f[0] += (float64(ba-2) + da) * step / float64(w)
			p.f[1] += (float64(bb-2) + db) * step / float64(h)
			step /= 4
		}
	}
}

// parabola returns the vertex of the parabola through (−1, a), (0, b),
// (1, c), clamped to ±0.5.
func parabola(a, b, c float64) float64 {
	d := a - 2*b + c
	if d >= 0 {
		return 0
	}
	return math.Max(-0.5, math.Min(0.5, 0.5*(a-c)/d))
}
