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
	expAlpha = os.Getenv("RX_ALPHA") != "0"
	expDeep  = os.Getenv("RX_DEEP") != "0"
	expPoolK = envInt("RX_POOLK", 10)
	expPoolQ = envInt("RX_POOLQ", 2)
	expCandK = envInt("RX_CANDK", 5)
	expIterN = envInt("RX_ITERS", 50)
	alphaMax = envInt("RX_AMAX", 100_000)
)

func expIters(n int) int { return expIterN }

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

var expStrokeAlpha = os.Getenv("RX_SA") == "1"
var expLK = os.Getenv("RX_LK") == "1"
var expLKOnly = os.Getenv("RX_LKONLY") == "1"

func init() {
	lkStepRev = int32(envInt("RX_STEPREV", int(lkStepRev)))
	kickSegMax = int32(envInt("RX_SEG", int(kickSegMax)))
	lkSteps = envInt("RX_STEPS", lkSteps)
	lkBestMin = envInt("RX_BESTMIN", lkBestMin)
	if v := os.Getenv("RX_BREADTH"); v != "" {
		for i := 1; i < koptDepthMax && i <= len(v); i++ {
			koptBreadth[i] = int(v[i-1] - '0')
		}
	}
}
