package design

import (
	"fmt"
	"slices"
	"strings"

	"github.com/golang/geo/r2"

	"dimerpath/lattice"
)

// Defaults of the design rules, used where a design's Rules leave a
// setting out.
const (
	// DefaultScanFieldNM is the side of the square the instrument scans
	// without a coarse move: 2 µm, at the low end of room-temperature
	// STM scan ranges (1–10 µm, from memory; ±1 µm for a 4 mm tube at
	// ±200 V, Aarhus STM).
	DefaultScanFieldNM = 2000.0
	// DefaultWindowGapDimers: at least one intact dimer between windows
	// on a row (common practice).
	DefaultWindowGapDimers = 1
	// DefaultWindowFacingRows: no window in the facing segment of the
	// next row on either side (common practice).
	DefaultWindowFacingRows = 1
	// DefaultFEKeepOutNM is the least gap between field-emission regions
	// and atomic-precision features (common practice; the FE spot is
	// ~40 nm and its electrical definition ~10 nm, Rudolph et al., APL
	// 2014).
	DefaultFEKeepOutNM = 5.0
	// DefaultTunnelGapMinNM and DefaultTunnelGapMaxNM bound SET tunnel
	// gaps: 7 to 16 intact dimer rows (5.4–12.3 nm), Wang et al.,
	// Commun. Phys. 3, 82 (2020).
	DefaultTunnelGapMinNM = 7 * lattice.RowSpacing
	DefaultTunnelGapMaxNM = 16 * lattice.RowSpacing
	// DefaultAPToleranceNM is the placement tolerance of atomic-precision
	// work, ±0.2 nm: about half a dimer pitch, so that a window lands on
	// the dimer meant (common practice; Fuechsle et al., Nat.
	// Nanotechnol. 7, 242 (2012) place to ±1 lattice site).
	DefaultAPToleranceNM = 0.2
	// DefaultFEToleranceNM is the placement tolerance of field-emission
	// work, ±2 nm (common practice; FE lines are 3–10 nm wide, from
	// memory).
	DefaultFEToleranceNM = 2.0
)

// RuleSettings are the design-rule settings with every default filled
// in; see Rules for what each means. All lengths are in nm.
type RuleSettings struct {
	ScanFieldNM      [2]float64
	WindowGapDimers  int
	WindowFacingRows int
	FEKeepOutNM      float64
	TunnelGapMinNM   float64
	TunnelGapMaxNM   float64
	APToleranceNM    float64
	FEToleranceNM    float64
}

// DefaultRules returns the rule settings of a design without Rules.
func DefaultRules() RuleSettings {
	return RuleSettings{
		ScanFieldNM:      [2]float64{DefaultScanFieldNM, DefaultScanFieldNM},
		WindowGapDimers:  DefaultWindowGapDimers,
		WindowFacingRows: DefaultWindowFacingRows,
		FEKeepOutNM:      DefaultFEKeepOutNM,
		TunnelGapMinNM:   DefaultTunnelGapMinNM,
		TunnelGapMaxNM:   DefaultTunnelGapMaxNM,
		APToleranceNM:    DefaultAPToleranceNM,
		FEToleranceNM:    DefaultFEToleranceNM,
	}
}

// EffectiveRules returns the design's rule settings: its Rules over
// DefaultRules.
func (d *Design) EffectiveRules() RuleSettings {
	rs := DefaultRules()
	r := d.Rules
	if r == nil {
		return rs
	}
	set := func(dst *float64, src *float64) {
		if src != nil {
			*dst = *src
		}
	}
	if r.ScanFieldNM != nil {
		rs.ScanFieldNM = *r.ScanFieldNM
	}
	if r.WindowGapDimers != nil {
		rs.WindowGapDimers = *r.WindowGapDimers
	}
	if r.WindowFacingRows != nil {
		rs.WindowFacingRows = *r.WindowFacingRows
	}
	set(&rs.FEKeepOutNM, r.FEKeepOutNM)
	set(&rs.TunnelGapMinNM, r.TunnelGapMinNM)
	set(&rs.TunnelGapMaxNM, r.TunnelGapMaxNM)
	set(&rs.APToleranceNM, r.APToleranceNM)
	set(&rs.FEToleranceNM, r.FEToleranceNM)
	return rs
}

// DefaultTolerance returns the placement tolerance (±nm) of a region in
// mode m that gives none: FEToleranceNM for ModeFE, APToleranceNM for
// every other mode (auto and hybrid keep the tighter AP value, since
// their edges may be written atom by atom).
func (rs RuleSettings) DefaultTolerance(m Mode) float64 {
	if m == ModeFE {
		return rs.FEToleranceNM
	}
	return rs.APToleranceNM
}

// Tolerance returns the region's placement tolerance (±nm): its own
// ToleranceNM, or the default for its mode.
func (r *Region) Tolerance(rs RuleSettings) float64 {
	if r.ToleranceNM > 0 {
		return r.ToleranceNM
	}
	return rs.DefaultTolerance(r.EffectiveMode())
}

// EffectiveMode returns the region's mode, ModeAuto when none is given.
func (r *Region) EffectiveMode() Mode {
	if r.Mode == "" {
		return ModeAuto
	}
	return r.Mode
}

// Templates maps template names to dopant-window templates.
type Templates map[string]lattice.WindowTemplate

// Names returns the template names in sorted order.
func (t Templates) Names() []string {
	names := make([]string, 0, len(t))
	for n := range t {
		names = append(names, n)
	}
	slices.Sort(names)
	return names
}

// Templates returns the design's window templates: the built-in P and As
// templates (lattice.BuiltinTemplates) with the design's own templates
// over them, so a design may edit a built-in's probability by giving a
// template of the same name.
func (d *Design) Templates() Templates {
	t := Templates{}
	for _, w := range lattice.BuiltinTemplates() {
		t[w.Name] = w
	}
	for _, w := range d.WindowTemplates {
		t[w.Name] = w
	}
	return t
}

// ParseRows parses a row direction as written in design files, "x" or
// "y".
func ParseRows(s string) (lattice.RowDirection, error) {
	switch s {
	case "x":
		return lattice.RowsAlongX, nil
	case "y":
		return lattice.RowsAlongY, nil
	}
	return 0, fmt.Errorf("row direction %q is not \"x\" or \"y\"", s)
}

// Surface returns the lattice of the design's field and terraces. A
// terrace with StepFrom takes its rows and lattice offset from the named
// earlier terrace across one single-height step. A design without
// terraces is one terrace with rows along x. It fails for a design that
// Validate would refuse.
func (d *Design) Surface() (*lattice.Surface, error) {
	terraces := make([]lattice.Terrace, len(d.Terraces))
	for i, t := range d.Terraces {
		lt := lattice.Terrace{Name: t.Name}
		if t.StepFrom != "" {
			j := slices.IndexFunc(d.Terraces[:i], func(o Terrace) bool { return o.Name == t.StepFrom })
			if j < 0 {
				return nil, fmt.Errorf("design: terraces[%d] %q: step_from %q names no earlier terrace", i, t.Name, t.StepFrom)
			}
			lt = terraces[j].AcrossStep()
			lt.Name = t.Name
			lt.Offset = lt.Offset.Add(point(t.OffsetNM))
			if t.Rows != "" && t.Rows != lt.Rows.String() {
				return nil, fmt.Errorf("design: terraces[%d] %q: rows %q disagrees with the step from %q, whose rows turn to %q", i, t.Name, t.Rows, t.StepFrom, lt.Rows)
			}
		} else {
			rows, err := ParseRows(t.Rows)
			if err != nil {
				return nil, fmt.Errorf("design: terraces[%d] %q: %v", i, t.Name, err)
			}
			lt.Rows = rows
			lt.Offset = point(t.OffsetNM)
		}
		lt.Boundary = points(t.Boundary)
		terraces[i] = lt
	}
	surf, err := lattice.NewSurface(d.Field.WidthNM, d.Field.HeightNM, terraces...)
	if err != nil {
		return nil, fmt.Errorf("design: %w", err)
	}
	return surf, nil
}

// Variant returns the variant with the given name; the empty name means
// the first variant. An unknown name gives an error listing the known
// ones.
func (d *Design) Variant(name string) (*Variant, error) {
	if len(d.Variants) == 0 {
		return nil, fmt.Errorf("design %q has no variants", d.Name)
	}
	if name == "" {
		return &d.Variants[0], nil
	}
	for i := range d.Variants {
		if d.Variants[i].Name == name {
			return &d.Variants[i], nil
		}
	}
	return nil, fmt.Errorf("design %q has no variant %q (it has %s)", d.Name, name, quoteList(d.VariantNames()))
}

// VariantNames returns the names of the variants in file order.
func (d *Design) VariantNames() []string {
	names := make([]string, len(d.Variants))
	for i, v := range d.Variants {
		names[i] = v.Name
	}
	return names
}

// Region returns the region of the variant with the given name, or nil.
func (v *Variant) Region(name string) *Region {
	for i := range v.Regions {
		if v.Regions[i].Name == name {
			return &v.Regions[i]
		}
	}
	return nil
}

func quoteList(names []string) string {
	q := make([]string, len(names))
	for i, n := range names {
		q[i] = fmt.Sprintf("%q", n)
	}
	return strings.Join(q, ", ")
}

func point(p [2]float64) r2.Point { return r2.Point{X: p[0], Y: p[1]} }

func points(ps [][2]float64) []r2.Point {
	if len(ps) == 0 {
		return nil
	}
	out := make([]r2.Point, len(ps))
	for i, p := range ps {
		out[i] = point(p)
	}
	return out
}

// Sites returns the region's H sites on surf: the union of its shapes
// (windows from templates) and its painted sites, minus its erased
// sites. Parts of shapes outside the field or off the terraces hold no
// sites (Check reports them). It fails when a shape names an unknown
// template or has too few points, or when painted sites do not exist on
// surf; the error names the shape or field. Complexity: O(lattice lines
// crossed + words), independent of the number of sites.
func (r *Region) Sites(surf *lattice.Surface, templates Templates) (*lattice.SiteSet, error) {
	set := lattice.NewSiteSet()
	for i := range r.Shapes {
		if err := addShape(set, surf, templates, &r.Shapes[i]); err != nil {
			return nil, fmt.Errorf("region %q: shapes[%d]: %w", r.Name, i, err)
		}
	}
	if r.Painted != nil {
		if missing := surf.Missing(r.Painted); !missing.IsEmpty() {
			return nil, fmt.Errorf("region %q: painted: %s", r.Name, describeMissing(missing))
		}
		set.Union(r.Painted)
	}
	if r.Erased != nil {
		set.Difference(r.Erased)
	}
	return set, nil
}

// describeMissing says how many sites of a set do not exist and where the
// first is.
func describeMissing(missing *lattice.SiteSet) string {
	n := missing.Count()
	var first lattice.Site
	for s := range missing.All() {
		first = s
		break
	}
	return fmt.Sprintf("%d sites do not exist on the surface (outside the field or on another terrace), the first %v", n, first)
}

// Windows returns every dopant window the region places, in shape order,
// including each copy of an array of windows (row by row). Windows are
// returned as placed even where they reach beyond their terrace (Check
// reports those); a window whose centre is off every terrace is left
// out. The error cases are those of Sites.
func (r *Region) Windows(surf *lattice.Surface, templates Templates) ([]lattice.Window, error) {
	var out []lattice.Window
	for i := range r.Shapes {
		sh := &r.Shapes[i]
		var err error
		out, err = appendWindows(out, surf, templates, sh)
		if err != nil {
			return nil, fmt.Errorf("region %q: shapes[%d]: %w", r.Name, i, err)
		}
	}
	return out, nil
}

func appendWindows(out []lattice.Window, surf *lattice.Surface, templates Templates, sh *Shape) ([]lattice.Window, error) {
	switch sh.Kind {
	case ShapeWindow:
		w, ok, err := placeWindow(surf, templates, sh)
		if err != nil || !ok {
			return out, err
		}
		return append(out, w), nil
	case ShapeArray:
		if sh.Array == nil || sh.Array.Of == nil {
			return out, fmt.Errorf("array: missing \"of\"")
		}
		if sh.Array.Of.Kind != ShapeWindow {
			return out, nil
		}
		w, ok, err := placeWindow(surf, templates, sh.Array.Of)
		if err != nil || !ok {
			return out, err
		}
		a := sh.Array
		// One allocation for the whole array: growing a 10^6-window list
		// by doubling cost most of laying such a variant out.
		out = slices.Grow(out, a.Rows*a.Cols)
		for j := 0; j < a.Rows; j++ {
			for i := 0; i < a.Cols; i++ {
				out = append(out, w.Shifted(i*a.PitchDimers, j*a.PitchRows))
			}
		}
	}
	return out, nil
}

func placeWindow(surf *lattice.Surface, templates Templates, sh *Shape) (lattice.Window, bool, error) {
	t, ok := templates[sh.Template]
	if !ok {
		return lattice.Window{}, false, fmt.Errorf("template %q is not defined (known: %s)", sh.Template, quoteList(templates.Names()))
	}
	if len(sh.Points) < 1 {
		return lattice.Window{}, false, fmt.Errorf("window: needs one point, its centre")
	}
	w, ok := surf.PlaceWindow(t, point(sh.Points[0]))
	return w, ok, nil
}

// Area returns the plane figure of a rect, polygon or polyline shape,
// and false for the other kinds (which are placed on the lattice, not
// rasterised).
func (sh *Shape) Area() (lattice.Area, bool) {
	switch sh.Kind {
	case ShapeRect:
		if len(sh.Points) == 2 {
			return lattice.RectFromCorners(point(sh.Points[0]), point(sh.Points[1])), true
		}
	case ShapePolygon:
		if len(sh.Points) >= 3 {
			return lattice.Polygon(points(sh.Points)), true
		}
	case ShapePolyline:
		if len(sh.Points) >= 1 {
			return lattice.Polyline{Points: points(sh.Points), WidthNM: sh.WidthNM}, true
		}
	}
	return nil, false
}

// minPoints is the least number of points each kind of shape needs.
var minPoints = map[ShapeKind]int{
	ShapeSite: 1, ShapeDimer: 1, ShapeRect: 2, ShapePolygon: 3, ShapePolyline: 2, ShapeWindow: 1, ShapeArray: 0,
}

func addShape(set *lattice.SiteSet, surf *lattice.Surface, templates Templates, sh *Shape) error {
	need, known := minPoints[sh.Kind]
	if !known {
		return fmt.Errorf("unknown shape kind %q", sh.Kind)
	}
	if len(sh.Points) < need {
		return fmt.Errorf("%s: needs %d points, has %d", sh.Kind, need, len(sh.Points))
	}
	switch sh.Kind {
	case ShapeSite:
		if site, _, ok := surf.Snap(point(sh.Points[0])); ok {
			surf.PaintSite(set, site)
		}
	case ShapeDimer:
		if t, r, d, ok := surf.SnapDimer(point(sh.Points[0])); ok {
			surf.PaintDimer(set, t, r, d)
		}
	case ShapeRect, ShapePolygon, ShapePolyline:
		a, _ := sh.Area()
		surf.Paint(set, a)
	case ShapeWindow:
		w, ok, err := placeWindow(surf, templates, sh)
		if err != nil {
			return err
		}
		if ok {
			surf.AddWindow(set, w)
		}
	case ShapeArray:
		return addArray(set, surf, templates, sh.Array)
	}
	return nil
}

// addArray paints every copy of an array of sites, dimers or windows.
func addArray(set *lattice.SiteSet, surf *lattice.Surface, templates Templates, a *Array) error {
	if a == nil || a.Of == nil {
		return fmt.Errorf("array: missing \"of\"")
	}
	of := a.Of
	if len(of.Points) < 1 {
		return fmt.Errorf("array: of: %s needs a point", of.Kind)
	}
	p := point(of.Points[0])
	switch of.Kind {
	case ShapeSite, ShapeDimer:
		site, _, ok := surf.Snap(p)
		if !ok {
			return nil
		}
		for j := 0; j < a.Rows; j++ {
			for i := 0; i < a.Cols; i++ {
				c := site
				c.Dimer += i * a.PitchDimers
				c.Row += j * a.PitchRows
				if of.Kind == ShapeSite {
					surf.PaintSite(set, c)
				} else {
					surf.PaintDimer(set, c.Terrace, c.Row, c.Dimer)
				}
			}
		}
	case ShapeWindow:
		w, ok, err := placeWindow(surf, templates, of)
		if err != nil || !ok {
			return err
		}
		for j := 0; j < a.Rows; j++ {
			for i := 0; i < a.Cols; i++ {
				surf.AddWindow(set, w.Shifted(i*a.PitchDimers, j*a.PitchRows))
			}
		}
	default:
		return fmt.Errorf("array: of: kind %q cannot be arrayed (site, dimer or window)", of.Kind)
	}
	return nil
}
