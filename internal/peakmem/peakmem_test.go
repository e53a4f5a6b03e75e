package peakmem

import (
	"runtime"
	"testing"
)

// TestMeasureSeesAnAllocation holds 64 MiB for a moment: the peak must
// count it, on both measures where the system reports the resident set.
func TestMeasureSeesAnAllocation(t *testing.T) {
	const n = 64 << 20
	var keep []byte
	p := Measure(func() {
		keep = make([]byte, n)
		for i := range keep {
			keep[i] = byte(i) // touch every page, so it is resident
		}
	})
	runtime.KeepAlive(keep)
	if p.Go < n {
		t.Errorf("Go peak %.0f MiB, want at least 64", MB(p.Go))
	}
	if p.RSS != 0 && p.RSS < n {
		t.Errorf("resident peak %.0f MiB, want at least 64", MB(p.RSS))
	}
}
