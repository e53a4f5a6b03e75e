package export

import (
	"bytes"
	"context"
	"encoding/json"
	"io"
	"sync"
	"testing"

	"dimerpath/export/internal/planfixture"
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
