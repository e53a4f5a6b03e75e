package units

import "testing"

func TestRanges(t *testing.T) {
	tests := []struct {
		nums []int
		max  int
		want string
	}{
		{nil, 0, ""},
		{[]int{5}, 0, "5"},
		{[]int{3, 2, 4, 9}, 0, "2 to 4, 9"},
		{[]int{1, 1, 2}, 0, "1 to 2"},
		{[]int{-3, -2, 0}, 0, "-3 to -2, 0"},
		{[]int{1, 3, 5, 7, 9, 11, 13, 15}, 6, "1, 3, 5, 7, 9, 11, …"},
		{[]int{1, 3, 5, 7, 9, 11}, 6, "1, 3, 5, 7, 9, 11"},
	}
	for _, tc := range tests {
		if got := Ranges(tc.nums, tc.max); got != tc.want {
			t.Errorf("Ranges(%v, %d) = %q, want %q", tc.nums, tc.max, got, tc.want)
		}
	}
}
