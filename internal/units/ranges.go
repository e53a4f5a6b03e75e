package units

import (
	"slices"
	"strconv"
	"strings"
)

// Ranges writes whole numbers (stroke ids, segment numbers) as sorted
// ranges of consecutive ones, "2 to 47, 170", each number once; when
// maxParts > 0, the ranges beyond the first maxParts are written "…".
// The ranges are spelled with "to", not with a dash, so that they never
// read as NoValue or as a negative number on the command line.
func Ranges(nums []int, maxParts int) string {
	nums = slices.Clone(nums)
	slices.Sort(nums)
	nums = slices.Compact(nums)
	var parts []string
	for i := 0; i < len(nums); {
		j := i
		for j+1 < len(nums) && nums[j+1] == nums[j]+1 {
			j++
		}
		if maxParts > 0 && len(parts) == maxParts {
			parts = append(parts, "…")
			break
		}
		if j == i {
			parts = append(parts, strconv.Itoa(nums[i]))
		} else {
			parts = append(parts, strconv.Itoa(nums[i])+" to "+strconv.Itoa(nums[j]))
		}
		i = j + 1
	}
	return strings.Join(parts, ", ")
}
