package indexing

import (
	"reticle/cell"

	"context"
	"math"
	"math/rand/v2"
	"os"
	"sort"
	"strconv"
	"testing"
)

// randomCase builds the observed lines of a random cell: the calculated
// lines of the library (first 30, radiation chosen so that they fall below
// 130° 2θ, Cu K-alpha1 when that suffices), uniform noise of ±0.01°, one
// zero error up to ±0.1°, 10 % of the lines dropped and 2 foreign lines
// added at random angles away from true ones.
func randomCase(rng *rand.Rand, c cell.Cell) ([]cell.Line, float64, float64) {
	const cu = 1.5405929 // Cu K-alpha1, Hölzer et al. 1997 (from memory)
	refs := cell.Reflections(c, 40)
	if len(refs) > 30 {
		refs = refs[:30]
	}
	lambda := cu
	if dmin := refs[len(refs)-1].D; 2*dmin*math.Sin(65*deg) < cu {
		lambda = 2 * dmin * math.Sin(65*deg)
	}
	zero := (2*rng.Float64() - 1) * 0.1
	var ls []cell.Line
	var tts []float64
	for _, r := range refs {
		tt := ttOf(r.Q, lambda)
		tts = append(tts, tt)
		if rng.Float64() < 0.1 {
			continue
		}
		ls = append(ls, cell.Line{TwoTheta: tt + zero + (2*rng.Float64()-1)*0.01, ESD: 0.005})
	}
	lo, hi := tts[0]*0.8, tts[len(tts)-1]
	for added := 0; added < 2; {
		tt := lo + (hi-lo)*rng.Float64()
		far := true
		for _, t := range tts {
			far = far && math.Abs(t+zero-tt) > 0.15
		}
		if far {
			ls = append(ls, cell.Line{TwoTheta: tt, ESD: 0.005})
			added++
		}
	}
	sort.Slice(ls, func(i, j int) bool { return ls[i].TwoTheta < ls[j].TwoTheta })
	return ls, lambda, tts[min(19, len(tts)-1)]
}

// sameLattice tells whether a solution allows the truth's lines up to the
// 20th and no others, within 0.1 % in d (as the public benchmark's scorer
// judges it).
func sameLattice(truth, got cell.Cell, lambda, ttmax float64) bool {
	qmax := qOf(ttmax, 0, lambda) * 1.001
	tq := clustersOf(truth, qmax)
	gq := clustersOf(got, qmax)
	near := func(q float64, set []float64) bool {
		for _, x := range set {
			if math.Abs(q-x) <= 2e-3*q {
				return true
			}
		}
		return false
	}
	for _, q := range tq {
		if !near(q, gq) {
			return false
		}
	}
	for _, q := range gq {
		if !near(q, tq) {
			return false
		}
	}
	return true
}

func clustersOf(c cell.Cell, qmax float64) []float64 {
	var out []float64
	for _, r := range cell.Reflections(c, qmax) {
		out = append(out, r.Q)
	}
	return out
}

func randomCell(rng *rand.Rand, s cell.System, cen cell.Centring) cell.Cell {
	a := 2 + 13*rng.Float64()
	c := a
	if s != cell.Cubic {
		for {
			c = a * (0.3 + 3.7*rng.Float64())
			if c >= 2 && c <= 15*4 {
				break
			}
		}
	}
	return newCell(s, cen, a, c)
}

// TestRandomCells: over random cells per system (edges 2–15 Å, c/a
// 0.3–4, the centrings of the system drawn in turn), the true lattice must
// rank first in at least 98 % of cases. RETICLE_LONG=1 (make test-long)
// runs 500 cells per system; the default 24 keep go test quick;
// RETICLE_PROPERTY_N sets the number for a run while developing.
func TestRandomCells(t *testing.T) {
	n := 24
	if os.Getenv("RETICLE_LONG") != "" {
		n = 500
	}
	if testing.Short() {
		n = 12
	}
	if v, err := strconv.Atoi(os.Getenv("RETICLE_PROPERTY_N")); err == nil && v > 0 {
		n = v // for quicker runs while developing
	}
	for _, sys := range []struct {
		s    cell.System
		cens []cell.Centring
	}{
		{cell.Cubic, []cell.Centring{cell.P, cell.I, cell.F}},
		{cell.Tetragonal, []cell.Centring{cell.P, cell.I}},
		{cell.Hexagonal, []cell.Centring{cell.P}},
		{cell.Rhombohedral, []cell.Centring{cell.R}},
	} {
		t.Run(sys.s.String(), func(t *testing.T) {
			t.Parallel()
			rng := rand.New(rand.NewPCG(uint64(sys.s)+1, 99))
			ok := 0
			var fails []string
			for i := 0; i < n; i++ {
				tc := randomCell(rng, sys.s, sys.cens[i%len(sys.cens)])
				ls, lambda, ttmax := randomCase(rng, tc)
				res, err := Index(context.Background(), ls, Options{Wavelength: lambda}, nil)
				if err != nil {
					t.Fatal(err)
				}
				// A random cell that is metrically of higher symmetry
				// within the data (its lines are those of the higher
				// lattice to 0.1 % in d, e.g. rhombohedral with c/a = √6)
				// is correctly reported in that symmetry.
				if len(res.Solutions) > 0 && (res.Solutions[0].Cell.System == tc.System ||
					res.Solutions[0].Cell.System.LaueOrder() > tc.System.LaueOrder()) &&
					sameLattice(tc, res.Solutions[0].Cell, lambda, ttmax) {
					ok++
				} else if len(fails) < 8 {
					got := "none"
					if len(res.Solutions) > 0 {
						got = res.Solutions[0].String()
					}
					fails = append(fails, tc.String()+" → "+got)
				}
			}
			frac := float64(ok) / float64(n)
			t.Logf("%s: true cell first in %d/%d (%.1f %%)", sys.s, ok, n, 100*frac)
			for _, f := range fails {
				t.Log("  ", f)
			}
			// The 98 % requirement is stated for 500 cells; a short run
			// of a few dozen only guards against gross regressions.
			limit := 0.98
			if n < 500 {
				limit = 0.95
			}
			if frac < limit {
				t.Errorf("%s: %.1f %% < %.0f %%", sys.s, 100*frac, 100*limit)
			}
		})
	}
}
