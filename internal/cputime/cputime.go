// Package cputime reads the CPU time of the calling thread, for the
// benchmarks that report the CPU a piece of single-threaded work costs:
// on the shared, loaded machine the wall-clock time of a frame or a plan
// also counts the time it waited for a core, the CPU time does not.
package cputime

import (
	"runtime"
	"time"
)

// Measure runs f locked to one OS thread and returns the CPU time that
// thread spent (user and system), or 0 where the system cannot tell a
// thread's time (only Linux can). Work f starts on other goroutines is
// not counted.
func Measure(f func()) time.Duration {
	runtime.LockOSThread()
	defer runtime.UnlockOSThread()
	t0 := threadTime()
	f()
	return threadTime() - t0
}
