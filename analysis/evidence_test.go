package analysis

import (
	"context"
	"math"
	"testing"

	"reticle/cell"
	"reticle/internal/synth"
)

// rockSalt returns the relative height of a reflection of a cubic F cell
// whose all-odd reflections are the fraction odd of the all-even ones,
// as the difference of two scatterers' factors makes them in the
// rock-salt structure: multiplicity × the Lorentz–polarisation factor
// (1 + cos²2θ)/(sin²θ cos θ) (common practice), without the generator's
// default pseudo-random factor, which would weaken some odd lines more
// than others.
func rockSalt(odd float64) func(h cell.HKL, tt float64, mult int) float64 {
	return func(h cell.HKL, tt float64, mult int) float64 {
		th := tt * math.Pi / 360
		lp := (1 + math.Pow(math.Cos(2*th), 2)) / (math.Sin(th) * math.Sin(th) * math.Cos(th))
		v := float64(mult) * lp
		if h[0]%2 != 0 {
			v *= odd
		}
		return v
	}
}

// weighPair runs the analysis of a simulated rock-salt-like scan, makes
// its cubic F cell and the primitive cubic cell of half its edge (whose
// lines are the F cell's all-even ones) the only candidates, the P cell
// first and both as likely, and weighs them by the pattern.
func weighPair(t *testing.T, odd float64, seed uint64) (p, f Candidate) {
	t.Helper()
	fc := cell.Cell{System: cell.Cubic, Centring: cell.F, A: 5.64, B: 5.64, C: 5.64, Alpha: 90, Beta: 90, Gamma: 90}
	scan := simulated(t, seed, synth.Instrument{}, synth.Phase{Cell: fc, Height: rockSalt(odd)})
	a, err := Run(context.Background(), scan, Settings{LinesOnly: true}, nil)
	if err != nil {
		t.Fatal(err)
	}
	pi, fi := -1, -1
	for i, c := range a.Candidates {
		ce := c.Cell()
		switch {
		case ce.System == cell.Cubic && ce.Centring == cell.F && math.Abs(ce.A-5.64) < 0.01 && fi < 0:
			fi = i
		case ce.System == cell.Cubic && ce.Centring == cell.P && math.Abs(ce.A-2.82) < 0.01 && pi < 0:
			pi = i
		}
	}
	if pi < 0 || fi < 0 {
		t.Fatalf("odd %g: the candidates lack cubic P a=2.82 (%d) or cubic F a=5.64 (%d)", odd, pi, fi)
	}
	cp, cf := a.Candidates[pi], a.Candidates[fi]
	if cp.Refined == nil {
		t.Fatal("the P cell was not refined")
	}
	cp.Probability, cf.Probability = 0.5, 0.5
	a.Candidates = []Candidate{cp, cf}
	if err := weighByPattern(context.Background(), a, a.Extraction, a.Settings); err != nil {
		t.Fatal(err)
	}
	var sum float64
	for _, c := range a.Candidates {
		sum += c.Probability
		if c.Evidence == nil {
			t.Fatalf("odd %g: %s has no evidence", odd, c.Cell())
		}
	}
	if math.Abs(sum-1) > 1e-9 {
		t.Errorf("odd %g: the probabilities sum to %g, were 1", odd, sum)
	}
	for _, c := range a.Candidates {
		if c.Cell().Centring == cell.F {
			f = c
		} else {
			p = c
		}
	}
	return p, f
}

// TestWeighByPattern: a cubic F pattern whose all-odd lines are weak
// leaves its primitive cell of half the edge (which has the even lines)
// as likely by the line positions. The whole pattern measures the odd
// lines: present at 0.07 % of the even ones (about one esd of the counts
// at their maxima), they put the F cell first at 90 % or more whenever
// none of them was picked as a peak (a picked one leaves the decision
// to the line positions; so at least half of the scans); absent, they
// leave both cells as the line positions had them (the pattern never
// counts missing lines twice).
func TestWeighByPattern(t *testing.T) {
	const scans = 6
	weighed := 0
	for seed := uint64(1); seed <= scans; seed++ {
		p, f := weighPair(t, 0.0007, seed)
		t.Logf("seed %d, odd lines present: F %.3f (%d extra lines, ln K %.2f), P %.3f", seed, f.Probability, f.Evidence.Extra, f.Evidence.LogBayes, p.Probability)
		if f.Evidence.Compared {
			weighed++
			if !(f.Probability > 0.9) || f.Rank != 1 {
				t.Errorf("seed %d, odd lines present: F %.3f, rank %d", seed, f.Probability, f.Rank)
			}
		} else if !(f.Probability == 0.5 && p.Probability == 0.5) {
			t.Errorf("seed %d, not weighed: F %.3f, P %.3f, want both 0.5", seed, f.Probability, p.Probability)
		}
		p, f = weighPair(t, 0, seed)
		if !f.Evidence.Compared || math.Abs(f.Probability-0.5) > 1e-9 || math.Abs(p.Probability-0.5) > 1e-9 {
			t.Errorf("seed %d, odd lines absent: F %.3f, P %.3f (weighed %v), want both 0.5, weighed", seed, f.Probability, p.Probability, f.Evidence.Compared)
		}
	}
	if weighed < scans/2 {
		t.Errorf("odd lines present: %d of %d scans weighed, want %d or more", weighed, scans, scans/2)
	}
}
