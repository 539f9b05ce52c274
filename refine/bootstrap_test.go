package refine

import (
	"math"
	"math/rand/v2"
	"testing"
)

// TestCoverageScale: departures drawn from a normal distribution of
// standard deviation 2 give an esd of 2 (within the 4 % a 68th percentile
// of 20,000 draws scatters by, about), whatever the covariance handed in;
// drawn from a mixture of 90 % N(0, 1) and 10 % N(0, 10²), the esd is
// the mixture's 68.27 % half-width, 1.15 (solved numerically from the
// mixture's distribution function), not its root-mean-square of 3.3. The
// correlation handed in is kept.
func TestCoverageScale(t *testing.T) {
	rng := rand.New(rand.NewPCG(5, 6))
	const n = 20000
	dep := [][]float64{make([]float64, n), make([]float64, n)}
	for k := 0; k < n; k++ {
		dep[0][k] = 2 * rng.NormFloat64()
		s := 1.0
		if rng.Float64() < 0.1 {
			s = 10
		}
		dep[1][k] = s * rng.NormFloat64()
	}
	cov := [][]float64{{9, 0.5 * 3 * 5}, {0.5 * 3 * 5, 25}}
	coverageScale(cov, dep)
	for i, want := range []float64{2, mixtureHalfWidth(0.1, 10)} {
		if got := math.Sqrt(cov[i][i]); math.Abs(got-want) > 0.04*want {
			t.Errorf("parameter %d: esd %.3f, want %.3f", i, got, want)
		}
	}
	if r := cov[0][1] / math.Sqrt(cov[0][0]*cov[1][1]); math.Abs(r-0.5) > 1e-12 {
		t.Errorf("correlation %.6f, want 0.5", r)
	}
}

// mixtureHalfWidth returns h with P(|x| ≤ h) = 0.6827 for x drawn from
// N(0, 1) with probability 1 − w and N(0, s²) with probability w, by
// bisection.
func mixtureHalfWidth(w, s float64) float64 {
	p := func(h float64) float64 {
		return (1-w)*math.Erf(h/math.Sqrt2) + w*math.Erf(h/(s*math.Sqrt2))
	}
	lo, hi := 0.0, 10.0
	for i := 0; i < 100; i++ {
		if mid := (lo + hi) / 2; p(mid) < coverageQuantile {
			lo = mid
		} else {
			hi = mid
		}
	}
	return (lo + hi) / 2
}
