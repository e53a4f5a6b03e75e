//go:build routecpu && unix

package route

import (
	"syscall"
	"time"
)

// Built with -tags routecpu, budgets and progress count the process's CPU
// time (user and system) instead of the wall clock, so that on a shared
// machine a measurement gives every solve the same work whatever the
// load: go run -tags routecpu ./planner/route/internal/yardstick. Never in
// a product build: a budget is the user's time.
func init() { now = processCPUTime }

func processCPUTime() time.Time {
	var ru syscall.Rusage
	if syscall.Getrusage(syscall.RUSAGE_SELF, &ru) != nil {
		return time.Now()
	}
	return time.Unix(0, ru.Utime.Nano()+ru.Stime.Nano())
}
