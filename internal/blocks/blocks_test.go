package blocks

import (
	"fmt"
	"runtime"
	"sync/atomic"
	"testing"
)

// TestRunDoesEveryItemOnce checks that the parallel path and the serial
// one each do every item exactly once, for sizes around the block.
func TestRunDoesEveryItemOnce(t *testing.T) {
	defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(4))
	const block = 16
	for _, minItems := range []int{1, 1 << 30} {
		for _, n := range []int{0, 1, block - 1, block, 5*block + 7} {
			done := make([]int32, n)
			var calls atomic.Int32
			Run(n, minItems, block, func() func(lo, hi int) {
				return func(lo, hi int) {
					calls.Add(1)
					for i := lo; i < hi; i++ {
						done[i]++
					}
				}
			})
			for i, d := range done {
				if d != 1 {
					t.Fatalf("min %d n %d: item %d done %d times", minItems, n, i, d)
				}
			}
			if minItems > n && n > 0 && calls.Load() != 1 {
				t.Errorf("min %d n %d: the serial path made %d calls, want 1", minItems, n, calls.Load())
			}
		}
	}
}

// TestPanicsReachTheCaller checks that a worker's panic is raised again
// in the caller by Run, Both and Parts, whichever goroutine it came from.
func TestPanicsReachTheCaller(t *testing.T) {
	defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(4))
	cases := map[string]func(){
		"Run": func() {
			Run(100, 1, 7, func() func(lo, hi int) {
				return func(lo, hi int) {
					if lo <= 50 && 50 < hi {
						panic("boom")
					}
				}
			})
		},
		"Both first":  func() { Both(func() { panic("boom") }, func() {}) },
		"Both second": func() { Both(func() {}, func() { panic("boom") }) },
		"Parts": func() {
			Parts(3, func(p int) {
				if p == 1 {
					panic("boom")
				}
			})
		},
	}
	for name, run := range cases {
		t.Run(name, func(t *testing.T) {
			defer func() {
				if r := recover(); fmt.Sprint(r) != "boom" {
					t.Errorf("recovered %v, want boom", r)
				}
			}()
			run()
			t.Error("no panic reached the caller")
		})
	}
}

func ExampleRun() {
	squares := make([]int, 10)
	Run(len(squares), 4, 3, func() func(lo, hi int) {
		return func(lo, hi int) {
			for i := lo; i < hi; i++ {
				squares[i] = i * i
			}
		}
	})
	fmt.Println(squares)
	// Output: [0 1 4 9 16 25 36 49 64 81]
}
