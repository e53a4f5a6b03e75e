package planner

import (
	"context"
	"runtime"
	"testing"
	"time"

	"dimerpath/lattice/design"
)

// benchMicron is the 1 µm x 1 µm benchmark design: four AP gate blocks
// holding about 10^6 H sites and an array of 10^5 phosphine windows
// (400 x 250 at 5 dimers by 2 rows, within the window-spacing rules).
func benchMicron() *design.Design {
	var regions []design.Region
	for i := 0; i < 4; i++ {
		x := 40 + float64(i)*232
		regions = append(regions, design.Region{Name: "gate-" + string(rune('A'+i)), Role: design.RoleGate, Mode: design.ModeAP,
			Shapes: []design.Shape{rect(x, 480, x+230, 642)}})
	}
	regions = append(regions, design.Region{Name: "donor-array", Role: design.RoleDonor, Mode: design.ModeAP, Species: "P",
		Shapes: []design.Shape{{Kind: design.ShapeArray, Array: &design.Array{
			Of:   &design.Shape{Kind: design.ShapeWindow, Template: "P", Points: [][2]float64{{100, 50}}},
			Cols: 400, Rows: 250, PitchDimers: 5, PitchRows: 2,
		}}}})
	d := testDesign(1000, 1000, regions...)
	d.Fiducials = []design.Fiducial{{Name: "F1", AtNM: [2]float64{20, 20}}, {Name: "F2", AtNM: [2]float64{980, 20}},
		{Name: "F3", AtNM: [2]float64{20, 980}}, {Name: "F4", AtNM: [2]float64{980, 980}}}
	return d
}

// BenchmarkPlan plans each benchmark design and reports, measured in the
// same run, the planned total, the total of the by-hand plan (regions in
// file order, rows in raster order, one mode per region, registrations
// at the fixed interval of the tightest budget), their ratio, and the
// planned total over the physical floor (the writing time alone), and
// x-layout: the time of a plan over the time of laying the design's
// regions out alone (design.Lay), the baseline timed in the same run.
func BenchmarkPlan(b *testing.B) {
	// The goals are for one core.
	defer runtime.GOMAXPROCS(runtime.GOMAXPROCS(1))
	for _, c := range []struct {
		name string
		d    *design.Design
	}{{"demo", demo(b)}, {"micron-1e6-sites-1e5-windows", benchMicron()}} {
		b.Run(c.name, func(b *testing.B) {
			// The baseline, timed in the same run: laying the design's
			// regions out alone (design.Lay), the first thing a plan does.
			layNS := layTime(b, c.d)
			var p *Plan
			b.ReportAllocs()
			b.ResetTimer()
			for i := 0; i < b.N; i++ {
				var err error
				p, err = buildVariant(context.Background(), c.d, "", DefaultProfile(), Options{Seed: 1})
				if err != nil {
					b.Fatal(err)
				}
			}
			b.StopTimer()
			b.ReportMetric(float64(b.Elapsed().Nanoseconds())/float64(b.N)/layNS, "x-layout")
			sites := 0
			for _, m := range p.Modes {
				sites += m.Sites
			}
			if !p.Coverage.OK {
				b.Errorf("coverage: %+v", p.Coverage)
			}
			b.ReportMetric(float64(sites), "sites")
			b.ReportMetric(float64(p.Yield.Windows), "windows")
			b.ReportMetric(p.TotalS, "planned-s")
			b.ReportMetric(p.ByHandS, "by-hand-s")
			b.ReportMetric(p.ByHandS/p.TotalS, "by-hand/planned")
			b.ReportMetric(p.TotalS/p.FloorS, "planned/floor")
		})
	}
}

// layTime returns the mean time of design.Lay on d, in ns, over at least
// 200 ms or 5 runs.
func layTime(b *testing.B, d *design.Design) float64 {
	b.Helper()
	n, start := 0, time.Now()
	for n < 5 || time.Since(start) < 200*time.Millisecond {
		if _, err := d.Lay(""); err != nil {
			b.Fatal(err)
		}
		n++
	}
	return float64(time.Since(start).Nanoseconds()) / float64(n)
}
