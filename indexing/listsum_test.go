package indexing

import (
	"math"
	"testing"

	"reticle/cell"
)

// TestListFoldsLaterDuplicates: a second description of the first cell,
// ranked last (a copy of the first candidate after one of a cell with c
// doubled), is listed with the first, which takes the probability of
// both, however many cells the list holds: also when the list is full
// before the copy is reached. Cells invented.
func TestListFoldsLaterDuplicates(t *testing.T) {
	truth := cell.Must(cell.Orthorhombic, cell.P, 4.1, 5.3, 6.7)
	doubled := truth
	doubled.C *= 2
	o, all, first, k := settledOn(t, truth, truth, 3, screenExtra)
	_, _, _, kd := settledOn(t, truth, doubled, 3, screenExtra)
	ranked := rankCands([]*cand{k, kd}, first, all, o)
	if len(ranked) != 2 || !sameCell(ranked[0].whole.c, truth, 1e-3) {
		t.Fatalf("ranked %d cells, first %v; want 2, first %v", len(ranked), ranked[0].whole.c, truth)
	}
	dup := *ranked[0]
	ranked = append(ranked, &dup)
	probs := probabilities(ranked, all, spanOf(o, all))
	want := probs[0] + probs[2]
	if !(probs[2] > 0) {
		t.Fatalf("the copy's probability is %g; the test needs it above 0", probs[2])
	}
	for _, n := range []int{1, 2, 10} {
		o.MaxSolutions = n
		var res Result
		res.list(ranked, first, all, o)
		if got := res.Solutions[0].Probability; math.Abs(got-want) > 1e-12 {
			t.Errorf("%d listed: the first cell's probability is %.6f, want %.6f (its own %.6f and its copy's %.6f)", n, got, want, probs[0], probs[2])
		}
		if len(res.Solutions) > min(n, 2) {
			t.Errorf("%d listed: %d solutions, want at most %d (the copy is not listed apart)", n, len(res.Solutions), min(n, 2))
		}
	}
}
