package cputime

import (
	"runtime"
	"testing"
	"time"
)

// TestMeasureCountsWorkNotSleep: a busy loop of about 50 ms of CPU counts,
// a sleep does not (Linux only).
func TestMeasureCountsWorkNotSleep(t *testing.T) {
	if runtime.GOOS != "linux" {
		t.Skip("thread CPU time is read on Linux only")
	}
	slept := Measure(func() { time.Sleep(100 * time.Millisecond) })
	if slept > 20*time.Millisecond {
		t.Errorf("a 100 ms sleep cost %v of CPU", slept)
	}
	x := 0.0
	busy := Measure(func() {
		for start := time.Now(); time.Since(start) < 50*time.Millisecond; {
			x += 1
		}
	})
	if busy <= 0 || busy > 2*time.Second {
		t.Errorf("a 50 ms busy loop cost %v of CPU (x %v)", busy, x)
	}
}
