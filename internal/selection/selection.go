// Package selection finds order statistics of float64 samples without a
// full sort (Hoare's selection), for the survey's medians and the yield
// intervals' quantiles.
package selection

import "slices"

// Kth reorders x so that x[k] holds the value a sort would put
// there, with no greater value before it and no smaller one after it
// (quickselect, median-of-three pivot, three-way partition so that runs
// of equal values end it at once; a sort after 64 rounds bounds the
// worst case). x holds no NaN.
func Kth(x []float64, k int) {
	for round := 0; len(x) > 1; round++ {
		if round == 64 {
			slices.Sort(x)
			return
		}
		a, b, c := x[0], x[len(x)/2], x[len(x)-1]
		pivot := max(min(a, b), min(max(a, b), c))
		// x[:lt] < pivot, x[lt:i] == pivot, x[gt:] > pivot.
		lt, i, gt := 0, 0, len(x)
		for i < gt {
			switch v := x[i]; {
			case v < pivot:
				x[lt], x[i] = v, x[lt]
				lt++
				i++
			case v > pivot:
				gt--
				x[gt], x[i] = v, x[gt]
			default:
				i++
			}
		}
		switch {
		case k < lt:
			x = x[:lt]
		case k >= gt:
			x, k = x[gt:], k-gt
		default:
			return
		}
	}
}
