// Package route orders what an STM tip writes so that its idle travel
// between writes costs as little time as possible: points (dwell sites)
// and strokes that may be written in either direction, with an optional
// start, open or closed paths, contiguous groups and precedence between
// groups. It knows nothing of silicon: positions are plain numbers in the
// caller's unit.
package route
