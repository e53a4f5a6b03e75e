package export

import (
	"bytes"
	"context"
	"encoding/xml"
	"errors"
	"fmt"
	"image/png"
	"io"
	"math"
	"os"
	"os/exec"
	"path/filepath"
	"regexp"
	"slices"
	"strings"
	"testing"
	"time"

	"dimerpath/export/internal/planfixture"
	"dimerpath/planner"
)

var testDate = time.Date(2026, 3, 14, 0, 0, 0, 0, time.UTC)

// fixtureOptions returns options with the SET fixture's lattice and
// regions as the pattern.
func fixtureOptions(d *planfixture.Device) Options {
	pat := &Pattern{Surface: d.Surface}
	for _, r := range d.Regions {
		pat.Regions = append(pat.Regions, PatternRegion{Name: r.Name, Sites: r.Sites})
	}
	return Options{Date: testDate, Generator: "dimerpath test", Pattern: pat}
}

func needTool(t *testing.T, name string) {
	t.Helper()
	if _, err := exec.LookPath(name); err != nil {
		t.Skipf("%s not installed (poppler-utils / librsvg2-bin): %v", name, err)
	}
}

func writePDFFile(t *testing.T, p *planner.Plan, opt Options) string {
	t.Helper()
	path := filepath.Join(t.TempDir(), "plan.pdf")
	if err := WriteFile(context.Background(), path, p, opt); err != nil {
		t.Fatal(err)
	}
	return path
}

// collapse joins whitespace runs, so text wrapped across lines matches.
func collapse(s string) string { return strings.Join(strings.Fields(s), " ") }

func TestPDFTextHoldsSegmentsAndCaution(t *testing.T) {
	needTool(t, "pdftotext")
	cases := map[string]struct {
		p   *planner.Plan
		opt Options
	}{}
	d := planfixture.SET()
	cases["set a4"] = struct {
		p   *planner.Plan
		opt Options
	}{d.Plan, fixtureOptions(d)}
	letter := fixtureOptions(d)
	letter.Paper = Letter
	cases["set letter"] = struct {
		p   *planner.Plan
		opt Options
	}{d.Plan, letter}
	cases["large, no pattern"] = struct {
		p   *planner.Plan
		opt Options
	}{planfixture.Large(2000, 5), Options{Date: testDate}}
	for name, tc := range cases {
		t.Run(name, func(t *testing.T) {
			path := writePDFFile(t, tc.p, tc.opt)
			out, err := exec.Command("pdftotext", "-layout", path, "-").Output()
			if err != nil {
				t.Fatal(err)
			}
			pages := strings.Split(string(out), "\f")
			if pages[len(pages)-1] == "" {
				pages = pages[:len(pages)-1]
			}
			// The caution, and "Page N of M", in every page's footer.
			for i, pg := range pages {
				if want := fmt.Sprintf("Page %d of %d", i+1, len(pages)); !strings.Contains(pg, want) {
					t.Errorf("page %d lacks %q", i+1, want)
				}
			}
			raw, err := exec.Command("pdftotext", path, "-").Output()
			if err != nil {
				t.Fatal(err)
			}
			for i, pg := range strings.Split(string(raw), "\f") {
				if i < len(pages) && !strings.Contains(collapse(pg), planner.Caution) {
					t.Errorf("page %d does not carry the caution", i+1)
				}
			}
			text := string(out)
			for _, want := range []string{tc.p.Design, tc.p.Variant, tc.p.Profile, "Saturday 14 March 2026", clock(tc.p.TotalS)} {
				if !strings.Contains(text, want) {
					t.Errorf("PDF text lacks %q", want)
				}
			}
			// Every segment's row: its number and fiducial, and its end
			// time within the row's first lines, in order.
			lines := strings.Split(text, "\n")
			from := 0
			for i, s := range tc.p.Segments {
				re := regexp.MustCompile(fmt.Sprintf(`^\s*%d\s+%s\s`, i+1, regexp.QuoteMeta(s.Fiducial)))
				k := slices.IndexFunc(lines[from:], re.MatchString)
				if k < 0 {
					t.Errorf("no table row for segment %d (%s)", i+1, s.Fiducial)
					continue
				}
				from += k
				if row := strings.Join(lines[from:min(from+3, len(lines))], " "); !strings.Contains(row, clock(s.EndS)) {
					t.Errorf("segment %d's row lacks its end time %s:\n%s", i+1, clock(s.EndS), row)
				}
			}
			// The segment table repeats its header on each page it spans.
			if n, m := strings.Count(text, "Register on"), len(tc.p.Segments); m > 40 && n < 2 {
				t.Errorf("%d segments but the table header appears %d times", m, n)
			}
		})
	}
}

func TestPDFPaperSize(t *testing.T) {
	needTool(t, "pdfinfo")
	d := planfixture.SET()
	for _, tc := range []struct {
		paper Paper
		want  string // pdfinfo's page size in points
	}{{A4, "595.28 x 841.89"}, {Letter, "612 x 792"}} {
		opt := fixtureOptions(d)
		opt.Paper = tc.paper
		out, err := exec.Command("pdfinfo", writePDFFile(t, d.Plan, opt)).Output()
		if err != nil {
			t.Fatal(err)
		}
		if !strings.Contains(string(out), tc.want) {
			t.Errorf("%s: pdfinfo says\n%s\nwant page size %s pts", tc.paper, out, tc.want)
		}
	}
}

// greyStats returns the mean and standard deviation of the luminance of
// a PNG, on a 0..255 scale, counting transparent pixels as white, and
// the largest difference between the colour channels of any pixel (0
// for an image in shades of grey).
func greyStats(t *testing.T, path string) (mean, sd float64) {
	mean, sd, _ = greyStatsChroma(t, path)
	return mean, sd
}

func greyStatsChroma(t *testing.T, path string) (mean, sd float64, chroma uint32) {
	t.Helper()
	f, err := os.Open(path)
	if err != nil {
		t.Fatal(err)
	}
	defer f.Close()
	img, err := png.Decode(f)
	if err != nil {
		t.Fatal(err)
	}
	b := img.Bounds()
	var sum, sum2 float64
	n := 0
	for y := b.Min.Y; y < b.Max.Y; y++ {
		for x := b.Min.X; x < b.Max.X; x++ {
			r, g, bl, a := img.At(x, y).RGBA()
			chroma = max(chroma, absDiff(r, g)>>8, absDiff(g, bl)>>8, absDiff(r, bl)>>8)
			// composite over white
			l := (0.299*float64(r) + 0.587*float64(g) + 0.114*float64(bl) + (65535 - float64(a))) / 257
			sum += l
			sum2 += l * l
			n++
		}
	}
	mean = sum / float64(n)
	return mean, math.Sqrt(math.Max(0, sum2/float64(n)-mean*mean)), chroma
}

func absDiff(a, b uint32) uint32 {
	if a > b {
		return a - b
	}
	return b - a
}

func TestPDFPagesRenderNotBlank(t *testing.T) {
	needTool(t, "pdftoppm")
	d := planfixture.SET()
	path := writePDFFile(t, d.Plan, fixtureOptions(d))
	dir := t.TempDir()
	if out, err := exec.Command("pdftoppm", "-png", "-r", "30", path, filepath.Join(dir, "page")).CombinedOutput(); err != nil {
		t.Fatalf("pdftoppm: %v\n%s", err, out)
	}
	pngs, _ := filepath.Glob(filepath.Join(dir, "page-*.png"))
	if len(pngs) < 5 {
		t.Fatalf("%d pages rendered, want at least 5 (cover, pattern, segments, estimates, AP areas)", len(pngs))
	}
	for _, f := range pngs {
		mean, sd, chroma := greyStatsChroma(t, f)
		// A blank page has sd 0; even the sparsest page has a heading,
		// the footer rule and the caution.
		if sd < 8 || mean > 254 {
			t.Errorf("%s looks blank: mean %.1f, sd %.1f", filepath.Base(f), mean, sd)
		}
		// Black-and-white print: nothing may depend on colour.
		if chroma > 2 {
			t.Errorf("%s has colour (channels differ by %d): the plan must print in black and white", filepath.Base(f), chroma)
		}
	}
}

func TestSVGRendersAndHasGroups(t *testing.T) {
	for name, p := range testPlans(t) {
		t.Run(name, func(t *testing.T) {
			opt := Options{}
			if name == "set" {
				opt = fixtureOptions(planfixture.SET())
			}
			var buf bytes.Buffer
			if err := WriteSVG(&buf, p, opt); err != nil {
				t.Fatal(err)
			}
			// Well-formed XML, with the groups and one element per stroke.
			ids := map[string]bool{}
			strokes := 0
			var root xml.StartElement
			dec := xml.NewDecoder(bytes.NewReader(buf.Bytes()))
			for {
				tok, err := dec.Token()
				if err == io.EOF {
					break
				}
				if err != nil {
					t.Fatalf("SVG is not well-formed XML: %v", err)
				}
				se, ok := tok.(xml.StartElement)
				if !ok {
					continue
				}
				if root.Name.Local == "" {
					root = se
				}
				for _, a := range se.Attr {
					if a.Name.Local == "id" {
						if ids[a.Value] {
							t.Errorf("duplicate id %q", a.Value)
						}
						ids[a.Value] = true
						if strings.HasPrefix(a.Value, "stroke-") && a.Value != "stroke-" {
							strokes++
						}
					}
				}
			}
			if root.Name.Local != "svg" || root.Name.Space != "http://www.w3.org/2000/svg" {
				t.Errorf("root element %v", root.Name)
			}
			for _, g := range []string{"strokes", "strokes-ap", "strokes-fe", "moves", "fiducials", "caution", "legend", "scale-bar"} {
				if !ids[g] {
					t.Errorf("no element with id %q", g)
				}
			}
			if name == "set" && !ids["regions"] {
				t.Error("no regions group with a pattern given")
			}
			if strokes != len(p.Strokes) {
				t.Errorf("%d stroke elements, plan has %d strokes", strokes, len(p.Strokes))
			}
			var vb [4]float64
			for _, a := range root.Attr {
				if a.Name.Local == "viewBox" {
					fmt.Sscan(a.Value, &vb[0], &vb[1], &vb[2], &vb[3])
				}
			}
			// viewBox in nm: it holds the field plus the margins.
			if vb[2] < p.FieldWidthNM || vb[3] < p.FieldHeightNM || vb[2] > 2*p.FieldWidthNM {
				t.Errorf("viewBox %v for a %g x %g nm field", vb, p.FieldWidthNM, p.FieldHeightNM)
			}
			renderSVGNotBlank(t, buf.Bytes())
		})
	}
}

// svgIDs parses an SVG and returns its element ids.
func svgIDs(t *testing.T, data []byte) map[string]bool {
	t.Helper()
	ids := map[string]bool{}
	dec := xml.NewDecoder(bytes.NewReader(data))
	for {
		tok, err := dec.Token()
		if err == io.EOF {
			return ids
		}
		if err != nil {
			t.Fatalf("SVG is not well-formed XML: %v", err)
		}
		if se, ok := tok.(xml.StartElement); ok {
			for _, a := range se.Attr {
				if a.Name.Local == "id" {
					ids[a.Value] = true
				}
			}
		}
	}
}

// renderSVGNotBlank renders data with rsvg-convert, where installed, and
// checks the image is not blank.
func renderSVGNotBlank(t *testing.T, data []byte) {
	t.Helper()
	if _, err := exec.LookPath("rsvg-convert"); err != nil {
		t.Log("rsvg-convert not installed: SVG not rendered")
		return
	}
	dir := t.TempDir()
	in, out := filepath.Join(dir, "p.svg"), filepath.Join(dir, "p.png")
	if err := os.WriteFile(in, data, 0o644); err != nil {
		t.Fatal(err)
	}
	if msg, err := exec.Command("rsvg-convert", "-w", "600", in, "-o", out).CombinedOutput(); err != nil {
		t.Fatalf("rsvg-convert: %v\n%s", err, msg)
	}
	if mean, sd := greyStats(t, out); sd < 8 || mean > 254 {
		t.Errorf("SVG renders blank: mean %.1f, sd %.1f", mean, sd)
	}
}

func TestSVGEscapesNames(t *testing.T) {
	p := planfixture.SET().Plan
	p.Design = `<Lab & "Co"> µ±²Å`
	p.Fiducials[0].Name = "F<1>&"
	p.Segments[0].Fiducial = "F<1>&"
	var buf bytes.Buffer
	if err := WriteSVG(&buf, p, Options{}); err != nil {
		t.Fatal(err)
	}
	dec := xml.NewDecoder(&buf)
	var text strings.Builder
	for {
		tok, err := dec.Token()
		if err == io.EOF {
			break
		}
		if err != nil {
			t.Fatalf("not well-formed: %v", err)
		}
		if cd, ok := tok.(xml.CharData); ok {
			text.Write(cd)
		}
	}
	for _, want := range []string{p.Design, "F<1>&"} {
		if !strings.Contains(text.String(), want) {
			t.Errorf("SVG text lacks %q", want)
		}
	}
}

func TestExportsAreDeterministic(t *testing.T) {
	d := planfixture.SET()
	opt := fixtureOptions(d)
	for _, f := range []Format{FormatPDF, FormatSVG, FormatJSON, FormatCSV} {
		var a, b bytes.Buffer
		if err := Write(context.Background(), &a, f, d.Plan, opt); err != nil {
			t.Fatal(err)
		}
		if err := Write(context.Background(), &b, f, planfixture.SET().Plan, fixtureOptions(planfixture.SET())); err != nil {
			t.Fatal(err)
		}
		if !bytes.Equal(a.Bytes(), b.Bytes()) {
			t.Errorf("%s: two exports of the same plan differ", f)
		}
	}
}

// failingWriter fails once more than n bytes have been written.
type failingWriter struct {
	w io.Writer
	n int
}

var errDiskFull = errors.New("injected: no space left on device")

func (f *failingWriter) Write(b []byte) (int, error) {
	if len(b) > f.n {
		k, _ := f.w.Write(b[:f.n])
		f.n = 0
		return k, errDiskFull
	}
	f.n -= len(b)
	return f.w.Write(b)
}

func TestWriteFileIsAtomic(t *testing.T) {
	d := planfixture.SET()
	opt := fixtureOptions(d)
	for _, ext := range []string{"pdf", "svg", "json", "csv"} {
		t.Run(ext, func(t *testing.T) {
			dir := t.TempDir()
			path := filepath.Join(dir, "plan."+ext)
			old := []byte("the previous export, which must survive\n")
			if err := os.WriteFile(path, old, 0o644); err != nil {
				t.Fatal(err)
			}
			// Fail after a few kB: the exporter has written part of the
			// file when the disk "fills".
			wrapWriter = func(w io.Writer) io.Writer { return &failingWriter{w: w, n: 3000} }
			defer func() { wrapWriter = func(w io.Writer) io.Writer { return w } }()
			err := WriteFile(context.Background(), path, d.Plan, opt)
			if !errors.Is(err, errDiskFull) || !strings.Contains(err.Error(), path) {
				t.Fatalf("WriteFile = %v, want the injected error naming %s", err, path)
			}
			got, _ := os.ReadFile(path)
			if !bytes.Equal(got, old) {
				t.Errorf("the earlier file was changed to %d bytes", len(got))
			}
			if entries, _ := os.ReadDir(dir); len(entries) != 1 {
				var names []string
				for _, e := range entries {
					names = append(names, e.Name())
				}
				t.Errorf("directory holds %v, want only the old file", names)
			}
			// And without the fault the same call replaces the file.
			wrapWriter = func(w io.Writer) io.Writer { return w }
			if err := WriteFile(context.Background(), path, d.Plan, opt); err != nil {
				t.Fatal(err)
			}
			if got, _ := os.ReadFile(path); bytes.Equal(got, old) || len(got) < 1000 {
				t.Errorf("successful export wrote %d bytes", len(got))
			}
		})
	}
}

func TestWriteFileCancelled(t *testing.T) {
	d := planfixture.SET()
	path := filepath.Join(t.TempDir(), "plan.pdf")
	ctx, cancel := context.WithCancel(context.Background())
	cancel()
	if err := WriteFile(ctx, path, d.Plan, fixtureOptions(d)); !errors.Is(err, context.Canceled) {
		t.Fatalf("WriteFile with a cancelled context = %v", err)
	}
	if _, err := os.Stat(path); !os.IsNotExist(err) {
		t.Errorf("cancelled export left %s (%v)", path, err)
	}
}

func TestFormatFromPath(t *testing.T) {
	for _, tc := range []struct {
		path string
		want Format
		ok   bool
	}{
		{"plan.pdf", FormatPDF, true},
		{"/tmp/x/Plan.PDF", FormatPDF, true},
		{"a.b.svg", FormatSVG, true},
		{"plan.json", FormatJSON, true},
		{"actions.csv", FormatCSV, true},
		{"plan.png", "", false},
		{"plan", "", false},
		{"plan.pdf.tmp", "", false},
	} {
		got, err := FormatFromPath(tc.path)
		if (err == nil) != tc.ok || got != tc.want {
			t.Errorf("FormatFromPath(%q) = %q, %v; want %q, ok %v", tc.path, got, err, tc.want, tc.ok)
		}
		if !tc.ok && (!errors.Is(err, ErrFormat) || !strings.Contains(err.Error(), tc.path)) {
			t.Errorf("FormatFromPath(%q) error %v should wrap ErrFormat and name the file", tc.path, err)
		}
	}
}

func TestParsePaper(t *testing.T) {
	for in, want := range map[string]Paper{"a4": A4, "A4": A4, " letter ": Letter, "Letter": Letter} {
		if got, err := ParsePaper(in); err != nil || got != want {
			t.Errorf("ParsePaper(%q) = %q, %v", in, got, err)
		}
	}
	if _, err := ParsePaper("a3"); err == nil || !strings.Contains(err.Error(), "a3") {
		t.Errorf("ParsePaper(a3) = %v", err)
	}
}

func TestProgressReported(t *testing.T) {
	d := planfixture.SET()
	opt := fixtureOptions(d)
	var stages []string
	last := -1.0
	opt.Progress = func(stage string, f float64) {
		if f < last || f > 1 {
			t.Errorf("progress %q %g after %g", stage, f, last)
		}
		last = f
		stages = append(stages, stage)
	}
	if err := WritePDF(context.Background(), io.Discard, d.Plan, opt); err != nil {
		t.Fatal(err)
	}
	if len(stages) < 5 || last != 1 {
		t.Errorf("progress stages %v, last %g", stages, last)
	}
}
