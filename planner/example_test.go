package planner_test

import (
	"context"
	"fmt"

	"dimerpath/assets"
	"dimerpath/lattice/design"
	"dimerpath/planner"
)

func ExampleBuild() {
	d, err := design.Parse(assets.DemoName, assets.DemoDesign)
	if err != nil {
		fmt.Println(err)
		return
	}
	// Lay the variant out once: the checks, the plan and the export all
	// start from the layout.
	lay, err := d.Lay("gap-9")
	if err != nil {
		fmt.Println(err)
		return
	}
	p, err := planner.Build(context.Background(), lay, planner.DefaultProfile(), planner.Options{Seed: 1})
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, m := range p.Modes[:4] {
		fmt.Printf("%s: %s\n", m.Region, m.Mode)
	}
	fmt.Printf("breakdown sums to the total: %v\n", p.Breakdown.Total() == p.TotalS)
	fmt.Printf("coverage OK: %v, P(all windows good) = %.4f\n", p.Coverage.OK, p.Yield.All)
	// Output:
	// donor-P: ap
	// donor-As: ap
	// sensor-island: ap
	// source-lead: ap
	// breakdown sums to the total: true
	// coverage OK: true, P(all windows good) = 0.5364
}

func ExampleCompare() {
	d, _ := design.Parse(assets.DemoName, assets.DemoDesign)
	results, err := planner.Compare(context.Background(), d, planner.LowTemperatureProfile(), planner.Options{Seed: 1, MonteCarloRuns: 100})
	if err != nil {
		fmt.Println(err)
		return
	}
	for _, r := range results {
		fmt.Printf("%s: %d segment(s), %d windows\n", r.Variant, len(r.Plan.Segments), r.Plan.Yield.Windows)
		for _, diff := range r.Differences {
			fmt.Println("  ", diff.What)
		}
	}
	// Output:
	// gap-9: 5 segment(s), 2 windows
	// gap-12-source: 5 segment(s), 2 windows
	//    tunnel gap sensor-island – source-lead
	//    region source-lead
}

func ExampleWritingSpeed() {
	// Schmucker et al. (2012): 2 nA at a 2 mC/cm line dose.
	fmt.Printf("%.1f nm/s\n", planner.WritingSpeed(2e-9, 2e-3))
	// Output: 10.0 nm/s
}

func ExampleDriftBudget() {
	// An AP stroke held to ±0.2 nm at 0.1 nm/min of drift, after a local
	// registration of ±0.05 nm with 0.01 nm of creep still to come.
	fmt.Printf("%.0f s\n", planner.DriftBudget(0.2, 0.05, 0.01, 0.1))
	// Output: 84 s
}

// The breakdown of a plan's time, kind by kind, as every view names it.
func ExampleTimeKind() {
	b := planner.Breakdown{APWriteS: 346, FEWriteS: 241, TravelS: 132, ModeSwitchS: 30, RegistrationS: 1024}
	for _, k := range planner.TimeKinds {
		if s := b.Seconds(k); s > 0 {
			fmt.Printf("%-8s %-20s %5.0f s\n", k.Short(), k, s)
		}
	}
	// Output:
	// AP       AP writing             346 s
	// FE       FE writing             241 s
	// travel   travel and settling    132 s
	// switch   mode switches           30 s
	// register registrations         1024 s
}
