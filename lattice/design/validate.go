package design

import (
	"fmt"
	"math"
	"strings"

	"dimerpath/internal/jsonfile"
	"dimerpath/lattice"
)

var knownKinds = []ShapeKind{ShapeSite, ShapeDimer, ShapeRect, ShapePolygon, ShapePolyline, ShapeWindow, ShapeArray}

func finite(v float64) bool { return !math.IsNaN(v) && !math.IsInf(v, 0) }

func listOf[T ~string](vs []T) string {
	s := make([]string, len(vs))
	for i, v := range vs {
		s[i] = string(v)
	}
	return quoteList(s)
}

func contains[T comparable](vs []T, v T) bool {
	for _, x := range vs {
		if x == v {
			return true
		}
	}
	return false
}

// validate adds to ps every problem of the design's meaning: format and
// version, field size, terraces, fiducials, rules, templates, variants,
// regions, shapes and tunnel gaps, and painted sites that do not exist on
// the design's surface.
func (d *Design) validate(ps *problems) {
	switch {
	case d.Format == "":
		ps.add("format", "missing: a design file starts with \"format\": %q", FormatName)
	case d.Format != FormatName:
		ps.add("format", "%q is not a dimerpath design (want %q)", d.Format, FormatName)
	}
	switch {
	case d.Version == 0:
		ps.add("version", "missing: this program writes version %d", FormatVersion)
	case d.Version < 0:
		ps.add("version", "%d is not a version number", d.Version)
	case d.Version > FormatVersion:
		ps.add("version", "%d is newer than this program reads (%d): update dimerpath", d.Version, FormatVersion)
	}
	if d.Name == "" {
		ps.add("name", "missing: give the design a name")
	}
	fieldOK := true
	for _, f := range []struct {
		path string
		v    float64
	}{{"field.width_nm", d.Field.WidthNM}, {"field.height_nm", d.Field.HeightNM}} {
		if !(f.v > 0) || f.v > MaxFieldNM {
			ps.add(f.path, "%g must be more than 0 and at most %g nm", f.v, MaxFieldNM)
			fieldOK = false
		}
	}
	terracesOK := d.validateTerraces(ps)
	for i, f := range d.Fiducials {
		path := fmt.Sprintf("fiducials[%d]", i)
		validateName(ps, path, "fiducials", d.Fiducials, i, func(f Fiducial) string { return f.Name })
		if !finite(f.AtNM[0]) || !finite(f.AtNM[1]) {
			ps.add(path+".at_nm", "%v is not a finite position", f.AtNM)
		} else if fieldOK && (f.AtNM[0] < 0 || f.AtNM[1] < 0 || f.AtNM[0] > d.Field.WidthNM || f.AtNM[1] > d.Field.HeightNM) {
			ps.add(path+".at_nm", "%v lies outside the %g x %g nm field", f.AtNM, d.Field.WidthNM, d.Field.HeightNM)
		}
	}
	d.validateRules(ps)
	for i, t := range d.WindowTemplates {
		path := fmt.Sprintf("templates[%d]", i)
		for _, p := range t.Normalized().Problems() {
			ps.add(path+"."+p.Field, "%v: %s", p.Value, p.Problem)
		}
		for j := range i {
			if d.WindowTemplates[j].Name == t.Name {
				ps.add(path+".name", "%q is also the name of templates[%d]", t.Name, j)
			}
		}
	}
	templates := d.Templates()
	species := map[string]bool{}
	for _, t := range templates {
		species[t.Species] = true
	}
	if d.Dopant != "" && !species[d.Dopant] {
		ps.add("dopant", "%q is the species of no window template", d.Dopant)
	}
	var surf *lattice.Surface
	if fieldOK && terracesOK {
		var err error
		if surf, err = d.Surface(); err != nil {
			ps.add("terraces", "%v", err)
		}
	}
	if len(d.Variants) == 0 {
		ps.add("variants", "missing: a design needs at least one variant")
	}
	if len(d.Variants) > MaxVariants {
		ps.add("variants", "%d variants, more than the limit of %d", len(d.Variants), MaxVariants)
		return
	}
	for i := range d.Variants {
		d.validateVariant(ps, i, templates, species, surf)
	}
	d.validateReferences(ps)
	d.validateSurvey(ps)
}

// MaxReferencePoints bounds the points of all references of a design
// together: an overlay is for orientation, a few layers of a contact
// mask, not a whole chip.
const MaxReferencePoints = 1_000_000

func (d *Design) validateReferences(ps *problems) {
	total := 0
	for i, r := range d.References {
		path := fmt.Sprintf("references[%d]", i)
		validateName(ps, path, "references", d.References, i, func(r Reference) string { return r.Name })
		for k, l := range r.Layers {
			if !validLayerSpec(l) {
				ps.add(fmt.Sprintf("%s.layers[%d]", path, k), "%q is not a GDSII layer: want L or L/D, whole numbers 0 to 32767", l)
			}
		}
		if !finite(r.ChipRotationDeg) {
			ps.add(path+".chip_rotation_deg", "%g is not a finite angle", r.ChipRotationDeg)
		}
		for k, p := range r.PolygonsNM {
			if len(p) < 3 {
				ps.add(fmt.Sprintf("%s.polygons_nm[%d]", path, k), "has %d points; a polygon needs 3 or more", len(p))
			}
			total += len(p)
		}
		if total > MaxReferencePoints {
			ps.add(path+".polygons_nm", "the references hold more than %d points, the limit: import fewer layers, or import them as a region", MaxReferencePoints)
			return
		}
	}
}

// validLayerSpec reports whether s is "L" or "L/D" with whole numbers
// 0 to 32767.
func validLayerSpec(s string) bool {
	num := func(v string) bool {
		if v == "" || len(v) > 5 {
			return false
		}
		n := 0
		for _, c := range v {
			if c < '0' || c > '9' {
				return false
			}
			n = 10*n + int(c-'0')
		}
		return n <= 32767
	}
	l, dt, has := strings.Cut(s, "/")
	return num(l) && (!has || num(dt))
}

func (d *Design) validateTerraces(ps *problems) bool {
	ok := true
	if len(d.Terraces) > lattice.MaxTerraces {
		ps.add("terraces", "%d terraces, more than the limit of %d", len(d.Terraces), lattice.MaxTerraces)
		return false
	}
	unbounded := -1
	for i, t := range d.Terraces {
		path := fmt.Sprintf("terraces[%d]", i)
		if !validateName(ps, path, "terraces", d.Terraces, i, func(t Terrace) string { return t.Name }) {
			ok = false
		}
		if t.StepFrom != "" {
			found := false
			for j := range i {
				found = found || d.Terraces[j].Name == t.StepFrom
			}
			if !found {
				ps.add(path+".step_from", "%q names no earlier terrace", t.StepFrom)
				ok = false
			}
			if t.Rows != "" {
				if _, err := ParseRows(t.Rows); err != nil {
					ps.add(path+".rows", "%v", err)
					ok = false
				}
			}
			if _, err := ParseStep(t.Step); err != nil {
				ps.add(path+".step", "%v", err)
				ok = false
			}
		} else if t.Step != "" {
			ps.add(path+".step", "%q needs step_from: the terrace it steps from", t.Step)
			ok = false
		} else if _, err := ParseRows(t.Rows); err != nil {
			ps.add(path+".rows", "%v (or give step_from)", err)
			ok = false
		}
		if !finite(t.OffsetNM[0]) || !finite(t.OffsetNM[1]) {
			ps.add(path+".offset_nm", "%v is not finite", t.OffsetNM)
			ok = false
		}
		switch n := len(t.Boundary); {
		case n == 0:
			if unbounded >= 0 {
				ps.add(path+".boundary_nm", "missing, as is that of terraces[%d]: only one terrace may take the rest of the field", unbounded)
				ok = false
			}
			unbounded = i
		case n < 3:
			ps.add(path+".boundary_nm", "has %d points; a polygon needs 3 or more", n)
			ok = false
		case n > MaxPoints:
			ps.add(path+".boundary_nm", "has %d points, more than the limit of %d", n, MaxPoints)
			ok = false
		}
		for k, p := range t.Boundary {
			if !checkPoint(ps, fmt.Sprintf("%s.boundary_nm[%d]", path, k), p) {
				ok = false
			}
		}
	}
	return ok
}

func (d *Design) validateRules(ps *problems) {
	r := d.Rules
	if r == nil {
		return
	}
	nonNeg := func(path string, v *float64) {
		if v != nil && !(*v >= 0 && *v <= MaxFieldNM) {
			ps.add("rules."+path, "%g must be between 0 and %g nm", *v, MaxFieldNM)
		}
	}
	positive := func(path string, v *float64) {
		if v != nil && !(*v > 0 && *v <= MaxFieldNM) {
			ps.add("rules."+path, "%g must be more than 0 and at most %g nm", *v, MaxFieldNM)
		}
	}
	if r.ScanFieldNM != nil {
		for k, v := range r.ScanFieldNM {
			if !(v > 0 && v <= MaxFieldNM) {
				ps.add(fmt.Sprintf("rules.scan_field_nm[%d]", k), "%g must be more than 0 and at most %g nm", v, MaxFieldNM)
			}
		}
	}
	for _, iv := range []struct {
		path string
		v    *int
	}{{"window_gap_dimers", r.WindowGapDimers}, {"window_facing_rows", r.WindowFacingRows}} {
		if iv.v != nil && (*iv.v < 0 || *iv.v > 1000) {
			ps.add("rules."+iv.path, "%d must be between 0 and 1000", *iv.v)
		}
	}
	nonNeg("fe_keepout_nm", r.FEKeepOutNM)
	nonNeg("tunnel_gap_min_nm", r.TunnelGapMinNM)
	positive("tunnel_gap_max_nm", r.TunnelGapMaxNM)
	positive("ap_tolerance_nm", r.APToleranceNM)
	positive("fe_tolerance_nm", r.FEToleranceNM)
	positive("lead_tolerance_nm", r.LeadToleranceNM)
	positive("gate_tolerance_nm", r.GateToleranceNM)
	positive("pad_tolerance_nm", r.PadToleranceNM)
	positive("tunnel_gap_tolerance_nm", r.TunnelGapToleranceNM)
	nonNeg("defect_window_clearance_nm", r.DefectWindowClearanceNM)
	nonNeg("defect_clearance_nm", r.DefectClearanceNM)
	if rs := d.EffectiveRules(); rs.TunnelGapMaxNM < rs.TunnelGapMinNM {
		ps.add("rules", "tunnel gap range %g–%g nm is empty: the maximum is below the minimum", rs.TunnelGapMinNM, rs.TunnelGapMaxNM)
	}
}

func (d *Design) validateVariant(ps *problems, vi int, templates Templates, species map[string]bool, surf *lattice.Surface) {
	v := &d.Variants[vi]
	path := fmt.Sprintf("variants[%d]", vi)
	validateName(ps, path, "variants", d.Variants, vi, func(v Variant) string { return v.Name })
	if len(v.Regions) > MaxRegions {
		ps.add(path+".regions", "%d regions, more than the limit of %d", len(v.Regions), MaxRegions)
		return
	}
	copies := 0
	names := map[string]int{}
	for ri := range v.Regions {
		r := &v.Regions[ri]
		rp := fmt.Sprintf("%s.regions[%d]", path, ri)
		if r.Name == "" {
			ps.add(rp+".name", "missing")
		} else if j, dup := names[r.Name]; dup {
			ps.add(rp+".name", "%q is also the name of regions[%d]", r.Name, j)
		} else {
			names[r.Name] = ri
		}
		if !contains(Roles, r.Role) {
			ps.add(rp+".role", "%q is not a role (%s)", r.Role, listOf(Roles))
		}
		if r.Mode != "" && !contains(Modes, r.Mode) {
			ps.add(rp+".mode", "%q is not a write mode (%s)", r.Mode, listOf(Modes))
		}
		if r.Species != "" && r.Species != NoDopant && !species[r.Species] {
			ps.add(rp+".species", "%q is the species of no window template (or %q for a region without dopant)", r.Species, NoDopant)
		}
		if r.LithographyStep != "" {
			switch {
			case r.Species != NoDopant:
				ps.add(rp+".lithography_step", "%q: only a region without dopant (species %q) names its step; the others are written in their dopant's", r.LithographyStep, NoDopant)
			case !species[r.LithographyStep]:
				ps.add(rp+".lithography_step", "%q is the species of no window template, so no process step takes it", r.LithographyStep)
			}
		}
		if r.Colour != "" && !IsColour(r.Colour) {
			ps.add(rp+".colour", "%q is not a colour: write #rrggbb in hexadecimal, e.g. #e64980", r.Colour)
		}
		if !(r.ToleranceNM >= 0 && r.ToleranceNM <= MaxFieldNM) {
			ps.add(rp+".tolerance_nm", "%g must be between 0 (the mode's default) and %g nm", r.ToleranceNM, MaxFieldNM)
		}
		if len(r.Shapes) > MaxShapes {
			ps.add(rp+".shapes", "%d shapes, more than the limit of %d", len(r.Shapes), MaxShapes)
			continue
		}
		for si := range r.Shapes {
			copies += validateShape(ps, fmt.Sprintf("%s.shapes[%d]", rp, si), &r.Shapes[si], r, templates, false)
		}
		if surf != nil {
			for _, set := range []struct {
				name string
				s    *lattice.SiteSet
			}{{"painted", r.Painted}, {"erased", r.Erased}} {
				if set.s == nil {
					continue
				}
				if missing := surf.Missing(set.s); !missing.IsEmpty() {
					ps.add(rp+"."+set.name, "%s", describeMissing(missing))
				}
			}
		}
	}
	if copies > MaxArrayCopies {
		ps.add(path, "its arrays hold %d copies together, more than the limit of %d", copies, MaxArrayCopies)
	}
	declared := make(map[[2]string]int, len(v.TunnelGaps)) // a gap's regions, in name order
	for gi, g := range v.TunnelGaps {
		gp := fmt.Sprintf("%s.tunnel_gaps[%d]", path, gi)
		validatePair(ps, declared, regionPair{path: gp, list: "tunnel_gaps", index: gi, a: g.A, b: g.B, noun: "gap", of: "between"}, names, v.Name)
		if !(g.MinNM >= 0 && g.MinNM <= MaxFieldNM) {
			ps.add(gp+".min_nm", "%g must be between 0 (the rule's) and %g nm", g.MinNM, MaxFieldNM)
		}
		if !(g.MaxNM >= 0 && g.MaxNM <= MaxFieldNM) {
			ps.add(gp+".max_nm", "%g must be between 0 (the rule's) and %g nm", g.MaxNM, MaxFieldNM)
		}
		if g.MinNM > 0 && g.MaxNM > 0 && g.MaxNM < g.MinNM {
			ps.add(gp, "range %g–%g nm is empty", g.MinNM, g.MaxNM)
		}
		if !(g.ToleranceNM >= 0 && g.ToleranceNM <= MaxFieldNM) {
			ps.add(gp+".tolerance_nm", "%g must be between 0 (the rule's) and %g nm", g.ToleranceNM, MaxFieldNM)
		}
	}
	coupled := make(map[[2]string]int, len(v.Couplings))
	for ci, c := range v.Couplings {
		cp := fmt.Sprintf("%s.couplings[%d]", path, ci)
		validatePair(ps, coupled, regionPair{path: cp, list: "couplings", index: ci, a: c.A, b: c.B, noun: "coupling", of: "of"}, names, v.Name)
		if !(c.ToleranceNM > 0 && c.ToleranceNM <= MaxFieldNM) {
			ps.add(cp+".tolerance_nm", "%g must be more than 0 and at most %g nm", c.ToleranceNM, MaxFieldNM)
		}
	}
}

// validateName adds the problems of the name of items[i], at path in
// the list named list: missing, or the name of an earlier entry (each
// one named). It reports whether the name is good.
func validateName[T any](ps *problems, path, list string, items []T, i int, name func(T) string) bool {
	n := name(items[i])
	ok := n != ""
	if !ok {
		ps.add(path+".name", "missing")
	}
	for j := range i {
		if n != "" && name(items[j]) == n {
			ps.add(path+".name", "%q is also the name of %s[%d]", n, list, j)
			ok = false
		}
	}
	return ok
}

// regionPair is one of a variant's pairs of regions, a tunnel gap or a
// coupling: its path, its list's field and index, its two ends, and the
// words that name it in messages ("gap" "between", "coupling" "of").
type regionPair struct {
	path, list string
	index      int
	a, b       string
	noun, of   string
}

// validatePair adds the problems of a pair of regions: declared twice
// (seen holds the pairs so far, ends in name order, with their index), an
// end that names no region of the variant, or the same region twice.
func validatePair(ps *problems, seen map[[2]string]int, p regionPair, names map[string]int, variant string) {
	key := [2]string{min(p.a, p.b), max(p.a, p.b)}
	if j, dup := seen[key]; dup {
		ps.add(p.path, "the %s %s %q and %q is also declared as %s[%d]", p.noun, p.of, p.a, p.b, p.list, j)
	} else {
		seen[key] = p.index
	}
	for _, end := range []struct{ field, name string }{{"a", p.a}, {"b", p.b}} {
		if _, ok := names[end.name]; !ok {
			ps.add(p.path+"."+end.field, "%q names no region of variant %q", end.name, variant)
		}
	}
	if p.a == p.b && p.a != "" {
		ps.add(p.path, "a %s needs two different regions, not %q twice", p.noun, p.a)
	}
}

// validateShape adds the shape's problems and returns the number of
// array copies it holds.
func validateShape(ps *problems, path string, sh *Shape, r *Region, templates Templates, inArray bool) int {
	if !contains(knownKinds, sh.Kind) {
		ps.add(path+".kind", "%q is not a shape kind (%s)", sh.Kind, listOf(knownKinds))
		return 0
	}
	n := len(sh.Points)
	switch sh.Kind {
	case ShapeSite, ShapeDimer, ShapeWindow:
		if n != 1 {
			ps.add(path+".points_nm", "a %s takes exactly one point, has %d", sh.Kind, n)
		}
	case ShapeRect:
		if n != 2 {
			ps.add(path+".points_nm", "a rect takes two opposite corners, has %d points", n)
		}
	case ShapePolygon:
		if n < 3 {
			ps.add(path+".points_nm", "a polygon needs 3 or more points, has %d", n)
		}
	case ShapePolyline:
		if n < 2 {
			ps.add(path+".points_nm", "a polyline needs 2 or more points, has %d", n)
		}
	case ShapeArray:
		if n != 0 {
			ps.add(path+".points_nm", "an array takes no points (its \"of\" shape has the first copy's)")
		}
	}
	if n > MaxPoints {
		ps.add(path+".points_nm", "has %d points, more than the limit of %d", n, MaxPoints)
	}
	for k, p := range sh.Points {
		checkPoint(ps, fmt.Sprintf("%s.points_nm[%d]", path, k), p)
	}
	if sh.Kind == ShapePolyline {
		if !(sh.WidthNM > 0 && sh.WidthNM <= MaxFieldNM) {
			ps.add(path+".width_nm", "%g must be more than 0 and at most %g nm", sh.WidthNM, MaxFieldNM)
		}
	} else if sh.WidthNM != 0 {
		ps.add(path+".width_nm", "only polylines have a width")
	}
	if sh.Kind == ShapeWindow {
		t, ok := templates[sh.Template]
		switch {
		case sh.Template == "":
			ps.add(path+".template", "missing: a window names its template (%s)", quoteList(templates.Names()))
		case !ok:
			ps.add(path+".template", "%q is not a template (%s)", sh.Template, quoteList(templates.Names()))
		case r.Species != "" && t.Species != r.Species:
			ps.add(path+".template", "template %q is for %s, but region %q is for %s", sh.Template, t.Species, r.Name, r.Species)
		}
	} else if sh.Template != "" {
		ps.add(path+".template", "only windows have a template")
	}
	if sh.Kind != ShapeArray {
		if sh.Array != nil {
			ps.add(path+".array", "only array shapes have an array")
		}
		return 0
	}
	a := sh.Array
	if a == nil {
		ps.add(path+".array", "missing: an array shape needs {\"of\", \"cols\", \"rows\", \"pitch_dimers\", \"pitch_rows\"}")
		return 0
	}
	ap := path + ".array"
	if inArray {
		ps.add(ap, "arrays do not nest")
		return 0
	}
	if a.Of == nil {
		ps.add(ap+".of", "missing: the shape to repeat (a site, dimer or window)")
	} else if a.Of.Kind != ShapeSite && a.Of.Kind != ShapeDimer && a.Of.Kind != ShapeWindow {
		ps.add(ap+".of.kind", "%q cannot be arrayed: arrays repeat a site, dimer or window", a.Of.Kind)
	} else {
		validateShape(ps, ap+".of", a.Of, r, templates, true)
	}
	if a.Cols < 1 || a.Cols > MaxArrayCopies {
		ps.add(ap+".cols", "%d must be between 1 and %d", a.Cols, MaxArrayCopies)
	}
	if a.Rows < 1 || a.Rows > MaxArrayCopies {
		ps.add(ap+".rows", "%d must be between 1 and %d", a.Rows, MaxArrayCopies)
	}
	if a.PitchDimers < 0 || (a.Cols > 1 && a.PitchDimers < 1) || a.PitchDimers > lattice.MaxRowIndex/2 {
		ps.add(ap+".pitch_dimers", "%d must be at least 1 (with more than one column) and at most %d", a.PitchDimers, lattice.MaxRowIndex/2)
	}
	if a.PitchRows < 0 || (a.Rows > 1 && a.PitchRows < 1) || a.PitchRows > lattice.MaxRows {
		ps.add(ap+".pitch_rows", "%d must be at least 1 (with more than one row) and at most %d", a.PitchRows, lattice.MaxRows)
	}
	if a.Cols >= 1 && a.Rows >= 1 {
		if c := int64(a.Cols) * int64(a.Rows); c > MaxArrayCopies {
			ps.add(ap, "%d x %d = %d copies, more than the limit of %d", a.Cols, a.Rows, c, MaxArrayCopies)
			return MaxArrayCopies + 1
		}
		return a.Cols * a.Rows
	}
	return 0
}

// checkPoint reports whether p is a finite point within reach of the
// largest field (MaxFieldNM from the origin on either axis), recording a
// problem at path if not. A coordinate beyond that (a rectangle to 1e19
// nm) lays out as nothing on the lattice, so it is a typo to report,
// not a shape to drop silently.
func checkPoint(ps *problems, path string, p [2]float64) bool {
	switch {
	case !finite(p[0]) || !finite(p[1]):
		ps.add(path, "%s is not a finite point", jsonfile.Quote(p))
	case math.Abs(p[0]) > MaxFieldNM || math.Abs(p[1]) > MaxFieldNM:
		ps.add(path, "%s lies beyond ±%g nm, farther out than the largest field reaches", jsonfile.Quote(p), MaxFieldNM)
	default:
		return true
	}
	return false
}

// IsColour reports whether s is a colour as design files write them:
// "#" and six hexadecimal digits (red, green, blue).
func IsColour(s string) bool {
	if len(s) != 7 || s[0] != '#' {
		return false
	}
	for _, c := range s[1:] {
		if !(c >= '0' && c <= '9' || c >= 'a' && c <= 'f' || c >= 'A' && c <= 'F') {
			return false
		}
	}
	return true
}
