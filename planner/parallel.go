package planner

import "dimerpath/internal/blocks"

// parallelMin is the fewest items inParallel spreads over the cores:
// below it (every ordinary design) starting goroutines costs more than
// it saves. A variable so that a test can make a small plan take the
// parallel path.
var parallelMin = 1 << 15

// parallelBlock is the number of items a worker of inParallel takes at
// a time (a variable so that a test can make small blocks).
var parallelBlock = 4096

// inParallel calls do(lo, hi) once for each block [lo, hi) of [0, n),
// on every core when n is at least parallelMin and on the caller's
// goroutine alone otherwise (blocks.Run). The blocks must be
// independent, each writing only its own items, so that the result is
// the same on any number of cores. A worker's panic is raised again in
// the caller (Build turns it into an *InternalError).
func inParallel(n int, do func(lo, hi int)) {
	blocks.Run(n, parallelMin, parallelBlock, func() func(lo, hi int) { return do })
}
