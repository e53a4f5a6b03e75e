package planner

import (
	"runtime"
	"sync"
	"sync/atomic"
)

// parallelMin is the fewest items inParallel spreads over the cores:
// below it (every ordinary design) starting goroutines costs more than
// it saves. A variable so that a test can make a small plan take the
// parallel path.
var parallelMin = 1 << 15

// parallelBlock is the number of items a worker of inParallel takes at
// a time (a variable so that a test can make small blocks).
var parallelBlock = 4096

// inParallel calls do(lo, hi) once for each block [lo, hi) of [0, n),
// on up to GOMAXPROCS goroutines when n is at least parallelMin and on
// the caller's alone (one call over all of [0, n)) otherwise. The blocks
// must be independent, each writing only its own items, so that the
// result is the same on any number of cores. A panic in a worker is
// raised again in the caller once every worker has stopped (Build turns
// it into an *InternalError, as it would the caller's own).
func inParallel(n int, do func(lo, hi int)) {
	block := parallelBlock
	workers := min(runtime.GOMAXPROCS(0), (n+block-1)/block)
	if n < parallelMin || workers <= 1 {
		if n > 0 {
			do(0, n)
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
			for !stop.Load() {
				lo := int(next.Add(int64(block))) - block
				if lo >= n {
					return
				}
				do(lo, min(lo+block, n))
			}
		}()
	}
	wg.Wait()
	if failure != nil {
		panic(failure)
	}
}
