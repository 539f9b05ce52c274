// Package order selects order statistics (the k-th smallest value) without sorting.
package order

import "slices"

// Nth returns the value of rank k (0-based) of v, the element that
// sorting v would put at index k. It reorders v. The selection is
// Hoare's (quickselect) with a median-of-three pivot, linear on average;
// a range that has not shrunk fast enough is sorted instead, so the worst
// case stays n log n.
func Nth(v []float64, k int) float64 {
	lo, hi := 0, len(v)-1
	for rounds := 0; lo < hi; rounds++ {
		if rounds > 48 {
			slices.Sort(v[lo : hi+1])
			break
		}
		mid := lo + (hi-lo)/2
		// Order v[lo], v[mid], v[hi]; the middle one is the pivot.
		if v[mid] < v[lo] {
			v[mid], v[lo] = v[lo], v[mid]
		}
		if v[hi] < v[lo] {
			v[hi], v[lo] = v[lo], v[hi]
		}
		if v[hi] < v[mid] {
			v[hi], v[mid] = v[mid], v[hi]
		}
		p := v[mid]
		i, j := lo, hi
		for i <= j {
			for v[i] < p {
				i++
			}
			for p < v[j] {
				j--
			}
			if i <= j {
				v[i], v[j] = v[j], v[i]
				i++
				j--
			}
		}
		switch {
		case k <= j:
			hi = j
		case k >= i:
			lo = i
		default:
			return v[k]
		}
	}
	return v[k]
}

// Median returns the median of v (not empty): the middle value, or the
// mean of the two middle values of an even count. v is left as it is.
func Median(v []float64) float64 {
	s := append([]float64(nil), v...)
	n := len(s)
	hi := Nth(s, n/2)
	if n%2 == 1 {
		return hi
	}
	return 0.5 * (slices.Max(s[:n/2]) + hi)
}
