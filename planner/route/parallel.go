package route

import "dimerpath/internal/blocks"

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

// inBlocks calls work(lo, hi) once for each block [lo, hi) of [0, n),
// on every core when n is at least parallelMin and on the caller's
// goroutine alone otherwise (blocks.Run). start is called once per
// goroutine and returns that goroutine's work function (which holds its
// scratch). The blocks must be independent: each writes only its own
// items' results, so what is computed is the same on any number of
// cores. A worker's panic is raised again in the caller.
func inBlocks(n int, start func() func(lo, hi int)) {
	blocks.Run(n, parallelMin, parallelBlock, start)
}

// both runs a and b at once (blocks.Both); a panic in either is raised
// again in the caller.
func both(a, b func()) { blocks.Both(a, b) }

// inParts calls do(p) for each part p of [0, parts), each on a goroutine
// of its own when there are more than one (blocks.Parts).
func inParts(parts int, do func(p int)) { blocks.Parts(parts, do) }
