package editor

import (
	"fmt"
	"slices"
	"strings"

	"dimerpath/lattice/design"
)

// VariantIndex returns the index of the variant shown.
func (s *Session) VariantIndex() int { return s.variant }

// Variant returns the variant shown (read only).
func (s *Session) Variant() *design.Variant { return &s.d.Variants[s.variant] }

// VariantNames returns the names of all variants in order.
func (s *Session) VariantNames() []string {
	out := make([]string, len(s.d.Variants))
	for i, v := range s.d.Variants {
		out[i] = v.Name
	}
	return out
}

// SetVariant shows variant i. It is not an edit: nothing to undo.
func (s *Session) SetVariant(i int) {
	if i < 0 || i >= len(s.d.Variants) || i == s.variant {
		return
	}
	s.cancelGesture()
	s.variant = i
	s.sel = nil
	s.shapeSel = nil
	s.chosen = -1
	s.ensureCaches()
	s.notify(ChangeVariants | ChangeRegions | ChangeSites | ChangeSelection | ChangePlan | ChangeFindings)
}

func (s *Session) uniqueVariantName(base string) string {
	return uniqueName(base, s.d.Variants, func(v design.Variant) string { return v.Name })
}

// uniqueName returns base, or base with a number ("base 2", "base 3",
// ...), whichever first is the name of none of items.
func uniqueName[T any](base string, items []T, name func(T) string) string {
	used := make(map[string]bool, len(items))
	for _, it := range items {
		used[name(it)] = true
	}
	if !used[base] {
		return base
	}
	for k := 2; ; k++ {
		if n := fmt.Sprintf("%s %d", base, k); !used[n] {
			return n
		}
	}
}

// DuplicateVariant copies variant i, shows the copy and returns its
// index.
func (s *Session) DuplicateVariant(i int) int {
	if i < 0 || i >= len(s.d.Variants) {
		return -1
	}
	c := cloneVariant(s.d.Variants[i])
	c.Name = s.uniqueVariantName(c.Name + " copy")
	s.d.Variants = slices.Insert(s.d.Variants, i+1, c)
	// The copy's regions share ids, and so caches, with the original
	// until either is edited.
	s.ids = slices.Insert(s.ids, i+1, append([]regionID(nil), s.ids[i]...))
	s.variant = i + 1
	s.sel = nil
	s.shapeSel = nil
	s.commit("duplicate variant "+s.d.Variants[i].Name, "", ChangeAll)
	return i + 1
}

// RenameVariant renames variant i; the design's rules refuse an empty
// name or one another variant has.
func (s *Session) RenameVariant(i int, name string) error {
	if err := s.renameVariant(i, name); err != nil {
		return err
	}
	s.commit("rename variant", fmt.Sprintf("rename-variant-%d", i), ChangeVariants)
	return nil
}

// CheckVariantName returns what RenameVariant(i, name) would refuse,
// without renaming anything.
func (s *Session) CheckVariantName(i int, name string) error {
	old := ""
	if i >= 0 && i < len(s.d.Variants) {
		old = s.d.Variants[i].Name
	}
	err := s.renameVariant(i, name)
	if err == nil && old != "" {
		s.d.Variants[i].Name = old
	}
	return err
}

// renameVariant renames variant i if the design's rules accept it,
// without committing.
func (s *Session) renameVariant(i int, name string) error {
	if i < 0 || i >= len(s.d.Variants) {
		return fmt.Errorf("no variant %d", i)
	}
	name = strings.TrimSpace(name)
	old := s.d.Variants[i].Name
	if name == old {
		return nil
	}
	return s.validEdit(fmt.Sprintf("rename variant %q to %q", old, name), func() func() {
		s.d.Variants[i].Name = name
		return func() { s.d.Variants[i].Name = old }
	})
}

// DeleteVariant removes variant i; the design's rules refuse to delete
// the last one.
func (s *Session) DeleteVariant(i int) error {
	if i < 0 || i >= len(s.d.Variants) {
		return fmt.Errorf("no variant %d", i)
	}
	name := s.d.Variants[i].Name
	err := s.validEdit("delete variant "+name, func() func() {
		vs := s.d.Variants
		s.d.Variants = slices.Delete(slices.Clone(vs), i, i+1)
		return func() { s.d.Variants = vs }
	})
	if err != nil {
		return err
	}
	s.ids = slices.Delete(s.ids, i, i+1)
	if s.variant >= len(s.d.Variants) || s.variant > i {
		s.variant = max(s.variant-1, 0)
	}
	s.sel = nil
	s.shapeSel = nil
	s.ensureCaches()
	s.commit("delete variant "+name, "", ChangeAll)
	return nil
}
