package planner

import (
	"math"
	"slices"
	"sort"

	"github.com/golang/geo/r2"
)

// What moves the tip away from where the last registration put it, as
// the segmenter, the timeline and the Monte Carlo see it (all lengths nm,
// times s):
//
//   - drift at the sampled rate r (nm/min), less with feed-forward
//     compensation (drift.compensation: the rate measured between two
//     registrations is subtracted, ResidualShare of it is left; the first
//     segment of a step has no measured rate yet), plus an excess that
//     decays exponentially after each long move and after an anneal
//     (drift.excess);
//   - piezo creep after a long move: Fraction of the part of the move
//     beyond the scan frame, arriving as a·(1 − exp(−t/τ)) (Libioulle et
//     al., JVST B 9, 655 (1991) show creep; its share and time constant
//     are from memory). The wait after the move lasts until what is
//     still to come is SettleShare of the next stroke's tolerance, so the
//     settle grows with the move's length (logarithmically), and what is
//     left counts against the stroke's budget.
//
// Everything is linear in the drift rate and in the creep fraction, so
// the planner keeps two functions of the writing clock per step: the
// drift displacement at the profile's mean rate (driftField) and the
// creep displacement per unit creep fraction (decay, creepField). The
// segmenter evaluates them at the planning values, the Monte Carlo at
// each sample's rate and fraction.

// decay sums exponentially decaying rates on one clock: a source added
// at time t0 with level a contributes a·exp(−(t−t0)/τ) to the rate at t
// ≥ t0. integral(t) is the integral of all sources' rates from 0 to t.
// Sources must be added at non-decreasing times. O(log n) per query.
type decay struct {
	tau   float64
	times []float64 // source times
	cum   []float64 // integral from 0 to times[i], sources up to i−1
	level []float64 // the summed rate right after source i is added
}

func (d *decay) add(t, a float64) {
	if a == 0 || d.tau <= 0 {
		return
	}
	n := len(d.times)
	if n > 0 && t == d.times[n-1] {
		d.level[n-1] += a
		return
	}
	cum, lvl := 0.0, 0.0
	if n > 0 {
		dt := t - d.times[n-1]
		cum = d.cum[n-1] + d.level[n-1]*d.tau*(-math.Expm1(-dt/d.tau))
		lvl = d.level[n-1] * math.Exp(-dt/d.tau)
	}
	d.times = append(d.times, t)
	d.cum = append(d.cum, cum)
	d.level = append(d.level, lvl+a)
}

// same reports whether d and e hold the same sources, bit for bit (their
// integrals and levels are then the same at every time).
func (d *decay) same(e *decay) bool {
	return sameFloat(d.tau, e.tau) && sameBits(d.times, e.times) && sameBits(d.cum, e.cum) && sameBits(d.level, e.level)
}

// sameFloat reports whether x and y are the same value, bit for bit
// (NaNs and signed zeros included).
func sameFloat(x, y float64) bool { return math.Float64bits(x) == math.Float64bits(y) }

// sameBits reports whether a and b hold the same values, bit for bit.
func sameBits(a, b []float64) bool { return slices.EqualFunc(a, b, sameFloat) }

// integral returns the integral of the summed rate from 0 to t (0 for
// t before the first source).
func (d *decay) integral(t float64) float64 {
	i := sort.SearchFloat64s(d.times, t)
	// times[i-1] < t <= times[i]; a source exactly at t adds nothing yet.
	if i < len(d.times) && d.times[i] == t {
		return d.cum[i]
	}
	if i == 0 {
		return 0
	}
	i--
	dt := t - d.times[i]
	return d.cum[i] + d.level[i]*d.tau*(-math.Expm1(-dt/d.tau))
}

// levelAt returns the summed rate of the sources added before t, at t.
func (d *decay) levelAt(t float64) float64 {
	i := sort.SearchFloat64s(d.times, t) // times[i-1] < t
	if i == 0 {
		return 0
	}
	i--
	return d.level[i] * math.Exp(-(t-d.times[i])/d.tau)
}

// saved returns how much less of the sources added before t0 arrives in
// [t0, t1] when delay seconds are spent before t0 without the clock
// knowing (a registration): at least their arrival in [t0, t1] times
// 1 − exp(−delay/τ), as each has decayed that much more.
func (d *decay) saved(t0, t1, delay float64) float64 { return d.savedMemo(t0, t1, delay, nil) }

// savedMemo is saved taking its Expm1 values from m when m is not nil
// (the same values: Expm1 is a pure function). The segmenter asks it
// for every start with the same delay (a local registration's time)
// again and again, and on an array with few distinct spans.
func (d *decay) savedMemo(t0, t1, delay float64, m *savedMemo) float64 {
	if d.tau <= 0 || delay <= 0 || t1 <= t0 {
		return 0
	}
	lv := d.levelAt(t0)
	if lv == 0 && d.tau-d.tau == 0 && t1-t0 == t1-t0 && delay == delay {
		// Nothing left of the sources (on an array about half the
		// starts): the product below is lv times finite factors ≥ +0,
		// lv itself (its sign too); a NaN or infinite τ, span or delay
		// takes the product's way.
		return lv
	}
	if m == nil {
		pre := lv * d.tau * (-math.Expm1(-(t1 - t0) / d.tau))
		return pre * (-math.Expm1(-delay / d.tau))
	}
	pre := lv * d.tau * (-m.span.at(-(t1 - t0) / d.tau))
	return pre * (-m.delay.at(-delay / d.tau))
}

// savedMemo holds savedMemo's Expm1 values, of the span [t0, t1] and of
// the delay apart (the delay's repeat, the span's less). One per
// goroutine.
type savedMemo struct{ span, delay recentMemo }

func newSavedMemo() *savedMemo {
	return &savedMemo{span: newExpm1Memo(), delay: newExpm1Memo()}
}

// newExpm1Memo returns a memo of math.Expm1.
func newExpm1Memo() recentMemo { return newRecentMemo(math.Expm1) }

// driftField is the drift displacement (nm) along one step's writing
// clock at the profile's mean rate r0: base·t plus the decaying excess
// after long moves and after the anneal that preceded the step.
type driftField struct {
	basePerS float64 // r0/60, nm/s (times the residual share where compensated)
	moves    decay   // excess after long moves, nm/s
	anneal   decay   // excess after the anneal, nm/s
}

// at returns the displacement accumulated from clock 0 to t.
func (f *driftField) at(t float64) float64 {
	return f.basePerS*t + f.moves.integral(t) + f.anneal.integral(t)
}

// motion turns tip moves into time, creep and drift excess, the same way
// for the segmenter, the timeline and the by-hand baseline.
type motion struct {
	speed, settle float64
	// creep at the planning fraction: the settle waits for it
	creepFrac, creepTau, frame, share, maxSettle float64
	// excess drift after a long move, nm/min per µm beyond the frame
	excessPerUM float64
}

func newMotion(p *Profile, creepFrac float64) motion {
	c := p.Registration.Creep
	return motion{speed: p.MoveSpeedNMPerS, settle: p.SettleS,
		creepFrac: creepFrac, creepTau: c.TauS, frame: c.FrameNM, share: c.SettleShare, maxSettle: c.MaxSettleS,
		excessPerUM: p.Drift.Excess.AfterMovePerUMNMPerMin}
}

// moveResult is one move: its time (travel, settle and the wait for
// creep), the creep still to come after it per unit creep fraction (nm),
// and the excess drift rate it starts at the profile's mean rate
// (nm/min).
type moveResult struct {
	timeS     float64
	creepUnit float64
	excess    float64
	waitS     float64 // the part of timeS spent waiting for creep
}

// move returns the move from a to b before work held to ±tolNM: the wait
// after it lasts until the creep still to come (at the planning
// fraction) is share·tol, at most maxSettle.
func (m *motion) move(a, b r2.Point, tolNM float64) moveResult {
	d := a.Sub(b).Norm()
	r := moveResult{timeS: d/m.speed + m.settle}
	beyond := d - m.frame
	if beyond <= 0 {
		return r
	}
	r.excess = m.excessPerUM * beyond / 1000
	if m.creepTau <= 0 {
		return r
	}
	r.creepUnit = beyond
	amount := m.creepFrac * beyond
	if target := m.share * tolNM; amount > target && target > 0 {
		w := math.Min(m.creepTau*math.Log(amount/target), m.maxSettle)
		r.waitS = math.Max(w-m.settle, 0)
		r.timeS += r.waitS
		r.creepUnit = beyond * math.Exp(-(m.settle+r.waitS)/m.creepTau)
	} else {
		r.creepUnit = beyond * math.Exp(-m.settle/m.creepTau)
	}
	return r
}

// plainMove is the move time without creep: distance/speed + settle, as
// the route engine scores it.
func (m *motion) plainMove(a, b r2.Point) float64 { return a.Sub(b).Norm()/m.speed + m.settle }
