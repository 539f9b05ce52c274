package indexing

import (
	"reticle/cell"

	"math"
	"sort"
)

// poissonTail returns P(X ≥ k) for a Poisson variable of mean lambda.
func poissonTail(k int, lambda float64) float64 {
	term, sum := math.Exp(-lambda), 0.0
	for j := 0; j < k; j++ {
		sum += term
		term *= lambda / float64(j+1)
	}
	return math.Max(0, 1-sum)
}

// family groups systems whose cells share axes: hexagonal and
// rhombohedral (hexagonal axes) are one.
func family(s cell.System) cell.System {
	if s == cell.Rhombohedral {
		return cell.Hexagonal
	}
	return s
}

// sameSet reports whether two sorted lists of Q cover each other: every
// value of each lies within 3e-3 relative of a value of the other (two
// descriptions of one lattice whose splittings fall below the windows).
func sameSet(a, b []float64) bool {
	return covers(a, b) && covers(b, a)
}

// covers reports whether every value of b lies within 3e-3 relative of a
// value of the sorted list a.
func covers(a, b []float64) bool {
	for _, q := range b {
		i := sort.SearchFloat64s(a, q*(1-3e-3))
		if i == len(a) || a[i] > q*(1+3e-3) {
			return false
		}
	}
	return true
}
