package design

import "testing"

// BenchmarkLayDemo lays out one variant of the demo (13.7·10^6 sites,
// mostly its four field-emission pads) and BenchmarkCheckDemo runs every
// design rule on it.
func BenchmarkLayDemo(b *testing.B) {
	d := loadDemo(b)
	n := 0
	b.ReportAllocs()
	for b.Loop() {
		l, err := d.Lay("gap-9")
		if err != nil {
			b.Fatal(err)
		}
		n = 0
		for _, r := range l.Regions {
			n += r.Sites.Count()
		}
	}
	b.ReportMetric(float64(n)*float64(b.N)/b.Elapsed().Seconds(), "sites/s")
}

func BenchmarkCheckDemo(b *testing.B) {
	d := loadDemo(b)
	l, err := d.Lay("gap-9")
	if err != nil {
		b.Fatal(err)
	}
	b.ReportAllocs()
	for b.Loop() {
		if fs := l.Check(); len(fs) != 0 {
			b.Fatal(fs)
		}
	}
}

func BenchmarkParseDemo(b *testing.B) {
	data := mustRead(b, "../../assets/demo.json")
	b.SetBytes(int64(len(data)))
	for b.Loop() {
		if _, err := Parse("demo.json", data); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkCheckWindowArray lays out and checks 10^5 P windows (a 316 x
// 316 array at 5 dimers and 2 rows pitch).
func BenchmarkCheckWindowArray(b *testing.B) {
	d := windowArrayDesign(316, 316, 5)
	b.ReportAllocs()
	for b.Loop() {
		fs, err := Check(d, "")
		if err != nil || len(fs) != 0 {
			b.Fatal(err, fs)
		}
	}
	b.ReportMetric(316*316*float64(b.N)/b.Elapsed().Seconds(), "windows/s")
}
