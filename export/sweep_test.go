package export

import (
	"bytes"
	"context"
	"encoding/xml"
	"errors"
	"io"
	"os"
	"os/exec"
	"path/filepath"
	"strings"
	"testing"

	"dimerpath/export/internal/planfixture"
	"dimerpath/lattice/design"
	"dimerpath/planner"
)

// sweepFixture is a sweep of an array's size over three planned sizes
// and one refused, made of the fixture's synthetic plans (their times
// and yields differ; what the report must show is taken from them).
func sweepFixture() *planner.Sweep {
	ref := design.ArrayRef{Region: "donors", Nth: 1, Cols: 10, Rows: 10, Of: design.ShapeWindow}
	sw := &planner.Sweep{Design: "fixture", Variant: "A", Profile: "rt", Seed: 4,
		Param: planner.SweepParameter{Name: "array:donors", Current: "10x10", Array: &ref}}
	for i, n := range []int{100, 300, 900} {
		p := planfixture.Large(n, int64(i+1))
		sw.Points = append(sw.Points, planner.SweepPoint{Value: []string{"10x10", "30x10", "30x30"}[i], X: float64(n), Plan: p})
	}
	sw.Points = append(sw.Points, planner.SweepPoint{Value: "300x300", X: 90000, Err: errors.New("the plan needs 12 V, beyond limits.max_bias_v = 10 V")})
	sw.Warnings = []string{"an example note"}
	return sw
}

func TestSweepPDF(t *testing.T) {
	needTool(t, "pdftotext")
	sw := sweepFixture()
	path := filepath.Join(t.TempDir(), "sweep.pdf")
	if err := WriteSweepFile(context.Background(), path, sw, Options{Date: testDate}); err != nil {
		t.Fatal(err)
	}
	out, err := exec.Command("pdftotext", path, "-").Output()
	if err != nil {
		t.Fatal(err)
	}
	text := collapse(string(out))
	for _, want := range []string{planner.Caution, "Saturday 14 March 2026", "Sweep of array:donors", "beyond limits.max_bias_v",
		"an example note", "windows in array donors", "Write time", "Dopant yield"} {
		if !strings.Contains(text, want) {
			t.Errorf("sweep PDF lacks %q", want)
		}
	}
	for _, pt := range sw.Points {
		if !strings.Contains(text, pt.Value) {
			t.Errorf("value %s missing", pt.Value)
		}
		if pt.Plan != nil {
			for _, v := range []float64{pt.Plan.TotalS, pt.Plan.P10S, pt.Plan.P90S} {
				if !strings.Contains(text, clock(v)) {
					t.Errorf("value %s: time %s missing", pt.Value, clock(v))
				}
			}
		}
	}
	if pages := strings.Count(string(out), "\f"); strings.Count(text, planner.Caution) < pages {
		t.Errorf("caution on %d of %d pages", strings.Count(text, planner.Caution), pages)
	}
	needTool(t, "pdftoppm")
	dir := t.TempDir()
	if msg, err := exec.Command("pdftoppm", "-png", "-r", "30", path, filepath.Join(dir, "page")).CombinedOutput(); err != nil {
		t.Fatalf("pdftoppm: %v\n%s", err, msg)
	}
	pngs, _ := filepath.Glob(filepath.Join(dir, "page-*.png"))
	for _, f := range pngs {
		if mean, sd, chroma := greyStatsChroma(t, f); sd < 8 || mean > 254 || chroma > 2 {
			t.Errorf("%s: mean %.1f, sd %.1f, colour %d: want a page in grey levels, not blank", filepath.Base(f), mean, sd, chroma)
		}
	}
}

func TestSweepSVG(t *testing.T) {
	sw := sweepFixture()
	var buf bytes.Buffer
	if err := WriteSweepSVG(&buf, sw, Options{Date: testDate}); err != nil {
		t.Fatal(err)
	}
	ids := map[string]bool{}
	classes := map[string]int{}
	dec := xml.NewDecoder(bytes.NewReader(buf.Bytes()))
	for {
		tok, err := dec.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("SVG is not well-formed XML: %v", err)
		}
		if se, ok := tok.(xml.StartElement); ok {
			for _, a := range se.Attr {
				switch a.Name.Local {
				case "id":
					ids[a.Value] = true
				case "class":
					classes[a.Value]++
				}
			}
		}
	}
	for _, id := range []string{"summary", "sweep-time", "sweep-yield", "caution"} {
		if !ids[id] {
			t.Errorf("SVG lacks group %q", id)
		}
	}
	// One marker per planned value on each chart.
	if classes["expected-point"] != 3 || classes["yield-point"] != 3 {
		t.Errorf("%d time and %d yield markers, want 3 each (the planned values)", classes["expected-point"], classes["yield-point"])
	}
	renderSVGNotBlank(t, buf.Bytes())
}

func TestSweepFileRefusesOtherFormats(t *testing.T) {
	dir := t.TempDir()
	path := filepath.Join(dir, "sweep.csv")
	err := WriteSweepFile(context.Background(), path, sweepFixture(), Options{})
	if !errors.Is(err, ErrFormat) {
		t.Errorf("err = %v, want ErrFormat", err)
	}
	if _, err := os.Stat(path); !os.IsNotExist(err) {
		t.Errorf("a refused report left %s", path)
	}
	if err := WriteSweepSVG(io.Discard, &planner.Sweep{}, Options{}); !errors.Is(err, ErrInvalid) {
		t.Errorf("an empty sweep: %v, want ErrInvalid", err)
	}
}

func TestSweepRows(t *testing.T) {
	sw := sweepFixture()
	rows := SweepRows(sw)
	if len(rows) != 1+len(sw.Points) {
		t.Fatalf("%d rows", len(rows))
	}
	if rows[0][0] != "array:donors" || rows[4][0] != "300x300" || len(rows[4]) != 2 || !strings.HasPrefix(rows[4][1], "not planned: ") {
		t.Errorf("rows %q", rows)
	}
	if got := rows[2][1]; got != thousands(len(sw.Points[1].Plan.Windows)) {
		t.Errorf("windows cell %q", got)
	}
}
