package design_test

import (
	"fmt"
	"log"

	"dimerpath/assets"
	"dimerpath/lattice/design"
)

// Parse a design, pick a variant and lay its regions onto the lattice.
func ExampleDesign_Lay() {
	d, err := design.Parse(assets.DemoName, assets.DemoDesign)
	if err != nil {
		log.Fatal(err)
	}
	l, err := d.Lay("gap-9")
	if err != nil {
		log.Fatal(err)
	}
	island := l.Region("sensor-island")
	fmt.Println(island.Region.Role, island.Region.EffectiveMode(), island.Sites.Count(), "sites")
	fmt.Printf("tolerance ±%.1f nm\n", island.ToleranceNM)
	// Output:
	// device ap 1560 sites
	// tolerance ±0.2 nm
}

func ExampleDesign_Variant() {
	d, _ := design.Parse(assets.DemoName, assets.DemoDesign)
	v, _ := d.Variant("") // the first variant
	fmt.Println(v.Name)
	_, err := d.Variant("gap-10")
	fmt.Println(err)
	// Output:
	// gap-9
	// design "Kestrel-7 donor-pair sensor" has no variant "gap-10" (it has "gap-9", "gap-12-source")
}

func ExampleDesign_Templates() {
	d, _ := design.Parse(assets.DemoName, assets.DemoDesign)
	for _, name := range d.Templates().Names() {
		t := d.Templates()[name]
		fmt.Printf("%s: %d dimers, %d H sites, p1 = %.2f ± %.2f\n", name, t.Dimers, t.Sites(), t.P1, t.P1SD)
	}
	// Output:
	// As: 2 dimers, 4 H sites, p1 = 0.97 ± 0.02
	// P: 3 dimers, 6 H sites, p1 = 0.63 ± 0.10
}

func ExampleDesign_EffectiveRules() {
	var d design.Design // no rules given: the defaults
	rs := d.EffectiveRules()
	fmt.Printf("scan field %g x %g nm, keep-out %g nm, tunnel gaps %.2f–%.2f nm\n",
		rs.ScanFieldNM[0], rs.ScanFieldNM[1], rs.FEKeepOutNM, rs.TunnelGapMinNM, rs.TunnelGapMaxNM)
	fmt.Printf("tolerance: ap ±%g nm, fe ±%g nm, auto ±%g nm\n",
		rs.DefaultTolerance(design.ModeAP), rs.DefaultTolerance(design.ModeFE), rs.DefaultTolerance(design.ModeAuto))
	// Output:
	// scan field 2000 x 2000 nm, keep-out 5 nm, tunnel gaps 5.38–12.29 nm
	// tolerance: ap ±0.2 nm, fe ±2 nm, auto ±0.2 nm
}

func ExampleRegion_Windows() {
	d, _ := design.Parse(assets.DemoName, assets.DemoDesign)
	surf, _ := d.Surface()
	v, _ := d.Variant("")
	for _, name := range []string{"donor-P", "donor-As"} {
		ws, _ := v.Region(name).Windows(surf, d.Templates())
		for _, w := range ws {
			c := surf.WindowCentre(w)
			fmt.Printf("%s: %v at (%.2f, %.2f) nm\n", name, w, c.X, c.Y)
		}
	}
	// Output:
	// donor-P: P@T0:R1302:D2486-2488 at (955.09, 1000.02) nm
	// donor-As: As@T0:R1302:D2518-2519 at (967.18, 1000.02) nm
}

func ExampleCheck() {
	d, _ := design.Parse(assets.DemoName, assets.DemoDesign)
	d.Variants[0].Regions[3].Shapes[0].Points[0][1] = 1008 // source lead 3 rows from the island
	findings, err := design.Check(d, "gap-9")
	if err != nil {
		log.Fatal(err)
	}
	for _, f := range findings {
		fmt.Println(f)
	}
	fmt.Println("errors:", design.HasErrors(findings))
	// Output:
	// error   tunnel-gap     [sensor-island, source-lead]  at (1000.0, 1006.9) nm: tunnel gap 2.30 nm (3.0 dimer rows across the rows) is narrower than 5.38 nm
	// errors: true
}

func ExampleParse() {
	_, err := design.Parse("broken.json", []byte(`{"format": "dimerpath-design", "version": 1, "name": "x",
		"field": {"width_nm": 100, "height_nm": -1},
		"variants": [{"name": "A", "regions": [{"name": "r", "role": "pad",
			"shapes": [{"kind": "rect", "points_nm": [[0, 0], [NaN, 5]]}]}]}]}`))
	fmt.Println(err)
	// Output:
	// broken.json:4:55: variants[0].regions[0].shapes[0].points_nm[1][0]: NaN is not a finite number
	// broken.json:2:43: field.height_nm: -1 must be more than 0 and at most 10000 nm
}

// A region's role and mode are spelled one way in the file and named
// another way for users.
func ExampleMode_Label() {
	r := design.Region{Name: "pad-1", Role: design.RolePad, Mode: design.ModeFE}
	fmt.Printf("file: role %q, mode %q\n", r.Role, r.Mode)
	fmt.Printf("shown: %s, %s; in tables %s\n", r.Role.Name(), r.Mode.Label(), r.Mode.Abbrev())
	// Output:
	// file: role "pad", mode "fe"
	// shown: contact pad, FE (field emission); in tables FE
}
