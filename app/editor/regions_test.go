package editor_test

import (
	"strings"
	"testing"

	"github.com/golang/geo/r2"

	"dimerpath/app/editor"
	"dimerpath/app/editor/editortest"
	"dimerpath/app/render"
	"dimerpath/lattice/design"
)

// Issue 13: region colours followed list order, so deleting a region
// recoloured the ones after it. Each region keeps its colour (saved with
// the design, editable); opening a design draws it as before.
func TestRegionsKeepTheirColours(t *testing.T) {
	s := editortest.Demo(t)
	v := s.Variant()
	if got, want := s.RegionColour(2), render.RegionColor(2); got != want {
		t.Errorf("region 2 opens in %v, want the palette's %v as before", got, want)
	}
	before := map[string]string{}
	for i, r := range v.Regions {
		before[r.Name] = render.ColourHex(s.RegionColour(i))
	}
	s.DeleteRegions(0)
	for i, r := range s.Variant().Regions {
		if got := render.ColourHex(s.RegionColour(i)); got != before[r.Name] {
			t.Errorf("after deleting another region %s is %s, was %s", r.Name, got, before[r.Name])
		}
	}
	// A new region takes a colour no region of the variant has; the
	// deleted region's is free again.
	i := s.AddRegion("", design.RoleGate)
	if got := render.ColourHex(s.RegionColour(i)); got != before["donor-P"] {
		t.Errorf("the new region is %s, want the free %s", got, before["donor-P"])
	}
	if err := s.SetRegionColour(i, "#123456"); err != nil {
		t.Fatal(err)
	}
	if got := s.Design().Variants[0].Regions[i].Colour; got != "#123456" {
		t.Errorf("colour stored %q", got)
	}
	if err := s.SetRegionColour(i, "blue"); err == nil || !strings.Contains(err.Error(), "not a colour") {
		t.Errorf("SetRegionColour(blue) = %v, want a refusal", err)
	}
	s.Undo()
	if got := render.ColourHex(s.RegionColour(i)); got != before["donor-P"] {
		t.Errorf("undo left the colour %s", got)
	}
}

// Issue 13: every new region started as "region", role device, which
// gave misleading findings on fan-outs. A region made for a stroke takes
// its role from the tool, with a unique name, and the session says so.
func TestNewRegionTakesItsRoleFromTheTool(t *testing.T) {
	tests := []struct {
		name string
		draw func(s *editor.Session)
		role design.Role
		want string // the new region's name
	}{
		{"a line is a lead", func(s *editor.Session) {
			s.SetTool(editor.ToolLine)
			s.Press(r2.Point{X: 20, Y: 150})
			s.Drag(r2.Point{X: 60, Y: 150})
			s.Release(r2.Point{X: 60, Y: 150})
		}, design.RoleLead, "lead 2"}, // the tiny design has a "lead"
		{"a large rectangle is a pad", func(s *editor.Session) {
			s.SetTool(editor.ToolRect)
			s.Press(r2.Point{X: 5, Y: 5})
			s.Drag(r2.Point{X: 130, Y: 120})
			s.Release(r2.Point{X: 130, Y: 120})
		}, design.RolePad, "pad"},
		{"a small rectangle is a device", func(s *editor.Session) {
			s.SetTool(editor.ToolRect)
			s.Press(r2.Point{X: 150, Y: 150})
			s.Drag(r2.Point{X: 160, Y: 158})
			s.Release(r2.Point{X: 160, Y: 158})
		}, design.RoleDevice, "device"},
		{"painted sites are a device", func(s *editor.Session) {
			s.SetTool(editor.ToolDimer)
			s.Click(r2.Point{X: 170, Y: 170}, 1)
		}, design.RoleDevice, "device"},
		{"a window goes to a donor region", func(s *editor.Session) {
			s.SetTool(editor.ToolWindow)
			s.Click(r2.Point{X: 180, Y: 30}, 1)
		}, design.RoleDonor, "P donors"},
	}
	for _, tc := range tests {
		t.Run(tc.name, func(t *testing.T) {
			s := editortest.Tiny(t)
			s.Select()
			n := len(s.Variant().Regions)
			tc.draw(s)
			v := s.Variant()
			if len(v.Regions) != n+1 {
				t.Fatalf("%d regions, want %d", len(v.Regions), n+1)
			}
			r := v.Regions[n]
			if r.Role != tc.role || r.Name != tc.want {
				t.Errorf("new region %q, role %s; want %q, role %s", r.Name, r.Role, tc.want, tc.role)
			}
			if !strings.Contains(s.Notice, r.Name) || !strings.Contains(s.Notice, tc.role.Name()) {
				t.Errorf("notice %q does not name the region and its role", s.Notice)
			}
		})
	}
	s := editortest.Tiny(t)
	if got := s.NewRegionName(design.RoleLead); got != "lead 2" {
		t.Errorf("NewRegionName(lead) = %q, want lead 2", got)
	}
}

// Issue 13: the Terrace tool refused a first click on the field edge
// only at Enter, losing every point, and nothing snapped to the border,
// leaving thin strips of the old terrace along the edges.
func TestTerraceOutlineSnapsToTheFieldEdge(t *testing.T) {
	s := editortest.Tiny(t)
	s.SetTool(editor.ToolTerrace)
	o := s.Opts
	o.TerraceStep = "down"
	if err := s.SetOptions(o); err != nil {
		t.Fatal(err)
	}
	near := 2.0
	for _, p := range []r2.Point{{X: 201, Y: 50}, {X: 120, Y: 50}, {X: 120.004, Y: 199}, {X: 199.2, Y: 200.7}} {
		s.Click(p, near)
		if s.Err != nil {
			t.Fatalf("click at %v refused: %v", p, s.Err)
		}
	}
	if err := s.FinishPath(); err != nil {
		t.Fatal(err)
	}
	ts := s.Design().Terraces
	got := ts[len(ts)-1].Boundary
	want := [][2]float64{{200, 50}, {120, 50}, {120, 200}, {200, 200}}
	if len(got) != len(want) {
		t.Fatalf("outline %v, want %v", got, want)
	}
	for i := range want {
		if got[i] != want[i] {
			t.Errorf("outline point %d at %v, want %v (on the field's border)", i, got[i], want[i])
		}
	}
	// A path that cannot be finished keeps its points.
	s.SetTool(editor.ToolPolygon)
	s.Click(r2.Point{X: 30, Y: 30}, near)
	s.Click(r2.Point{X: 60, Y: 30}, near)
	if err := s.FinishPath(); err == nil || !s.Drawing() {
		t.Errorf("a 2-vertex polygon: error %v, still drawing %v; want an error and the points kept", err, s.Drawing())
	}
	s.Click(r2.Point{X: 45, Y: 60}, near)
	if err := s.FinishPath(); err != nil {
		t.Errorf("the polygon with a third vertex: %v", err)
	}
}

// Issue 13: the Array tool showed nothing before the click. Hovering
// shows the array a click would place: its extent and each element,
// where the click then puts them.
func TestArrayToolPreviewsBeforeTheClick(t *testing.T) {
	s := editortest.Tiny(t)
	s.Select()
	s.SetTool(editor.ToolArray)
	o := s.Opts
	o.ArrayOf, o.ArrayCols, o.ArrayRows, o.ArrayPitchDimers, o.ArrayPitchRows = "window", 3, 2, 6, 3
	if err := s.SetOptions(o); err != nil {
		t.Fatal(err)
	}
	at := r2.Point{X: 150.1, Y: 40.2}
	if s.Preview() != nil {
		t.Fatal("a preview before the pointer is over the lattice")
	}
	s.Hover(at)
	pv := s.Preview()
	if pv == nil || !pv.Rect || len(pv.Cells) != 6 {
		t.Fatalf("preview %+v, want the extent and 6 elements", pv)
	}
	s.Click(at, 1)
	v := s.Variant()
	sites := s.RegionSites(len(v.Regions) - 1)
	ext := pv.Points
	box := r2.RectFromPoints(ext[0], ext[1]).ExpandedByMargin(1e-6)
	for site := range sites.All() {
		q := s.Surface().Position(site)
		if !box.ContainsPoint(q) {
			t.Fatalf("the array writes site %v at %v outside the previewed extent %v", site, q, box)
		}
		in := false
		for _, c := range pv.Cells {
			in = in || c.ExpandedByMargin(1e-6).ContainsPoint(q)
		}
		if !in {
			t.Fatalf("site %v at %v lies in no previewed element", site, q)
		}
	}
	if n := sites.Count(); n != 6*6 {
		t.Errorf("the array wrote %d sites, want 6 windows of 6", n)
	}
}
