package indexing

import "gonum.org/v1/gonum/stat/distuv"

// unexplainedLater reports whether the cell k, found from the first n
// lines, leaves significantly more of the next n lines unindexed than
// of the first n (k's refinement over all lines, k.whole, decides).
// A foreign phase's lines, or spurious ones, spread over the range, so
// the later lines are as likely to be foreign as the first; a cell
// that explains the first lines and not the next was fitted to the
// first alone (one axis guessed from a few lines), and a search on
// more lines is the better informed. Significant: a one-sided binomial
// test at 1 %, the rate of foreign lines estimated from the first n by
// Laplace's rule of succession, (u + 1)/(n + 2).
func unexplainedLater(k *cand, n int) bool {
	w := k.whole
	if w == nil || len(w.ref) <= n {
		return false
	}
	u1, u2, n2 := 0, 0, 0
	for i, j := range w.ref[:min(len(w.ref), 2*n)] {
		switch {
		case i < n && j < 0:
			u1++
		case i >= n:
			n2++
			if j < 0 {
				u2++
			}
		}
	}
	p := float64(u1+1) / float64(n+2)
	return binomialTail(n2, u2, p) < laterLevel
}

// laterLevel is the significance of unexplainedLater's test.
const laterLevel = 0.01

// binomialTail returns the probability of k or more successes in n
// trials of probability p.
func binomialTail(n, k int, p float64) float64 {
	if k <= 0 {
		return 1
	}
	return distuv.Binomial{N: float64(n), P: p}.Survival(float64(k - 1))
}
