package survey

import (
	"context"
	"fmt"
	"math"
	"math/rand/v2"
	"runtime"
	"sync"
	"testing"
	"time"

	"dimerpath/lattice/survey/synth"
)

// benchScene is a survey of n x n pixels at 0.1 nm per pixel with a step
// and a defect every 100 nm².
func benchScene(tb testing.TB, n int) *Topograph {
	rng := rand.New(rand.NewPCG(uint64(n), 1))
	p := synth.Params{
		Width: n, Height: n, ScaleNM: [2]float64{0.0985, 0.1012}, SkewDeg: 0.7, RotationDeg: 14,
		NoiseNM: 0.01, LineNoiseNM: 0.01, TiltNMPerNM: [2]float64{0.005, -0.002}, Seed: 3,
	}
	w, h := p.Affine(float64(n), float64(n))
	p.Step = &synth.Step{Through: [2]float64{0.6 * w, 0.5 * h}, AngleDeg: 75, Up: true}
	p.Defects = randomDefects(rng, int(w*h/100), w, h, 1.5, 2.5)
	top, _ := render(tb, p)
	return top
}

// fftTime returns the time of one 2-D transform of an n x n image (the
// best of three): the baseline the analysis is measured against.
func fftTime(n int) float64 {
	f := make([]float64, n*n)
	for i := range f {
		f[i] = math.Sin(float64(i))
	}
	best := math.Inf(1)
	for rep := 0; rep < 3; rep++ {
		t0 := time.Now()
		forward2D(f, n, n)
		best = math.Min(best, float64(time.Since(t0).Nanoseconds()))
	}
	return best
}

// peakHeap samples the heap in use every 5 ms while fn runs and returns
// the largest value in MB.
func peakHeap(fn func()) float64 {
	runtime.GC()
	var base runtime.MemStats
	runtime.ReadMemStats(&base)
	done := make(chan struct{})
	var wg sync.WaitGroup
	var peak uint64
	wg.Add(1)
	go func() {
		defer wg.Done()
		var m runtime.MemStats
		for {
			runtime.ReadMemStats(&m)
			peak = max(peak, m.HeapInuse)
			select {
			case <-done:
				return
			case <-time.After(5 * time.Millisecond):
			}
		}
	}()
	fn()
	close(done)
	wg.Wait()
	return float64(peak) / (1 << 20)
}

// BenchmarkAnalyse times the whole analysis of a 1024 x 1024 and a 4096 x
// 4096 survey on one core and reports x-fft, its time over one 2-D
// transform of the same image timed in the same run (the goals: 2 s and
// 20 s), and peak-MB, the largest heap in use during the analysis (the
// image itself included; the goal: under 1 GB).
func BenchmarkAnalyse(b *testing.B) {
	defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(1))
	for _, n := range []int{1024, 4096} {
		b.Run(fmt.Sprintf("%dx%d", n, n), func(b *testing.B) {
			if n > 1024 && testing.Short() {
				b.Skip("short")
			}
			top := benchScene(b, n)
			fft := fftTime(n)
			var an *Analysis
			var peak float64
			b.ResetTimer()
			for i := 0; i < b.N; i++ {
				var err error
				peak = math.Max(peak, peakHeap(func() { an, err = Analyse(context.Background(), top, Options{}) }))
				if err != nil {
					b.Fatal(err)
				}
			}
			b.StopTimer()
			perOp := float64(b.Elapsed().Nanoseconds()) / float64(b.N)
			b.ReportMetric(perOp/fft, "x-fft")
			b.ReportMetric(fft/1e6, "fft-ms")
			b.ReportMetric(peak, "peak-MB")
			b.ReportMetric(float64(len(an.Defects)), "defects")
		})
	}
}
