package analysis

import (
	"context"
	"math"
	"testing"

	"reticle/cell"
)

// TestWeighByPattern: with the demo's cubic F cell (the lattice it was
// made with) and its primitive cubic cell made equally likely by the
// lines, the whole-pattern fits put the F cell first: the P cell's
// extra reflections find no counts and cost their parameters. The two
// fitted candidates keep the probability they had together, and each
// carries its fit.
func TestWeighByPattern(t *testing.T) {
	a := demo(t, Settings{})
	f, p := -1, -1
	for i, c := range a.Candidates {
		switch ce := c.Cell(); {
		case ce.System == cell.Cubic && ce.Centring == cell.F && f < 0:
			f = i
		case ce.System == cell.Cubic && ce.Centring == cell.P && p < 0:
			p = i
		}
	}
	if f < 0 || p < 0 {
		t.Fatal("the demo lacks its cubic F or cubic P candidate")
	}
	// The P cell first and equally likely, the rest out of the way.
	cf, cp := a.Candidates[f], a.Candidates[p]
	cp.Probability, cf.Probability = 0.5, 0.5
	a.Candidates = []Candidate{cp, cf}
	if err := weighByPattern(context.Background(), a, a.Extraction, a.Settings); err != nil {
		t.Fatal(err)
	}
	first := a.Candidates[0]
	if first.Cell().Centring != cell.F || !(first.Probability > 0.9) {
		t.Errorf("first %s with probability %.3f", first.Cell(), first.Probability)
	}
	var sum float64
	for _, c := range a.Candidates {
		sum += c.Probability
		if c.Evidence == nil || c.Evidence.Err != "" || !(c.Evidence.Rwp > 0) {
			t.Errorf("%s: evidence %+v", c.Cell(), c.Evidence)
		}
	}
	if math.Abs(sum-1) > 1e-9 {
		t.Errorf("the probabilities sum to %g, were 1", sum)
	}
}
