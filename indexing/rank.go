package indexing

import (
	"math"
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
