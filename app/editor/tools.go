package editor

import (
	"errors"
	"fmt"
	"math"

	"github.com/golang/geo/r1"
	"github.com/golang/geo/r2"

	"dimerpath/app/render"
	"dimerpath/lattice"
	"dimerpath/lattice/design"
)

// Tool is an editing tool of the lattice view.
type Tool int

const (
	ToolSelect   Tool = iota // pick regions
	ToolPan                  // drag the view
	ToolSite                 // paint single H sites
	ToolDimer                // paint whole dimers
	ToolWindow               // place a dopant window
	ToolRect                 // rectangle shape
	ToolPolygon              // polygon shape
	ToolLine                 // polyline shape with a width
	ToolArray                // regular array of windows, dimers or sites
	ToolEraser               // restore H under the brush, in every region
	ToolFiducial             // place a fiducial mark
	ToolTerrace              // outline a terrace beyond a step
	ToolDefect               // add, select, move and delete a survey's defects
)

// ToolInfo describes a tool for the palette, the menus and the status
// bar.
type ToolInfo struct {
	Tool Tool
	Name string
	Key  rune   // the key that picks the tool
	Hint string // what to do with it
}

// Tools lists every tool in palette order.
var Tools = []ToolInfo{
	{ToolSelect, "Select", 'v', "Click a shape to select it, drag it to move it; drag on clean H to box regions. Delete removes, Esc deselects."},
	{ToolPan, "Pan", 'h', "Drag to move the view. Right- or middle-drag pans with any tool; the wheel zooms."},
	{ToolSite, "Site", 's', "Click or drag to depassivate single H sites."},
	{ToolDimer, "Dimer", 'd', "Click or drag to depassivate both H sites of each dimer."},
	{ToolWindow, "Window", 'w', "Click to place a dopant window on whole dimers of one row."},
	{ToolRect, "Rectangle", 'r', "Drag from corner to corner; each edge snaps to the nearest edge between dimers or between rows."},
	{ToolPolygon, "Polygon", 'p', "Click the vertices; click the first again or press Enter to close, Esc to cancel."},
	{ToolLine, "Line", 'l', "Drag, or click the vertices and press Enter (or click the last again); width in the options."},
	{ToolArray, "Array", 'a', "Click to place an n x m array at a pitch counted in dimers and rows."},
	{ToolEraser, "Eraser", 'e', "Click or drag to restore hydrogen on the sites under the brush, in every region."},
	{ToolFiducial, "Fiducial", 'f', "Click to place a fiducial mark for re-registration."},
	{ToolTerrace, "Terrace", 't', "Click the outline of a terrace beyond a step, say in Options whether the step goes up or down; Enter closes it."},
	{ToolDefect, "Defect", 'k', "Click the survey image to add a defect (bright or dark in Options), click a defect to select it, drag one to move it; Delete removes the selected one, Esc deselects."},
}

// Info returns the tool's description.
func (t Tool) Info() ToolInfo {
	for _, ti := range Tools {
		if ti.Tool == t {
			return ti
		}
	}
	return ToolInfo{Tool: t, Name: "?"}
}

// ToolOptions are the settings of the painting tools.
type ToolOptions struct {
	// Template is the dopant-window template of the window tool and of
	// window arrays ("P" or "As", or a design's own).
	Template string
	// LineWidthNM is the line tool's width.
	LineWidthNM float64
	// BrushNM is the radius of the site, dimer and eraser brushes; 0
	// paints one site or dimer at a time.
	BrushNM float64
	// TerraceStep is which way the step goes from the terrace under the
	// first point of a terrace outline to the new terrace: "up" or
	// "down" (design.Terrace.Step). The two lattices differ by 0.27 nm,
	// so the terrace tool asks: "" finishes no outline until it is set.
	TerraceStep string
	// DefectKind is what the defect tool adds: design.DefectBright or
	// DefectDark; DefectSizeNM its apparent width (design.SurveyDefect).
	DefectKind   string
	DefectSizeNM float64
	// ArrayOf is what the array tool repeats: "window", "dimer" or "site".
	ArrayOf                          string
	ArrayCols, ArrayRows             int
	ArrayPitchDimers, ArrayPitchRows int
}

// DefaultToolOptions returns the options a new session starts with. The
// array pitch leaves two intact dimers between phosphine windows on a
// row and skips a row between window rows, inside the default spacing
// rule (common practice). The defect tool adds bright defects (dangling
// bonds, adsorbates) DefaultDefectSizeNM wide until told otherwise.
func DefaultToolOptions() ToolOptions {
	return ToolOptions{
		Template: "P", LineWidthNM: 2, BrushNM: 0,
		DefectKind: design.DefectBright, DefectSizeNM: DefaultDefectSizeNM,
		ArrayOf: "window", ArrayCols: 4, ArrayRows: 4, ArrayPitchDimers: 5, ArrayPitchRows: 2,
	}
}

// Validate reports the first option out of range, naming it.
func (o ToolOptions) Validate() error {
	switch {
	case !(o.LineWidthNM >= 0.1 && o.LineWidthNM <= 2000):
		return fmt.Errorf("line width %g nm: must be between 0.1 and 2000 nm", o.LineWidthNM)
	case !(o.BrushNM >= 0 && o.BrushNM <= 500):
		return fmt.Errorf("brush radius %g nm: must be between 0 and 500 nm", o.BrushNM)
	case o.TerraceStep != "" && o.TerraceStep != "up" && o.TerraceStep != "down":
		return fmt.Errorf("terrace step %q: must be up or down", o.TerraceStep)
	case o.DefectKind != design.DefectBright && o.DefectKind != design.DefectDark:
		return fmt.Errorf("defect kind %q: must be %s or %s", o.DefectKind, design.DefectBright, design.DefectDark)
	case !(o.DefectSizeNM >= MinDefectSizeNM && o.DefectSizeNM <= MaxDefectSizeNM):
		return fmt.Errorf("defect width %g nm: must be between %g and %g nm", o.DefectSizeNM, MinDefectSizeNM, MaxDefectSizeNM)
	case o.ArrayOf != "window" && o.ArrayOf != "dimer" && o.ArrayOf != "site":
		return fmt.Errorf("array element %q: must be window, dimer or site", o.ArrayOf)
	case o.ArrayCols < 1 || o.ArrayCols > 1000 || o.ArrayRows < 1 || o.ArrayRows > 1000:
		return fmt.Errorf("array size %d x %d: each must be between 1 and 1000", o.ArrayCols, o.ArrayRows)
	case o.ArrayPitchDimers < 1 || o.ArrayPitchDimers > 10000 || o.ArrayPitchRows < 1 || o.ArrayPitchRows > 10000:
		return fmt.Errorf("array pitch %d dimers x %d rows: each must be between 1 and 10000", o.ArrayPitchDimers, o.ArrayPitchRows)
	}
	return nil
}

// ErrTerraceStep is the terrace tool's question: an outline is finished
// only once the tool's options say which way the step goes.
var ErrTerraceStep = errors.New("which way does the step go from the terrace under the first point to the new one, up or down? Choose it in the Terrace tool's options (the two lattices lie 0.27 nm apart)")

// SetTool picks the tool, dropping any shape half drawn.
func (s *Session) SetTool(t Tool) {
	if t == s.Tool {
		return
	}
	s.cancelGesture()
	s.Tool = t
	s.notify(ChangeTool | ChangePreview)
}

// SetOptions replaces the tool options if they are valid.
func (s *Session) SetOptions(o ToolOptions) error {
	if err := o.Validate(); err != nil {
		return err
	}
	if _, ok := TemplateOf(s.d, o.Template); !ok {
		return fmt.Errorf("window template %q: not defined (built in: P, As)", o.Template)
	}
	s.Opts = o
	s.notify(ChangeTool | ChangePreview)
	return nil
}

// gesture is a tool action in progress: a drag or a path being clicked.
type gesture struct {
	tool    Tool
	start   r2.Point
	last    r2.Point
	points  []r2.Point // path vertices, snapped
	target  int        // region being painted, -1 for the eraser
	created bool       // target was made for this gesture
	moving  bool       // the Select tool is dragging the selected shape
	changed bool
	pressed bool // a drag is in progress
	dragged bool
}

// hoverState is the pointer position in nm for previews, if known.
type hoverState struct {
	at r2.Point
	ok bool
}

func (s *Session) cancelGesture() {
	g := s.gesture
	s.gesture = nil
	if g == nil {
		return
	}
	if g.pressed && (g.changed || g.created) {
		// A stroke cut short by a tool or variant change is kept, as if
		// the button had been released.
		s.commit(strokeLabel(g.tool), "", ChangeSites|ChangeRegions)
	}
	s.notify(ChangePreview)
}

func strokeLabel(t Tool) string {
	switch t {
	case ToolEraser:
		return "erase"
	case ToolDimer:
		return "paint dimers"
	}
	return "paint sites"
}

// Hover tells the session where the pointer is (nm), for previews.
func (s *Session) Hover(p r2.Point) {
	s.hoverAt = hoverState{p, true}
	switch {
	case s.Drawing():
		s.notify(ChangePreview) // the rubber band to the pointer
	case s.Opts.BrushNM > 0 && (s.Tool == ToolSite || s.Tool == ToolDimer || s.Tool == ToolEraser):
		s.notify(ChangePreview) // the brush outline
	case s.Tool == ToolArray:
		s.notify(ChangePreview) // the array a click would place
	}
}

// Unhover tells the session the pointer left the view.
func (s *Session) Unhover() {
	s.hoverAt = hoverState{}
	s.notify(ChangePreview)
}

// SetNear tells the session how close (nm, at the view's zoom) the
// pointer must come to a mark to take it: a drag's press uses the last
// one set (Click sets it too).
func (s *Session) SetNear(near float64) { s.near = near }

// Press starts a drag at p (nm) with the current tool.
func (s *Session) Press(p r2.Point) {
	if s.gesture != nil && s.gesture.pressed {
		s.Release(p)
	}
	switch s.Tool {
	case ToolSite, ToolDimer, ToolEraser:
		g := &gesture{tool: s.Tool, start: p, last: p, pressed: true, target: -1}
		s.gesture = g
		if s.Tool != ToolEraser {
			g.target, g.created = s.paintTarget(nil)
		}
		s.brush(p, p)
	case ToolRect:
		s.gesture = &gesture{tool: s.Tool, start: p, last: p, pressed: true}
	case ToolSelect:
		g := &gesture{tool: s.Tool, start: p, last: p, pressed: true}
		if i, k := s.ShapeAt(p); k >= 0 {
			// A drag that starts on a shape moves it.
			if ci, ck := s.SelectedShape(); ci != i || ck != k {
				s.SelectShape(i, k)
			}
			g.moving = true
		}
		s.gesture = g
	case ToolLine:
		if s.gesture == nil || len(s.gesture.points) == 0 {
			c := s.snapDimerCentre(p)
			s.gesture = &gesture{tool: s.Tool, start: c, last: c, pressed: true}
		}
	case ToolDefect:
		g := &gesture{tool: s.Tool, start: p, last: p, pressed: true}
		s.defectPress(g, p)
		s.gesture = g
	}
	s.notify(ChangePreview)
}

// Drag moves a drag in progress to p (nm).
func (s *Session) Drag(p r2.Point) {
	g := s.gesture
	if g == nil || !g.pressed {
		return
	}
	g.dragged = true
	switch g.tool {
	case ToolSite, ToolDimer, ToolEraser:
		s.brush(g.last, p)
		g.last = p
	case ToolRect, ToolSelect, ToolDefect:
		g.last = p
	case ToolLine:
		g.last = s.snapDimerCentre(p)
	}
	s.notify(ChangePreview)
}

// Release ends a drag at p (nm).
func (s *Session) Release(p r2.Point) {
	g := s.gesture
	if g == nil || !g.pressed {
		return
	}
	s.Drag(p)
	g.pressed = false
	s.gesture = nil
	switch g.tool {
	case ToolSite, ToolDimer, ToolEraser:
		if g.changed {
			s.commit(strokeLabel(g.tool), "", ChangeSites|ChangeRegions)
		} else if g.created {
			// Nothing painted: drop the region made for the stroke.
			v := s.Variant()
			v.Regions = v.Regions[:len(v.Regions)-1]
			s.ids[s.variant] = s.ids[s.variant][:len(s.ids[s.variant])-1]
			s.sel = nil
			s.notify(ChangeRegions | ChangeSelection)
		}
	case ToolRect:
		a, b := s.snapRect(g.start, g.last)
		s.addShape(design.Shape{Kind: design.ShapeRect, Points: pts(a, b)}, "rectangle")
	case ToolSelect:
		if g.moving {
			if g.dragged {
				s.MoveSelectedShape(g.last.Sub(g.start))
			}
		} else if g.dragged {
			box := r2.RectFromPoints(g.start, g.last)
			var hit []int
			for i := range s.Variant().Regions {
				if s.RegionBounds(i).Intersects(box) {
					hit = append(hit, i)
				}
			}
			s.Select(hit...)
		}
	case ToolLine:
		if g.dragged && g.start != g.last {
			s.addShape(design.Shape{Kind: design.ShapePolyline, Points: pts(g.start, g.last), WidthNM: s.Opts.LineWidthNM}, "line")
		} else {
			// A click: start a clicked path at the pressed point.
			s.gesture = &gesture{tool: ToolLine, points: []r2.Point{g.start}}
		}
	case ToolDefect:
		s.defectRelease(g)
	}
	s.notify(ChangePreview)
}

// Click is a press and release at p (nm) without a drag. near is how
// close (nm) a click must be to a path's first or last vertex to close
// or end it.
func (s *Session) Click(p r2.Point, near float64) {
	s.near = near
	switch s.Tool {
	case ToolSite, ToolDimer, ToolEraser:
		s.Press(p)
		s.Release(p)
	case ToolSelect:
		switch i, k := s.ShapeAt(p); {
		case k >= 0:
			s.SelectShape(i, k)
		case i >= 0:
			s.Select(i)
		default:
			s.Select()
		}
	case ToolWindow:
		s.addShape(design.Shape{Kind: design.ShapeWindow, Template: s.Opts.Template, Points: pts(s.snapDimerCentre(p))}, "window")
	case ToolArray:
		of := design.Shape{Kind: design.ShapeKind(s.Opts.ArrayOf)}
		switch s.Opts.ArrayOf {
		case "window":
			of.Template = s.Opts.Template
			of.Points = pts(s.snapDimerCentre(p))
		case "dimer":
			of.Points = pts(s.snapDimerCentre(p))
		default:
			of.Points = pts(s.snapSite(p))
		}
		o := s.Opts
		s.addShape(design.Shape{Kind: design.ShapeArray, Array: &design.Array{Of: &of, Cols: o.ArrayCols, Rows: o.ArrayRows, PitchDimers: o.ArrayPitchDimers, PitchRows: o.ArrayPitchRows}}, "array")
	case ToolDefect:
		s.defectClick(p, near)
	case ToolFiducial:
		if s.surf.Field.ContainsPoint(p) {
			s.AddFiducial(p)
		}
	case ToolPolygon, ToolLine, ToolTerrace:
		q := s.snapDimerCentre(p)
		if s.Tool == ToolTerrace {
			q = s.snapToFieldEdge(p, near)
		}
		g := s.gesture
		if g == nil || g.tool != s.Tool {
			g = &gesture{tool: s.Tool}
			s.gesture = g
		}
		if s.Tool == ToolTerrace && len(g.points) == 0 && s.terraceUnder(q) < 0 {
			// Refused now, not after the outline is done.
			s.Err = fmt.Errorf("a terrace outline starts on the terrace it steps from: (%.2f, %.2f) nm is on none", q.X, q.Y)
			s.notify(ChangePreview)
			return
		}
		if n := len(g.points); n > 0 {
			closing := s.Tool != ToolLine && n >= 3 && p.Sub(g.points[0]).Norm() <= near
			ending := s.Tool == ToolLine && n >= 2 && p.Sub(g.points[n-1]).Norm() <= near
			if closing || ending {
				s.FinishPath()
				return
			}
			if q == g.points[n-1] {
				return
			}
		}
		g.points = append(g.points, q)
		s.notify(ChangePreview)
	}
}

// FinishPath completes a polygon, line or terrace outline being clicked.
func (s *Session) FinishPath() error {
	g := s.gesture
	if g == nil || len(g.points) == 0 {
		return nil
	}
	s.gesture = nil
	defer s.notify(ChangePreview)
	// A path that cannot be finished keeps its points, to add to or Esc.
	keep := func(err error) error {
		s.gesture = g
		return err
	}
	switch g.tool {
	case ToolPolygon:
		if len(g.points) < 3 {
			return keep(errors.New("a polygon needs at least 3 vertices"))
		}
		s.addShape(design.Shape{Kind: design.ShapePolygon, Points: pts(g.points...)}, "polygon")
	case ToolLine:
		if len(g.points) < 2 {
			return keep(errors.New("a line needs at least 2 vertices"))
		}
		s.addShape(design.Shape{Kind: design.ShapePolyline, Points: pts(g.points...), WidthNM: s.Opts.LineWidthNM}, "line")
	case ToolTerrace:
		if s.Opts.TerraceStep == "" {
			return keep(ErrTerraceStep)
		}
		if _, err := s.AddTerrace(g.points); err != nil {
			return keep(err)
		}
	}
	return nil
}

// CancelPath drops the shape being drawn.
func (s *Session) CancelPath() {
	if s.gesture != nil && !s.gesture.pressed {
		s.gesture = nil
		s.notify(ChangePreview)
	}
}

// Drawing reports whether a path is being clicked (Enter and Esc then
// belong to it).
func (s *Session) Drawing() bool { return s.gesture != nil && len(s.gesture.points) > 0 }

func pts(ps ...r2.Point) [][2]float64 {
	out := make([][2]float64, len(ps))
	for i, p := range ps {
		out[i] = [2]float64{p.X, p.Y}
	}
	return out
}

// PadMinNM is the side from which a rectangle or polygon drawn into a
// new region is taken for a contact pad: pads are hundreds of nm across,
// islands and gates tens (the demo's pads are 700 nm, its island 20 nm).
const PadMinNM = 100

// newRegionRole guesses the role of a region made for shape sh (nil for
// brush strokes) and says why, for the notice: a window (or an array of
// them) goes to a donor region, a line is a lead, a rectangle or polygon
// PadMinNM or more a side a pad, anything else a device.
func newRegionRole(sh *design.Shape) (design.Role, string) {
	if sh == nil {
		return design.RoleDevice, "painted sites"
	}
	switch sh.Kind {
	case design.ShapePolyline:
		return design.RoleLead, "a line"
	case design.ShapeRect, design.ShapePolygon:
		b := r2.EmptyRect()
		for _, q := range sh.Points {
			b = b.AddPoint(r2.Point{X: q[0], Y: q[1]})
		}
		if sz := b.Size(); sz.X >= PadMinNM && sz.Y >= PadMinNM {
			return design.RolePad, fmt.Sprintf("a %s %d nm or more a side", ShapeName(*sh), PadMinNM)
		}
		return design.RoleDevice, fmt.Sprintf("a %s under %d nm a side", ShapeName(*sh), PadMinNM)
	}
	return design.RoleDevice, "a " + ShapeName(*sh)
}

// regionBaseName is the name a new region of role r starts from, made
// unique by a number: "lead", "lead 2".
func regionBaseName(r design.Role) string {
	switch r {
	case design.RoleDevice, design.RoleGate, design.RoleLead, design.RolePad:
		return string(r)
	}
	return "region"
}

// paintTarget returns the region a painting tool draws shape sh into
// (nil for brush strokes): the active region, or (for windows, an active
// donor region or the first donor region of the template's species) a
// new one, named uniquely after the role newRegionRole infers from sh,
// with a Notice saying so. created says a region was added; it is
// committed with the edit that paints it.
func (s *Session) paintTarget(sh *design.Shape) (int, bool) {
	v := s.Variant()
	a := s.Active()
	window := sh != nil && (sh.Kind == design.ShapeWindow || (sh.Kind == design.ShapeArray && sh.Array != nil && sh.Array.Of != nil && sh.Array.Of.Kind == design.ShapeWindow))
	if !window {
		if a >= 0 {
			return a, false
		}
		role, why := newRegionRole(sh)
		i := s.addRegion(regionBaseName(role), role)
		s.Notice = fmt.Sprintf("New region %q, role %s (from %s): rename it or change its role in Regions.", v.Regions[i].Name, role.Name(), why)
		return i, true
	}
	tpl, _ := TemplateOf(s.d, s.Opts.Template)
	if a >= 0 && v.Regions[a].Role == design.RoleDonor {
		return a, false
	}
	for i, r := range v.Regions {
		if r.Role == design.RoleDonor && r.Species == tpl.Species {
			s.sel = []int{i}
			return i, false
		}
	}
	i := s.addRegion(tpl.Species+" donors", design.RoleDonor)
	v.Regions[i].Species = tpl.Species
	v.Regions[i].Mode = design.ModeAP
	s.Notice = fmt.Sprintf("New region %q for %s windows, role %s, atomic precision.", v.Regions[i].Name, tpl.Species, design.RoleDonor.Name())
	return i, true
}

// addShape adds sh to the paint target and commits. The shape's sites
// are taken off the region's erased sites, so a new shape shows whole.
func (s *Session) addShape(sh design.Shape, what string) {
	i, _ := s.paintTarget(&sh)
	sites, err := ShapeSites(s.surf, s.d, &sh)
	if err != nil {
		s.Err = err
		return
	}
	c := s.touch(s.variant, i)
	r := &s.Variant().Regions[i]
	r.Shapes = append(r.Shapes, sh)
	if r.Erased != nil {
		r.Erased.Difference(sites)
	}
	c.sites.Union(sites)
	s.commit("add "+what+" to "+r.Name, "", ChangeSites|ChangeRegions|ChangeSelection)
}

// brush applies the site, dimer or eraser brush along the segment a-b
// (nm).
func (s *Session) brush(a, b r2.Point) {
	g := s.gesture
	set := s.brushSites(g.tool, a, b)
	if set == nil || set.IsEmpty() {
		return
	}
	if g.tool == ToolEraser {
		for i := range s.Variant().Regions {
			if !s.RegionSites(i).Intersects(set) {
				continue
			}
			c := s.touch(s.variant, i)
			r := &s.Variant().Regions[i]
			if r.Erased == nil {
				r.Erased = lattice.NewSiteSet()
			}
			// Only sites the region has need recording as erased.
			hit := set.Clone().Intersect(c.sites)
			r.Erased.Union(hit)
			if r.Painted != nil {
				r.Painted.Difference(hit)
			}
			c.sites.Difference(hit)
			g.changed = true
		}
		return
	}
	c := s.touch(s.variant, g.target)
	r := &s.Variant().Regions[g.target]
	if r.Painted == nil {
		r.Painted = lattice.NewSiteSet()
	}
	r.Painted.Union(set)
	if r.Erased != nil {
		r.Erased.Difference(set)
	}
	c.sites.Union(set)
	g.changed = true
}

// brushSites returns the sites the brush covers along a-b.
func (s *Session) brushSites(tool Tool, a, b r2.Point) *lattice.SiteSet {
	set := lattice.NewSiteSet()
	if s.Opts.BrushNM > 0 {
		sh := design.Shape{Kind: design.ShapePolyline, Points: pts(a, b), WidthNM: 2 * s.Opts.BrushNM}
		if a == b {
			// A dab: a short segment so the polyline has length.
			sh.Points = pts(a, a.Add(r2.Point{X: 1e-3}))
		}
		got, err := ShapeSites(s.surf, s.d, &sh)
		if err != nil {
			s.Err = err
			return nil
		}
		set = got
		if tool == ToolDimer {
			set = set.WholeDimers()
		}
		return set
	}
	// One site or dimer at a time: sample the segment finely enough that
	// no site along it is skipped.
	n := int(math.Ceil(b.Sub(a).Norm()/(lattice.DimerPitch/3))) + 1
	for k := 0; k < n; k++ {
		f := 0.0
		if n > 1 {
			f = float64(k) / float64(n-1)
		}
		p := a.Add(b.Sub(a).Mul(f))
		if tool == ToolDimer {
			if t, row, d, ok := s.surf.SnapDimer(p); ok {
				set.AddRun(t, row, 2*d, 2*d+2)
			}
		} else if site, _, ok := s.surf.Snap(p); ok {
			set.Add(site)
		}
	}
	return set
}

// --- Snapping ---

// snapSite returns the position of the H site nearest p, or p off the
// lattice.
func (s *Session) snapSite(p r2.Point) r2.Point {
	if site, _, ok := s.surf.Snap(p); ok {
		return s.surf.Position(site)
	}
	return p
}

// snapDimerCentre returns the centre of the dimer nearest p.
func (s *Session) snapDimerCentre(p r2.Point) r2.Point {
	if t, row, d, ok := s.surf.SnapDimer(p); ok {
		return s.surf.DimerCentre(t, row, d)
	}
	return p
}

// snapRect returns the corners of the rectangle drawn from a to b with
// each edge moved to the nearest cell edge (midway between dimers along
// the rows, midway between rows across them), on the terrace under a
// (else under b, else the first): it holds whole dimers of whole rows,
// and is the area it writes (lattice.Frame.NearestCellRect).
func (s *Session) snapRect(a, b r2.Point) (lo, hi r2.Point) {
	r := s.surf.Frame(s.terraceFor(a, b)).NearestCellRect(a, b)
	return r.Lo(), r.Hi()
}

// terraceFor returns the terrace under a, else under b, else the first.
func (s *Session) terraceFor(a, b r2.Point) int {
	ti := s.surf.TerraceAt(a)
	if ti < 0 {
		ti = max(s.surf.TerraceAt(b), 0)
	}
	return ti
}

// snapToFieldEdge returns p for a terrace outline: on the field's border
// when it lies within near nm of it or beyond it (so an outline drawn to
// the edge leaves no strip of the old terrace along it), rounded to
// 0.01 nm.
func (s *Session) snapToFieldEdge(p r2.Point, near float64) r2.Point {
	f := s.surf.Field
	snap := func(v, lo, hi float64) float64 {
		switch {
		case v <= lo+near:
			return lo
		case v >= hi-near:
			return hi
		}
		return round2(v)
	}
	return r2.Point{X: snap(p.X, f.X.Lo, f.X.Hi), Y: snap(p.Y, f.Y.Lo, f.Y.Hi)}
}

// terraceUnder returns the terrace under p, looking a hair inside the
// field for a point on its border, or -1.
func (s *Session) terraceUnder(p r2.Point) int {
	if t := s.surf.TerraceAt(p); t >= 0 {
		return t
	}
	const hair = 0.01 // nm
	f := s.surf.Field
	q := r2.Point{X: min(max(p.X, f.X.Lo+hair), f.X.Hi-hair), Y: min(max(p.Y, f.Y.Lo+hair), f.Y.Hi-hair)}
	return s.surf.TerraceAt(q)
}

// Preview returns the shape the current tool is drawing, or the brush
// outline under the pointer, or nil.
func (s *Session) Preview() *render.Preview {
	g := s.gesture
	if g != nil {
		switch {
		case g.tool == ToolRect && g.pressed:
			a, b := s.snapRect(g.start, g.last)
			return &render.Preview{Points: []r2.Point{a, b}, Rect: true}
		case g.tool == ToolSelect && g.pressed && g.dragged && g.moving:
			return s.movePreview(g.last.Sub(g.start))
		case g.tool == ToolSelect && g.pressed && g.dragged:
			return &render.Preview{Points: []r2.Point{g.start, g.last}, Rect: true}
		case g.tool == ToolLine && g.pressed && g.dragged:
			return &render.Preview{Points: []r2.Point{g.start, g.last}, WidthNM: s.Opts.LineWidthNM}
		case len(g.points) > 0:
			p := &render.Preview{Points: append([]r2.Point(nil), g.points...)}
			if s.hoverAt.ok {
				q := s.snapDimerCentre(s.hoverAt.at)
				if g.tool == ToolTerrace {
					q = s.snapToFieldEdge(s.hoverAt.at, s.near)
				}
				p.Points = append(p.Points, q)
			}
			p.Closed = g.tool != ToolLine && len(p.Points) >= 3
			if g.tool == ToolLine {
				p.WidthNM = s.Opts.LineWidthNM
			}
			return p
		}
	}
	switch s.Tool {
	case ToolSite, ToolDimer, ToolEraser:
		if s.hoverAt.ok && s.Opts.BrushNM > 0 {
			return &render.Preview{Points: []r2.Point{s.hoverAt.at}, BrushNM: s.Opts.BrushNM}
		}
	case ToolArray:
		if s.hoverAt.ok {
			return s.arrayPreview(s.hoverAt.at)
		}
	}
	return nil
}

// maxPreviewCells bounds the elements an array preview fills; a larger
// array shows its extent alone.
const maxPreviewCells = 4096

// arrayPreview is what a click of the Array tool at p would place: the
// extent of the array and, up to maxPreviewCells, each element's cells
// (whole dimers of one row, or one site's half of a dimer), snapped as
// the click snaps them.
func (s *Session) arrayPreview(p r2.Point) *render.Preview {
	o := s.Opts
	at := s.snapDimerCentre(p)
	if o.ArrayOf == "site" {
		at = s.snapSite(p)
	}
	t := s.surf.TerraceAt(at)
	if t < 0 {
		return nil
	}
	f := s.surf.Frame(t)
	a0, c0 := f.ToLocal(at)
	halfAlong, halfAcross := lattice.DimerPitch/2, lattice.RowSpacing/2
	if o.ArrayOf == "window" {
		if tpl, ok := TemplateOf(s.d, o.Template); ok {
			halfAlong = float64(tpl.Dimers) * lattice.DimerPitch / 2
		}
	}
	if o.ArrayOf == "site" {
		halfAcross = lattice.RowSpacing / 4
	}
	cell := func(i, j int) r2.Rect {
		a := a0 + float64(i*o.ArrayPitchDimers)*lattice.DimerPitch
		c := c0 + float64(j*o.ArrayPitchRows)*lattice.RowSpacing
		return f.FieldRect(r1.Interval{Lo: a - halfAlong, Hi: a + halfAlong}, r1.Interval{Lo: c - halfAcross, Hi: c + halfAcross})
	}
	ext := cell(0, 0).Union(cell(o.ArrayCols-1, o.ArrayRows-1))
	pv := &render.Preview{Points: []r2.Point{ext.Lo(), ext.Hi()}, Rect: true}
	if o.ArrayCols*o.ArrayRows <= maxPreviewCells {
		for j := range o.ArrayRows {
			for i := range o.ArrayCols {
				pv.Cells = append(pv.Cells, cell(i, j))
			}
		}
	}
	return pv
}
