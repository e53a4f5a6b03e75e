package export

import (
	"errors"
	"fmt"
	"slices"
	"strconv"
	"strings"

	"dimerpath/internal/jsonfile"
	"dimerpath/lattice/design"
)

// GDSLayer is a GDSII layer and data type, written "L/D".
type GDSLayer struct {
	Layer, Datatype int16
}

func (l GDSLayer) String() string { return fmt.Sprintf("%d/%d", l.Layer, l.Datatype) }

// ParseGDSLayer reads "L/D" or "L" (data type 0); both numbers are 0 to
// 32767.
func ParseGDSLayer(s string) (GDSLayer, error) {
	ls, ds, hasD := strings.Cut(strings.TrimSpace(s), "/")
	l, err := strconv.ParseInt(ls, 10, 16)
	if err != nil || l < 0 {
		return GDSLayer{}, fmt.Errorf("layer %q: want L or L/D, whole numbers 0 to 32767", jsonfile.Prefix(s, jsonfile.MaxQuote))
	}
	d := int64(0)
	if hasD {
		if d, err = strconv.ParseInt(ds, 10, 16); err != nil || d < 0 {
			return GDSLayer{}, fmt.Errorf("layer %q: want L or L/D, whole numbers 0 to 32767", jsonfile.Prefix(s, jsonfile.MaxQuote))
		}
	}
	return GDSLayer{int16(l), int16(d)}, nil
}

// GDSRoles and GDSModes are the region roles and write modes in the
// order of the default layer table: role i is layer 10+i, mode j data
// type j.
var (
	GDSRoles = []design.Role{design.RoleDevice, design.RoleGate, design.RoleLead, design.RolePad, design.RoleDonor, design.RoleOther}
	GDSModes = []design.Mode{design.ModeAuto, design.ModeAP, design.ModeFE, design.ModeHybrid}
)

// GDSLayers says which GDSII layer each part of a design goes on.
type GDSLayers struct {
	Field     GDSLayer // the design's field (its lattice)
	ScanField GDSLayer // the instrument's scan field (design rules)
	// Terraces: terrace i goes on Terraces.Layer, data type
	// Terraces.Datatype + i.
	Terraces  GDSLayer
	Fiducials GDSLayer // marks and their names
	Windows   GDSLayer // dopant windows
	// Regions maps "role/mode" (as drawn) to a layer.
	Regions map[string]GDSLayer
	// MarkSizeNM is the span of the cross drawn for each fiducial.
	MarkSizeNM float64
}

// DefaultGDSLayers returns the layer table of the README: field 1/0,
// scan field 1/1, terraces 2/i, fiducials 3/0, windows 4/0, regions
// 10+role/mode (device 10, gate 11, lead 12, pad 13, donor 14, other 15;
// auto 0, ap 1, fe 2, hybrid 3), 20 nm marks.
func DefaultGDSLayers() GDSLayers {
	g := GDSLayers{
		Field: GDSLayer{1, 0}, ScanField: GDSLayer{1, 1}, Terraces: GDSLayer{2, 0},
		Fiducials: GDSLayer{3, 0}, Windows: GDSLayer{4, 0},
		Regions: map[string]GDSLayer{}, MarkSizeNM: 20,
	}
	for i, r := range GDSRoles {
		for j, m := range GDSModes {
			g.Regions[string(r)+"/"+string(m)] = GDSLayer{int16(10 + i), int16(j)}
		}
	}
	return g
}

// Region returns the layer of a region by its role and drawn mode.
func (g GDSLayers) Region(r *design.Region) GDSLayer {
	return g.Regions[string(r.Role)+"/"+string(r.EffectiveMode())]
}

// GDSLayerMapFormat names the layer map file (README "GDSII layers").
const GDSLayerMapFormat = "dimerpath-gds-layers"

// gdsLayerFile is the layer map file: every field optional, unknown
// fields refused.
type gdsLayerFile struct {
	Format     string            `json:"format"`
	Version    int               `json:"version"`
	Field      *string           `json:"field,omitempty"`
	ScanField  *string           `json:"scan_field,omitempty"`
	Terraces   *string           `json:"terraces,omitempty"`
	Fiducials  *string           `json:"fiducials,omitempty"`
	Windows    *string           `json:"windows,omitempty"`
	Regions    map[string]string `json:"regions,omitempty"`
	MarkSizeNM *float64          `json:"mark_size_nm,omitempty"`
}

// ErrGDSLayers is wrapped by the *jsonfile.Error of a layer map file
// that cannot be read.
var ErrGDSLayers = errors.New("invalid GDSII layer map")

// maxGDSLayerBytes bounds a layer map file (a few hundred bytes).
const maxGDSLayerBytes = 1 << 20

// ReadGDSLayers reads a layer map file over the default table: each
// field it gives replaces the default; a "regions" key is "role/mode" or
// "role" (every mode of the role). Errors name the file, the field, its
// line and column.
func ReadGDSLayers(path string) (GDSLayers, error) {
	data, err := jsonfile.ReadFile(path, maxGDSLayerBytes, ErrGDSLayers)
	if err != nil {
		return GDSLayers{}, err
	}
	return ParseGDSLayers(path, data)
}

// ParseGDSLayers is ReadGDSLayers on data read from name.
func ParseGDSLayers(name string, data []byte) (GDSLayers, error) {
	g := DefaultGDSLayers()
	var f gdsLayerFile
	var ps jsonfile.Problems
	fail := func() (GDSLayers, error) {
		jsonfile.Locate(data, ps.List())
		return g, ps.Err(name, ErrGDSLayers)
	}
	if !jsonfile.Decode(data, &f, &ps, jsonfile.Options{What: "the layer map", MaxString: 1000, MaxList: 1000, MaxDepth: 4}) || ps.Len() > 0 {
		return fail()
	}
	if f.Format != GDSLayerMapFormat {
		ps.AddValue("format", f.Format, "not a layer map file (want %q)", GDSLayerMapFormat)
		return fail()
	}
	if f.Version != 1 {
		ps.AddValue("version", f.Version, "this dimerpath reads layer map version 1")
		return fail()
	}
	set := func(field string, dst *GDSLayer, src *string) {
		if src == nil {
			return
		}
		l, err := ParseGDSLayer(*src)
		if err != nil {
			ps.AddValue(field, *src, "%v", err)
			return
		}
		*dst = l
	}
	for _, x := range []struct {
		field string
		dst   *GDSLayer
		src   *string
	}{{"field", &g.Field, f.Field}, {"scan_field", &g.ScanField, f.ScanField}, {"terraces", &g.Terraces, f.Terraces},
		{"fiducials", &g.Fiducials, f.Fiducials}, {"windows", &g.Windows, f.Windows}} {
		set(x.field, x.dst, x.src)
	}
	keys := make([]string, 0, len(f.Regions))
	for k := range f.Regions {
		keys = append(keys, k)
	}
	// "role" first, so "role/mode" overrides it; sorted within, so the
	// problems come in one order.
	slices.Sort(keys)
	slices.SortStableFunc(keys, func(a, b string) int { return strings.Count(a, "/") - strings.Count(b, "/") })
	for _, k := range keys {
		path := jsonfile.Key("regions", k)
		role, mode, hasMode := strings.Cut(k, "/")
		if !slices.Contains(GDSRoles, design.Role(role)) {
			ps.Addf(path, "unknown role %q (want one of %s)", jsonfile.Prefix(role, jsonfile.MaxQuote), joinAny(GDSRoles))
			continue
		}
		if hasMode && !slices.Contains(GDSModes, design.Mode(mode)) {
			ps.Addf(path, "unknown mode %q (want one of %s)", jsonfile.Prefix(mode, jsonfile.MaxQuote), joinAny(GDSModes))
			continue
		}
		l, err := ParseGDSLayer(f.Regions[k])
		if err != nil {
			ps.AddValue(path, f.Regions[k], "%v", err)
			continue
		}
		for _, m := range GDSModes {
			if !hasMode || design.Mode(mode) == m {
				g.Regions[role+"/"+string(m)] = l
			}
		}
	}
	if f.MarkSizeNM != nil {
		if v := *f.MarkSizeNM; !(v > 0 && v <= 10000) {
			ps.AddValue("mark_size_nm", v, "want more than 0 and at most 10000 nm")
		} else {
			g.MarkSizeNM = v
		}
	}
	if ps.Len() > 0 {
		return fail()
	}
	return g, nil
}

func joinAny[T ~string](v []T) string {
	s := make([]string, len(v))
	for i, x := range v {
		s[i] = string(x)
	}
	return strings.Join(s, ", ")
}
