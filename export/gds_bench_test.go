package export

import (
	"bytes"
	"context"
	"testing"

	"dimerpath/assets"
	"dimerpath/lattice"
	"dimerpath/lattice/design"
	"dimerpath/lattice/design/gdsimport"
)

// BenchmarkGDS measures the GDSII export and import of the demo and of a
// 10^6-window array (issue 15: the demo's export and import each within
// 100 ms; the array exported within 1 s to at most 10 kB and imported,
// flattened to sites, within 5 s). The baseline is painting every site
// of the demo's 2 µm field (2.7·10^7 sites, lattice.Surface.Paint), a
// lattice operation of known cost measured in the same run: compare the
// x_baseline column across machines, not the milliseconds.
func BenchmarkGDS(b *testing.B) {
	demo, err := design.Parse(assets.DemoName, assets.DemoDesign)
	if err != nil {
		b.Fatal(err)
	}
	demoLayout := lay(b, demo, "")
	array := arrayDesign(b, 1000, 1000)
	arrayLayout := lay(b, array, "")
	var demoGDS, arrayGDS bytes.Buffer
	if _, err := WriteGDS(context.Background(), &demoGDS, demoLayout, GDSOptions{}); err != nil {
		b.Fatal(err)
	}
	if _, err := WriteGDS(context.Background(), &arrayGDS, arrayLayout, GDSOptions{}); err != nil {
		b.Fatal(err)
	}
	regionLayers := []gdsimport.Layer{}
	for l := int16(10); l <= 15; l++ {
		regionLayers = append(regionLayers, gdsimport.Layer{Layer: l, AnyDatatype: true})
	}

	baseline := 0.0
	run := func(name string, fn func() (bytes int, sites int)) {
		b.Run(name, func(b *testing.B) {
			b.ReportAllocs()
			n, s := 0, 0
			for b.Loop() {
				n, s = fn()
			}
			if n > 0 {
				b.ReportMetric(float64(n), "bytes/file")
			}
			if s > 0 {
				b.ReportMetric(float64(s), "sites")
			}
			perOp := b.Elapsed().Seconds() / float64(b.N)
			switch {
			case name == "baseline-paint-demo-field":
				baseline = perOp
			case baseline > 0:
				b.ReportMetric(perOp/baseline, "x_baseline")
			}
		})
	}
	run("baseline-paint-demo-field", func() (int, int) {
		set := lattice.NewSiteSet()
		demoLayout.Surface.Paint(set, lattice.Rect{Rect: demoLayout.Surface.Field})
		return 0, 0
	})
	export := func(l *design.Layout) (int, int) {
		var buf bytes.Buffer
		if _, err := WriteGDS(context.Background(), &buf, l, GDSOptions{}); err != nil {
			b.Fatal(err)
		}
		return buf.Len(), 0
	}
	imp := func(data []byte, layers []gdsimport.Layer, surf *lattice.Surface) (int, int) {
		g, err := gdsimport.Read(bytes.NewReader(data), "bench.gds", gdsimport.Options{Layers: layers})
		if err != nil {
			b.Fatal(err)
		}
		return 0, g.Sites(surf, lattice.ChipFrame{}).Count()
	}
	run("demo-export", func() (int, int) { return export(demoLayout) })
	run("demo-parse-lay-export", func() (int, int) {
		d, err := design.Parse(assets.DemoName, assets.DemoDesign)
		if err != nil {
			b.Fatal(err)
		}
		return export(lay(b, d, ""))
	})
	run("demo-import-region-layers", func() (int, int) { return imp(demoGDS.Bytes(), regionLayers, demoLayout.Surface) })
	run("array-1e6-export", func() (int, int) { return export(arrayLayout) })
	run("array-1e6-lay", func() (int, int) { lay(b, array, ""); return 0, 0 })
	run("array-1e6-import-windows", func() (int, int) {
		return imp(arrayGDS.Bytes(), []gdsimport.Layer{{Layer: 4}}, arrayLayout.Surface)
	})
}
