package export

import (
	"bytes"
	"context"
	"dimerpath/planner"
	"errors"
	"os"
	"testing"
	"time"

	"dimerpath/export/internal/planfixture"
)

func TestScratch(t *testing.T) {
	d := planfixture.SET()
	pat := &Pattern{Surface: d.Surface}
	for _, r := range d.Regions {
		pat.Regions = append(pat.Regions, PatternRegion{Name: r.Name, Sites: r.Sites})
	}
	opt := Options{Date: time.Date(2026, 3, 14, 0, 0, 0, 0, time.UTC), Generator: "dimerpath test", Pattern: pat}
	for _, f := range []string{"a.pdf", "a.svg", "a.json", "a.csv"} {
		if err := WriteFile(context.Background(), "/tmp/exp/"+f, d.Plan, opt); err != nil {
			t.Fatal(err)
		}
	}
	_ = os.Stdout
}

func TestScratchCompare(t *testing.T) {
	a := planfixture.SET().Plan
	b := planfixture.Large(300, 2)
	b.Variant = "dense-300"
	b.Design = a.Design
	c := planfixture.Large(900, 3)
	c.Variant = "dense-900"
	c.Design = a.Design
	rs := append(ResultsOf([]*planner.Plan{a, b, c}), VariantResult{Variant: "too-fast", Err: errors.New("planner: FE speed 5000 nm/s exceeds the instrument limit max_speed_nm_per_s = 2000 nm/s")})
	opt := Options{Date: time.Date(2026, 3, 14, 0, 0, 0, 0, time.UTC), Generator: "dimerpath test"}
	var buf bytes.Buffer
	if err := WriteComparisonPDF(context.Background(), &buf, rs, opt); err != nil {
		t.Fatal(err)
	}
	os.WriteFile("/tmp/exp/cmp.pdf", buf.Bytes(), 0o644)
	buf.Reset()
	if err := WriteComparisonSVG(&buf, rs, opt); err != nil {
		t.Fatal(err)
	}
	os.WriteFile("/tmp/exp/cmp.svg", buf.Bytes(), 0o644)
}
