// Package peakmem measures the peak memory of a piece of work, for the
// benchmarks that report it beside their times: the peak resident set
// of the process (Linux: VmHWM after resetting it through
// /proc/self/clear_refs) and the peak of the memory the Go runtime holds
// from the system, sampled through runtime/metrics.
package peakmem

import (
	"bufio"
	"bytes"
	"os"
	"runtime"
	"runtime/metrics"
	"strconv"
	"sync"
	"time"
)

// Peak is the peak memory of one piece of work, in bytes.
type Peak struct {
	// RSS is the process's peak resident set while the work ran (0 where
	// the system does not report it); it includes what was resident
	// before the work began.
	RSS uint64
	// Go is the peak of the memory the Go runtime had mapped and not
	// returned to the system (runtime/metrics /memory/classes/total:bytes
	// less heap/released), sampled every millisecond and after the work.
	Go uint64
}

// MB returns b in mebibytes.
func MB(b uint64) float64 { return float64(b) / (1 << 20) }

// Measure runs f and returns its peak memory. It collects garbage first,
// so the work starts from the live heap alone.
func Measure(f func()) Peak {
	runtime.GC()
	resetHWM()
	var (
		mu   sync.Mutex
		peak uint64
		done = make(chan struct{})
		wg   sync.WaitGroup
	)
	sample := func() {
		if v := goBytes(); v > 0 {
			mu.Lock()
			peak = max(peak, v)
			mu.Unlock()
		}
	}
	wg.Add(1)
	go func() {
		defer wg.Done()
		t := time.NewTicker(time.Millisecond)
		defer t.Stop()
		for {
			select {
			case <-done:
				return
			case <-t.C:
				sample()
			}
		}
	}()
	f()
	close(done)
	wg.Wait()
	sample()
	return Peak{RSS: hwm(), Go: peak}
}

var samples = []metrics.Sample{{Name: "/memory/classes/total:bytes"}, {Name: "/memory/classes/heap/released:bytes"}}

func goBytes() uint64 {
	s := make([]metrics.Sample, len(samples))
	copy(s, samples)
	metrics.Read(s)
	if s[0].Value.Kind() != metrics.KindUint64 || s[1].Value.Kind() != metrics.KindUint64 {
		return 0
	}
	return s[0].Value.Uint64() - s[1].Value.Uint64()
}

// resetHWM resets the process's peak resident set (Linux 4.0 and later).
func resetHWM() {
	_ = os.WriteFile("/proc/self/clear_refs", []byte("5"), 0)
}

// hwm returns the process's peak resident set in bytes, or 0.
func hwm() uint64 {
	data, err := os.ReadFile("/proc/self/status")
	if err != nil {
		return 0
	}
	sc := bufio.NewScanner(bytes.NewReader(data))
	for sc.Scan() {
		line := sc.Bytes()
		if !bytes.HasPrefix(line, []byte("VmHWM:")) {
			continue
		}
		f := bytes.Fields(line[len("VmHWM:"):])
		if len(f) == 0 {
			return 0
		}
		kb, err := strconv.ParseUint(string(f[0]), 10, 64)
		if err != nil {
			return 0
		}
		return kb << 10
	}
	return 0
}
