package export

import (
	"bytes"
	"context"
	"errors"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"dimerpath/export/internal/planfixture"
	"dimerpath/planner"
)

// compareFixture returns three planned variants and one refused.
func compareFixture() []VariantResult {
	a := planfixture.SET().Plan
	b := planfixture.Large(300, 2)
	b.Variant, b.Design = "dense-300", a.Design
	c := planfixture.Large(900, 3)
	c.Variant, c.Design = "dense-900", a.Design
	return append(ResultsOf([]*planner.Plan{a, b, c}),
		VariantResult{Variant: "too-fast", Err: errors.New("FE speed 5000 nm/s exceeds the profile's limit of 2000 nm/s")})
}

func TestComparisonPDF(t *testing.T) {
	needTool(t, "pdftotext")
	rs := compareFixture()
	path := filepath.Join(t.TempDir(), "cmp.pdf")
	var buf bytes.Buffer
	if err := WriteComparisonPDF(context.Background(), &buf, rs, Options{Date: testDate, Paper: Letter}); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(path, buf.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	out, err := exec.Command("pdftotext", path, "-").Output()
	if err != nil {
		t.Fatal(err)
	}
	text := collapse(string(out))
	for _, want := range []string{planner.Caution, "Saturday 14 March 2026", "5000 nm/s exceeds"} {
		if !strings.Contains(text, want) {
			t.Errorf("comparison PDF lacks %q", want)
		}
	}
	for _, r := range rs {
		if strings.Count(text, r.Variant) < 3 { // table and charts
			t.Errorf("variant %q appears %d times, want table and charts", r.Variant, strings.Count(text, r.Variant))
		}
		if r.Plan != nil && !strings.Contains(text, clock(r.Plan.TotalS)) {
			t.Errorf("variant %q's total %s missing", r.Variant, clock(r.Plan.TotalS))
		}
	}
	if pages := strings.Count(string(out), "\f"); strings.Count(text, planner.Caution) < pages {
		t.Errorf("caution on %d of %d pages", strings.Count(text, planner.Caution), pages)
	}
}

func TestComparisonSVG(t *testing.T) {
	rs := compareFixture()
	var buf bytes.Buffer
	if err := WriteComparisonSVG(&buf, rs, Options{Date: testDate}); err != nil {
		t.Fatal(err)
	}
	ids := svgIDs(t, buf.Bytes())
	for _, g := range []string{"summary", "breakdown-compare", "spread-compare", "yield-compare", "caution"} {
		if !ids[g] {
			t.Errorf("comparison SVG lacks group %q", g)
		}
	}
	if !strings.Contains(buf.String(), "dense-900") || !strings.Contains(buf.String(), "not planned") {
		t.Error("comparison SVG lacks a variant or the refused one")
	}
	renderSVGNotBlank(t, buf.Bytes())
}

func TestComparisonRejects(t *testing.T) {
	bad := planfixture.SET().Plan
	bad.TotalS = -1
	for name, rs := range map[string][]VariantResult{
		"none":         nil,
		"neither":      {{Variant: "x"}},
		"invalid plan": {{Variant: "x", Plan: bad}},
	} {
		if err := WriteComparisonSVG(&bytes.Buffer{}, rs, Options{}); !errors.Is(err, ErrInvalid) {
			t.Errorf("%s: WriteComparisonSVG = %v, want ErrInvalid", name, err)
		}
		if err := WriteComparisonPDF(context.Background(), &bytes.Buffer{}, rs, Options{}); !errors.Is(err, ErrInvalid) {
			t.Errorf("%s: WriteComparisonPDF = %v, want ErrInvalid", name, err)
		}
	}
}

func TestWriteComparisonFile(t *testing.T) {
	dir := t.TempDir()
	for _, name := range []string{"cmp.pdf", "cmp.svg"} {
		if err := WriteComparisonFile(context.Background(), filepath.Join(dir, name), compareFixture(), Options{}); err != nil {
			t.Errorf("%s: %v", name, err)
		}
	}
	for _, name := range []string{"cmp.json", "cmp.csv", "cmp.txt"} {
		err := WriteComparisonFile(context.Background(), filepath.Join(dir, name), compareFixture(), Options{})
		if !errors.Is(err, ErrFormat) {
			t.Errorf("%s: %v, want ErrFormat", name, err)
		}
	}
	// A failing writer leaves the old report.
	path := filepath.Join(dir, "cmp.pdf")
	old, _ := os.ReadFile(path)
	wrapWriter = func(w io.Writer) io.Writer { return &failingWriter{w: w, n: 2000} }
	defer func() { wrapWriter = func(w io.Writer) io.Writer { return w } }()
	if err := WriteComparisonFile(context.Background(), path, compareFixture(), Options{}); !errors.Is(err, errDiskFull) {
		t.Fatalf("WriteComparisonFile with a failing disk = %v", err)
	}
	if now, _ := os.ReadFile(path); !bytes.Equal(now, old) {
		t.Error("a failed report changed the earlier file")
	}
	if entries, _ := os.ReadDir(dir); len(entries) != 2 {
		t.Errorf("%d files left, want the two reports", len(entries))
	}
}
