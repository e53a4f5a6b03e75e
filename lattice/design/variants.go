package design

import (
	"fmt"
	"strings"
)

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
