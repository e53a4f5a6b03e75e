package planner

import (
	"math"
	"math/rand/v2"
	"slices"
	"testing"

	"github.com/golang/geo/r1"
	"github.com/golang/geo/r2"

	"dimerpath/lattice"
)

// naiveChords is chordIndex.chords written out plainly: every row
// segment is tested on its own and the intervals merged by
// lattice.MergeIntervals.
func naiveChords(segs []runSeg, dir lattice.RowDirection, c, half, gap float64, cells bool) []r1.Interval {
	alongPad, acrossPad := 0.0, lattice.HOffset
	if cells {
		alongPad, acrossPad = lattice.DimerPitch/2, lattice.RowSpacing/2
	}
	var sp []r1.Interval
	for _, s := range segs {
		au, ac := dir.Split(s.a)
		bu, bc := dir.Split(s.b)
		if s.rows == dir {
			if ac >= c-half-lattice.HOffset && ac <= c+half+lattice.HOffset {
				sp = append(sp, r1.Interval{Lo: min(au, bu) - alongPad, Hi: max(au, bu) + alongPad})
			}
			continue
		}
		lo, hi := min(ac, bc), max(ac, bc)
		if hi+lattice.DimerPitch/2 < c-half || lo-lattice.DimerPitch/2 > c+half {
			continue
		}
		sp = append(sp, r1.Interval{Lo: au - acrossPad, Hi: au + acrossPad})
	}
	return lattice.MergeIntervals(sp, gap)
}

// TestChordsMatchNaive checks that the index's blocks of rows across the
// lines (taken whole where a line meets or misses all of them) give
// exactly the intervals of testing every row alone.
func TestChordsMatchNaive(t *testing.T) {
	rng := rand.New(rand.NewPCG(1, 2))
	for trial := range 40 {
		var segs []runSeg
		n := 1 + rng.IntN(300)
		// Rows across the lines (along y) at increasing x, with extents
		// in y that are often equal (a rectangle) and sometimes ragged;
		// some rows along the lines (along x) mixed in.
		ragged := trial%2 == 1
		for k := range n {
			x := float64(k)*lattice.RowSpacing + float64(rng.IntN(3))*lattice.RowSpacing*3*float64(trial%3)
			lo, hi := 10.0, 60.0
			if ragged {
				lo, hi = 10+rng.Float64()*20, 40+rng.Float64()*20
			}
			segs = append(segs, runSeg{a: r2.Point{X: x, Y: lo}, b: r2.Point{X: x, Y: hi}, rows: lattice.RowsAlongY})
			if rng.IntN(10) == 0 {
				y := rng.Float64() * 70
				segs = append(segs, runSeg{a: r2.Point{X: rng.Float64() * 50, Y: y}, b: r2.Point{X: 50 + rng.Float64()*50, Y: y}, rows: lattice.RowsAlongX})
			}
		}
		ix := newChordIndex(segs, lattice.RowsAlongX)
		for q := range 50 {
			c := rng.Float64()*80 - 5
			gap, cells := 2*lattice.RowSpacing, q%2 == 0
			if q%3 == 0 {
				gap = lattice.RowSpacing
			}
			got := slices.Clone(ix.chords(c, lattice.RowSpacing/2, gap, cells))
			want := naiveChords(segs, lattice.RowsAlongX, c, lattice.RowSpacing/2, gap, cells)
			if !slices.Equal(got, want) {
				t.Fatalf("trial %d, line at %g (gap %g, cells %v): chords %v, want %v", trial, c, gap, cells, got, want)
			}
		}
	}
}

// TestSlantBandExact checks slantBand's shortcuts against the plain
// difference of fastPhi, bit for bit, across and beyond the tails.
func TestSlantBandExact(t *testing.T) {
	rng := rand.New(rand.NewPCG(3, 4))
	check := func(b, a float64) {
		if got, want := slantBand(b, a), fastPhi(b)-fastPhi(a); got != want {
			t.Fatalf("slantBand(%v, %v) = %v, want %v", b, a, got, want)
		}
	}
	for range 200000 {
		a := -40 + rng.Float64()*45
		check(a+rng.Float64()*50, a)
	}
	for _, x := range []float64{0, 7.99, 8, 8.01, phiOne, phiNil, 8.29, 8.3, 8.4, 8.5, 8.6, 9, 12, 38, 39, 40} {
		check(x, -x)
		check(x, -phiNil)
		check(0, -x)
		check(0.5, -x)
		check(x, x-3.6) // a short piece, before its start
		check(-x+3.6, -x)
	}
}

// TestSlantBandMemo: with a tail memo (newTailMemo), slantBand's value is still
// fastPhi(b) − fastPhi(a) bit for bit, when arguments beyond the table
// repeat (memo hits), and when more distinct ones than the memo holds
// come round (replacements).
func TestSlantBandMemo(t *testing.T) {
	rng := rand.New(rand.NewPCG(14, 14))
	m := newTailMemo()
	for _, distinct := range []int{1, 3, 4, 5, 9} {
		offsets := make([]float64, distinct)
		for i := range offsets {
			offsets[i] = 8 + rng.Float64()*0.6 // where fastPhi leaves the table for erfc
		}
		for range 20000 {
			x := offsets[rng.IntN(distinct)]
			for _, ba := range [][2]float64{{x, x - 5}, {5 - x, -x}, {-3, -x}, {x, 3}} {
				if got, want := slantBandMemo(ba[0], ba[1], m), fastPhi(ba[0])-fastPhi(ba[1]); got != want {
					t.Fatalf("slantBandMemo(%v, %v) = %v, want %v", ba[0], ba[1], got, want)
				}
			}
		}
	}
	if got, want := m.at(0), normalCDF(0); got != want { // a fresh argument, not the memo's initial state
		t.Fatalf("memo normalCDF(0) = %v, want %v", got, want)
	}
}

// TestMissAndLog: missAndLog's miss is expNeg's bit for bit, and its
// log(1 − miss) is math.Log1p's to the table's stated 1.5·10⁻⁸, inside both
// tables, beyond them and at their edges.
func TestMissAndLog(t *testing.T) {
	rng := rand.New(rand.NewPCG(9, 10))
	check := func(x float64) {
		miss, logOK := missAndLog(x)
		if want := expNeg(x); miss != want {
			t.Fatalf("missAndLog(%v) miss = %v, expNeg %v", x, miss, want)
		}
		if want := math.Log1p(-math.Exp(-x)); math.Abs(logOK-want) > 1.5e-8 {
			t.Fatalf("missAndLog(%v) log = %v, math.Log1p gives %v", x, logOK, want)
		}
		// Within the log table, its own Hermite interpolation bit for bit
		// (missAndLog shares the exp table's weights).
		if tl := (x - logTableFrom) * logSteps; miss >= 1e-4 && tl >= 0 && tl < logLast {
			i := int(tl)
			c := logSpans[i]
			if want := hermite(tl-float64(i), c[0], c[1], c[2], c[3]); logOK != want {
				t.Fatalf("missAndLog(%v) log = %v, the table's interpolation %v", x, logOK, want)
			}
		}
	}
	for range 200000 {
		check(0.01 + rng.Float64()*40)
	}
	for _, x := range []float64{0.01, 0.5 - 1e-12, 0.5, 0.5 + 1e-12, 9.2, 10 - 1e-12, 10, 10 + 1e-12, exposureSure - 1e-12, exposureSure, 37, 100} {
		check(x)
	}
}

// TestMissAccurateExact checks missAccurate's shortcut against accurate
// on the exponentials.
func TestMissAccurateExact(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	for range 200000 {
		lo := rng.Float64() * 40
		hi := lo + rng.ExpFloat64()*0.05
		if got, want := missAccurate(lo, hi, 1), accurate(math.Exp(-hi), math.Exp(-lo), 1); got != want {
			t.Fatalf("missAccurate(%v, %v) = %v, want %v", lo, hi, got, want)
		}
	}
}

// TestSlantedRangeMatchesExact: a slanted piece's exposure summed along
// site lines by slantedRange, with and without tracking the largest term
// (the same values bit for bit; the Gaussian across it by recurrence, the
// band along it from the piece's table, newBandTable) against the line
// exposure written out with math.Exp and erfc (CheckCoverage's formula:
// X·exp(−d²/2σ²)·[Φ((L−s)/σ) − Φ(−s/σ)]), for pieces at many angles,
// lengths, footprints and amplitudes. The bound is the table's: cubic
// Hermite on nodes σ/32 apart errs by at most (1/32)⁴/384·1.1 =
// 2.7·10⁻⁹ of the band (1.1 bounds the band's fourth derivative in σ
// units: twice max|φ‴| = 2·0.55), the Φ table behind its nodes by 10⁻¹⁰
// in value and 1.6·10⁻¹⁰ through its slopes; 3.1·10⁻⁹ of the amplitude
// in all.
func TestSlantedRangeMatchesExact(t *testing.T) {
	surf, err := lattice.NewSurface(2000, 2000)
	if err != nil {
		t.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(10, 32))
	worst := 0.0
	for trial := range 300 {
		sigma := 0.3 + rng.Float64()*3
		amp := math.Exp(rng.Float64()*8 - 2)
		length := 0.05 + rng.Float64()*40
		angle := rng.Float64() * 2 * math.Pi
		a := r2.Point{X: 500 + rng.Float64()*10, Y: 500 + rng.Float64()*10}
		b := a.Add(r2.Point{X: math.Cos(angle), Y: math.Sin(angle)}.Mul(length))
		reach := sigma * math.Sqrt(2*math.Log(max(amp/exposureNeglect, 1)))
		p := makePiece(surf, 0, 0, a, b, amp, sigma, reach)
		bandTables{}.tabulate(&p)
		if p.kind != pieceSlanted {
			continue
		}
		l0 := int(math.Floor((p.yLo+lattice.HOffset)/lattice.RowSpacing)) * 2
		l1 := (int(math.Ceil((p.yHi-lattice.HOffset)/lattice.RowSpacing)) + 1) * 2
		d0 := int(math.Floor(p.uLo/lattice.DimerPitch)) - 1
		d1 := int(math.Ceil(p.uHi/lattice.DimerPitch)) + 2
		x, plain, best, who := make([]float64, d1-d0), make([]float64, d1-d0), make([]float64, d1-d0), make([]int32, d1-d0)
		for l := l0; l < l1; l += 1 + rng.IntN(3) {
			y := lineY(l)
			clear(x)
			clear(plain)
			k0, k1 := p.slantedDimers(d0, d1, y)
			p.slantedRange(d0, k0, k1, y, x, best, who, true)
			p.slantedRange(d0, k0, k1, y, plain, nil, nil, true) // no tracking: slantedRun
			for k := k0; k < k1; k++ {
				if plain[k] != x[k] {
					t.Fatalf("trial %d: line %d dimer %d: %g without tracking, %g with", trial, l, d0+k, plain[k], x[k])
				}
				u := lattice.DimerAlong(d0 + k)
				s := (u-p.pu)*p.du + (y-p.py)*p.dy
				across := (y-p.py)*p.du - (u-p.pu)*p.dy
				want := amp * math.Exp(-across*across/(2*sigma*sigma)) * (normalCDF((p.L-s)/sigma) - normalCDF(-s/sigma))
				if d := math.Abs(x[k]-want) / amp; d > 3.1e-9 || math.IsNaN(x[k]) {
					t.Fatalf("trial %d (L %g, σ %g, amp %g): line %d dimer %d: %g, want %g (off by %.3g of amp)", trial, length, sigma, amp, l, d0+k, x[k], want, d)
				} else {
					worst = max(worst, d)
				}
			}
		}
	}
	t.Logf("largest error %.3g of the amplitude", worst)
}
