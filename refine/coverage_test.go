package refine

import (
	"context"
	"math"
	"math/rand/v2"
	"os"
	"testing"
)

// TestCoverage checks that the uncertainties are honest: over many
// simulated line lists with Gaussian errors of known σ, the refined
// parameters fall within one esd of the truth about 68.3 % of the time and
// within two esds about 95.4 % (the normal distribution's 1σ and 2σ
// fractions). Each system gets its draws in thirds: without corrections,
// with a zero shift refined, and with a zero shift and a displacement
// refined. RETICLE_LONG=1 runs 6,000 draws per system with limits
// 0.68 ± 0.03 and 0.95 ± 0.015; the default 1,200 draws are held to
// 0.68 ± 0.04 and 0.95 ± 0.02 (about three binomial standard deviations).
func TestCoverage(t *testing.T) {
	draws, tol1, tol2 := 1200, 0.04, 0.02
	if os.Getenv("RETICLE_LONG") != "" {
		draws, tol1, tol2 = 6000, 0.03, 0.015
	}
	if testing.Short() {
		draws = 120
	}
	for _, c := range testCells {
		t.Run(c.System.String(), func(t *testing.T) {
			rng := rand.New(rand.NewPCG(uint64(c.System)+1, 7))
			within1, within2 := map[string]int{}, map[string]int{}
			count := map[string]int{}
			for d := 0; d < draws; d++ {
				tr := truth{cell: c, radius: 240}
				opt := Options{Wavelength: cuKa1, Radius: 240}
				switch d % 3 {
				case 1:
					tr.zero = 0.2*rng.Float64() - 0.1
					opt.Corrections = Zero
				case 2:
					tr.zero = 0.2*rng.Float64() - 0.1
					tr.disp = 0.2*rng.Float64() - 0.1
					opt.Corrections = Zero | Displacement
				}
				obs := synthLines(tr, rng)
				// Start away from the truth, as a real refinement does.
				start := c
				start.A *= 1.0005
				start.B *= 1.0005
				start.C *= 0.9995
				start = start.Symmetrize()
				res, err := Refine(context.Background(), start, obs, opt)
				if err != nil {
					t.Fatal(err)
				}
				want := truthParams(tr)
				for _, p := range res.Params {
					z := math.Abs(p.Value-want[p.Name]) / p.ESD
					count[p.Name]++
					if z <= 1 {
						within1[p.Name]++
					}
					if z <= 2 {
						within2[p.Name]++
					}
				}
			}
			for _, name := range []string{"a", "b", "c", "alpha", "beta", "gamma", "zero", "displacement"} {
				n := count[name]
				if n == 0 {
					continue
				}
				f1, f2 := float64(within1[name])/float64(n), float64(within2[name])/float64(n)
				t.Logf("%s: %d draws, within 1 esd %.3f, within 2 esd %.3f", name, n, f1, f2)
				if testing.Short() {
					continue
				}
				if math.Abs(f1-0.683) > tol1 || math.Abs(f2-0.954) > tol2 {
					t.Errorf("%s: within 1 esd %.3f (want 0.683 ± %g), within 2 esd %.3f (want 0.954 ± %g)", name, f1, tol1, f2, tol2)
				}
			}
		})
	}
}
