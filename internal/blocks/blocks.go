// Package blocks spreads independent work over the machine's cores in a
// way that cannot change what is computed: each block of items is
// written by exactly one goroutine, so the planner's results are the
// same on any number of cores. A panic in a worker is raised again in
// the caller once every worker has stopped, so the caller's own recovery
// (Build's *InternalError) sees it as it would a serial panic.
package blocks

import (
	"runtime"
	"sync"
	"sync/atomic"
)

// Run calls work(lo, hi) once for each block [lo, hi) of [0, n), blocks
// of size block taken in turn by up to GOMAXPROCS goroutines, when n is
// at least minItems; below it (or on one core) the caller's goroutine
// does all of [0, n) in one call, because starting goroutines would
// cost more than it saves. start is called once per goroutine and
// returns that goroutine's work function (which may hold its scratch).
// The blocks must be independent: each writes only its own items.
func Run(n, minItems, block int, start func() func(lo, hi int)) {
	if block < 1 {
		block = 1
	}
	workers := min(runtime.GOMAXPROCS(0), (n+block-1)/block)
	if n < minItems || workers <= 1 {
		if n > 0 {
			start()(0, n)
		}
		return
	}
	var next atomic.Int64
	var stop atomic.Bool
	var failed firstPanic
	var wg sync.WaitGroup
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			defer failed.catch(&stop)
			work := start()
			for !stop.Load() {
				lo := int(next.Add(int64(block))) - block
				if lo >= n {
					return
				}
				work(lo, min(lo+block, n))
			}
		}()
	}
	wg.Wait()
	failed.raise()
}

// Both runs a on a goroutine of its own and b on the caller's, and
// returns when both have ended.
func Both(a, b func()) {
	Parts(2, func(p int) {
		if p == 0 {
			a()
		} else {
			b()
		}
	})
}

// Parts calls do(p) for each part p of [0, parts), each on a goroutine
// of its own when there is more than one (the last on the caller's).
func Parts(parts int, do func(p int)) {
	if parts <= 1 {
		if parts == 1 {
			do(0)
		}
		return
	}
	var failed firstPanic
	var wg sync.WaitGroup
	for p := range parts - 1 {
		wg.Add(1)
		go func() {
			defer wg.Done()
			defer failed.catch(nil)
			do(p)
		}()
	}
	func() {
		defer failed.catch(nil)
		do(parts - 1)
	}()
	wg.Wait()
	failed.raise()
}

// firstPanic keeps the first panic of a group of goroutines.
type firstPanic struct {
	once  sync.Once
	value any
	set   atomic.Bool
}

// catch, deferred in a goroutine, keeps its panic (the first of the
// group) and tells the others to stop taking work.
func (f *firstPanic) catch(stop *atomic.Bool) {
	if r := recover(); r != nil {
		if stop != nil {
			stop.Store(true)
		}
		f.once.Do(func() { f.value = r; f.set.Store(true) })
	}
}

// raise panics again with the kept value, if any, in the caller.
func (f *firstPanic) raise() {
	if f.set.Load() {
		panic(f.value)
	}
}
