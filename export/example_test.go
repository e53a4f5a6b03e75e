package export_test

import (
	"bytes"
	"context"
	"encoding/csv"
	"fmt"
	"log"
	"os"
	"path/filepath"
	"strings"
	"time"

	"dimerpath/export"
	"dimerpath/export/internal/planfixture"
	"dimerpath/planner"
)

// The examples export a small fixture plan; in the program the plan
// comes from planner.Build.

func ExampleWritePlanJSON() {
	p := planfixture.SET().Plan
	var buf bytes.Buffer
	if err := export.WritePlanJSON(&buf, p, "dimerpath 0.1.0"); err != nil {
		log.Fatal(err)
	}
	for _, line := range strings.Split(buf.String(), "\n")[:5] {
		fmt.Println(line)
	}
	// Output:
	// {
	//   "format": "dimerpath-plan",
	//   "version": 2,
	//   "generator": "dimerpath 0.1.0",
	//   "caution": "CAUTION: a dimerpath plan is advisory. Check every bias, current, speed, dose and position against your instrument's limits and your lab's procedures before writing.",
}

func ExampleReadPlanJSON() {
	var buf bytes.Buffer
	if err := export.WritePlanJSON(&buf, planfixture.SET().Plan, ""); err != nil {
		log.Fatal(err)
	}
	p, err := export.ReadPlanJSON(&buf)
	if err != nil {
		log.Fatal(err)
	}
	fmt.Printf("%s / %s: %d strokes in %d segments, %d actions, %.0f s\n",
		p.Design, p.Variant, len(p.Strokes), len(p.Segments), len(p.Actions), p.TotalS)

	_, err = export.ReadPlanJSON(strings.NewReader(`{"format": "dimerpath-plan", "version": 9}`))
	fmt.Println(err)
	// Output:
	// Kestrel Lab SET-K1 / baseline: 25 strokes in 6 segments, 80 actions, 12639 s
	// line 1, column 41: version = 9: unsupported plan file version (this dimerpath reads versions 1 to 2)
}

func ExampleWriteActionsCSV() {
	var buf bytes.Buffer
	if err := export.WriteActionsCSV(&buf, planfixture.SET().Plan); err != nil {
		log.Fatal(err)
	}
	rows, err := csv.NewReader(&buf).ReadAll()
	if err != nil {
		log.Fatal(err)
	}
	fmt.Println(len(rows)-1, "actions")
	// Scripts find columns by their header name.
	col := map[string]int{}
	for i, name := range rows[0] {
		col[name] = i
	}
	show := []string{"index", "kind", "segment", "stroke", "stroke_number", "fiducial", "bias_v", "current_a", "step"}
	fmt.Println(strings.Join(show, ","))
	for _, r := range rows[1:7] {
		var cells []string
		for _, name := range show {
			cells = append(cells, r[col[name]])
		}
		fmt.Println(strings.Join(cells, ","))
	}
	// Output:
	// 80 actions
	// index,kind,segment,stroke,stroke_number,fiducial,bias_v,current_a,step
	// 0,condition,-1,-1,,,,,0
	// 1,survey,-1,-1,,,,,0
	// 2,move,0,-1,,,,,1
	// 3,register,0,-1,,F-SW,,,1
	// 4,switch,0,-1,,,4,2e-09,1
	// 5,move,0,-1,,,,,1
}

func ExampleWriteSVG() {
	var buf bytes.Buffer
	if err := export.WriteSVG(&buf, planfixture.SET().Plan, export.Options{}); err != nil {
		log.Fatal(err)
	}
	svg := buf.String()
	fmt.Println(strings.Count(svg, `class="stroke `), "stroke elements")
	fmt.Println(strings.Contains(svg, `<g id="moves"`), strings.Contains(svg, `<g id="fiducials"`))
	// Output:
	// 25 stroke elements
	// true true
}

func ExampleWritePDF() {
	d := planfixture.SET()
	pat := &export.Pattern{Surface: d.Surface}
	for _, r := range d.Regions {
		pat.Regions = append(pat.Regions, export.PatternRegion{Name: r.Name, Sites: r.Sites})
	}
	opt := export.Options{Paper: export.Letter, Date: time.Date(2026, 3, 14, 0, 0, 0, 0, time.UTC), Pattern: pat}
	var buf bytes.Buffer
	if err := export.WritePDF(context.Background(), &buf, d.Plan, opt); err != nil {
		log.Fatal(err)
	}
	fmt.Println(buf.String()[:5])
	// Output:
	// %PDF-
}

func ExampleWriteFile() {
	dir, err := os.MkdirTemp("", "export-example")
	if err != nil {
		log.Fatal(err)
	}
	defer os.RemoveAll(dir)
	p := planfixture.SET().Plan
	for _, name := range []string{"plan.json", "actions.csv", "route.svg", "plan.png"} {
		err := export.WriteFile(context.Background(), filepath.Join(dir, name), p, export.Options{})
		fmt.Println(name, err == nil)
	}
	// Output:
	// plan.json true
	// actions.csv true
	// route.svg true
	// plan.png false
}

func ExampleFormatFromPath() {
	for _, name := range []string{"run-14.pdf", "Plan.SVG", "plan.txt"} {
		f, err := export.FormatFromPath(name)
		fmt.Printf("%q %v\n", f, err)
	}
	// Output:
	// "pdf" <nil>
	// "svg" <nil>
	// "" plan.txt: unknown export format ".txt" (use .pdf, .svg, .json or .csv)
}

func ExampleWriteComparisonSVG() {
	a := planfixture.SET().Plan
	b := planfixture.SET().Plan
	b.Variant = "copy"
	var buf bytes.Buffer
	if err := export.WriteComparisonSVG(&buf, export.ResultsOf([]*planner.Plan{a, b}), export.Options{}); err != nil {
		log.Fatal(err)
	}
	fmt.Println(strings.Contains(buf.String(), `id="breakdown-compare"`), strings.Count(buf.String(), ">copy<"))
	// Output:
	// true 4
}
