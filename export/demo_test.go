package export

import (
	"bytes"
	"context"
	"encoding/csv"
	"maps"
	"os/exec"
	"path/filepath"
	"reflect"
	"slices"
	"strconv"
	"strings"
	"sync"
	"testing"

	"dimerpath/assets"
	"dimerpath/lattice/design"
	"dimerpath/planner"
)

// demoPlans holds the built-in demo design planned with the default
// profile, one plan per variant, built once.
var demoPlans = sync.OnceValues(func() (map[string]*planner.Plan, error) {
	d, err := design.Parse(assets.DemoName, assets.DemoDesign)
	if err != nil {
		return nil, err
	}
	out := map[string]*planner.Plan{}
	for _, v := range d.VariantNames() {
		lay, err := d.Lay(v)
		if err != nil {
			return nil, err
		}
		p, err := planner.Build(context.Background(), lay, planner.DefaultProfile(), planner.Options{Seed: 1})
		if err != nil {
			return nil, err
		}
		out[v] = p
	}
	return out, nil
})

var demoLayout = sync.OnceValues(func() (*design.Layout, error) {
	d, err := design.Parse(assets.DemoName, assets.DemoDesign)
	if err != nil {
		return nil, err
	}
	return d.Lay("")
})

// TestDemoPlanExports exports the real plans of the demo design: the
// JSON reads back to the plan, the CSV has one row per action, and the
// PDF's text holds every segment and the caution.
func TestDemoPlanExports(t *testing.T) {
	plans, err := demoPlans()
	if err != nil {
		t.Fatal(err)
	}
	for name, p := range plans {
		t.Run(name, func(t *testing.T) {
			var js, cs bytes.Buffer
			if err := WritePlanJSON(&js, p, "test"); err != nil {
				t.Fatal(err)
			}
			got, err := ReadPlanJSON(bytes.NewReader(js.Bytes()))
			if err != nil {
				t.Fatal(err)
			}
			if !reflect.DeepEqual(normalised(got), normalised(p)) {
				t.Error("the demo plan does not survive the JSON round trip")
				diffPlans(t, normalised(got), normalised(p))
			}
			if err := WriteActionsCSV(&cs, p); err != nil {
				t.Fatal(err)
			}
			rows, err := csv.NewReader(&cs).ReadAll()
			if err != nil || len(rows) != len(p.Actions)+1 {
				t.Errorf("CSV: %d rows for %d actions (%v)", len(rows)-1, len(p.Actions), err)
			}
			if err := WriteSVG(&bytes.Buffer{}, p, Options{}); err != nil {
				t.Error(err)
			}
		})
	}
	if _, err := exec.LookPath("pdftotext"); err != nil {
		t.Skip("pdftotext not installed")
	}
	lay, err := demoLayout()
	if err != nil {
		t.Fatal(err)
	}
	p := plans[lay.Variant.Name]
	path := filepath.Join(t.TempDir(), "demo.pdf")
	if err := WriteFile(context.Background(), path, p, Options{Date: testDate, Pattern: PatternOf(lay)}); err != nil {
		t.Fatal(err)
	}
	out, err := exec.Command("pdftotext", "-layout", path, "-").Output()
	if err != nil {
		t.Fatal(err)
	}
	raw, _ := exec.Command("pdftotext", path, "-").Output()
	if n, pages := strings.Count(collapse(string(raw)), planner.Caution), strings.Count(string(raw), "\f"); n < pages {
		t.Errorf("caution on %d of %d pages", n, pages)
	}
	lines := strings.Split(string(out), "\n")
	for i, s := range p.Segments {
		found := false
		for _, l := range lines {
			f := strings.Fields(l)
			where := s.Fiducial
			if s.Registration == planner.RegLocal {
				where = "local"
			}
			if len(f) >= 2 && f[0] == strconv.Itoa(i+1) && f[1] == where {
				found = true
				break
			}
		}
		if !found {
			t.Errorf("no table row for segment %d (%s)", i+1, s.Fiducial)
		}
	}
}

func TestDemoComparison(t *testing.T) {
	plans, err := demoPlans()
	if err != nil {
		t.Fatal(err)
	}
	var rs []*planner.Plan
	for _, name := range slices.Sorted(maps.Keys(plans)) {
		rs = append(rs, plans[name])
	}
	var buf bytes.Buffer
	if err := WriteComparisonSVG(&buf, ResultsOf(rs), Options{}); err != nil {
		t.Fatal(err)
	}
	renderSVGNotBlank(t, buf.Bytes())
}
