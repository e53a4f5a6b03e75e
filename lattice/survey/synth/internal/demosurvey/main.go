// Command demosurvey writes the demo survey topograph (see
// synth.DemoParams) as an 8-bit grey PNG:
//
//	go run ./lattice/survey/synth/internal/demosurvey -o assets/demo-survey.png
package main

import (
	"bytes"
	"flag"
	"fmt"
	"os"

	"dimerpath/internal/atomicfile"
	"dimerpath/lattice/survey"
	"dimerpath/lattice/survey/synth"
)

func main() {
	out := flag.String("o", "assets/demo-survey.png", "write the PNG to `FILE`")
	flag.Parse()
	p := synth.DemoParams()
	im, err := synth.Render(p)
	if err != nil {
		fmt.Fprintln(os.Stderr, "demosurvey:", err)
		os.Exit(1)
	}
	t := &survey.Topograph{
		Width: p.Width, Height: p.Height, Z: make([]float32, len(im.Z)), ZUnitNM: 1,
		SizeNM: [2]float64{p.NominalNMPerPx[0] * float64(p.Width), p.NominalNMPerPx[1] * float64(p.Height)},
	}
	for i, v := range im.Z {
		t.Z[i] = float32(v)
	}
	var buf bytes.Buffer
	if err := survey.WritePNG(&buf, t, 8); err != nil {
		fmt.Fprintln(os.Stderr, "demosurvey:", err)
		os.Exit(1)
	}
	if err := atomicfile.WriteBytes(*out, buf.Bytes(), 0o644); err != nil {
		fmt.Fprintln(os.Stderr, "demosurvey:", err)
		os.Exit(1)
	}
	fmt.Printf("demosurvey: wrote %s (%d bytes, seed %d)\n", *out, buf.Len(), synth.DemoSeed)
}
