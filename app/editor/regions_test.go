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
