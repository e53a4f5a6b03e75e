package design

import (
	"errors"
	"fmt"
	"sort"
	"strconv"
	"strings"
)

// ArrayRef names one array shape of a variant: its region and the
// shape's place among that region's arrays. A sweep over array sizes
// (planner.PlanSweep) uses it to resize one array and leave the rest of
// the design as it is.
type ArrayRef struct {
	Region string
	// Nth counts the region's array shapes from 1, in shape order.
	Nth int
	// Shape is the index of the shape in Region.Shapes.
	Shape int
	// Cols, Rows and Of are the array as the design holds it.
	Cols, Rows int
	Of         ShapeKind
}

// Name returns how the array is named on the command line and in the
// GUI: the region's name, followed by "#N" when it is not the region's
// first array ("donors", "donors#2").
func (a ArrayRef) Name() string {
	if a.Nth <= 1 {
		return a.Region
	}
	return a.Region + "#" + strconv.Itoa(a.Nth)
}

// Arrays lists the array shapes of the named variant (empty: the first)
// in region and shape order.
func (d *Design) Arrays(variant string) ([]ArrayRef, error) {
	v, err := d.Variant(variant)
	if err != nil {
		return nil, err
	}
	var out []ArrayRef
	for _, r := range v.Regions {
		n := 0
		for si, sh := range r.Shapes {
			if sh.Kind != ShapeArray || sh.Array == nil {
				continue
			}
			n++
			ref := ArrayRef{Region: r.Name, Nth: n, Shape: si, Cols: sh.Array.Cols, Rows: sh.Array.Rows}
			if sh.Array.Of != nil {
				ref.Of = sh.Array.Of.Kind
			}
			out = append(out, ref)
		}
	}
	return out, nil
}

// Array returns the array of the variant named as ArrayRef.Name gives
// it ("donors" or "donors#2"); an unknown name gives an error listing
// the arrays there are.
func (d *Design) Array(variant, name string) (ArrayRef, error) {
	refs, err := d.Arrays(variant)
	if err != nil {
		return ArrayRef{}, err
	}
	for _, a := range refs {
		if a.Name() == name {
			return a, nil
		}
	}
	if len(refs) == 0 {
		return ArrayRef{}, fmt.Errorf("variant %q has no array shapes", d.variantName(variant))
	}
	names := make([]string, len(refs))
	for i, a := range refs {
		names[i] = a.Name()
	}
	return ArrayRef{}, fmt.Errorf("variant %q has no array %q (it has %s)", d.variantName(variant), name, quoteList(names))
}

func (d *Design) variantName(variant string) string {
	if v, err := d.Variant(variant); err == nil {
		return v.Name
	}
	return variant
}

// ErrArraySize is wrapped by the errors of WithArraySize and ParseArraySize.
var ErrArraySize = errors.New("array size refused")

// ParseArraySize reads an array size written "COLSxROWS" ("1000x500") or
// "N" (N x N).
func ParseArraySize(s string) (cols, rows int, err error) {
	t := strings.TrimSpace(s)
	c, r, two := strings.Cut(strings.ToLower(t), "x")
	cols, err1 := strconv.Atoi(strings.TrimSpace(c))
	rows, err2 := cols, error(nil)
	if two {
		rows, err2 = strconv.Atoi(strings.TrimSpace(r))
	}
	if err1 != nil || err2 != nil {
		return 0, 0, fmt.Errorf("%w: %q is not an array size (write COLSxROWS, such as 1000x500, or N for N x N)", ErrArraySize, s)
	}
	return cols, rows, nil
}

// WithArraySize returns a copy of d in which the array ref of the named
// variant holds cols x rows copies; d itself is not changed (the copy
// shares every variant, region and shape but the ones on the way to the
// array). It refuses, wrapping ErrArraySize, a size the design file's
// limits refuse (at least one copy, at most MaxArrayCopies in the
// variant) and an array whose corner copies leave the lattice: a copy
// outside the field or off the first copy's terrace, which would silently
// not be written.
func (d *Design) WithArraySize(variant string, ref ArrayRef, cols, rows int) (*Design, error) {
	name := fmt.Sprintf("array %s = %dx%d", ref.Name(), cols, rows)
	if cols < 1 || rows < 1 {
		return nil, fmt.Errorf("%w: %s: an array holds at least 1 x 1 copies", ErrArraySize, name)
	}
	if int64(cols)*int64(rows) > MaxArrayCopies {
		return nil, fmt.Errorf("%w: %s: %d copies, more than the limit of %d copies an array may hold", ErrArraySize, name, int64(cols)*int64(rows), MaxArrayCopies)
	}
	v, err := d.Variant(variant)
	if err != nil {
		return nil, err
	}
	vi := 0
	for i := range d.Variants {
		if &d.Variants[i] == v {
			vi = i
		}
	}
	ri := -1
	for i := range v.Regions {
		if v.Regions[i].Name == ref.Region {
			ri = i
		}
	}
	if ri < 0 || ref.Shape < 0 || ref.Shape >= len(v.Regions[ri].Shapes) || v.Regions[ri].Shapes[ref.Shape].Array == nil {
		return nil, fmt.Errorf("%w: %s: variant %q has no such array", ErrArraySize, name, v.Name)
	}
	out := *d
	out.Variants = append([]Variant(nil), d.Variants...)
	nv := &out.Variants[vi]
	nv.Regions = append([]Region(nil), v.Regions...)
	nr := &nv.Regions[ri]
	nr.Shapes = append([]Shape(nil), nr.Shapes...)
	sh := &nr.Shapes[ref.Shape]
	arr := *sh.Array
	arr.Cols, arr.Rows = cols, rows
	sh.Array = &arr

	total := 0
	for _, r := range nv.Regions {
		for _, s := range r.Shapes {
			if s.Kind == ShapeArray && s.Array != nil {
				total += s.Array.Cols * s.Array.Rows
			}
		}
	}
	if total > MaxArrayCopies {
		return nil, fmt.Errorf("%w: %s: the variant's arrays would hold %d copies together, more than the limit of %d", ErrArraySize, name, total, MaxArrayCopies)
	}
	if err := arrayOnLattice(&out, &arr); err != nil {
		return nil, fmt.Errorf("%w: %s: %v", ErrArraySize, name, err)
	}
	return &out, nil
}

// arrayOnLattice returns an error when a corner copy of the array lies
// off the lattice (outside the field or off the first copy's terrace),
// saying how many columns and rows fit from the first copy.
func arrayOnLattice(d *Design, a *Array) error {
	if a.Of == nil || len(a.Of.Points) < 1 {
		return errors.New(`the array has no "of" shape with a point`)
	}
	surf, err := d.Surface()
	if err != nil {
		return err
	}
	// exists reports whether the copy in column i, row j (from 0) lies
	// on the lattice.
	var exists func(i, j int) bool
	switch a.Of.Kind {
	case ShapeWindow:
		w, ok, err := placeWindow(surf, d.Templates(), a.Of)
		if err != nil {
			return err
		}
		exists = func(i, j int) bool { return ok && surf.WindowExists(w.Shifted(i*a.PitchDimers, j*a.PitchRows)) }
	case ShapeSite, ShapeDimer:
		site, _, ok := surf.Snap(point(a.Of.Points[0]))
		exists = func(i, j int) bool {
			s := site
			s.Dimer += i * a.PitchDimers
			s.Row += j * a.PitchRows
			return ok && surf.Valid(s)
		}
	default:
		return fmt.Errorf("kind %q cannot be arrayed", a.Of.Kind)
	}
	for _, c := range [][2]int{{0, 0}, {a.Cols - 1, 0}, {0, a.Rows - 1}, {a.Cols - 1, a.Rows - 1}} {
		if exists(c[0], c[1]) {
			continue
		}
		msg := fmt.Sprintf("its copy in column %d, row %d lies off the lattice (outside the %g x %g nm field or off the first copy's terrace)",
			c[0]+1, c[1]+1, d.Field.WidthNM, d.Field.HeightNM)
		if exists(0, 0) {
			// The most that fit along each axis from the first copy (the
			// copies along an axis stay on a convex terrace up to a point).
			cols := sort.Search(MaxArrayCopies, func(n int) bool { return !exists(n, 0) })
			rows := sort.Search(MaxArrayCopies, func(n int) bool { return !exists(0, n) })
			msg += fmt.Sprintf("; from the first copy at most %d columns and %d rows fit", cols, rows)
		}
		return errors.New(msg)
	}
	return nil
}
