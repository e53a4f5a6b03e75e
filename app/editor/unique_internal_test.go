package editor

import "testing"

func TestUniqueName(t *testing.T) {
	id := func(s string) string { return s }
	for _, tc := range []struct {
		name  string
		base  string
		taken []string
		want  string
	}{
		{"free", "pad", []string{"lead"}, "pad"},
		{"taken once", "pad", []string{"pad"}, "pad 2"},
		{"gap in the numbers", "pad", []string{"pad", "pad 2", "pad 4"}, "pad 3"},
		{"none yet", "layout", nil, "layout"},
	} {
		t.Run(tc.name, func(t *testing.T) {
			if got := uniqueName(tc.base, tc.taken, id); got != tc.want {
				t.Errorf("uniqueName(%q, %q) = %q, want %q", tc.base, tc.taken, got, tc.want)
			}
		})
	}
}
