package indexing

import (
	"math"
	"testing"
)

// TestBinomialTail checks the binomial tail against sums of binomial
// coefficients worked by hand: P(X ≥ 3) of 10 fair trials is
// 1 − (1 + 10 + 45)/1024; P(X ≥ 2) of 4 trials at 0.1 is
// 1 − 0.9⁴ − 4·0.1·0.9³; P(X ≥ n) is pⁿ.
func TestBinomialTail(t *testing.T) {
	for _, c := range []struct {
		n, k int
		p    float64
		want float64
	}{
		{10, 3, 0.5, 1 - 56.0/1024},
		{4, 2, 0.1, 1 - 0.6561 - 0.2916},
		{5, 5, 0.3, 0.00243},
		{7, 0, 0.2, 1},
		{6, 7, 0.2, 0},
	} {
		if got := binomialTail(c.n, c.k, c.p); math.Abs(got-c.want) > 1e-12 {
			t.Errorf("binomialTail(%d, %d, %g) = %g, want %g", c.n, c.k, c.p, got, c.want)
		}
	}
}

// TestUnexplainedLater: a cell that indexes every one of the first 20
// lines and leaves 6 of the next 20 unindexed was fitted to the first
// alone (the chance of 6 or more at the rate 1/22 is below 1 %); one
// that leaves 2 of the first and 3 of the next is not.
func TestUnexplainedLater(t *testing.T) {
	mk := func(first, later int) *cand {
		ref := make([]int, 40)
		for i := range first {
			ref[i] = -1
		}
		for i := range later {
			ref[20+i] = -1
		}
		return &cand{whole: &cand{ref: ref}}
	}
	if !unexplainedLater(mk(0, 6), 20) {
		t.Error("0 and 6 unindexed: want the search repeated")
	}
	if unexplainedLater(mk(2, 3), 20) {
		t.Error("2 and 3 unindexed: want no repeat")
	}
}
