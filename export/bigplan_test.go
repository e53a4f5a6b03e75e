package export

import (
	"bytes"
	"context"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"sort"
	"strconv"
	"strings"
	"testing"

	"dimerpath/export/internal/planfixture"
)

// TestLargePlanIsSummarisedOnPaper prints a plan of 70 000 strokes in 350
// segments, beyond every limit of bigplan.go: the segment table covers
// every segment in ranges (each stroke's number once), the stroke list
// says where the strokes are, the overview draws segment areas, and the
// whole fits in a few dozen pages. The SVG still has every stroke.
func TestLargePlanIsSummarisedOnPaper(t *testing.T) {
	needTool(t, "pdftotext")
	p := planfixture.Large(70_000, 5)
	if len(p.Segments) <= maxSegmentRows || len(p.Strokes) <= maxDrawnStrokes {
		t.Fatalf("fixture of %d segments and %d strokes is not beyond the limits", len(p.Segments), len(p.Strokes))
	}
	path := filepath.Join(t.TempDir(), "large.pdf")
	var buf bytes.Buffer
	if err := WritePDF(context.Background(), &buf, p, Options{Date: testDate}); err != nil {
		t.Fatal(err)
	}
	if err := os.WriteFile(path, buf.Bytes(), 0o644); err != nil {
		t.Fatal(err)
	}
	out, err := exec.Command("pdftotext", path, "-").Output()
	if err != nil {
		t.Fatal(err)
	}
	text := string(out)
	flat := collapse(text)
	k := segmentBlock(len(p.Segments))
	for _, want := range []string{
		"This plan has 350 segments", "each row below covers up to " + strconv.Itoa(k) + " consecutive segments",
		"This plan has 70 000 strokes", "each row of the segments' actions covers up to " + strconv.Itoa(k) + " consecutive", "action CSV", "each segment is drawn as the area its strokes cover",
	} {
		if !strings.Contains(flat, want) {
			t.Errorf("the printed plan lacks %q", want)
		}
	}
	if pages := strings.Count(text, "\f"); pages > 60 { // listed in full: some 1 200 pages
		t.Errorf("%d pages for a summarised plan", pages)
	}
	// The rows' stroke ranges cover every paper number exactly once, in
	// the segment table and in the summarised action list.
	listAt := strings.Index(text, "Every action, in order")
	for name, part := range map[string]string{
		"segment table": text[strings.Index(text, "This plan has 350 segments"):listAt],
		"action list":   text[listAt:],
	} {
		covered := strokeNumbersIn(part)
		if len(covered) != len(p.Strokes) || covered[0] != 1 || covered[len(covered)-1] != len(p.Strokes) {
			t.Errorf("the %s's ranges list %d stroke numbers from %v, want 1 to %d once each", name, len(covered), covered[:min(3, len(covered))], len(p.Strokes))
		}
		for i := 1; i < len(covered); i++ {
			if covered[i] != covered[i-1]+1 {
				t.Errorf("%s: stroke number %d listed after %d", name, covered[i], covered[i-1])
				break
			}
		}
	}
	if !strings.Contains(flat, "Register on F") || !strings.Contains(flat, "verification images") {
		t.Errorf("the summarised action list does not say what the segments do")
	}
	// Each range row's last segment ends when the table says; the last
	// row ends at the plan's end.
	if !strings.Contains(flat, clock(p.Segments[len(p.Segments)-1].EndS)) {
		t.Errorf("the table lacks the last segment's end %s", clock(p.Segments[len(p.Segments)-1].EndS))
	}

	var svg bytes.Buffer
	if err := WriteSVG(&svg, p, Options{}); err != nil {
		t.Fatal(err)
	}
	if n := strings.Count(svg.String(), `id="stroke-`); n != len(p.Strokes) {
		t.Errorf("the SVG has %d strokes, want all %d", n, len(p.Strokes))
	}
}

// strokeNumbersIn returns the paper numbers that the "strokes 1–38, 40"
// ranges of a printed text name, sorted.
func strokeNumbersIn(text string) []int {
	var covered []int
	for _, m := range regexp.MustCompile(`strokes ([0-9][0-9–, ]*)`).FindAllStringSubmatch(text, -1) {
		for _, part := range strings.Split(m[1], ",") {
			part = strings.TrimSpace(part)
			a, b, isRange := strings.Cut(part, "–")
			lo, err1 := strconv.Atoi(strings.TrimSpace(a))
			hi := lo
			var err2 error
			if isRange {
				hi, err2 = strconv.Atoi(strings.Fields(b)[0])
			}
			if err1 != nil || err2 != nil {
				continue
			}
			for n := lo; n <= hi; n++ {
				covered = append(covered, n)
			}
		}
	}
	sort.Ints(covered)
	return covered
}

func TestOrdinal(t *testing.T) {
	for n, want := range map[int]string{1: "first", 2: "2nd", 3: "3rd", 4: "4th", 11: "11th", 12: "12th", 13: "13th", 21: "21st", 22: "22nd", 112: "112th", 16: "16th"} {
		if got := ordinal(n); got != want {
			t.Errorf("ordinal(%d) = %q, want %q", n, got, want)
		}
	}
}
