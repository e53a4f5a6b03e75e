package export

import (
	"bytes"
	"context"
	"encoding/json"
	"io"
	"sync"
	"testing"

	"dimerpath/export/internal/planfixture"
	"dimerpath/internal/peakmem"
	"dimerpath/lattice/design/designtest"
	"dimerpath/planner"
)

var (
	benchOnce sync.Once
	benchPlan *planner.Plan
)

// largePlan is the 10⁵-stroke benchmark plan, built once.
func largePlan() *planner.Plan {
	benchOnce.Do(func() { benchPlan = planfixture.Large(100_000, 1) })
	return benchPlan
}

// countingWriter counts bytes, so the benchmarks report file sizes.
type countingWriter struct{ n int64 }

func (c *countingWriter) Write(b []byte) (int, error) { c.n += int64(len(b)); return len(b), nil }

// BenchmarkExport10e5 exports a plan of 10⁵ strokes (about 2·10⁵
// actions) in each format. The baseline is encoding/json's Marshal of
// the same planner.Plan: the least a machine-readable export costs.
func BenchmarkExport10e5(b *testing.B) {
	p := largePlan()
	baseline := 0.0 // s/op of the baseline, measured first in this run
	run := func(name string, fn func(w io.Writer) error) {
		b.Run(name, func(b *testing.B) {
			b.ReportAllocs()
			var size int64
			for b.Loop() {
				cw := &countingWriter{}
				if err := fn(cw); err != nil {
					b.Fatal(err)
				}
				size = cw.n
			}
			b.ReportMetric(float64(size)/1e6, "MB/file")
			perOp := b.Elapsed().Seconds() / float64(b.N)
			switch {
			case name == "baseline-encoding-json":
				baseline = perOp
			case baseline > 0: // not when -bench filtered the baseline out
				b.ReportMetric(perOp/baseline, "x_baseline")
			}
		})
	}
	run("baseline-encoding-json", func(w io.Writer) error {
		data, err := json.Marshal(p)
		if err != nil {
			return err
		}
		_, err = w.Write(data)
		return err
	})
	run("plan-json", func(w io.Writer) error { return WritePlanJSON(w, p, "bench") })
	run("actions-csv", func(w io.Writer) error { return WriteActionsCSV(w, p) })
	run("svg", func(w io.Writer) error { return WriteSVG(w, p, Options{}) })
	run("pdf", func(w io.Writer) error { return WritePDF(context.Background(), w, p, Options{}) })
}

// BenchmarkReadPlanJSON10e5 reads back the 10⁵-stroke plan file.
func BenchmarkReadPlanJSON10e5(b *testing.B) {
	var buf bytes.Buffer
	if err := WritePlanJSON(&buf, largePlan(), "bench"); err != nil {
		b.Fatal(err)
	}
	data := buf.Bytes()
	b.ReportAllocs()
	b.SetBytes(int64(len(data)))
	for b.Loop() {
		if _, err := ReadPlanJSON(bytes.NewReader(data)); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkPDFSET is the operator's PDF of the small fixture device with
// its lattice drawn.
func BenchmarkPDFSET(b *testing.B) {
	d := planfixture.SET()
	opt := fixtureOptions(d)
	b.ReportAllocs()
	for b.Loop() {
		if err := WritePDF(context.Background(), io.Discard, d.Plan, opt); err != nil {
			b.Fatal(err)
		}
	}
}

// BenchmarkExportArray1e6 exports the plan of the million-window donor
// array (issue 14 §2: designtest.WindowArray(1000, 1000), planned once
// with the rt preset) as the operator's PDF, with the lattice pattern,
// and as the action CSV, which holds every action. The baseline is
// encoding/json's Marshal of the same plan, measured first in this run.
// Goal: the PDF in at most 30 s, readable (segments summarised in
// ranges, every one still in the CSV and JSON).
func BenchmarkExportArray1e6(b *testing.B) {
	p, pat := arrayPlan(b)
	baseline := 0.0
	for _, c := range []struct {
		name string
		fn   func(w io.Writer) error
	}{
		{"baseline-encoding-json", func(w io.Writer) error {
			data, err := json.Marshal(p)
			if err == nil {
				_, err = w.Write(data)
			}
			return err
		}},
		{"pdf", func(w io.Writer) error { return WritePDF(context.Background(), w, p, Options{Pattern: pat}) }},
		{"actions-csv", func(w io.Writer) error { return WriteActionsCSV(w, p) }},
	} {
		b.Run(c.name, func(b *testing.B) {
			var size int64
			var peak peakmem.Peak
			for b.Loop() {
				cw := &countingWriter{}
				pk := peakmem.Measure(func() {
					if err := c.fn(cw); err != nil {
						b.Fatal(err)
					}
				})
				peak.RSS, peak.Go = max(peak.RSS, pk.RSS), max(peak.Go, pk.Go)
				size = cw.n
			}
			b.ReportMetric(float64(size)/1e6, "MB/file")
			b.ReportMetric(peakmem.MB(peak.Go), "peak-Go-MB")
			perOp := b.Elapsed().Seconds() / float64(b.N)
			if c.name == "baseline-encoding-json" {
				baseline = perOp
			} else if baseline > 0 {
				b.ReportMetric(perOp/baseline, "x_baseline")
			}
		})
	}
}

var (
	arrayOnce    sync.Once
	arrayPlanned *planner.Plan
	arrayPattern *Pattern
	arrayErr     error
)

// arrayPlan plans the million-window array once per process.
func arrayPlan(b *testing.B) (*planner.Plan, *Pattern) {
	arrayOnce.Do(func() {
		d := designtest.WindowArray(1000, 1000)
		lay, err := d.Lay("")
		if err != nil {
			arrayErr = err
			return
		}
		prof := planner.DefaultProfile()
		prof.Limits.ScanFieldNM = designtest.FieldNM(d)
		arrayPlanned, arrayErr = planner.Build(context.Background(), lay, prof, planner.Options{Seed: 1})
		arrayPattern = PatternOf(lay)
	})
	if arrayErr != nil {
		b.Fatal(arrayErr)
	}
	return arrayPlanned, arrayPattern
}
