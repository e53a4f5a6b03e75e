package synth

import "math"

// The demo survey: an invented survey topograph of the demo design's
// device area (assets/demo.json, the Kestrel-7 donor-pair sensor), made
// by DemoParams with DemoSeed and written to assets/demo-survey.png by
// internal/demosurvey. It is invented data for the demo, never a check
// value.
const (
	// DemoSeed seeds the demo survey's noise.
	DemoSeed = 20261202
	// DemoOffsetNM is the field position (x and y) of the demo survey's
	// lower-left corner, and DemoRotationDeg the field angle of its x
	// axis: the scan frame is turned 3° from the lattice.
	DemoOffsetNM    = 932.5
	DemoRotationDeg = -3.0
	// DemoPixels is its side in pixels, DemoNominalNMPerPx the pixel size
	// the (invented) instrument claims.
	DemoPixels         = 900
	DemoNominalNMPerPx = 0.15
)

// DemoDefectsField lists the demo survey's defects in field nm: dangling
// bonds, vacancies and an adsorbate over the device area, four of them a
// few nm from the dopant windows and the island, none within the
// surface-clearance rule's reach of them.
var DemoDefectsField = []Defect{
	{Kind: Bright, AtNM: [2]float64{941.3, 1046.2}, HeightNM: 0.14, SizeNM: 1.0},
	{Kind: Bright, AtNM: [2]float64{1032.7, 1061.9}, HeightNM: 0.16, SizeNM: 0.9},
	{Kind: Bright, AtNM: [2]float64{1051.4, 951.0}, HeightNM: 0.13, SizeNM: 1.1},
	{Kind: Bright, AtNM: [2]float64{973.5, 938.8}, HeightNM: 0.15, SizeNM: 0.9},
	{Kind: Bright, AtNM: [2]float64{1058.9, 1023.6}, HeightNM: 0.22, SizeNM: 1.9},
	{Kind: Bright, AtNM: [2]float64{936.2, 968.4}, HeightNM: 0.12, SizeNM: 1.0},
	{Kind: Bright, AtNM: [2]float64{1019.0, 1037.5}, HeightNM: 0.14, SizeNM: 0.8},
	{Kind: Bright, AtNM: [2]float64{962.8, 1062.0}, HeightNM: 0.15, SizeNM: 1.0},
	{Kind: Dark, AtNM: [2]float64{1009.6, 958.1}, HeightNM: 0.07, SizeNM: 0.7},
	{Kind: Dark, AtNM: [2]float64{948.7, 1021.3}, HeightNM: 0.06, SizeNM: 0.6},
	{Kind: Dark, AtNM: [2]float64{1064.1, 991.9}, HeightNM: 0.08, SizeNM: 1.4},
	{Kind: Dark, AtNM: [2]float64{985.1, 1053.0}, HeightNM: 0.06, SizeNM: 0.6},
	{Kind: Dark, AtNM: [2]float64{1040.2, 934.6}, HeightNM: 0.07, SizeNM: 0.7},
	{Kind: Dark, AtNM: [2]float64{933.0, 1003.5}, HeightNM: 0.06, SizeNM: 0.6},
	// Near the core, but clear of the surface-clearance rule's defaults.
	{Kind: Bright, AtNM: [2]float64{958.0, 1006.5}, HeightNM: 0.15, SizeNM: 1.0},
	{Kind: Dark, AtNM: [2]float64{1013.6, 1001.2}, HeightNM: 0.07, SizeNM: 0.7},
	{Kind: Bright, AtNM: [2]float64{975.0, 993.0}, HeightNM: 0.14, SizeNM: 0.9},
	{Kind: Bright, AtNM: [2]float64{996.0, 990.5}, HeightNM: 0.13, SizeNM: 0.8},
}

// DemoParams returns the parameters of the demo survey. The lattice is
// the demo design's lower terrace (rows along the field's x axis, dimer 0
// of row 0 at the field's origin), seen through a scan frame turned by
// DemoRotationDeg and a slightly mis-calibrated scanner (1.2 % long in x,
// 0.5 % short in y, 0.4° of skew).
func DemoParams() Params {
	toImage := func(f [2]float64) [2]float64 {
		s, c := math.Sincos(-DemoRotationDeg * math.Pi / 180)
		dx, dy := f[0]-DemoOffsetNM, f[1]-DemoOffsetNM
		return [2]float64{c*dx - s*dy, s*dx + c*dy}
	}
	p := Params{
		Width: DemoPixels, Height: DemoPixels,
		ScaleNM:        [2]float64{DemoNominalNMPerPx * 1.012, DemoNominalNMPerPx * 0.995},
		SkewDeg:        0.4,
		RotationDeg:    -DemoRotationDeg,
		PhaseNM:        toImage([2]float64{0, 0}),
		NominalNMPerPx: [2]float64{DemoNominalNMPerPx, DemoNominalNMPerPx},
		NoiseNM:        0.004,
		LineNoiseNM:    0.003,
		TiltNMPerNM:    [2]float64{0.002, -0.001},
		Seed:           DemoSeed,
		Contrast:       DefaultContrast,
	}
	p.Contrast.TipSD = 0.08
	for _, d := range DemoDefectsField {
		d.AtNM = toImage(d.AtNM)
		p.Defects = append(p.Defects, d)
	}
	return p
}
