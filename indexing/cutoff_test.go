package indexing

import (
	"math"
	"math/rand/v2"
	"testing"

	"reticle/cell"
)

// TestCutoffBound checks the bound of cutoff on random lattices against
// the lines of random cells: whenever a count stops at the limit for a
// threshold score, the lattice's full count scores below that
// threshold, so stopping loses no lattice that would be kept.
func TestCutoffBound(t *testing.T) {
	rng := rand.New(rand.NewPCG(2026, 12))
	stopped := 0
	for trial := 0; trial < 6; trial++ {
		ls, lambda, _ := randomCase(rng, randomCell(rng, cell.Triclinic, cell.P))
		o := Options{Wavelength: lambda}.withDefaults()
		qs, ws := zoneLines(ls, o)
		need := len(qs) - o.MaxImpurities
		qmax := qs[len(qs)-1] + ws[len(ws)-1]
		set := newLineSet(qs, ws, qmax)
		for k := 0; k < 300; k++ {
			// A random lattice, dense enough (edges up to three times
			// a random cell's) to index most lines by chance.
			f := randomCell(rng, cell.Triclinic, cell.P).QForm()
			for i := range f {
				f[i] /= 1 + 8*rng.Float64()
			}
			threshold := 1 + 20*rng.Float64()
			cut := newCutoff(1, threshold, qs, ws, need)
			n, fig := set.count(f, cut.limit())
			full, ffig := set.count(f, math.MaxInt32)
			if n == 0 && full >= need {
				stopped++
				if score := ffig * math.Pow(0.84, float64(len(qs)-full)); score >= threshold {
					t.Fatalf("trial %d: count stopped at %d lines for threshold %.3g, but the full count scores %.3g", trial, cut.limit(), threshold, score)
				}
			}
			if n > 0 && (n != full || fig != ffig) {
				t.Fatalf("trial %d: a finished count differs from the unlimited one: %d %g against %d %g", trial, n, fig, full, ffig)
			}
		}
	}
	if stopped == 0 {
		t.Fatal("no count stopped at its limit: the test checks nothing")
	}
	t.Logf("%d counts stopped at their limit", stopped)
}

// zoneLines returns the Q of the lines and their windows as the zone
// search takes them at no zero offset.
func zoneLines(ls []cell.Line, o Options) (qs, ws []float64) {
	qs = make([]float64, len(ls))
	ws = make([]float64, len(ls))
	for i, l := range ls {
		qs[i] = qOf(l.TwoTheta, 0, o.Wavelength)
		ws[i] = dQ(l.TwoTheta, o.Tolerance+screenExtra, o.Wavelength)
	}
	return qs, ws
}
