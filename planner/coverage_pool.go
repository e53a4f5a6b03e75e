package planner

import (
	"context"
	"fmt"
	"math"
	"runtime"
	"runtime/debug"
	"slices"
	"sync"
	"sync/atomic"

	"dimerpath/lattice"
)

// The coverage check on every core. Each terrace's sites are cut into
// chunks by a grid fixed in site lines and dimers (coverageChunkLines x
// coverageChunkDimers, from the terrace's origin), never by the number of
// cores; workers take the chunks one after another, each with its own
// scratch and caches, and sum a chunk into sums of its own; the chunks'
// sums are then added in chunk order. So the result is the same, bit for
// bit, on one core or many (TestCoverageSameOnAnyCores).

// coverageChunkLines and coverageChunkDimers are the chunks' size: large
// enough that the ranges a chunk boundary cuts cost little (the demo's
// check sums ~1.8·10⁶ of its 13.6·10⁶ sites one by one either way), small
// enough for a few dozen chunks on the demo's 2 µm field to share out.
const (
	coverageChunkLines  = 256
	coverageChunkDimers = 512
)

// coverageChunk is a chunk: a range of one terrace and the pieces whose
// boxes may reach it, in the terrace's piece order.
type coverageChunk struct {
	r      siteRect
	pieces []*piece
}

// chunkSums is what a chunk adds to the check: per region and per stroke
// it touched, its sums, and its stray sites over the limit.
type chunkSums struct {
	acc       []indexedAcc
	strokes   []strokeSums
	nOver     int
	straySite []StraySite
	issues    []string
}

type indexedAcc struct {
	i int32
	a regionAcc
}

type strokeSums struct {
	i             int32
	missed, stray float64
}

// chunkMarks records which regions' and strokes' sums a worker's current
// chunk touched: mark id (the chunk's index + 1) and the lists.
type chunkMarks struct {
	id                  int32
	acc, stroke         []int32
	accList, strokeList []int32
}

// accAt returns region ri's accumulator (len(regions): other) for the
// current chunk.
func (ck *coverageCheck) accAt(ri int) *regionAcc {
	if m := &ck.touched; m.acc[ri] != m.id {
		m.acc[ri] = m.id
		m.accList = append(m.accList, int32(ri))
	}
	return &ck.acc[ri]
}

func (ck *coverageCheck) markStroke(si int32) {
	if m := &ck.touched; m.stroke[si] != m.id {
		m.stroke[si] = m.id
		m.strokeList = append(m.strokeList, si)
	}
}

// addMissed and addStray add to stroke si's sums for the current chunk.
func (ck *coverageCheck) addMissed(si int32, v float64) {
	ck.markStroke(si)
	ck.missed[si] += v
}

func (ck *coverageCheck) addStray(si int32, v float64) {
	ck.markStroke(si)
	ck.stray[si] += v
}

// run sums every chunk (on up to GOMAXPROCS workers), adds their sums in
// chunk order, and assembles the Coverage.
func (ck *coverageCheck) run(ctx context.Context) error {
	chunks := ck.chunks()
	merge := &chunkMerger{ck: ck, sums: make([]chunkSums, len(chunks)), done: make([]bool, len(chunks))}
	workers := min(runtime.GOMAXPROCS(0), len(chunks))
	if workers > 1 {
		// The pieces' caches filled before the workers share them.
		var all []*piece
		for t := range ck.pieces {
			for i := range ck.pieces[t] {
				all = append(all, &ck.pieces[t][i])
			}
		}
		const block = 256
		err := onWorkers(ctx, (len(all)+block-1)/block, workers, func() func(int) {
			return func(b int) {
				for _, p := range all[b*block : min(len(all), (b+1)*block)] {
					p.fillCaches()
				}
			}
		})
		if err != nil {
			return err
		}
	}
	// The regions' line extents are shared by the workers, each made
	// once by the first that asks (regionLines).
	ck.rows = make([]regionExtents, len(ck.regions)*len(ck.surf.Terraces))
	// Every worker's copy of the check is made here, before any chunk is
	// merged: a copy made on a worker's goroutine would read ck while the
	// merger, on another, adds a finished chunk to it.
	copies := make([]*coverageCheck, max(workers, 1))
	for k := range copies {
		copies[k] = ck.worker()
	}
	var started atomic.Int32
	err := onWorkers(ctx, len(chunks), workers, func() func(int) {
		w := copies[started.Add(1)-1]
		return func(i int) {
			w.touched.id = int32(i + 1)
			c := &chunks[i]
			w.decide(c.r, c.pieces, nil, nil, nil, nil)
			merge.put(i, w.flush())
		}
	})
	if err != nil {
		return err
	}
	ck.heldStraysPeak = merge.peak
	ck.finish()
	return nil
}

// chunkMerger adds the chunks' sums to the check in chunk order as soon
// as every earlier chunk is done, so a chunk's sums wait only while an
// earlier chunk is still being summed; and of the waiting chunks' stray
// sites it keeps only as many as can still be among the check's first
// MaxStraySites. So an overdosed plan or a tiny stray limit (every chunk
// full of stray sites) holds at most MaxStraySites waiting, plus one
// chunk's per worker, whatever the field's size; the result is the same
// as adding every chunk at the end.
type chunkMerger struct {
	mu   sync.Mutex
	ck   *coverageCheck
	sums []chunkSums
	done []bool
	next int // chunks before next are added
	held int // stray sites of done chunks not yet added
	peak int // the most held at once (for the tests)
}

// put records chunk i's sums and adds every chunk it completes the
// ordered run of.
func (m *chunkMerger) put(i int, s chunkSums) {
	m.mu.Lock()
	defer m.mu.Unlock()
	m.sums[i], m.done[i] = s, true
	m.held += len(s.straySite)
	for m.next < len(m.sums) && m.done[m.next] {
		m.held -= len(m.sums[m.next].straySite)
		m.ck.add(&m.sums[m.next])
		m.sums[m.next] = chunkSums{}
		m.next++
	}
	room := max(0, MaxStraySites-len(m.ck.straySite))
	if m.held > room {
		// Chunks added later come after these, so their first sites are
		// the only ones that can still be listed.
		m.held = 0
		for j := m.next; j < len(m.sums); j++ {
			if !m.done[j] {
				continue
			}
			if ss := m.sums[j].straySite; len(ss) > room {
				m.sums[j].straySite = slices.Clone(ss[:room])
			}
			room -= len(m.sums[j].straySite)
			m.held += len(m.sums[j].straySite)
		}
	}
	m.peak = max(m.peak, m.held)
}

// chunks returns the check's chunks: for each terrace, in the order of
// its site lines and then dimers, the grid cells that meet the range
// anything reaches (its painted sites and its pieces' boxes).
func (ck *coverageCheck) chunks() []coverageChunk {
	var out []coverageChunk
	for t := range ck.surf.Terraces {
		rows, dimers := ck.surf.RowCount(t), ck.surf.DimerCount(t)
		l0, l1, d0, d1 := 2*rows, 0, dimers, 0
		for r := 0; r < ck.painted.RowCount(t) && r < rows; r++ {
			for side := 0; side < 2; side++ {
				if first, last := ck.painted.Row(t, r).DimerExtent(lattice.SideOf(side)); first >= 0 {
					l0, l1 = min(l0, 2*r+side), max(l1, 2*r+side+1)
					d0, d1 = min(d0, first), max(d1, last+1)
				}
			}
		}
		ps := ck.pieces[t]
		for i := range ps {
			pl0, pl1, pd0, pd1 := pieceCells(&ps[i], rows, dimers)
			l0, l1 = min(l0, pl0), max(l1, pl1)
			d0, d1 = min(d0, pd0), max(d1, pd1)
		}
		if l1 <= l0 || d1 <= d0 {
			continue
		}
		// The grid's cells that meet [l0, l1) x [d0, d1).
		cl0, cl1 := l0/coverageChunkLines, (l1-1)/coverageChunkLines+1
		cd0, cd1 := d0/coverageChunkDimers, (d1-1)/coverageChunkDimers+1
		nd := cd1 - cd0
		cells := (cl1 - cl0) * nd
		// Each piece goes to every cell its box may reach (one or two
		// lines and dimers wider than decide's test: decide keeps those
		// that reach), counted first so the lists share one slice.
		count := make([]int, cells+1)
		each := func(p *piece, f func(cell int)) {
			pl0, pl1, pd0, pd1 := pieceCells(p, rows, dimers)
			pl0, pd0 = max(pl0-1, l0), max(pd0-1, d0)
			pl1, pd1 = min(pl1+1, l1), min(pd1+1, d1)
			if pl1 <= pl0 || pd1 <= pd0 {
				return
			}
			for a := pl0 / coverageChunkLines; a <= (pl1-1)/coverageChunkLines; a++ {
				for b := pd0 / coverageChunkDimers; b <= (pd1-1)/coverageChunkDimers; b++ {
					f((a-cl0)*nd + (b - cd0))
				}
			}
		}
		for i := range ps {
			each(&ps[i], func(c int) { count[c+1]++ })
		}
		for c := range cells {
			count[c+1] += count[c]
		}
		flat := make([]*piece, count[cells])
		fill := make([]int, cells)
		copy(fill, count[:cells])
		for i := range ps {
			p := &ps[i]
			each(p, func(c int) { flat[fill[c]] = p; fill[c]++ })
		}
		for a := cl0; a < cl1; a++ {
			for b := cd0; b < cd1; b++ {
				c := (a-cl0)*nd + (b - cd0)
				cl, cd := max(l0, a*coverageChunkLines), max(d0, b*coverageChunkDimers)
				ce, cf := min(l1, (a+1)*coverageChunkLines), min(d1, (b+1)*coverageChunkDimers)
				r := siteRect{t: t, l0: cl, l1: ce, d0: cd, d1: cf,
					u0: lattice.DimerAlong(cd), u1: lattice.DimerAlong(cf - 1), y0: lineY(cl), y1: lineY(ce - 1)}
				out = append(out, coverageChunk{r: r, pieces: flat[count[c]:count[c+1]:count[c+1]]})
			}
		}
	}
	return out
}

// pieceCells returns the site lines [l0, l1) and dimers [d0, d1) of a
// terrace with rows rows and dimers dimers that p's box may reach.
func pieceCells(p *piece, rows, dimers int) (l0, l1, d0, d1 int) {
	l0 = max(0, int(math.Floor((p.yLo+lattice.HOffset)/lattice.RowSpacing))*2)
	l1 = min(2*rows, (int(math.Ceil((p.yHi-lattice.HOffset)/lattice.RowSpacing))+1)*2)
	d0 = max(0, int(math.Floor(p.uLo/lattice.DimerPitch)))
	d1 = min(dimers, int(math.Ceil(p.uHi/lattice.DimerPitch))+1)
	return l0, l1, d0, d1
}

// worker returns a copy of the check for one worker: the shared inputs
// and pieces, and its own scratch, caches and sums.
func (ck *coverageCheck) worker() *coverageCheck {
	w := *ck
	w.arena, w.who, w.looked, w.ptrs, w.spanBuf, w.spanBuf2, w.slab = nil, nil, nil, nil, nil, nil, nil
	nt := len(ck.surf.Terraces)
	w.exist = make([]rowDimers, nt)
	for t := range nt {
		n := ck.surf.RowCount(t)
		w.exist[t] = rowDimers{dimers: make([][]lattice.DimerRange, n), done: make([]bool, n)}
	}
	w.allowed = make([]rowSpans, len(ck.regions)*nt)
	w.rowRegs = make([]rowRegions, nt)
	w.acc = make([]regionAcc, len(ck.acc))
	w.missed, w.stray = make([]float64, len(ck.missed)), make([]float64, len(ck.stray))
	w.touched = chunkMarks{acc: make([]int32, len(ck.acc)), stroke: make([]int32, len(ck.missed))}
	w.nOver, w.straySite, w.issues = 0, nil, nil
	w.tail = newTailMemo()
	return &w
}

// flush returns the current chunk's sums and clears them.
func (ck *coverageCheck) flush() chunkSums {
	m := &ck.touched
	s := chunkSums{nOver: ck.nOver, straySite: ck.straySite, issues: ck.issues}
	if len(m.accList) > 0 {
		s.acc = make([]indexedAcc, len(m.accList))
		for k, ri := range m.accList {
			s.acc[k] = indexedAcc{i: ri, a: ck.acc[ri]}
			ck.acc[ri] = regionAcc{}
		}
	}
	if len(m.strokeList) > 0 {
		s.strokes = make([]strokeSums, len(m.strokeList))
		for k, si := range m.strokeList {
			s.strokes[k] = strokeSums{i: si, missed: ck.missed[si], stray: ck.stray[si]}
			ck.missed[si], ck.stray[si] = 0, 0
		}
	}
	m.accList, m.strokeList = m.accList[:0], m.strokeList[:0]
	ck.nOver, ck.straySite, ck.issues = 0, nil, nil
	return s
}

// add adds a chunk's sums to the check's (in chunk order: see run).
func (ck *coverageCheck) add(s *chunkSums) {
	for _, e := range s.acc {
		a := &ck.acc[e.i]
		a.missed += e.a.missed
		a.stray += e.a.stray
		a.spurious += e.a.spurious
		a.logP += e.a.logP
	}
	for _, e := range s.strokes {
		ck.missed[e.i] += e.missed
		ck.stray[e.i] += e.stray
	}
	// The first stray sites and issues, as one pass over the chunks in
	// order would have listed them.
	ck.nOver += s.nOver
	for _, ss := range s.straySite {
		if len(ck.straySite) < MaxStraySites {
			ck.straySite = append(ck.straySite, ss)
		}
	}
	for _, is := range s.issues {
		if len(ck.issues) < coverageExamples {
			ck.issues = append(ck.issues, is)
		}
	}
}

// onWorkers runs do(i) for every i in [0, n), each once, on up to
// workers goroutines (on the caller's alone for one), each with the do
// that start returns for it. It stops early when ctx is done (returning
// ctx.Err()) or a do panics (returning the panic as an *InternalError);
// it returns only once every goroutine it started has ended.
func onWorkers(ctx context.Context, n, workers int, start func() func(i int)) error {
	var next atomic.Int64
	var stop atomic.Bool
	var mu sync.Mutex
	var failed error
	work := func() {
		defer func() {
			if r := recover(); r != nil {
				stop.Store(true)
				mu.Lock()
				if failed == nil {
					failed = &InternalError{Message: fmt.Sprintf("panic: %v", r), Stack: debug.Stack()}
				}
				mu.Unlock()
			}
		}()
		do := start()
		for !stop.Load() && ctx.Err() == nil {
			i := int(next.Add(1) - 1)
			if i >= n {
				return
			}
			do(i)
		}
	}
	if workers <= 1 {
		work()
	} else {
		var wg sync.WaitGroup
		for range workers {
			wg.Add(1)
			go func() {
				defer wg.Done()
				work()
			}()
		}
		wg.Wait()
	}
	if failed != nil {
		return failed
	}
	return ctx.Err()
}
