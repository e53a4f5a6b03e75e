package route

import (
	"runtime"
	"sync"
	"sync/atomic"
)

// parallelMin is the fewest items a stage of the set-up spreads over the
// cores: below it (every problem but the largest; the planner's
// re-route problems have ~70 nodes) starting goroutines costs more than
// it saves. A variable so that a test can make a small problem take the
// parallel path.
var parallelMin = 1 << 15

// parallelBlock is the number of items a worker takes at a time: large
// enough that taking one costs nothing beside its work, small enough
// that the workers end together.
const parallelBlock = 2048

// inBlocks calls work(lo, hi) once for each block [lo, hi) of
// [0, n), on up to GOMAXPROCS goroutines when n is at least parallelMin
// and on the caller's alone otherwise. start is called once per
// goroutine and returns that goroutine's work function (which holds its
// scratch). The blocks must be independent: each writes only its own
// items' results, so what is computed is the same on any number of
// cores. A panic in a worker is raised again in the caller once every
// worker has stopped, as it would have been without them.
func inBlocks(n int, start func() func(lo, hi int)) {
	workers := min(runtime.GOMAXPROCS(0), (n+parallelBlock-1)/parallelBlock)
	if n < parallelMin || workers <= 1 {
		if n > 0 {
			start()(0, n)
		}
		return
	}
	var next atomic.Int64
	var stop atomic.Bool
	var wg sync.WaitGroup
	var once sync.Once
	var failure any
	for range workers {
		wg.Add(1)
		go func() {
			defer wg.Done()
			defer func() {
				if r := recover(); r != nil {
					stop.Store(true)
					once.Do(func() { failure = r })
				}
			}()
			work := start()
			for !stop.Load() {
				lo := int(next.Add(parallelBlock)) - parallelBlock
				if lo >= n {
					return
				}
				work(lo, min(lo+parallelBlock, n))
			}
		}()
	}
	wg.Wait()
	if failure != nil {
		panic(failure)
	}
}

// both runs a on a goroutine of its own and b on the caller's, and
// returns when both have; a panic in a is raised again in the caller.
func both(a, b func()) {
	var failure any
	done := make(chan struct{})
	go func() {
		defer close(done)
		defer func() { failure = recover() }()
		a()
	}()
	b()
	<-done
	if failure != nil {
		panic(failure)
	}
}

// inParts calls do(p) for each part p of [0, parts), each on a goroutine
// of its own when there are more than one; a panic is raised again in
// the caller once every part has ended.
func inParts(parts int, do func(p int)) {
	if parts <= 1 {
		do(0)
		return
	}
	var wg sync.WaitGroup
	var once sync.Once
	var failure any
	for p := range parts {
		wg.Add(1)
		go func() {
			defer wg.Done()
			defer func() {
				if r := recover(); r != nil {
					once.Do(func() { failure = r })
				}
			}()
			do(p)
		}()
	}
	wg.Wait()
	if failure != nil {
		panic(failure)
	}
}
