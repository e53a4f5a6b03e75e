package placement

import (
	"context"
	"fmt"
	"math/rand/v2"
	"runtime"
	"testing"
	"time"

	"github.com/golang/geo/r2"

	"dimerpath/assets"
	"dimerpath/lattice/design"
)

// demoWithSurvey returns the demo design with a 240 x 240 nm survey
// centred on its device, a defect every 100 nm² and a step edge.
func demoWithSurvey(tb testing.TB) *design.Design {
	d, err := design.Parse(assets.DemoName, assets.DemoDesign)
	if err != nil {
		tb.Fatal(err)
	}
	rng := rand.New(rand.NewPCG(1, 2))
	var defects []design.SurveyDefect
	for len(defects) < 576 {
		p := [2]float64{240 * rng.Float64(), 240 * rng.Float64()}
		defects = append(defects, design.SurveyDefect{AtNM: p, Kind: design.DefectBright, SizeNM: 0.6 + rng.Float64()})
	}
	d.Survey = &design.Survey{OffsetNM: [2]float64{880, 880}, SizePx: [2]int{1600, 1600}, ScaleNMPerPx: [2]float64{0.15, 0.15},
		Defects: defects, Steps: []design.SurveyStep{{PolylineNM: [][2]float64{{200, 0}, {215, 240}}}}}
	return d
}

// BenchmarkSearch times a placement search over a box of 100 and of 200
// nm a side for the demo's atomic-precision core (the donor windows and
// the island) and for its whole device (with the leads and gates), and
// reports x-lay, its time over laying the design out (design.Lay, timed
// in the same run). The goal: a 200 nm box at lattice resolution for the
// core within 1 s. The cost should grow with the box's area and the
// core's extent, not their product.
func BenchmarkSearch(b *testing.B) {
	defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(1))
	d := demoWithSurvey(b)
	t0 := time.Now()
	l, err := d.Lay("gap-9")
	if err != nil {
		b.Fatal(err)
	}
	lay := float64(time.Since(t0).Nanoseconds())
	device := []string{"donor-P", "donor-As", "sensor-island", "source-lead", "drain-lead"}
	for _, c := range []struct {
		name    string
		regions []string
		side    float64
	}{
		{"core-box-100nm", nil, 100},
		{"core-box-200nm", nil, 200},
		{"device-box-200nm", device, 200},
	} {
		b.Run(c.name, func(b *testing.B) {
			box := r2.RectFromCenterSize(r2.Point{X: 1000, Y: 1000}, r2.Point{X: c.side, Y: c.side})
			var best []Placement
			b.ResetTimer()
			for i := 0; i < b.N; i++ {
				var err error
				_, best, err = Search(context.Background(), l, Options{Regions: c.regions, Box: box})
				if err != nil {
					b.Fatal(err)
				}
			}
			b.StopTimer()
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/lay, "x-lay")
			if len(best) > 0 {
				b.ReportMetric(best[0].MarginNM, "best-margin-nm")
			}
		})
	}
	_ = fmt.Sprint
}
