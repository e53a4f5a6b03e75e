package route

import (
	"os"
	"strconv"
	"syscall"
	"time"
)

// experiment switches (temporary)
var (
	expDebug = os.Getenv("RX_DEBUG") != ""
)

func envInt(k string, d int) int {
	if v, err := strconv.Atoi(os.Getenv(k)); err == nil {
		return v
	}
	return d
}

var expCPU = time.Duration(envInt("RX_CPU_MS", 0)) * time.Millisecond

func cpuNow() time.Duration {
	var ru syscall.Rusage
	syscall.Getrusage(syscall.RUSAGE_SELF, &ru)
	return time.Duration(ru.Utime.Nano() + ru.Stime.Nano())
}

func init() {
	poolNearest = envInt("RX_POOLK", poolNearest)
	poolQuadrant = envInt("RX_POOLQ", poolQuadrant)
	alphaCands = envInt("RX_CANDK", alphaCands)
	ascentIters = envInt("RX_ITERS", ascentIters)
	lkNodesPerSecond = envInt("RX_LKNPS", lkNodesPerSecond)
	kickSegMax = int32(envInt("RX_SEG", int(kickSegMax)))
	lkSteps = envInt("RX_STEPS", lkSteps)
	if v := os.Getenv("RX_BREADTH"); v != "" {
		for i := 1; i < koptDepthMax && i <= len(v); i++ {
			koptBreadth[i] = int(v[i-1] - '0')
		}
	}
}
var expKick3 = envInt("RX_KICK3", 0)
var expAsBudget = time.Duration(envInt("RX_ASBUDGET_MS", 0)) * time.Millisecond
